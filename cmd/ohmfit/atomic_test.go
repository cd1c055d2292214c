package main

import (
	"errors"
	"io"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// dirEntries lists a directory's names, to catch left-over temporary files.
func dirEntries(t *testing.T, dir string) []string {
	t.Helper()
	es, err := os.ReadDir(dir)
	if err != nil {
		t.Fatal(err)
	}
	var names []string
	for _, e := range es {
		names = append(names, e.Name())
	}
	return names
}

func readString(t *testing.T, path string) string {
	t.Helper()
	b, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	return string(b)
}

func TestWriteAtomicWrites(t *testing.T) {
	dir := t.TempDir()
	out := filepath.Join(dir, "bom.csv")
	if err := os.WriteFile(out, []byte("old contents\n"), 0o600); err != nil {
		t.Fatal(err)
	}
	body := strings.Repeat("R1,4k7,0603\n", 10000) // larger than any write buffer
	err := writeAtomic(out, []string{filepath.Join(dir, "t.yaml")}, func(w io.Writer) error {
		_, err := io.WriteString(w, body)
		return err
	})
	if err != nil {
		t.Fatal(err)
	}
	if got := readString(t, out); got != body {
		t.Errorf("file holds %d bytes, want %d", len(got), len(body))
	}
	if names := dirEntries(t, dir); len(names) != 1 {
		t.Errorf("directory holds %v, want only bom.csv", names)
	}
}

// TestWriteAtomicFailure: a write that fails part way, after more than a
// buffer's worth of output, leaves no partial file, no temporary file, and
// an older file of that name untouched.
func TestWriteAtomicFailure(t *testing.T) {
	boom := errors.New("disk on fire")
	failing := func(w io.Writer) error {
		if _, err := io.WriteString(w, strings.Repeat("x", 1<<20)); err != nil {
			return err
		}
		return boom
	}
	t.Run("new file", func(t *testing.T) {
		dir := t.TempDir()
		out := filepath.Join(dir, "plot.svg")
		err := writeAtomic(out, nil, failing)
		if err == nil || !strings.Contains(err.Error(), boom.Error()) || exitCodeOf(err) != ExitBadInput {
			t.Errorf("err = %v (exit %d), want it to name the cause and exit 2", err, exitCodeOf(err))
		}
		if names := dirEntries(t, dir); len(names) != 0 {
			t.Errorf("failed write left %v", names)
		}
	})
	t.Run("old file kept", func(t *testing.T) {
		dir := t.TempDir()
		out := filepath.Join(dir, "plot.svg")
		if err := os.WriteFile(out, []byte("<svg/>\n"), 0o644); err != nil {
			t.Fatal(err)
		}
		if err := writeAtomic(out, nil, failing); err == nil {
			t.Fatal("failed write reported success")
		}
		if got := readString(t, out); got != "<svg/>\n" {
			t.Errorf("old file now holds %q", got[:min(len(got), 40)])
		}
		if names := dirEntries(t, dir); len(names) != 1 {
			t.Errorf("failed write left %v", names)
		}
	})
	t.Run("panic", func(t *testing.T) {
		dir := t.TempDir()
		out := filepath.Join(dir, "bom.csv")
		func() {
			defer func() { _ = recover() }()
			_ = writeAtomic(out, nil, func(w io.Writer) error {
				io.WriteString(w, "half")
				panic("renderer bug")
			})
		}()
		if names := dirEntries(t, dir); len(names) != 0 {
			t.Errorf("panicking write left %v", names)
		}
	})
	t.Run("no such directory", func(t *testing.T) {
		dir := t.TempDir()
		out := filepath.Join(dir, "missing", "bom.csv")
		err := writeAtomic(out, nil, func(w io.Writer) error { return nil })
		if err == nil || exitCodeOf(err) != ExitBadInput || strings.Contains(err.Error(), ".tmp") {
			t.Errorf("err = %v, want a bad-input error that names no temporary file", err)
		}
		if names := dirEntries(t, dir); len(names) != 0 {
			t.Errorf("left %v", names)
		}
	})
	t.Run("directory in the way", func(t *testing.T) {
		dir := t.TempDir()
		if err := writeAtomic(dir, nil, func(w io.Writer) error { return nil }); err == nil {
			t.Error("wrote over a directory")
		}
	})
}

// TestWriteAtomicRefusesInputs: an output that names an input of the run,
// however it is spelt, is refused and the input is left as it was.
func TestWriteAtomicRefusesInputs(t *testing.T) {
	dir := t.TempDir()
	in := filepath.Join(dir, "divider.yaml")
	const tpl = "ohmfit: 1\n"
	if err := os.WriteFile(in, []byte(tpl), 0o644); err != nil {
		t.Fatal(err)
	}
	link := filepath.Join(dir, "link.yaml")
	if err := os.Symlink(in, link); err != nil {
		t.Skipf("no symlinks here: %v", err)
	}
	hard := filepath.Join(dir, "hard.yaml")
	if err := os.Link(in, hard); err != nil {
		t.Skipf("no hard links here: %v", err)
	}
	for _, out := range []string{
		in,
		filepath.Join(dir, ".", "divider.yaml"),
		filepath.Join(dir, "sub", "..", "divider.yaml"),
		link, // a symlink to the input
		hard, // another name for the same file
	} {
		err := writeAtomic(out, []string{"", in}, func(w io.Writer) error {
			_, err := io.WriteString(w, "clobbered")
			return err
		})
		if err == nil || exitCodeOf(err) != ExitBadInput || !strings.Contains(err.Error(), "input") {
			t.Errorf("writeAtomic(%s) = %v, want a refusal naming the input", out, err)
		}
		if got := readString(t, in); got != tpl {
			t.Fatalf("input now holds %q", got)
		}
	}
	if names := dirEntries(t, dir); len(names) != 3 {
		t.Errorf("directory holds %v, want the input and its two links", names)
	}
}
