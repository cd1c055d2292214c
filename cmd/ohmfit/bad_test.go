package main

import (
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// badDir is the shared corpus of templates with one mistake each. Files
// directly in it are refused by the loader, files in network/ by the
// network checks; both state the whole expected "line:col: message" on
// their first line ("# want: ..."), the one place a case's message lives.
// Files in raw/ cannot carry a comment (an empty file, a binary one) and are
// checked by their golden files, as is the file made at run time.
var badDir = filepath.Join("..", "..", "testdata", "bad")

// TestBadInputs runs `ohmfit fit FILE` and `ohmfit solve FILE` on every file
// of the bad corpus, and on files too large to commit made here: each must
// exit 2 with exactly one line on stderr and nothing on stdout, and the
// line must be the file's own "# want:" line after the file name, or, for a
// file that cannot carry one, the golden copy in testdata/bad.
func TestBadInputs(t *testing.T) {
	var files []string
	for _, pat := range []string{"*.yaml", filepath.Join("network", "*.yaml"), filepath.Join("raw", "*")} {
		m, err := filepath.Glob(filepath.Join(badDir, pat))
		if err != nil {
			t.Fatal(err)
		}
		files = append(files, m...)
	}
	if len(files) < 20 {
		t.Fatalf("found %d bad templates in %s, want the whole corpus", len(files), badDir)
	}
	for _, f := range files {
		rel, _ := filepath.Rel(badDir, f)
		name := strings.ReplaceAll(strings.TrimSuffix(rel, filepath.Ext(rel)), string(filepath.Separator), "-")
		t.Run(name, func(t *testing.T) {
			data, err := os.ReadFile(f)
			if err != nil {
				t.Fatal(err)
			}
			if first, _, _ := strings.Cut(string(data), "\n"); strings.HasPrefix(first, "# want: ") {
				badRuns(t, f, errorLabel+f+":"+strings.TrimPrefix(first, "# want: "))
			} else if strings.HasPrefix(rel, "raw") {
				golden(t, filepath.Join("bad", name), badRuns(t, f, ""))
			} else {
				t.Fatalf("first line %q does not start with \"# want: \"", first)
			}
		})
	}

	// Files made here: a 100 MB one (refused by its size before it is
	// read) and an empty one; the golden copies show the directory as TMP.
	dir := t.TempDir()
	huge := filepath.Join(dir, "huge.yaml")
	hf, err := os.Create(huge)
	if err != nil {
		t.Fatal(err)
	}
	// A real header, then a sparse tail: the size is what matters.
	if _, err := hf.WriteString("ohmfit: 1\nparts:\n"); err != nil {
		t.Fatal(err)
	}
	if err := hf.Truncate(100 << 20); err != nil {
		t.Fatal(err)
	}
	if err := hf.Close(); err != nil {
		t.Fatal(err)
	}
	t.Run("made-100MB", func(t *testing.T) {
		got := badRuns(t, huge, "")
		golden(t, filepath.Join("bad", "made-100MB"), strings.ReplaceAll(got, dir, "TMP"))
	})
}

// badRuns runs fit and solve on file, checks the contract for bad input and
// returns both stderr lines with their command lines, for a golden file.
// want, when set, is the exact stderr line expected from both.
func badRuns(t *testing.T, file, want string) string {
	t.Helper()
	var b strings.Builder
	for _, args := range [][]string{{"fit", file, "--workers", "1"}, {"solve", file}} {
		stdout, stderr, code := runCLI(t, args...)
		if code != ExitBadInput {
			t.Errorf("%v: exit %d, want %d\nstdout: %s\nstderr: %s", args, code, ExitBadInput, stdout, stderr)
		}
		if stdout != "" {
			t.Errorf("%v: wrote to stdout:\n%s", args, stdout)
		}
		if strings.Count(stderr, "\n") != 1 || !strings.HasSuffix(stderr, "\n") {
			t.Errorf("%v: want exactly one stderr line, got:\n%s", args, stderr)
		}
		if line := strings.TrimSuffix(stderr, "\n"); want != "" && line != want {
			t.Errorf("%v:\ngot  %s\nwant %s", args, line, want)
		}
		b.WriteString("$ ohmfit " + strings.Join(args, " ") + "\n" + stderr)
	}
	return b.String()
}

// TestBadGoldensOnlyWithoutWantLine keeps each bad-input case in one place:
// a golden file in testdata/bad only for a case whose file cannot state its
// message (raw/, and the file made at run time).
func TestBadGoldensOnlyWithoutWantLine(t *testing.T) {
	goldens, err := filepath.Glob(filepath.Join("testdata", "bad", "*.golden"))
	if err != nil {
		t.Fatal(err)
	}
	for _, g := range goldens {
		name := strings.TrimSuffix(filepath.Base(g), ".golden")
		if !strings.HasPrefix(name, "raw-") && !strings.HasPrefix(name, "made-") {
			t.Errorf("%s: the case's \"# want:\" line states its message; a golden copy would be a second place", g)
		}
	}
}

// TestDegenerateInputs runs `ohmfit fit` on every template in
// testdata/bad/degenerate (no excitation, a goal no free part moves, a
// figure undefined for every candidate) in each output format: each must
// exit 2 with the same one line, the file's "# want:" line, and write
// nothing to stdout, before any search.
func TestDegenerateInputs(t *testing.T) {
	files, err := filepath.Glob(filepath.Join(badDir, "degenerate", "*.yaml"))
	if err != nil || len(files) == 0 {
		t.Fatalf("no degenerate templates (%v)", err)
	}
	for _, f := range files {
		t.Run(filepath.Base(f), func(t *testing.T) {
			data, err := os.ReadFile(f)
			if err != nil {
				t.Fatal(err)
			}
			first, _, _ := strings.Cut(string(data), "\n")
			want := errorLabel + f + ":" + strings.TrimPrefix(first, "# want: ") + "\n"
			for _, format := range []string{"table", "json", "csv"} {
				stdout, stderr, code := runCLI(t, "fit", f, "--format", format)
				if code != ExitBadInput || stdout != "" || stderr != want {
					t.Errorf("--format %s: exit %d, stdout %q\ngot  %swant %s", format, code, stdout, stderr, want)
				}
			}
		})
	}
}
