package main

import (
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// FuzzCLI writes arbitrary text to a template file and runs the whole
// command line on it, as a user would: `fit` with a short time limit and
// `solve`. Whatever the text, the program must not panic, must exit 0, 1 or
// 2 as the contract fixes, and on exit 2 must print exactly one line on
// stderr and nothing on stdout.
func FuzzCLI(f *testing.F) {
	var seeds []string
	for _, pat := range []string{
		filepath.Join("..", "..", "testdata", "examples", "*.yaml"),
		filepath.Join("..", "..", "testdata", "bad", "*.yaml"),
		filepath.Join("..", "..", "testdata", "bad", "network", "*.yaml"),
		filepath.Join("..", "..", "testdata", "bad", "degenerate", "*.yaml"),
		filepath.Join("testdata", "*.yaml"),
	} {
		m, _ := filepath.Glob(pat)
		seeds = append(seeds, m...)
	}
	for _, s := range seeds {
		if filepath.Base(s) == "absurd.yaml" || filepath.Base(s) == "big.yaml" {
			continue // searches meant to be refused or to run long: slow seeds
		}
		data, err := os.ReadFile(s)
		if err != nil {
			f.Fatal(err)
		}
		f.Add(data)
	}
	f.Add([]byte(""))
	f.Add([]byte("ohmfit: 1\nparts: &a [*a]\n"))
	f.Fuzz(func(t *testing.T, data []byte) {
		path := filepath.Join(t.TempDir(), "t.yaml")
		if err := os.WriteFile(path, data, 0o644); err != nil {
			t.Fatal(err)
		}
		for _, args := range [][]string{
			{"fit", path, "--top", "2", "--time-limit", "200ms", "--workers", "1"},
			{"solve", path},
		} {
			stdout, stderr, code := runCLI(t, args...)
			checkOutcome(t, args, stdout, stderr, code)
		}
	})
}

// checkOutcome checks the contract's promises about one run: exit code 0,
// 1 or 2, and on exit 2 one stderr line and no stdout.
func checkOutcome(t *testing.T, args []string, stdout, stderr string, code ExitCode) {
	t.Helper()
	switch code {
	case ExitOK, ExitNoSolution:
	case ExitBadInput:
		if n := strings.Count(stderr, "\n"); n != 1 || !strings.HasSuffix(stderr, "\n") {
			t.Fatalf("%v: exit 2 with %d stderr lines:\n%s", args, n, stderr)
		}
		if stdout != "" {
			t.Fatalf("%v: exit 2 with output on stdout:\n%s", args, stdout)
		}
	default:
		t.Fatalf("%v: exit code %d, outside the contract's 0, 1, 2\nstderr: %s", args, code, stderr)
	}
}
