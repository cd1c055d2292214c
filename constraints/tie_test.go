package constraints_test

import (
	"testing"

	"github.com/ohmfit/ohmfit/constraints"
)

// The tie rules: errors tie within 1e-12 relative or 1e-15 absolute
// (shared/contract.md); powers within 1e-12 relative only, so that real
// differences between microwatt designs rank.
func TestTies(t *testing.T) {
	cases := []struct {
		name       string
		tie        constraints.Tie
		a, b       float64
		same, less bool
	}{
		{"exact hit as 0 and 2e-16", constraints.ErrorTie, 0, 2e-16, true, false},
		{"errors 1e-15 apart near zero", constraints.ErrorTie, 3e-16, 1.3e-15, true, false},
		{"errors 2e-15 apart near zero", constraints.ErrorTie, 3e-16, 2.3e-15, false, true},
		{"errors 5e-13 relative", constraints.ErrorTie, 0.5, 0.5 * (1 + 5e-13), true, false},
		{"errors 1e-11 relative", constraints.ErrorTie, 0.5, 0.5 * (1 + 1e-11), false, true},
		{"microwatts 1e-10 relative apart", constraints.PowerTie, 12.7558368325e-6, 12.7558368338e-6, false, true},
		{"microwatts 5e-13 relative apart", constraints.PowerTie, 12.8e-6, 12.8e-6 * (1 + 5e-13), true, false},
		{"no power at all", constraints.PowerTie, 0, 0, true, false},
		{"a femtowatt against none", constraints.PowerTie, 0, 1e-15, false, true},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			if got := c.tie.Same(c.a, c.b); got != c.same {
				t.Errorf("Same(%g, %g) = %v, want %v", c.a, c.b, got, c.same)
			}
			if got := c.tie.Same(c.b, c.a); got != c.same {
				t.Errorf("Same(%g, %g) = %v, want %v (symmetry)", c.b, c.a, got, c.same)
			}
			if got := c.tie.Less(c.a, c.b); got != c.less {
				t.Errorf("Less(%g, %g) = %v, want %v", c.a, c.b, got, c.less)
			}
			if !c.tie.AtMost(c.a, c.b) {
				t.Errorf("AtMost(%g, %g) = false", c.a, c.b)
			}
			// Below is the edge of "worse or ties": b - Below(b) ties with b.
			if w := c.b; w != 0 && !c.tie.Same(w-c.tie.Below(w)*(1-1e-3), w) {
				t.Errorf("%g less Below does not tie with it", w)
			}
			if w := c.b; w != 0 && c.tie.Same(w-c.tie.Below(w)*(1+1e-3), w) {
				t.Errorf("%g less more than Below ties with it", w)
			}
		})
	}
}

// supply_power_max is inclusive, within the power tie.
func TestOverPowerLimit(t *testing.T) {
	cases := []struct {
		pw, lim float64
		over    bool
	}{
		{1e-3, 0, false},                  // no limit
		{1e-3, 1e-3, false},               // at the limit
		{1e-3 * (1 + 5e-13), 1e-3, false}, // the limit's own rounding
		{1.0001e-3, 1e-3, true},
		{1e-6 + 1e-15, 1e-6, true}, // 1e-9 relative over a microwatt limit
		{0.9e-3, 1e-3, false},
	}
	for _, c := range cases {
		if got := constraints.OverPowerLimit(c.pw, c.lim); got != c.over {
			t.Errorf("OverPowerLimit(%g, %g) = %v, want %v", c.pw, c.lim, got, c.over)
		}
	}
}
