package main

import (
	"image/png"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// attackDir holds templates that are valid but extreme: values and goals
// at the ends of what the program accepts.
var attackDir = filepath.Join("testdata", "attack")

// TestPlotExtreme draws --plot for answers with huge powers and errors (a
// 1e9 A source, a 1e12 V source, a 1e-30 goal, the same on a sensor sweep):
// every format must draw and exit 0, never panic in the tick code.
func TestPlotExtreme(t *testing.T) {
	files, _ := filepath.Glob(filepath.Join(attackDir, "plot-*.yaml"))
	if len(files) < 4 {
		t.Fatalf("found %d plot attacks, want 4", len(files))
	}
	dir := t.TempDir()
	for _, f := range files {
		for _, ext := range []string{"svg", "png"} {
			name := strings.TrimSuffix(filepath.Base(f), ".yaml") + "." + ext
			t.Run(name, func(t *testing.T) {
				out := filepath.Join(dir, name)
				_, stderr, code := runCLI(t, "fit", f, "--top", "3", "--workers", "1", "--plot", out)
				if code != ExitOK {
					t.Fatalf("exit %d: %s", code, stderr)
				}
				if fi, err := os.Stat(out); err != nil || fi.Size() == 0 {
					t.Fatalf("no plot written: %v", err)
				}
			})
		}
	}
}

// TestCheckPlotLongSweep draws check --plot for a design over an 801-point
// sweep: a target read in every condition gets one spread panel, not 801
// histograms, so the picture's size (and the memory that draws it) does
// not grow with the sweep. Four targets, four panels of 3 in at 110 dpi.
func TestCheckPlotLongSweep(t *testing.T) {
	f := filepath.Join(attackDir, "sweep-801.yaml")
	dir := t.TempDir()
	for _, ext := range []string{"png", "svg"} {
		out := filepath.Join(dir, "p."+ext)
		_, stderr, code := runCLI(t, "check", f, "--samples", "100", "--plot", out)
		if code != ExitOK {
			t.Fatalf("exit %d: %s", code, stderr)
		}
		if ext != "png" {
			continue
		}
		r, err := os.Open(out)
		if err != nil {
			t.Fatal(err)
		}
		cfg, err := png.DecodeConfig(r)
		r.Close()
		if err != nil {
			t.Fatal(err)
		}
		if want := 4 * 3 * 110; cfg.Height != want {
			t.Errorf("plot is %d px high, want %d (four panels)", cfg.Height, want)
		}
	}
}
