package synth

import (
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
	// Parts are a, b, c as the arrangement names them, each combination in
	// one order only: a ≥ b for a pair, a ≥ b ≥ c for three in series or in
	// parallel, b ≥ c in a + (b ∥ c), a ≥ b in (a + b) ∥ c.
	Parts []float64
	Value float64
	Error float64 // |Value - target| / target
}

// CombineSettings bound a Combine call. Zero values mean the defaults.
type CombineSettings struct {
	MaxParts int // 1, 2 or 3; zero means 2
	Top      int // zero means 10
}

// Combine finds the best ways to make target ohms from base, a sorted list
// of standard values, and returns them in a strict total order: by error
// (errors equal by constraints.Same are tied), then fewer parts, then the
// arrangement in the order of the Arr constants, then larger parts first.
//
// A combination whose value equals, by constraints.Same, the value of some
// arrangement of fewer parts from base is dominated and never returned:
// 3.3k + 1k is not listed when 4.3k is a standard value, as that single part
// makes the same value and ranks first.
//
// The list is exact at every rank: it is the first Top of the full
// enumeration of every single part, pair and (with MaxParts 3) triple in that
// order, dominated ones left out. Every arrangement's value rises with its
// last part, so for each choice of the other parts the error falls and then
// rises along the sorted values; the walk starts where the value crosses
// the target and goes outwards on each side until a part is worse than the
// current Top-th best, and every part beyond it is worse still.
func Combine(target float64, base []float64, s CombineSettings) ([]Combination, error) {
	if !(target > 0) || math.IsInf(target, 0) {
		return nil, errorf(nil, "combine needs a positive finite target, not %g", target)
	}
	if len(base) == 0 {
		return nil, errorf(nil, "no standard values to combine")
	}
	if s.MaxParts == 0 {
		s.MaxParts = 2
	}
	if s.MaxParts < 1 || s.MaxParts > 3 {
		return nil, errorf(nil, "combine takes 1 to 3 parts, not %d", s.MaxParts)
	}
	if s.Top <= 0 {
		s.Top = 10
	}
	c := &combiner{target: target, top: s.Top, base: base, bound: math.Inf(1)}
	upTo := func(i int) []float64 { return base[:i+1] } // values <= base[i]
	each := func() {
		if c.seeding {
			for _, a := range base {
				c.offer(ArrSingle, a, 0, 0, a)
			}
		}
		if s.MaxParts >= 2 {
			for i, a := range base {
				// a >= b keeps each pair once.
				c.walk(upTo(i), func(b float64) float64 { return a + b }, func(b, v float64) bool { return c.offer(ArrSeries, a, b, 0, v) })
				c.walk(upTo(i), func(b float64) float64 { return par(a, b) }, func(b, v float64) bool { return c.offer(ArrParallel, a, b, 0, v) })
			}
		}
		if s.MaxParts >= 3 {
			for i, a := range base {
				for k, b := range base {
					if k <= i {
						// a >= b >= c for the symmetric arrangements.
						ab, gab := a+b, 1/a+1/b
						c.walk(upTo(k), func(x float64) float64 { return ab + x }, func(x, v float64) bool { return c.offer(ArrSeries3, a, b, x, v) })
						c.walk(upTo(k), func(x float64) float64 { return 1 / (gab + 1/x) }, func(x, v float64) bool { return c.offer(ArrParallel3, a, b, x, v) })
						c.walk(base, func(x float64) float64 { return par(ab, x) }, func(x, v float64) bool { return c.offer(ArrParallelSeries, a, b, x, v) })
					}
					// a + (b ∥ c) for any a, with b >= c.
					c.walk(upTo(k), func(x float64) float64 { return a + par(b, x) }, func(x, v float64) bool { return c.offer(ArrSeriesParallel, a, b, x, v) })
				}
			}
		}
	}
	// The first pass offers only the two parts around each crossing, which
	// settles a close bound at little cost; the second walks outwards from
	// them.
	c.seeding = true
	each()
	c.seeding = false
	each()
	return c.sorted(), nil
}

// combiner keeps the best top combinations seen so far.
type combiner struct {
	target float64
	top    int
	base   []float64     // the standard values, for the dominance check
	heap   []Combination // the best so far, worst at the root (combLess reversed)
	bound  float64       // error of the top-th best once there are top, else +Inf
	// seeding: walks offer only the two parts around the crossing, and
	// afterwards only the others.
	seeding bool
}

// walk offers the values of vals (sorted) to add as the last part, for one
// choice of the other parts. value(x) is the arrangement's resistance with
// last part x and must rise with x, so the error falls until value crosses
// the target and rises after it: starting at the crossing, the walk goes
// up, then down, each until add reports a part beyond the bound; every part
// further out is worse still. (Rounding moves a value by a few ulps, far
// below the tie tolerance, so it cannot hide a part that belongs.)
func (c *combiner) walk(vals []float64, value func(x float64) float64, add func(x, v float64) bool) {
	if len(vals) == 0 {
		return
	}
	// Every value lies between those of the smallest and the largest part:
	// when both are on one side of the target and the nearer one is beyond
	// the bound, so is every part.
	if v := value(vals[0]); v > c.target && c.beyond(v) {
		return
	}
	if v := value(vals[len(vals)-1]); v < c.target && c.beyond(v) {
		return
	}
	k := sort.Search(len(vals), func(j int) bool { return value(vals[j]) >= c.target })
	if c.seeding {
		if k < len(vals) {
			add(vals[k], value(vals[k]))
		}
		if k > 0 {
			add(vals[k-1], value(vals[k-1]))
		}
		return
	}
	for j := k + 1; j < len(vals); j++ {
		if !add(vals[j], value(vals[j])) {
			break
		}
	}
	for j := k - 2; j >= 0; j-- {
		if !add(vals[j], value(vals[j])) {
			break
		}
	}
}

// offer adds the combination of parts x, y, z (as many as a counts) with
// value v to the pool unless it is dominated. It reports false when the
// error is beyond the bound (worse than the top-th best and not tied with
// it), which is what ends a walk; a dominated combination within the bound
// does not end it.
func (c *combiner) offer(a Arrangement, x, y, z, v float64) bool {
	if c.beyond(v) {
		return false
	}
	e := math.Abs(v-c.target) / c.target
	if c.dominated(a.Count(), v) {
		return true
	}
	n := a.Count()
	full := len(c.heap) == c.top
	parts := [3]float64{x, y, z}
	cand := Combination{Arrangement: a, Parts: parts[:n], Value: v, Error: e}
	if full && !combLess(cand, c.heap[0]) {
		return true // ties with the top-th on error but ranks after it
	}
	if c.dominated(n, v) {
		return true
	}
	cand.Parts = append([]float64(nil), parts[:n]...)
	if full {
		c.heap[0] = cand
		c.down(0)
	} else {
		c.heap = append(c.heap, cand)
		c.up(len(c.heap) - 1)
	}
	if len(c.heap) == c.top {
		c.bound = c.heap[0].Error
	}
	return true
}

// beyond reports whether value v is worse than the top-th best so far and
// not tied with it, so that it cannot be in the list.
func (c *combiner) beyond(v float64) bool {
	e := math.Abs(v-c.target) / c.target
	return e > c.bound && !constraints.Same(e, c.bound)
}

// dominated reports whether some arrangement of fewer than n parts from base
// has value v (by constraints.Same). With n = 3 each part a that can be the
// larger of a pair is tried, the partner found by binary search as the pair's
// value rises with it: a + b = v with a >= b needs v/2 <= a <= v, and
// a ∥ b = v needs v <= a <= 2v (a little wider here, for rounding).
func (c *combiner) dominated(n int, v float64) bool {
	if n < 2 {
		return false
	}
	if c.hits(c.base, func(x float64) float64 { return x }, v) {
		return true
	}
	if n < 3 {
		return false
	}
	lo := sort.SearchFloat64s(c.base, 0.5*v*(1-1e-9))
	for _, a := range c.base[lo:] {
		if a > 2*v*(1+1e-9) {
			break
		}
		if c.hits(c.base, func(b float64) float64 { return a + b }, v) ||
			c.hits(c.base, func(b float64) float64 { return par(a, b) }, v) {
			return true
		}
	}
	return false
}

// hits reports whether value(x) equals v by constraints.Same for some x of
// vals (sorted), value rising with x: only the two values around the
// crossing can be nearest.
func (c *combiner) hits(vals []float64, value func(x float64) float64, v float64) bool {
	k := sort.Search(len(vals), func(j int) bool { return value(vals[j]) >= v })
	return (k < len(vals) && constraints.Same(value(vals[k]), v)) ||
		(k > 0 && constraints.Same(value(vals[k-1]), v))
}

// worse is the heap order: the root is the combination that ranks last.
func (c *combiner) worse(i, j int) bool { return combLess(c.heap[j], c.heap[i]) }

func (c *combiner) up(i int) {
	for i > 0 {
		p := (i - 1) / 2
		if !c.worse(i, p) {
			return
		}
		c.heap[i], c.heap[p] = c.heap[p], c.heap[i]
		i = p
	}
}

func (c *combiner) down(i int) {
	for {
		w, l := i, 2*i+1
		if l < len(c.heap) && c.worse(l, w) {
			w = l
		}
		if r := l + 1; r < len(c.heap) && c.worse(r, w) {
			w = r
		}
		if w == i {
			return
		}
		c.heap[i], c.heap[w] = c.heap[w], c.heap[i]
		i = w
	}
}

// sorted returns the kept combinations, best first.
func (c *combiner) sorted() []Combination {
	out := c.heap
	sort.Slice(out, func(i, j int) bool { return combLess(out[i], out[j]) })
	return out
}

// par is the parallel law (constraints.ParallelOf).
func par(x, y float64) float64 { return constraints.ParallelOf(x, y) }

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
