package constraints

import (
	"errors"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// FuzzParse feeds arbitrary text to Parse: it must never panic, and every
// failure must be a one-line *Error; every success must satisfy the
// invariants the rest of ohmfit relies on.
func FuzzParse(f *testing.F) {
	seeds, _ := filepath.Glob(filepath.Join("..", "testdata", "examples", "*.yaml"))
	// The bad corpus too: the YAML mistakes are near the parser's edges.
	for _, dir := range []string{"bad", filepath.Join("bad", "network"), filepath.Join("bad", "degenerate")} {
		m, _ := filepath.Glob(filepath.Join("..", "testdata", dir, "*.yaml"))
		seeds = append(seeds, m...)
	}
	seeds = append(seeds, filepath.Join("testdata", "contract.yaml"))
	for _, s := range seeds {
		data, err := os.ReadFile(s)
		if err != nil {
			f.Fatal(err)
		}
		f.Add(data)
	}
	f.Add([]byte(head + "targets:\n  - {voltage: [in, out], equals: 0, tolerance: 1m}\n"))
	f.Add([]byte("ohmfit: 1\nparts: &a [*a]\n"))
	f.Fuzz(func(t *testing.T, data []byte) {
		tpl, err := Parse("fuzz.yaml", data)
		if err != nil {
			var e *Error
			if !errors.As(err, &e) {
				t.Fatalf("error %T is not an *Error: %v", err, err)
			}
			if e.Msg == "" || strings.ContainsAny(err.Error(), "\n") {
				t.Fatalf("bad message %q", err)
			}
			return
		}
		if tpl.Ground == "" || len(tpl.Conditions) == 0 || len(tpl.Rank) != 3 || len(tpl.Parts) == 0 {
			t.Fatalf("invariants broken: %+v", tpl)
		}
		if len(tpl.Circuit().Parts) != len(tpl.Parts) {
			t.Fatal("circuit lost parts")
		}
		for _, tg := range tpl.Targets {
			if !tg.HasEquals && !tg.HasMin && !tg.HasMax {
				t.Fatalf("target %s checks nothing", tg.Label())
			}
		}
	})
}
