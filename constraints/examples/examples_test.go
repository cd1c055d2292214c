package examples

import (
	"bytes"
	"io/fs"
	"os"
	"path/filepath"
	"slices"
	"strings"
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

// TestBoardCopiesMatch keeps testdata/examples/boards byte-identical to the
// embedded boards directory, file for file in both directions, so that a
// built-in board and its copy on disk give the same answer.
func TestBoardCopiesMatch(t *testing.T) {
	dir := filepath.Join("..", "..", "testdata", "examples", "boards")
	var disk, emb []string
	err := filepath.WalkDir(dir, func(p string, d fs.DirEntry, err error) error {
		if err == nil && !d.IsDir() {
			rel, _ := filepath.Rel(dir, p)
			disk = append(disk, filepath.ToSlash(rel))
		}
		return err
	})
	if err != nil {
		t.Fatal(err)
	}
	err = fs.WalkDir(boards, "boards", func(p string, d fs.DirEntry, err error) error {
		if err == nil && !d.IsDir() {
			emb = append(emb, strings.TrimPrefix(p, "boards/"))
		}
		return err
	})
	if err != nil {
		t.Fatal(err)
	}
	slices.Sort(disk)
	slices.Sort(emb)
	if !slices.Equal(disk, emb) {
		t.Fatalf("testdata/examples/boards holds %v, embedded %v", disk, emb)
	}
	for _, rel := range emb {
		e, ok := BoardFile(rel)
		d, err := os.ReadFile(filepath.Join(dir, filepath.FromSlash(rel)))
		if !ok || err != nil || !bytes.Equal(e, d) {
			t.Errorf("%s differs from its copy in testdata/examples/boards", rel)
		}
	}
	if len(BoardNames()) == 0 {
		t.Error("no built-in board")
	}
	for _, bad := range []string{"../examples.go", "/etc/passwd", "controller/../../examples.go", ""} {
		if _, ok := BoardFile(bad); ok {
			t.Errorf("BoardFile(%q) found a file outside the boards", bad)
		}
	}
}
