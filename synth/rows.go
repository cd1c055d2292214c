package synth

import (
	"context"
	"math"
	"sync"
	"sync/atomic"

	"github.com/ohmfit/ohmfit/constraints"
	"github.com/ohmfit/ohmfit/solver"
)

// Rows is the exhaustive method. It picks the position with the most options
// as the row position and enumerates every combination of the others (a row).
// For each row and condition it solves the network once with the row
// position at a reference value G0 and back-substitutes once more for the
// response w to a unit current through that position. By the
// Sherman–Morrison formula the MNA solution for any other conductance G of
// that position is then exactly
//
//	x(G) = x0 - w·s,  s = (G-G0)·V0 / (1 + (G-G0)·z)
//
// where V0 is the voltage across the position and z = w(a) - w(b): the
// bilinear theorem in matrix form. Every option of the row is scored from
// that formula without another solve. Node voltages, currents and resistances
// are monotone in G along a row while 1 + (G-G0)·z keeps its sign, so binary
// search finds the options whose goals can still reach the current top list
// and that meet the monotone hard limits; the rest of the row is skipped,
// which is what makes the search both exhaustive and fast. Rows where the
// formula has a pole inside the row's range, or whose solve fails, are scored
// option by option with full solves.
type Rows struct{}

// Name returns "exhaustive", the --method word for this method.
func (Rows) Name() string { return "exhaustive" }

var _ Method = Rows{}

// rowChunk is how many rows a worker claims at a time: small enough to
// balance two cores and to notice a time limit within milliseconds.
const rowChunk = 64

func (Rows) run(ctx context.Context, p *Problem, set *Settings, st *runState) error {
	if len(p.Domains) == 0 {
		return runNoFree(p, st)
	}
	j := rowPosition(p)
	var outer []int
	for i := range p.Domains {
		if i != j {
			outer = append(outer, i)
		}
	}
	fr := 1.0 // in float64 first: the product may pass int64's range
	for _, i := range outer {
		fr *= float64(len(p.Domains[i].Options))
	}
	if fr > set.MaxRows || fr > math.MaxInt64/2 {
		return tooManyRows(p, fr, set.MaxRows)
	}
	rows := int64(1)
	for _, i := range outer {
		rows *= int64(len(p.Domains[i].Options))
	}
	// A shard takes its share of the rows, in order.
	first, last := int64(0), rows
	if set.Shards > 1 {
		n, k := int64(set.Shards), int64(set.Shard)
		first, last = (k-1)*rows/n, k*rows/n
	}
	if set.Progress != nil {
		set.Progress.start(float64(last-first), "rows")
	}
	workers := set.Workers
	if int64(workers) > (last-first+rowChunk-1)/rowChunk {
		workers = max(1, int((last-first+rowChunk-1)/rowChunk))
	}
	st.stats.Workers = workers
	var next atomic.Int64
	next.Store(first)
	var stopped atomic.Bool
	var mu sync.Mutex
	var wg sync.WaitGroup
	for range workers {
		wg.Go(func() {
			w := newRowWorker(p, st.r, set, j, outer)
			for {
				if ctx.Err() != nil {
					stopped.Store(true)
					break
				}
				start := next.Add(rowChunk) - rowChunk
				if start >= last {
					break
				}
				end := min(start+rowChunk, last)
				w.runRows(start, end)
				if set.Progress != nil {
					set.Progress.done.Add(float64(end - start))
				}
			}
			mu.Lock()
			st.merge(w.top, w.front, w.viol, w.stats)
			mu.Unlock()
		})
	}
	wg.Wait()
	st.status = Proven
	st.open = math.Inf(1)
	if stopped.Load() {
		st.open = 0 // rows not visited are not bounded
		st.status = Interrupted
		if ctx.Err() == context.DeadlineExceeded {
			st.status = TimeLimit
		}
	}
	return nil
}

// rowPosition picks the position with the most options (ties: the last), so
// the fewest rows need a solve.
func rowPosition(p *Problem) int {
	j := 0
	for i, d := range p.Domains {
		if len(d.Options) >= len(p.Domains[j].Options) {
			j = i
		}
	}
	return j
}

// runNoFree scores a template without free positions: one candidate.
func runNoFree(p *Problem, st *runState) error {
	s := p.Spec.Network.NewSolver()
	sc := p.Spec.NewScore()
	st.stats.Workers = 1
	st.stats.Rows = 1
	st.stats.Evaluated = 1
	st.stats.Solves = int64(len(p.Spec.Conditions))
	if err := p.Spec.Evaluate(s, nil, sc); err != nil {
		return err
	}
	st.status = Proven
	st.open = math.Inf(1)
	if sc.Feasible && withinCap(sc.Error, st.errCap) {
		st.top.offer(&candidate{Opt: []int32{}, Error: sc.Error, Power: sc.Power})
	} else {
		st.viol.add(sc.Violated, 1)
	}
	return nil
}

// rowCond holds one condition's exact description of a row.
type rowCond struct {
	hidden bool      // a derivative's helper condition: no power or limits of its own
	vals   []float64 // part values of this condition and row (row position at G0)
	x0     []float64 // solution, ground first: node k at k, unknown u at u+1
	w      []float64 // port response, same layout
	g0     float64   // reference conductance of the row position
	z      float64   // w(a) - w(b)
	v0     float64   // x0(a) - x0(b)
	// total resistor power as p0 + p1·s + p2·s²
	p0, p1, p2 float64
	// per target: for a resistance target, R0 and the numerator of its update
	r0, rc []float64
	// a line's first row (rowWorker.searchLine): its solution and port
	// response, the line position's port response and conductance
	xb, wb, wk []float64
	gk         float64
	// a plane's first row (rowWorker.nextLine): its solution and the
	// row, line and plane positions' port responses, and the plane
	// position's conductance
	xp, wp, wkp, wm []float64
	gm              float64
}

// rowWorker searches rows on one goroutine with its own solver and top list.
type rowWorker struct {
	p      *Problem
	net    *solver.Network
	s      *solver.Solver
	fine   *solver.Solver // refined solves: the figures a kept candidate is compared by
	j      int            // row position (index into Domains)
	jPart  int
	ja, jb int // row position's nodes
	opts   []Option
	outer  []int
	cur    []int32
	cond   []rowCond
	top    *topList
	cand   candidate
	viol   violations
	stats  Stats
	nc     int
	free   []float64
	sc     *constraints.Score
	port   []float64 // scratch for resistance targets
	edges  []solver.Edge
	branch []int // per part: unknown of its current + 1 in the x0 layout, or -1
	keys   []constraints.RankKey
	lim    float64
	ranges [][2]int // narrow's result, reused

	frontCap float64    // goal error bound of the trade-off front; 0: none kept
	errCap   float64    // Settings.ErrorMax: a hard limit on goal error; 0: none
	front    *frontList // the worker's trade-off front, nil when none is kept

	points  *constraints.Points // node voltages the sweep-wide targets read
	derived []int               // targets that are sweep-wide

	// line is the outer position of the line whose first row cond holds
	// (searchLine), -1 for none; kPart, ka and kb are its part and nodes.
	// lineable: no target needs a solve per row beyond the port response
	// (a resistance target does).
	line, kPart, ka, kb int
	lineable            bool
	// plane is the outer position whose every value, with the line's
	// first value, begins a line that is updated from the plane's first
	// (nextLine), -1 for none; mPart, ma and mb are its part and nodes.
	plane, mPart, ma, mb int

	// bar, when not nil, is a candidate known to rank among the best the
	// search keeps (BranchBound's shared list): options that cannot beat it
	// need not be scored.
	bar *candidate
}

func newRowWorker(p *Problem, r *ranker, set *Settings, j int, outer []int) *rowWorker {
	top := set.Top + topMargin
	net := p.Spec.Network
	n := net.Unknowns()
	nc := len(p.Spec.Conditions)
	w := &rowWorker{
		p: p, net: net, s: net.NewSolver(), fine: refinedSolver(net), j: j, outer: outer,
		jPart: p.Domains[j].Part, opts: p.Domains[j].Options,
		cur:  make([]int32, len(p.Domains)),
		cond: make([]rowCond, nc),
		top:  newTopList(r, top, len(p.Domains)),
		cand: candidate{Opt: make([]int32, len(p.Domains))},
		viol: newViolations(p),
		nc:   nc, free: make([]float64, len(p.Domains)), sc: p.Spec.NewScore(),
		port: make([]float64, n+1),
		keys: p.Spec.Template.Rank, lim: p.Spec.Template.Limits.SupplyPowerMax,
		ranges: make([][2]int, 0, 2),
		line:   -1, lineable: true, plane: -1,
	}
	parts := net.Parts()
	w.edges = make([]solver.Edge, len(parts))
	for _, e := range net.Edges() {
		w.edges[e.Part] = e
	}
	w.branch = make([]int, len(parts))
	for i := range parts {
		w.branch[i] = -1
		if u := net.BranchUnknown(i); u >= 0 {
			w.branch[i] = u + 1
		}
	}
	e := w.edges[w.jPart]
	w.ja, w.jb = e.From, e.To
	w.errCap = set.ErrorMax
	if set.FrontErrorCap > 0 {
		w.frontCap = set.FrontErrorCap
		w.front = &frontList{r: r}
	}
	for _, pr := range p.Spec.Probes {
		if pr.Kind == constraints.Resistance {
			w.lineable = false
		}
	}
	w.points = p.Spec.NewPoints()
	for ti, dp := range p.Spec.Derived {
		if dp != nil {
			w.derived = append(w.derived, ti)
		}
	}
	for c := range w.cond {
		rc := &w.cond[c]
		rc.vals = make([]float64, len(parts))
		rc.hidden = !p.Spec.Visible(c)
		rc.x0 = make([]float64, n+1)
		rc.w = make([]float64, n+1)
		rc.xb, rc.wb, rc.wk = make([]float64, n+1), make([]float64, n+1), make([]float64, n+1)
		rc.xp, rc.wp, rc.wkp, rc.wm = make([]float64, n+1), make([]float64, n+1), make([]float64, n+1), make([]float64, n+1)
		rc.r0 = make([]float64, len(p.Spec.Probes))
		rc.rc = make([]float64, len(p.Spec.Probes))
	}
	return w
}

// runRows searches rows [start, end) of the odometer over the outer positions.
func (w *rowWorker) runRows(start, end int64) {
	// Decode start into option indices (mixed radix, last outer position fastest).
	r := start
	for k := len(w.outer) - 1; k >= 0; k-- {
		n := int64(len(w.p.Domains[w.outer[k]].Options))
		w.cur[w.outer[k]] = int32(r % n)
		r /= n
	}
	// The rows come in lines along the last outer position with more than
	// one option (searchLine; the ones after it never change), each begun
	// afresh at the start of a chunk: which rows are updated does not
	// depend on the number of workers.
	line := -1
	for k := len(w.outer) - 1; k >= 0 && line < 0; k-- {
		if len(w.p.Domains[w.outer[k]].Options) > 1 {
			line = w.outer[k]
		}
	}
	first := true
	for row := start; row < end; row++ {
		if line < 0 {
			w.searchRow()
		} else {
			how := alongLine
			if first {
				how = freshRow
			}
			w.searchLine(0, len(w.opts)-1, len(w.opts)/2, line, -1, how)
		}
		w.stats.Rows++
		// Advance the odometer.
		first = false
		for k := len(w.outer) - 1; k >= 0; k-- {
			i := w.outer[k]
			w.cur[i]++
			if int(w.cur[i]) < len(w.p.Domains[i].Options) {
				break
			}
			w.cur[i] = 0
			if i == line {
				first = true // a carry past the line's position starts a new line
			}
		}
	}
	w.line, w.plane = -1, -1
}

// searchRow scores the options of the row position for the current outer values.
func (w *rowWorker) searchRow() {
	w.searchRange(0, len(w.opts)-1, len(w.opts)/2)
}

// searchRange scores options lo..hi of the row position for the current
// outer values, with option ref as the reference of the update formula.
func (w *rowWorker) searchRange(lo, hi, ref int) {
	w.line, w.plane = -1, -1
	if !w.prepare(w.opts[ref].Value) {
		w.slowRow(lo, hi)
		return
	}
	w.scanRange(lo, hi)
}

// lineStart says how a row searchLine is given follows the one before it.
type lineStart uint8

const (
	alongLine lineStart = iota // only the line position moved: the line's next row
	nextLine                   // the plane position moved and the line's went back to its first value
	freshRow                   // anything else: the row is solved
)

// searchLine is searchRange for the rows of a line: rows that differ from
// the line's first only in the value of outer position k. The first row
// (how is freshRow) is solved as searchRange does, with k's port response
// besides; each later one (alongLine) is updated from it by the
// Sherman–Morrison formula for k's conductance (the bilinear theorem
// again, now across rows) instead of a new solve. With a plane position m
// (-1 for none), a line that begins where only m moved since the plane's
// first row (nextLine) has its first row updated from that one the same
// way, for m's conductance (nextLineFromPlane). A row whose update would
// divide by a small 1 + ΔG·z (where rounding grows) is solved afresh and
// starts a new line, and a new plane.
func (w *rowWorker) searchLine(lo, hi, ref, k, m int, how lineStart) {
	ok := false
	switch {
	case how == alongLine && w.line == k:
		ok = w.updateLine()
	case how == nextLine && w.line == k && w.plane == m && m >= 0:
		ok = w.nextLineFromPlane()
	}
	if !ok {
		w.line, w.plane = -1, -1
		if w.lineable {
			w.line, w.kPart = k, w.p.Domains[k].Part
			e := w.edges[w.kPart]
			w.ka, w.kb = e.From, e.To
			// Only a line's first row can be a plane's first: a line
			// solved afresh part way along is not one.
			if m >= 0 && how != alongLine {
				w.plane, w.mPart = m, w.p.Domains[m].Part
				e := w.edges[w.mPart]
				w.ma, w.mb = e.From, e.To
			}
		}
		if !w.prepare(w.opts[ref].Value) {
			w.line, w.plane = -1, -1
			w.slowRow(lo, hi)
			return
		}
	}
	w.scanRange(lo, hi)
}

// nextLineFromPlane sets up the first row of a new line from the plane's
// first row (see searchLine) for the current value of the plane position:
// the solution and the row and line positions' port responses, each
// v = vp − wm·ΔG·(vp(a) − vp(b))/d with d = 1 + ΔG·(wm(a) − wm(b)), a and
// b the plane position's nodes (Sherman–Morrison for its conductance). It
// reports false when d is below lineMinDen in a condition.
func (w *rowWorker) nextLineFromPlane() bool {
	v := w.p.Domains[w.plane].Options[w.cur[w.plane]].Value
	kv := w.p.Domains[w.line].Options[w.cur[w.line]].Value
	ma, mb := w.ma, w.mb
	for c := range w.cond {
		rc := &w.cond[c]
		dg := 1/v - rc.gm
		d := 1 + dg*(rc.wm[ma]-rc.wm[mb])
		if !(d >= lineMinDen) {
			return false
		}
		sx := dg * (rc.xp[ma] - rc.xp[mb]) / d
		sw := dg * (rc.wp[ma] - rc.wp[mb]) / d
		sk := dg * (rc.wkp[ma] - rc.wkp[mb]) / d
		xp, wp, wkp, wm := rc.xp, rc.wp, rc.wkp, rc.wm[:len(rc.xp)]
		xb, wb, wk := rc.xb, rc.wb, rc.wk
		for i := range wm {
			xb[i] = xp[i] - wm[i]*sx
			wb[i] = wp[i] - wm[i]*sw
			wk[i] = wkp[i] - wm[i]*sk
		}
		copy(rc.x0, xb)
		copy(rc.w, wb)
		rc.vals[w.mPart] = v
		rc.vals[w.kPart] = kv // the line position is back at the plane's first value
		rc.z = rc.w[w.ja] - rc.w[w.jb]
		rc.v0 = rc.x0[w.ja] - rc.x0[w.jb]
		w.powerCoefficients(rc)
	}
	return true
}

// lineMinDen is the least 1 + ΔG·z (the ratio of the new row's MNA
// determinant to the line's first) that updateLine takes: below it the
// update's rounding grows as its inverse, and the row is solved afresh.
const lineMinDen = 0.125

// updateLine sets the row up from the line's first (see searchLine) for
// the current value of the line's position: x = xb − wk·sk and
// w = wb − wk·t, with sk = ΔG·(xb(a) − xb(b))/d, t = ΔG·(wb(a) − wb(b))/d and
// d = 1 + ΔG·(wk(a) − wk(b)), a and b the position's nodes. It reports
// false when d is below lineMinDen in a condition.
func (w *rowWorker) updateLine() bool {
	v := w.p.Domains[w.line].Options[w.cur[w.line]].Value
	ka, kb := w.ka, w.kb
	for c := range w.cond {
		rc := &w.cond[c]
		dg := 1/v - rc.gk
		d := 1 + dg*(rc.wk[ka]-rc.wk[kb])
		if !(d >= lineMinDen) {
			return false
		}
		sk := dg * (rc.xb[ka] - rc.xb[kb]) / d
		t := dg * (rc.wb[ka] - rc.wb[kb]) / d
		x, wr, xb, wb, wk := rc.x0, rc.w, rc.xb, rc.wb, rc.wk[:len(rc.x0)]
		for i := range wk {
			x[i] = xb[i] - wk[i]*sk
			wr[i] = wb[i] - wk[i]*t
		}
		rc.vals[w.kPart] = v
		rc.z = rc.w[w.ja] - rc.w[w.jb]
		rc.v0 = rc.x0[w.ja] - rc.x0[w.jb]
		w.powerCoefficients(rc)
	}
	return true
}

// scanRange scores options lo..hi of the row prepared by prepare (or
// updateLine): the pole check, narrow's cut, and every option left.
func (w *rowWorker) scanRange(lo, hi int) {
	// A pole of the update formula inside the row breaks monotonicity.
	for c := range w.cond {
		rc := &w.cond[c]
		for _, i := range [2]int{lo, hi} {
			if 1+(1/w.opts[i].Value-rc.g0)*rc.z <= 1e-9 {
				w.slowRow(lo, hi)
				return
			}
		}
	}
	for _, r := range w.narrow(lo, hi) {
		for i := r[0]; i <= r[1]; i++ {
			w.scoreOption(i)
		}
	}
}

// prepare solves every condition for the row with the row position at
// resistance rRef, and sets up the update formula. It reports false when a
// solve fails.
func (w *rowWorker) prepare(rRef float64) bool {
	p, s := w.p, w.s
	for _, i := range w.outer {
		w.free[i] = w.p.Domains[i].Options[w.cur[i]].Value
	}
	for c := range w.cond {
		rc := &w.cond[c]
		copy(rc.vals, p.Spec.Conditions[c].Values)
		for _, i := range w.outer {
			rc.vals[p.Domains[i].Part] = w.free[i]
		}
		rc.vals[w.jPart] = rRef
		for i, v := range rc.vals {
			s.SetValue(i, v)
		}
		w.stats.Solves++
		if err := s.Solve(); err != nil {
			return false
		}
		x := s.X()
		rc.x0[0] = 0
		copy(rc.x0[1:], x)
		w.stats.Solves++
		if err := s.PortResponse(w.ja, w.jb, rc.w[1:]); err != nil {
			return false
		}
		rc.w[0] = 0
		if w.line >= 0 {
			// The first row of a line: k's port response and the
			// line's base solution, which updateLine starts from.
			w.stats.Solves++
			if err := s.PortResponse(w.ka, w.kb, rc.wk[1:]); err != nil {
				return false
			}
			rc.wk[0] = 0
			copy(rc.xb, rc.x0)
			copy(rc.wb, rc.w)
			rc.gk = 1 / rc.vals[w.kPart]
			if w.plane >= 0 {
				// The first row of a plane: m's port response and the
				// plane's base, which nextLineFromPlane starts from.
				w.stats.Solves++
				if err := s.PortResponse(w.ma, w.mb, rc.wm[1:]); err != nil {
					return false
				}
				rc.wm[0] = 0
				copy(rc.xp, rc.x0)
				copy(rc.wp, rc.w)
				copy(rc.wkp, rc.wk)
				rc.gm = 1 / rc.vals[w.mPart]
			}
		}
		rc.g0 = 1 / rRef
		rc.z = rc.w[w.ja] - rc.w[w.jb]
		rc.v0 = rc.x0[w.ja] - rc.x0[w.jb]
		w.powerCoefficients(rc)
		for ti, pr := range p.Spec.Probes {
			if pr.Kind != constraints.Resistance || !p.Spec.Applies[ti][c] {
				continue
			}
			w.stats.Solves++
			if err := s.PortResponse(pr.A, pr.B, w.port[1:]); err != nil {
				return false
			}
			w.port[0] = 0
			rc.r0[ti] = w.port[pr.A] - w.port[pr.B]
			rc.rc[ti] = (rc.w[pr.A] - rc.w[pr.B]) * (w.port[w.ja] - w.port[w.jb])
		}
	}
	return true
}

// powerCoefficients writes the total resistor power as a quadratic in s.
// By Tellegen's theorem it is the power the sources and op-amp outputs
// deliver; each source's current (or voltage) is affine in s, and an op-amp
// output's power is the product of two affine terms.
func (w *rowWorker) powerCoefficients(rc *rowCond) {
	rc.p0, rc.p1, rc.p2 = 0, 0, 0
	for i, e := range w.edges {
		switch e.Kind {
		case solver.VoltageSource:
			// Absorbed V·I with I = x0[b] - w[b]·s; delivered is the negative.
			b := w.branch[i]
			v := rc.vals[i]
			rc.p0 -= v * rc.x0[b]
			rc.p1 += v * rc.w[b]
		case solver.CurrentSource:
			iv := rc.vals[i]
			rc.p0 -= (rc.x0[e.From] - rc.x0[e.To]) * iv
			rc.p1 += (rc.w[e.From] - rc.w[e.To]) * iv
		case solver.OpAmp:
			// Delivered V(out)·I with both affine in s.
			b, o := w.branch[i], e.To
			rc.p0 += rc.x0[o] * rc.x0[b]
			rc.p1 -= rc.x0[o]*rc.w[b] + rc.w[o]*rc.x0[b]
			rc.p2 += rc.w[o] * rc.w[b]
		}
	}
	// Average power of a duty-cycled supply (on_fraction).
	f := w.p.Spec.OnFraction
	rc.p0, rc.p1, rc.p2 = rc.p0*f, rc.p1*f, rc.p2*f
}

// sAt returns the update parameter s and the conductance for option i.
func (rc *rowCond) sAt(g float64) float64 {
	dg := g - rc.g0
	return dg * rc.v0 / (1 + dg*rc.z)
}

// probe returns target ti's value in condition rc at update parameter s and
// row conductance g.
func (w *rowWorker) probe(rc *rowCond, ti int, s, g float64) float64 {
	pr := &w.p.Spec.Probes[ti]
	switch pr.Kind {
	case constraints.Voltage:
		return (rc.x0[pr.A] - rc.w[pr.A]*s) - (rc.x0[pr.B] - rc.w[pr.B]*s)
	case constraints.Code:
		return ((rc.x0[pr.A] - rc.w[pr.A]*s) - (rc.x0[pr.B] - rc.w[pr.B]*s)) * pr.Scale
	case constraints.Ratio:
		d := rc.x0[pr.B] - rc.w[pr.B]*s
		if d == 0 {
			return math.NaN()
		}
		return (rc.x0[pr.A] - rc.w[pr.A]*s) / d
	case constraints.Current:
		return pr.Sign * w.amps(rc, pr.Part, s, g) // constraints.CurrentSign, set in the probe
	case constraints.Power:
		return w.watts(rc, pr.Part, s, g)
	case constraints.SelfHeating:
		return w.watts(rc, pr.Part, s, g) * pr.Scale // P/δ, as Probe.Read
	case constraints.Resistance:
		dg := g - rc.g0
		return rc.r0[ti] - dg*rc.rc[ti]/(1+dg*rc.z)
	}
	return math.NaN()
}

// watts is the power part i absorbs.
func (w *rowWorker) watts(rc *rowCond, i int, s, g float64) float64 {
	e := w.edges[i]
	if e.Kind == solver.OpAmp {
		return -(rc.x0[e.To] - rc.w[e.To]*s) * w.amps(rc, i, s, g)
	}
	return ((rc.x0[e.From] - rc.w[e.From]*s) - (rc.x0[e.To] - rc.w[e.To]*s)) * w.amps(rc, i, s, g)
}

// amps is the current through part i along its edge.
func (w *rowWorker) amps(rc *rowCond, i int, s, g float64) float64 {
	e := w.edges[i]
	switch e.Kind {
	case solver.Resistor:
		gi := g
		if i != w.jPart {
			gi = 1 / rc.vals[i]
		}
		return ((rc.x0[e.From] - rc.w[e.From]*s) - (rc.x0[e.To] - rc.w[e.To]*s)) * gi
	case solver.CurrentSource:
		return rc.vals[i]
	}
	b := w.branch[i]
	return rc.x0[b] - rc.w[b]*s
}

// scoreOption scores option i of the row from the update formula and offers
// it to the top list.
func (w *rowWorker) scoreOption(i int) {
	w.stats.Evaluated++
	g := 1 / w.opts[i].Value
	p := w.p
	errMax, powMax := 0.0, 0.0
	for c := range w.cond {
		rc := &w.cond[c]
		s := rc.sAt(g)
		if !rc.hidden {
			pw := rc.p0 + s*(rc.p1+s*rc.p2)
			if pw > powMax {
				powMax = pw
			}
			if constraints.OverPowerLimit(pw, w.lim) {
				w.viol.supply(c, 1)
				return
			}
		}
		for ti := range p.Spec.Probes {
			if !p.Spec.Applies[ti][c] {
				continue
			}
			v := w.probe(rc, ti, s, g)
			tg := &p.Spec.Template.Targets[ti]
			if !tg.Meets(v) {
				w.viol.target(ti, c, 1)
				return
			}
			if e := tg.GoalError(v); e > errMax {
				errMax = e
			}
		}
		w.points.GatherUpdated(c, rc.x0, rc.w, s)
	}
	// Sweep-wide targets (linearity, sensitivity, resolution) read the
	// node voltages of several conditions; none is monotone along a row, so
	// they are only checked here, never used to cut a row.
	for _, ti := range w.derived {
		dp := p.Spec.Derived[ti]
		v := w.points.Derived(ti)
		tg := &p.Spec.Template.Targets[ti]
		if !tg.Meets(v) {
			w.viol.target(ti, dp.Conds[0], 1)
			return
		}
		if e := tg.GoalError(v); e > errMax || math.IsNaN(e) {
			errMax = e
		}
	}
	w.offer(i, errMax, powMax, false)
}

// rescoreSlack is how far, at most, the update formula's goal error (in
// absolute terms) and power (relative) may be off by rounding. A
// candidate that could enter the list within it is scored again with full
// solves before it is offered: exact ties (decade-scaled copies of one
// ratio) differ in the update formula by more than the contract's tie
// tolerance, and would otherwise be ranked by rounding instead of by power.
const rescoreSlack = 1e-9

// offer offers option i of the row, scored errMax and powMax, to the
// worker's lists. exact says the scores come from full solves; otherwise
// they may be off by rescoreSlack. Either way a candidate that could be
// kept is scored again with refined solves (fine) before it is compared:
// the figures kept are those the results show, whatever path found the
// candidate, so that which of two near-ties is kept does not hang on the
// rounding of one path (a gain-10 difference stage's exact ties spread
// over 1e-16 … 3e-15 in plain solves, past the contract's 1e-15 tie).
func (w *rowWorker) offer(i int, errMax, powMax float64, exact bool) {
	// The error cap is a hard limit; the update formula's rounding is
	// allowed for here and the cap checked again on the full solve below.
	lowest := errMax
	if !exact {
		lowest = max(0, errMax-rescoreSlack)
	}
	if !withinCap(lowest, w.errCap) {
		return
	}
	copy(w.cand.Opt, w.cur)
	w.cand.Opt[w.j] = int32(i)
	w.cand.Parts = partCount(w.p.Domains, w.cand.Opt)
	w.cand.atLeast(errMax, powMax)
	top := !w.top.full() || w.top.r.less(&w.cand, w.top.worst())
	front := w.mayFront(&w.cand, errMax)
	if !top && !front {
		return
	}
	for k, d := range w.p.Domains {
		w.free[k] = d.Options[w.cand.Opt[k]].Value
	}
	w.stats.Solves += int64(w.nc)
	if err := w.p.Spec.Evaluate(w.fine, w.free, w.sc); err != nil {
		return
	}
	if !w.sc.Feasible {
		w.viol.add(w.sc.Violated, 1)
		return
	}
	errMax, powMax = w.sc.Error, w.sc.Power
	if !withinCap(errMax, w.errCap) {
		return
	}
	w.cand.Error, w.cand.Power = errMax, powMax
	w.top.offer(&w.cand)
	w.offerFront(&w.cand)
}

// mayFront reports whether c, whose plainly computed error is e, could
// enter the trade-off front once scored again by refined solves; false
// when no front is kept.
func (w *rowWorker) mayFront(c *candidate, e float64) bool {
	return w.front != nil && e <= w.frontCap+rescoreSlack && w.front.mayTake(c)
}

// offerFront offers c, scored by refined solves, to the trade-off front
// when its error is within the front's cap.
func (w *rowWorker) offerFront(c *candidate) {
	if w.front != nil && withinCap(c.Error, w.frontCap) {
		w.front.offer(c)
	}
}

// slowRow scores options lo..hi with full nodal solves: for rows where the
// update formula cannot be trusted.
func (w *rowWorker) slowRow(lo, hi int) {
	p := w.p
	for k, d := range p.Domains {
		w.free[k] = d.Options[w.cur[k]].Value
	}
	for i := lo; i <= hi; i++ {
		w.free[w.j] = w.opts[i].Value
		w.stats.Evaluated++
		w.stats.Solves += int64(w.nc)
		if err := p.Spec.Evaluate(w.s, w.free, w.sc); err != nil {
			continue
		}
		if !w.sc.Feasible {
			w.viol.add(w.sc.Violated, 1)
			continue
		}
		w.offer(i, w.sc.Error, w.sc.Power, true)
	}
}

// narrow returns the ranges of options lo..hi still worth scoring: those
// that meet every monotone hard limit and that could still enter the top list
// (or the trade-off front, when one is kept). Everything it drops is proven
// unable to: each test is a binary search on a quantity that is monotone
// along the row.
func (w *rowWorker) narrow(lo, hi int) [][2]int {
	worst := w.threshold()
	primary := constraints.ByError
	if len(w.keys) > 0 {
		primary = w.keys[0]
	}
	goalsCut := primary == constraints.ByError && worst != nil && w.frontCap == 0
	if goalsCut {
		// Most rows a search visits miss the bar on a goal: cut by the
		// goals first, and take the hard limits only in what is left.
		// (hardLimits counts what each limit rules out while the worker's
		// own list is empty, for the message when nothing is feasible;
		// with a bar here some answer is known, so that message is never
		// shown and the rows cut first need no count.)
		if lo, hi = w.goalRange(lo, hi, constraints.ErrorTie.Above(worst.Error)+rescoreSlack); lo > hi {
			return nil
		}
	}
	lo, hi = w.hardLimits(lo, hi)
	if lo > hi {
		return nil
	}
	if w.errCap > 0 {
		// The error cap is a hard limit: what cannot meet it is never kept.
		if lo, hi = w.goalRange(lo, hi, constraints.ErrorTie.Above(w.errCap)+rescoreSlack); lo > hi {
			return nil
		}
	}
	full := append(w.ranges[:0], [2]int{lo, hi})
	switch primary {
	case constraints.ByError:
		if goalsCut {
			return full // cut by the goals above, with this same threshold
		}
		// The update formula's rounding (rescoreSlack) is allowed for, so
		// that an exact tie of the threshold is scored, not cut.
		t := math.Inf(1)
		if worst != nil {
			t = constraints.ErrorTie.Above(worst.Error) + rescoreSlack
		}
		if w.frontCap > 0 {
			t = math.Max(t, constraints.ErrorTie.Above(w.frontCap)+rescoreSlack)
		}
		if math.IsInf(t, 1) {
			return full
		}
		a, b := w.goalRange(lo, hi, t)
		if a > b {
			return nil
		}
		return append(w.ranges[:0], [2]int{a, b})
	case constraints.ByPower:
		if worst == nil {
			return full
		}
		a, b, ok := w.powerRange(lo, hi, constraints.PowerTie.Above(worst.Power)*(1+rescoreSlack))
		if !ok {
			return full
		}
		out := w.ranges[:0]
		if a <= b {
			out = append(out, [2]int{a, b})
		}
		if w.frontCap > 0 {
			// The front also wants low-error options the power bound drops.
			c, d := w.goalRange(lo, hi, constraints.ErrorTie.Above(w.frontCap)+rescoreSlack)
			out = unionRange(out, c, d)
		}
		return out
	}
	return full
}

// threshold returns the candidate an option must beat to be worth scoring:
// the last of the worker's full top list, or the bar another part of the
// search set (see BranchBound), whichever ranks first; nil when neither.
func (w *rowWorker) threshold() *candidate {
	t := w.top.worst()
	if w.bar != nil && (t == nil || w.top.r.less(w.bar, t)) {
		return w.bar
	}
	return t
}

// unionRange adds [a, b] (if not empty) to at most one existing range,
// merging the two when they overlap or touch.
func unionRange(r [][2]int, a, b int) [][2]int {
	if a > b {
		return r
	}
	if len(r) == 0 {
		return append(r, [2]int{a, b})
	}
	x := r[0]
	if a <= x[1]+1 && x[0] <= b+1 {
		r[0] = [2]int{min(a, x[0]), max(b, x[1])}
		return r
	}
	if a < x[0] {
		return append([][2]int{{a, b}}, x)
	}
	return append(r, [2]int{a, b})
}

// hardLimits shrinks lo..hi to the options that meet every hard limit on a
// quantity monotone along the row (in every condition). When a limit empties
// a row before any answer is known, the row's options are counted against
// that limit, for the message when nothing is feasible.
func (w *rowWorker) hardLimits(lo, hi int) (int, int) {
	p := w.p
	counting := w.top.worst() == nil
	for c := range w.cond {
		rc := &w.cond[c]
		if w.lim > 0 && !rc.hidden && w.powerMonotone(rc, lo, hi) {
			nlo, nhi := w.bisect(lo, hi, math.Inf(-1), w.lim, rc, -1)
			if nlo > nhi {
				if counting {
					w.viol.supply(c, float64(hi-lo+1))
				}
				return 1, 0
			}
			lo, hi = nlo, nhi
		}
		for ti := range p.Spec.Probes {
			if !p.Spec.Applies[ti][c] {
				continue
			}
			blo, bhi := p.Spec.Template.Targets[ti].Band()
			if (math.IsInf(blo, -1) && math.IsInf(bhi, 1)) || !w.monotone(rc, ti, lo, hi) {
				continue
			}
			nlo, nhi := w.bisect(lo, hi, blo, bhi, rc, ti)
			if nlo > nhi {
				if counting {
					w.viol.target(ti, c, float64(hi-lo+1))
				}
				return 1, 0
			}
			lo, hi = nlo, nhi
		}
	}
	return lo, hi
}

// goalRange shrinks lo..hi to the options whose goal error can be at most t:
// every monotone goal, in every condition, within t of its value.
func (w *rowWorker) goalRange(lo, hi int, t float64) (int, int) {
	p := w.p
	for c := range w.cond {
		rc := &w.cond[c]
		for ti := range p.Spec.Probes {
			tg := &p.Spec.Template.Targets[ti]
			if !tg.HasEquals || !p.Spec.Applies[ti][c] || !w.monotone(rc, ti, lo, hi) {
				continue
			}
			d := t
			if tg.Equals != 0 {
				d *= math.Abs(tg.Equals)
			}
			lo, hi = w.bisect(lo, hi, tg.Equals-d, tg.Equals+d, rc, ti)
			if lo > hi {
				return 1, 0
			}
		}
	}
	return lo, hi
}

// powerRange shrinks lo..hi to the options whose total power is at most t in
// every condition. It reports false when power is not monotone along the row
// in some condition, and then nothing can be cut.
func (w *rowWorker) powerRange(lo, hi int, t float64) (int, int, bool) {
	for c := range w.cond {
		if !w.cond[c].hidden && !w.powerMonotone(&w.cond[c], lo, hi) {
			return lo, hi, false
		}
	}
	for c := range w.cond {
		if w.cond[c].hidden {
			continue
		}
		lo, hi = w.bisect(lo, hi, math.Inf(-1), t, &w.cond[c], -1)
		if lo > hi {
			return 1, 0, true
		}
	}
	return lo, hi, true
}

// monotone reports whether target ti is monotone along options lo..hi of
// the row (given that the update formula has no pole there).
func (w *rowWorker) monotone(rc *rowCond, ti, lo, hi int) bool {
	pr := &w.p.Spec.Probes[ti]
	switch pr.Kind {
	case constraints.Voltage, constraints.Code, constraints.Current, constraints.Resistance:
		return true
	case constraints.Ratio:
		// A bilinear function of s: monotone unless its denominator changes
		// sign inside the row.
		d1 := rc.x0[pr.B] - rc.w[pr.B]*rc.sAt(1/w.opts[lo].Value)
		d2 := rc.x0[pr.B] - rc.w[pr.B]*rc.sAt(1/w.opts[hi].Value)
		return (d1 > 0 && d2 > 0) || (d1 < 0 && d2 < 0)
	}
	return false
}

// powerMonotone reports whether total power is monotone along lo..hi.
func (w *rowWorker) powerMonotone(rc *rowCond, lo, hi int) bool {
	if rc.p2 == 0 {
		return true
	}
	v := -rc.p1 / (2 * rc.p2)
	s1, s2 := rc.sAt(1/w.opts[lo].Value), rc.sAt(1/w.opts[hi].Value)
	return v <= math.Min(s1, s2) || v >= math.Max(s1, s2)
}

// quantity returns target ti's value (or, for ti < 0, the total power) at
// option i of the row in condition rc.
func (w *rowWorker) quantity(rc *rowCond, ti, i int) float64 {
	g := 1 / w.opts[i].Value
	s := rc.sAt(g)
	if ti < 0 {
		return rc.p0 + s*(rc.p1+s*rc.p2)
	}
	return w.probe(rc, ti, s, g)
}

// bisect returns the sub-range of lo..hi where quantity ti (monotone along
// the row) lies in [a, b] (inclusive, within the tie tolerance), or an empty
// range (lo > hi).
func (w *rowWorker) bisect(lo, hi int, a, b float64, rc *rowCond, ti int) (int, int) {
	flo, fhi := w.quantity(rc, ti, lo), w.quantity(rc, ti, hi)
	if math.IsNaN(flo) || math.IsNaN(fhi) {
		return lo, hi
	}
	ge := func(v float64) bool { return v >= a || constraints.Same(v, a) }
	le := func(v float64) bool { return v <= b || constraints.Same(v, b) }
	if flo == fhi {
		if ge(flo) && le(flo) {
			return lo, hi
		}
		return 1, 0
	}
	inc := flo < fhi
	// The ends settle most rows: all of the range outside [a, b], or all
	// of it inside.
	least, most := flo, fhi
	if !inc {
		least, most = fhi, flo
	}
	if !ge(most) || !le(least) {
		return 1, 0
	}
	if ge(least) && le(most) {
		return lo, hi
	}
	// first returns the first index in [l, h] where the test holds (it is
	// false then true along the range), or h+1.
	first := func(l, h int, below bool) int {
		for l <= h {
			m := int(uint(l+h) >> 1)
			v := w.quantity(rc, ti, m)
			var ok bool
			switch {
			case inc && below:
				ok = ge(v) // entering from below a
			case inc:
				ok = !le(v) // leaving above b
			case below:
				ok = le(v) // entering from above b
			default:
				ok = !ge(v) // leaving below a
			}
			if ok {
				h = m - 1
			} else {
				l = m + 1
			}
		}
		return l
	}
	return first(lo, hi, true), first(lo, hi, false) - 1
}

// refinedSolver returns a solver for net with iterative refinement on: the
// one kind of solve whose figures a kept candidate carries.
func refinedSolver(net *solver.Network) *solver.Solver {
	s := net.NewSolver()
	s.SetRefinement(true)
	return s
}

// partCount is the number of physical parts of the candidate with options
// opt.
func partCount(ds []Domain, opt []int32) int {
	n := 0
	for k, d := range ds {
		n += d.Options[opt[k]].Count
	}
	return n
}

// atLeast sets c's figures to the least that refined solves can give for
// figures e and p from plain solves or the update formula (rescoreSlack):
// the figures to ask whether c could enter a list before scoring it again.
func (c *candidate) atLeast(e, p float64) {
	c.Error, c.Power = max(0, e-rescoreSlack), p*(1-rescoreSlack)
}
