package main

import "testing"

// --memory reads sizes with their units: binary prefixes are powers of
// 1024 and decimal ones powers of 1000 (IEC 80000-13, binary prefixes;
// SI for kB, MB, GB).
func TestMemorySizes(t *testing.T) {
	cases := []struct {
		in   string
		want int64
		ok   bool
	}{
		{"512MiB", 512 << 20, true},
		{"4GiB", 4 << 30, true},
		{"2GB", 2_000_000_000, true},
		{"800 MB", 800_000_000, true},
		{" 1MiB ", 1 << 20, true},
		{"1MB", 0, false}, // 10^6 bytes: below the least accepted, 1 MiB
		{"12", 0, false},
		{"-4GiB", 0, false},
		{"four gigabytes", 0, false},
		{"", 0, false},
	}
	for _, c := range cases {
		var got int64
		err := (&sizeValue{p: &got}).Set(c.in)
		if (err == nil) != c.ok || (c.ok && got != c.want) {
			t.Errorf("%q: %d, %v; want %d (accepted %v)", c.in, got, err, c.want, c.ok)
		}
	}
	if s := (&sizeValue{p: new(int64(512 << 20))}).String(); s != "512MiB" {
		t.Errorf("default shown as %q, want 512MiB", s)
	}
}
