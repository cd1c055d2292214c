package constraints

import (
	"math"

	"github.com/ohmfit/ohmfit/solver"
)

// Points holds the node voltages the sweep-wide targets (linearity,
// sensitivity, resolution) read, gathered condition by condition, for a
// caller that scores without Evaluate (a search's update formula, a
// Monte Carlo draw). It is exported for those callers, synth and
// synth/variation; which voltages it keeps, and where, stays here, so
// every caller gathers them the one way. One per goroutine; it does not
// allocate after NewPoints.
type Points struct {
	p *Problem
	v []float64
}

// pointSlot is one node voltage a sweep-wide target reads in a condition.
type pointSlot struct {
	index int // into Points.v
	node  int // node index
}

// NewPoints returns an empty gatherer for the problem's sweep-wide targets.
func (p *Problem) NewPoints() *Points {
	return &Points{p: p, v: make([]float64, p.npoints)}
}

// addPoints lays out the points derived probe dp reads: its own stretch of
// a Points gatherer, and in each condition it reads, the node to record.
func (p *Problem) addPoints(dp *DerivedProbe) {
	dp.offset = p.npoints
	p.npoints += len(dp.Conds)
	if p.slots == nil {
		p.slots = make([][]pointSlot, len(p.Conditions))
	}
	for k, c := range dp.Conds {
		p.slots[c] = append(p.slots[c], pointSlot{index: dp.offset + k, node: dp.Node})
	}
}

// Gather records, after condition ci was solved by s, the node voltages
// the sweep-wide targets read in it.
func (pt *Points) Gather(ci int, s *solver.Solver) {
	if pt.p.slots == nil {
		return
	}
	for _, ps := range pt.p.slots[ci] {
		pt.v[ps.index] = s.Voltage(ps.node)
	}
}

// GatherUpdated records condition ci's node voltages from a rank-one
// update of a solution, node voltage x0[n] - w[n]·u (the layout of
// solver.Solver.X with the ground node first).
func (pt *Points) GatherUpdated(ci int, x0, w []float64, u float64) {
	if pt.p.slots == nil {
		return
	}
	for _, ps := range pt.p.slots[ci] {
		pt.v[ps.index] = x0[ps.node] - w[ps.node]*u
	}
}

// Fail marks condition ci's points as unknown (its solve failed), so that
// every sweep-wide target reading it comes out NaN.
func (pt *Points) Fail(ci int) {
	if pt.p.slots == nil {
		return
	}
	for _, ps := range pt.p.slots[ci] {
		pt.v[ps.index] = math.NaN()
	}
}

// Derived computes sweep-wide target ti from the points gathered.
func (pt *Points) Derived(ti int) float64 {
	dp := pt.p.Derived[ti]
	return dp.Value(pt.v[dp.offset : dp.offset+len(dp.Conds)])
}
