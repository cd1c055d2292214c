package main

import (
	"strings"
	"testing"

	"github.com/ohmfit/ohmfit/synth/board"
	"github.com/ohmfit/ohmfit/synth/variation"
)

// TestBoardVerdictOneValue: an unproven board whose bound is one value says
// "at least 1 value is needed", not "1 values are"; more keep the plural.
func TestBoardVerdictOneValue(t *testing.T) {
	for _, c := range []struct {
		bound int
		want  string
	}{
		{1, "at least 1 value is needed"},
		{2, "at least 2 values are needed"},
	} {
		got := boardVerdict(&board.Result{Bound: c.bound})
		if !strings.HasSuffix(got, c.want) {
			t.Errorf("bound %d: %q, want it to end %q", c.bound, got, c.want)
		}
	}
}

// TestBOMNoteOneValue: a board of one distinct value ordered as two items
// (two tolerances) says "2 BOM lines for 1 distinct resistor value".
func TestBOMNoteOneValue(t *testing.T) {
	line := func(tol float64, d string) variation.BOMLine {
		return variation.BOMLine{BOMItem: variation.BOMItem{Type: variation.TypeResistor, Value: 10e3, Tolerance: tol}, Designators: []string{d}}
	}
	chk := &board.Checked{BOM: []variation.BOMLine{line(0.01, "U1-R1"), line(0.05, "U2-R1")}}
	got := bomNote(&board.Result{Distinct: 1}, chk)
	if want := "2 BOM lines for 1 distinct resistor value: "; !strings.HasPrefix(got, want) {
		t.Errorf("%q, want it to begin %q", got, want)
	}
}
