package main

import (
	"encoding/json"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// --output writes the result to a file instead of stdout, atomically, and
// never over an input; a run that fails on bad input writes nothing.
func TestOutputFlag(t *testing.T) {
	dir := t.TempDir()
	out := filepath.Join(dir, "answers.json")
	stdout, stderr, code := runCLI(t, "fit", "example:feedback", "--top", "2", "--format", "json", "--output", out)
	if code != ExitOK || stdout != "" {
		t.Fatalf("exit %d, stdout %q, stderr %q", code, stdout, stderr)
	}
	var doc map[string]any
	data, err := os.ReadFile(out)
	if err != nil {
		t.Fatal(err)
	}
	if err := json.Unmarshal(data, &doc); err != nil || doc["exhaustive"] != true {
		t.Fatalf("%v: %s", err, data)
	}

	// Never over the template itself, whatever the spelling of its path.
	tpl := filepath.Join(dir, "t.yaml")
	text := []byte("ohmfit: 1\nparts:\n  - {name: V1, type: voltage-source, plus: a, minus: gnd, volts: 5}\n  - {name: R1, type: resistor, from: a, to: b, value: 1k}\n  - {name: R2, type: resistor, from: b, to: gnd, value: 2k}\n")
	if err := os.WriteFile(tpl, text, 0o644); err != nil {
		t.Fatal(err)
	}
	for _, args := range [][]string{
		{"solve", tpl, "--output", tpl},
		{"solve", tpl, "--output", filepath.Join(dir, ".", "t.yaml")},
		{"fit", tpl, "--output", tpl},
		{"check", tpl, "--samples", "0", "--output", tpl},
	} {
		t.Run(strings.Join(args, " "), func(t *testing.T) {
			_, stderr, code := runCLI(t, args...)
			if code != ExitBadInput {
				t.Errorf("%v: exit %d (stderr %q)", args, code, stderr)
			}
			if got, _ := os.ReadFile(tpl); string(got) != string(text) {
				t.Fatalf("%v changed the template", args)
			}
		})
	}

	// Bad input: no output file appears.
	bad := filepath.Join(dir, "never.txt")
	if _, _, code := runCLI(t, "fit", "testdata/bad.yaml", "--output", bad); code != ExitBadInput {
		t.Errorf("exit %d", code)
	}
	if _, err := os.Stat(bad); !os.IsNotExist(err) {
		t.Errorf("a failed run left %s", bad)
	}

	// No solution: the (empty) result is still written, exit 1.
	none := filepath.Join(dir, "none.txt")
	if _, _, code := runCLI(t, "fit", "testdata/impossible.yaml", "--output", none); code != ExitNoSolution {
		t.Errorf("exit %d", code)
	}
	if _, err := os.Stat(none); err != nil {
		t.Errorf("no-solution result not written: %v", err)
	}
}
