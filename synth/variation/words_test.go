package variation

import "testing"

// TestPlural: the singular for one only; zero and many take the plural
// (English grammar).
func TestPlural(t *testing.T) {
	for n, want := range map[int]string{0: "samples", 1: "sample", 2: "samples", 10000: "samples"} {
		if got := Plural(n, "sample", "samples"); got != want {
			t.Errorf("Plural(%d) = %q, want %q", n, got, want)
		}
	}
}
