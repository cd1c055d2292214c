package main

import (
	"encoding/csv"
	"io"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// TestWriteAtomic checks that an output lands whole, that an input is never
// written over (by path or as the same file), and that no temporary file is
// left behind.
func TestWriteAtomic(t *testing.T) {
	dir := t.TempDir()
	in := filepath.Join(dir, "design.yaml")
	if err := os.WriteFile(in, []byte("keep"), 0o644); err != nil {
		t.Fatal(err)
	}
	out := filepath.Join(dir, "bom.csv")
	w := func(w io.Writer) error { _, err := io.WriteString(w, "a,b\n"); return err }
	if err := writeAtomic(out, []string{in}, w); err != nil {
		t.Fatal(err)
	}
	if b, _ := os.ReadFile(out); string(b) != "a,b\n" {
		t.Errorf("output %q", b)
	}
	link := filepath.Join(dir, "alias.yaml")
	if err := os.Link(in, link); err != nil {
		t.Skip("no hard links here")
	}
	for _, target := range []string{in, link, filepath.Join(dir, ".", "design.yaml")} {
		if err := writeAtomic(target, []string{in}, w); err == nil || exitCodeOf(err) != ExitBadInput {
			t.Errorf("writing over %s: %v, want a refusal", target, err)
		}
	}
	if b, _ := os.ReadFile(in); string(b) != "keep" {
		t.Errorf("input changed to %q", b)
	}
	entries, _ := os.ReadDir(dir)
	for _, e := range entries {
		if strings.HasSuffix(e.Name(), ".tmp") {
			t.Errorf("temporary file left: %s", e.Name())
		}
	}
}

// TestCheckBOMAndPlot runs check with --bom and --plot and reads the CSV
// back: one line per distinct part, designators grouped, quantities adding
// up to the resistor count; the SVG and PNG files are non-empty images.
// The design breaks its band in the worst case (exit 1): the report and
// its files are still written.
func TestCheckBOMAndPlot(t *testing.T) {
	dir := t.TempDir()
	bom := filepath.Join(dir, "bom.csv")
	for _, img := range []string{"mc.svg", "mc.png"} {
		_, errOut, code := runCLI(t, "check", "testdata/check-divider.yaml", "--samples", "300", "--bom", bom, "--plot", filepath.Join(dir, img))
		if code != ExitNoSolution {
			t.Fatalf("exit %d: %s", code, errOut)
		}
		b, err := os.ReadFile(filepath.Join(dir, img))
		if err != nil || len(b) < 500 {
			t.Errorf("%s: %d bytes, %v", img, len(b), err)
		}
		if strings.HasSuffix(img, ".svg") && !strings.Contains(string(b), "<svg") {
			t.Errorf("%s is not SVG", img)
		}
		if strings.HasSuffix(img, ".png") && !strings.HasPrefix(string(b), "\x89PNG") {
			t.Errorf("%s is not PNG", img)
		}
	}
	f, err := os.Open(bom)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	rows, err := csv.NewReader(f).ReadAll()
	if err != nil {
		t.Fatal(err)
	}
	if strings.Join(rows[0], ",") != strings.Join(bomHeader, ",") {
		t.Errorf("header %q", rows[0])
	}
	want := map[string]string{"R1": "1", "R2": "1", "R3, R4": "2"}
	if len(rows)-1 != len(want) {
		t.Errorf("%d part lines, want %d: %q", len(rows)-1, len(want), rows)
	}
	for _, r := range rows[1:] {
		if want[r[0]] != r[len(r)-1] {
			t.Errorf("line %q: quantity %s, want %s", r[0], r[len(r)-1], want[r[0]])
		}
	}
}

// TestFitPlotAndBOM runs fit with --plot (Pareto picture) and --bom for
// rank 2.
func TestFitPlotAndBOM(t *testing.T) {
	dir := t.TempDir()
	_, errOut, code := runCLI(t, "fit", "example:divider", "--workers", "1", "--plot", filepath.Join(dir, "front.svg"), "--bom", filepath.Join(dir, "bom.csv"), "--bom-rank", "2")
	if code != ExitOK {
		t.Fatalf("exit %d: %s", code, errOut)
	}
	b, err := os.ReadFile(filepath.Join(dir, "front.svg"))
	if err != nil || !strings.Contains(string(b), "Pareto front") {
		t.Errorf("plot: %v, legend missing", err)
	}
	c, err := os.ReadFile(filepath.Join(dir, "bom.csv"))
	if err != nil || !strings.Contains(string(c), "3K6") {
		t.Errorf("bom for rank 2 (3.6k, 8.2k): %q, %v", c, err)
	}
}
