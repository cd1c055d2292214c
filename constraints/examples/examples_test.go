package examples

import (
	"bytes"
	"os"
	"path/filepath"
	"slices"
	"testing"
)

// TestCopiesMatch keeps testdata/examples (used by CLI tests and docs)
// byte-identical to the embedded files, in both directions.
func TestCopiesMatch(t *testing.T) {
	dir := filepath.Join("..", "..", "testdata", "examples")
	onDisk, err := filepath.Glob(filepath.Join(dir, "*.yaml"))
	if err != nil {
		t.Fatal(err)
	}
	var diskNames []string
	for _, p := range onDisk {
		diskNames = append(diskNames, filepath.Base(p[:len(p)-len(".yaml")]))
	}
	slices.Sort(diskNames)
	if !slices.Equal(diskNames, Names()) {
		t.Errorf("testdata/examples holds %v, embedded %v", diskNames, Names())
	}
	for _, name := range Names() {
		emb, _ := Get(name)
		disk, err := os.ReadFile(filepath.Join(dir, name+".yaml"))
		if err != nil {
			t.Error(err)
			continue
		}
		if !bytes.Equal(emb, disk) {
			t.Errorf("%s.yaml differs from its copy in testdata/examples", name)
		}
	}
}

func TestNamesGetSummary(t *testing.T) {
	names := Names()
	if !slices.IsSorted(names) || len(names) < 4 {
		t.Fatalf("Names() = %v", names)
	}
	cases := []struct {
		name    string
		found   bool
		summary string
	}{
		{"feedback", true, "Regulator feedback, 1.8 V rail"},
		{"divider", true, "5 V to 3.3 V logic divider"},
		{"nonesuch", false, ""},
		{"../examples", false, ""},
	}
	for _, c := range cases {
		data, ok := Get(c.name)
		if ok != c.found || (ok && len(data) == 0) {
			t.Errorf("Get(%q) = %d bytes, %v", c.name, len(data), ok)
		}
		if got := Summary(c.name); got != c.summary {
			t.Errorf("Summary(%q) = %q, want %q", c.name, got, c.summary)
		}
	}
}
