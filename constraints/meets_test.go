package constraints

import (
	"math"
	"testing"
)

// Meets: inclusive bounds with the contract's tie tolerance, and a figure
// that is not a finite number (a ratio over 0 V, a resolution of a node that
// does not move) meets no target, limit or not: such a candidate has no
// figure to rank or to put on a board.
func TestMeets(t *testing.T) {
	inf := math.Inf(1)
	cases := []struct {
		name string
		tg   Target
		v    float64
		want bool
	}{
		{"inside a max", Target{HasMax: true, Max: 1}, 0.5, true},
		{"on a max", Target{HasMax: true, Max: 1}, 1, true},
		{"on a max within the tie tolerance", Target{HasMax: true, Max: 1}, 1 + 1e-13, true},
		{"beyond a max", Target{HasMax: true, Max: 1}, 1.001, false},
		{"below a min", Target{HasMin: true, Min: 1}, 0.999, false},
		{"a goal with no limits", Target{HasEquals: true, Equals: 1}, 5, true},
		{"a goal, +Inf", Target{HasEquals: true, Equals: 1}, inf, false},
		{"a min, +Inf", Target{HasMin: true, Min: 1}, inf, false},
		{"a max, -Inf", Target{HasMax: true, Max: 1}, -inf, false},
		{"no limits, NaN", Target{}, math.NaN(), false},
		{"within a tolerance band", Target{HasEquals: true, Equals: 2, Tolerance: 0.01, TolRelative: true}, 2.019, true},
		{"outside a tolerance band", Target{HasEquals: true, Equals: 2, Tolerance: 0.01, TolRelative: true}, 2.021, false},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			if got := c.tg.Meets(c.v); got != c.want {
				t.Errorf("Meets(%g) = %v, want %v", c.v, got, c.want)
			}
		})
	}
}
