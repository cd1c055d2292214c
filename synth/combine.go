package synth

import (
	"fmt"
	"math"
	"sort"

	"github.com/ohmfit/ohmfit/constraints"
)

// Arrangement is how a few physical parts make one resistance.
type Arrangement int

// The arrangements Combine considers. With three parts, "a+b∥c" is a in series
// with the parallel pair b∥c, and "(a+b)∥c" is the series pair a+b in parallel
// with c.
const (
	ArrSingle         Arrangement = iota // a
	ArrSeries                            // a + b
	ArrParallel                          // a ∥ b
	ArrSeries3                           // a + b + c
	ArrParallel3                         // a ∥ b ∥ c
	ArrSeriesParallel                    // a + (b ∥ c)
	ArrParallelSeries                    // (a + b) ∥ c
)

// String gives the JSON name: "single", "series", "parallel", or a short
// description of a mixed arrangement.
func (a Arrangement) String() string {
	switch a {
	case ArrSingle:
		return "single"
	case ArrSeries:
		return "series"
	case ArrParallel:
		return "parallel"
	case ArrSeries3:
		return "series of three"
	case ArrParallel3:
		return "parallel of three"
	case ArrSeriesParallel:
		return "a + (b parallel c)"
	case ArrParallelSeries:
		return "(a + b) parallel c"
	}
	return "unknown"
}

// Count returns the number of physical parts.
func (a Arrangement) Count() int {
	switch a {
	case ArrSingle:
		return 1
	case ArrSeries, ArrParallel:
		return 2
	}
	return 3
}

// Combination is one way to make a target value.
type Combination struct {
	Arrangement Arrangement
	Parts       []float64 // a, b, c as the arrangement names them
	Value       float64
	Error       float64 // |Value - target| / target
}

// CombineSettings bound a Combine call. Zero values mean the defaults.
type CombineSettings struct {
	MaxParts int // 1, 2 or 3; zero means 2
	Top      int // zero means 10
}

// Combine finds the best ways to make target ohms from base, a sorted list
// of standard values, ranked by error, then part count, then arrangement,
// then larger parts first. It is exact: every arrangement's value rises with
// its last part, so for each choice of the other parts only the two standard
// neighbours of the last part's ideal value (computed in closed form) can be
// best, and the rest are skipped without loss.
func Combine(target float64, base []float64, s CombineSettings) ([]Combination, error) {
	if !(target > 0) || math.IsInf(target, 0) {
		return nil, fmt.Errorf("synth: combine needs a positive finite target, not %g", target)
	}
	if len(base) == 0 {
		return nil, fmt.Errorf("synth: no standard values to combine")
	}
	if s.MaxParts == 0 {
		s.MaxParts = 2
	}
	if s.MaxParts < 1 || s.MaxParts > 3 {
		return nil, fmt.Errorf("synth: combine takes 1 to 3 parts, not %d", s.MaxParts)
	}
	if s.Top <= 0 {
		s.Top = 10
	}
	c := &combiner{target: target, top: s.Top, bound: math.Inf(1)}
	upTo := func(i int) []float64 { return base[:i+1] } // values <= base[i]
	for _, a := range base {
		c.add(ArrSingle, a, 0, 0)
	}
	if s.MaxParts >= 2 {
		for i, a := range base {
			// a >= b keeps each pair once.
			c.nearest(upTo(i), target-a, func(b float64) { c.add(ArrSeries, a, b, 0) })
			c.nearest(upTo(i), 1/(1/target-1/a), func(b float64) { c.add(ArrParallel, a, b, 0) })
		}
	}
	if s.MaxParts >= 3 {
		for i, a := range base {
			for k, b := range base {
				if k <= i {
					// a >= b >= c for the symmetric arrangements.
					c.nearest(upTo(k), target-a-b, func(x float64) { c.add(ArrSeries3, a, b, x) })
					c.nearest(upTo(k), 1/(1/target-1/a-1/b), func(x float64) { c.add(ArrParallel3, a, b, x) })
					c.nearest(base, 1/(1/target-1/(a+b)), func(x float64) { c.add(ArrParallelSeries, a, b, x) })
				}
				// a + (b ∥ c) for any a, with b >= c.
				c.nearest(upTo(k), 1/(1/(target-a)-1/b), func(x float64) { c.add(ArrSeriesParallel, a, b, x) })
			}
		}
	}
	c.prune()
	return c.out, nil
}

// combiner keeps the best combinations seen in a bounded pool.
type combiner struct {
	target float64
	top    int
	out    []Combination
	bound  float64 // error of the top-th best after the last prune
}

// nearest calls f with the values of vals (sorted) just below and just above
// ideal. A non-positive or infinite ideal means no part can reach the target
// in that arrangement, and f is not called.
func (c *combiner) nearest(vals []float64, ideal float64, f func(float64)) {
	if len(vals) == 0 || !(ideal > 0) || math.IsInf(ideal, 0) {
		return
	}
	k := sort.SearchFloat64s(vals, ideal)
	if k < len(vals) {
		f(vals[k])
	}
	if k > 0 {
		f(vals[k-1])
	}
}

func (c *combiner) add(a Arrangement, x, y, z float64) {
	parts := [3]float64{x, y, z}
	v := arrangementValue(a, parts[:a.Count()])
	e := math.Abs(v-c.target) / c.target
	if e > c.bound && !constraints.Same(e, c.bound) {
		return
	}
	c.out = append(c.out, Combination{Arrangement: a, Parts: append([]float64(nil), parts[:a.Count()]...), Value: v, Error: e})
	if len(c.out) >= 8*c.top {
		c.prune()
	}
}

// prune sorts the pool and keeps the best top, tightening the bound.
func (c *combiner) prune() {
	sort.Slice(c.out, func(i, j int) bool { return combLess(c.out[i], c.out[j]) })
	if len(c.out) > c.top {
		c.out = c.out[:c.top]
	}
	if len(c.out) == c.top {
		c.bound = c.out[c.top-1].Error
	}
}

// arrangementValue computes the resistance of an arrangement.
func arrangementValue(a Arrangement, p []float64) float64 {
	par := func(x, y float64) float64 { return x * y / (x + y) }
	switch a {
	case ArrSingle:
		return p[0]
	case ArrSeries:
		return p[0] + p[1]
	case ArrParallel:
		return par(p[0], p[1])
	case ArrSeries3:
		return p[0] + p[1] + p[2]
	case ArrParallel3:
		return 1 / (1/p[0] + 1/p[1] + 1/p[2])
	case ArrSeriesParallel:
		return p[0] + par(p[1], p[2])
	case ArrParallelSeries:
		return par(p[0]+p[1], p[2])
	}
	return math.NaN()
}

func combLess(a, b Combination) bool {
	if !constraints.Same(a.Error, b.Error) {
		return a.Error < b.Error
	}
	if a.Arrangement.Count() != b.Arrangement.Count() {
		return a.Arrangement.Count() < b.Arrangement.Count()
	}
	if a.Arrangement != b.Arrangement {
		return a.Arrangement < b.Arrangement
	}
	for i := range a.Parts {
		if a.Parts[i] != b.Parts[i] {
			return a.Parts[i] > b.Parts[i]
		}
	}
	return false
}
