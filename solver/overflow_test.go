package solver

import (
	"errors"
	"math"
	"testing"
)

// TestAnalyzeOverflow: two sources of the largest float64 in series put a
// node at twice that, which overflows (found by FuzzSolve); Analyze must
// say so rather than return infinities and NaNs.
func TestAnalyzeOverflow(t *testing.T) {
	for _, c := range []Circuit{
		{Parts: []Part{vsrc("V1", "gnd", "c", math.MaxFloat64), vsrc("V2", "c", "a", math.MaxFloat64)}},
		// Finite voltages and currents, but V²/R overflows.
		{Parts: []Part{vsrc("V1", "a", "gnd", 1e200), res("R1", "a", "gnd", 1)}},
	} {
		sol, err := Analyze(c)
		var oe *OverflowError
		if !errors.As(err, &oe) {
			t.Errorf("Analyze = %+v, %v; want an *OverflowError", sol, err)
		}
	}
}
