package main

import (
	"encoding/csv"
	"os"
	"path/filepath"
	"slices"
	"strconv"
	"strings"
	"testing"
)

// TestBoardBOMFile writes a board's --bom and reads it back: the check
// --bom header, and every designator of the table's BOM exactly once, with
// quantities that add up to the designators.
func TestBoardBOMFile(t *testing.T) {
	path := filepath.Join(t.TempDir(), "board-bom.csv")
	stdout, stderr, code := runCLI(t, "board", "example:controller", "--bom", path)
	if code != ExitOK {
		t.Fatalf("exit %d: %s", code, stderr)
	}
	f, err := os.Open(path)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	rows, err := csv.NewReader(f).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	if len(rows) < 2 || !slices.Equal(rows[0], bomHeader) {
		t.Fatalf("header %v, want %v", rows[0], bomHeader)
	}
	seen := map[string]int{}
	for _, r := range rows[1:] {
		ds := strings.Split(r[0], ", ")
		if q := r[len(r)-1]; q != strconv.Itoa(len(ds)) {
			t.Errorf("line %v: quantity %s for %d designators", r, q, len(ds))
		}
		for _, d := range ds {
			seen[d]++
			if !strings.Contains(stdout, d) {
				t.Errorf("%s is in the file but not in the table", d)
			}
		}
	}
	for d, n := range seen {
		if n != 1 {
			t.Errorf("%s on %d lines", d, n)
		}
	}
	if len(seen) < 12 {
		t.Errorf("only %d designators for six networks of two or more resistors", len(seen))
	}
}
