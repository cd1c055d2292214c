package synth

import (
	"container/heap"
	"context"
	"math"

	"github.com/ohmfit/ohmfit/constraints"
	"github.com/ohmfit/ohmfit/solver"
)

// bbWorker is one goroutine of a branch-and-bound run.
type bbWorker struct {
	sh    *bbShared
	p     *Problem
	s     *solver.Solver
	sc    *constraints.Score
	free  []float64
	rw    *rowWorker // finishes leaves; its top list and front are the worker's answers
	inc   *topList   // corners scored since the last sync
	cand  candidate
	after func(int)
	along func(int) error // solveAlong, made once
	// lineOK: corners may be updated along lines (updateCorner); not
	// where a target reads a resistance, which needs factors.
	lineOK bool
	ln     lineEnds

	order           []int // searchLeaf's odometer order
	corners, solves int64 // corner candidates scored and their solves
	synced          [2]int64

	nc     int
	edges  []solver.Edge
	ratios []int // targets that are ratios
	pparts []int // parts with a power target
	pslot  []int // per target: its slot in pparts, or -1
	srcs   []int // voltage and current sources
	amps   []int // op-amps
	res    []int // resistors
	pos    []int // per part: its position (index into Domains), or -1

	// Corner ranges per condition (index ×nc + condition): views of
	// glo and ghi, which follow a record's layout.
	glo, ghi   []float64
	det        []int8 // determinant sign seen: 0 none, ±1, 2 both
	den        []int8 // per ratio target: sign of V(b), as det
	qlo, qhi   []float64
	qnan       []bool
	vlo, vhi   []float64 // per power part: edge volts
	ilo, ihi   []float64 // per power part: edge amps
	wlo, whi   []float64 // per source: absorbed watts
	ovlo, ovhi []float64 // per op-amp: V(out)
	oilo, oihi []float64 // per op-amp: output current
	rvlo, rvhi []float64 // per resistor: edge volts
	corner     []int32
	gslot      []int     // goal slots (target×nc + condition) the split choice reads
	gscale     []float64 // per goal slot: 1/|goal|
	pairs      []goalPair
	pts, hull  []point2 // pairBound's scratch

	// Corner records (bound_corners.go).
	lay         recordLayout
	rec         []float64 // the record afterCond writes
	rsg         []int8
	vary, pvary []int             // varying positions of the box and its parent
	pool        map[int][]records // released record space, by corner count
	// dive holds the open halves this worker keeps to itself while open
	// is over its budget (put), last taken first.
	dive    []*box
	tmpRecs []float64
	tmpSgns []int8
}

func newBBWorker(sh *bbShared, set *Settings, st *runState) *bbWorker {
	p := sh.p
	nc := len(p.Spec.Conditions)
	w := &bbWorker{sh: sh, p: p, s: p.Spec.Network.NewSolver(), sc: p.Spec.NewScore(),
		free: make([]float64, len(p.Domains)),
		rw:   newRowWorker(p, st.r, set, sh.j, sh.outer),
		inc:  newTopList(st.r, set.Top+topMargin, len(p.Domains)),
		cand: candidate{Opt: make([]int32, len(p.Domains))},
		nc:   nc, corner: make([]int32, len(p.Domains)),
	}
	w.after = w.afterCond
	w.along = w.solveAlong
	w.lineOK = true
	for _, pr := range p.Spec.Probes {
		if pr.Kind == constraints.Resistance {
			w.lineOK = false
		}
	}
	parts := p.Spec.Network.Parts()
	w.edges = make([]solver.Edge, len(parts))
	for _, e := range p.Spec.Network.Edges() {
		w.edges[e.Part] = e
	}
	w.pslot = make([]int, len(p.Spec.Probes))
	for ti, pr := range p.Spec.Probes {
		w.pslot[ti] = -1
		switch pr.Kind {
		case constraints.Ratio:
			w.ratios = append(w.ratios, ti)
		case constraints.Power, constraints.SelfHeating:
			for k, q := range w.pparts {
				if q == pr.Part {
					w.pslot[ti] = k
				}
			}
			if w.pslot[ti] < 0 {
				w.pslot[ti] = len(w.pparts)
				w.pparts = append(w.pparts, pr.Part)
			}
		}
	}
	for i, e := range w.edges {
		switch e.Kind {
		case solver.VoltageSource, solver.CurrentSource:
			w.srcs = append(w.srcs, i)
		case solver.OpAmp:
			w.amps = append(w.amps, i)
		case solver.Resistor:
			w.res = append(w.res, i)
		}
	}
	w.pos = make([]int, len(parts))
	for i := range w.pos {
		w.pos[i] = -1
	}
	for k, d := range p.Domains {
		w.pos[d.Part] = k
	}
	for ti, tg := range p.Spec.Template.Targets {
		if !tg.HasEquals || p.Spec.Derived[ti] != nil {
			continue
		}
		for c := 0; c < nc; c++ {
			if p.Spec.Applies[ti][c] && p.Spec.Visible(c) {
				w.gslot = append(w.gslot, ti*nc+c)
				sc := 1.0
				if tg.Equals != 0 {
					sc = 1 / math.Abs(tg.Equals)
				}
				w.gscale = append(w.gscale, sc)
			}
		}
	}
	w.pairs = goalPairs(p, w.edges)
	w.pool = map[int][]records{}
	w.lay = newRecordLayout(len(p.Spec.Probes), len(w.pparts), len(w.srcs), len(w.res), len(w.amps), p.Spec.Network.Unknowns(), nc)
	w.det = make([]int8, nc)
	w.den = make([]int8, len(p.Spec.Probes)*nc)
	w.qnan = make([]bool, len(p.Spec.Probes)*nc)
	// The ranges are views of one pair of arrays laid out as a record's
	// quantities, so that gather widens them in one pass.
	l := &w.lay
	w.glo, w.ghi = make([]float64, l.opow), make([]float64, l.opow)
	view := func(off, items int) ([]float64, []float64) {
		return w.glo[off : off+items*nc], w.ghi[off : off+items*nc]
	}
	w.qlo, w.qhi = view(l.oq, len(p.Spec.Probes))
	w.vlo, w.vhi = view(l.ov, len(w.pparts))
	w.ilo, w.ihi = view(l.oi, len(w.pparts))
	w.wlo, w.whi = view(l.ow, len(w.srcs))
	w.rvlo, w.rvhi = view(l.orv, len(w.res))
	w.ovlo, w.ovhi = view(l.oov, len(w.amps))
	w.oilo, w.oihi = view(l.ooi, len(w.amps))
	return w
}

// stats returns the worker's statistics: the leaves' and the corners'.
func (w *bbWorker) stats() Stats {
	s := w.rw.stats
	s.Evaluated += w.corners
	s.Solves += w.solves
	return s
}

// loop takes open boxes until none is left or the search stops.
func (w *bbWorker) loop(ctx context.Context, set *Settings) {
	sh := w.sh
	for {
		b, worst, ok := w.next(ctx)
		if !ok {
			return
		}
		var kids []*box
		switch {
		case sh.ruledOut(b, worst):
			w.release(b)
			w.count(b)
			w.progress(set, b)
		case sh.isLeaf(b):
			w.searchLeaf(b, worst)
			w.sync()
			w.progress(set, b)
		default:
			a, c := w.splitBox(b)
			w.bound(a, worst)
			w.bound(c, worst)
			w.release(b) // both halves have theirs
			worst = w.sync()
			for _, k := range []*box{a, c} {
				if sh.ruledOut(k, worst) {
					w.release(k)
					w.count(k)
					w.progress(set, k)
					continue
				}
				if sh.isLeaf(k) {
					w.release(k) // finished by rows, never split
				}
				kids = append(kids, k)
			}
		}
		w.put(kids)
	}
}

// next returns the worker's next box and the bar to beat: the last of its
// dive if it has one, else the first open box, waiting while other
// workers may still add some. It reports false when the search is over:
// nothing is left, or it stopped, in which case every box the worker held
// is back in open, where the bound counts it.
func (w *bbWorker) next(ctx context.Context) (*box, *candidate, bool) {
	sh := w.sh
	sh.mu.Lock()
	if n := len(w.dive); n > 0 {
		if ctx.Err() != nil || sh.stopped {
			for _, b := range w.dive {
				heap.Push(&sh.open, b)
			}
			w.dive = w.dive[:0]
			sh.stopped = true
			sh.busy--
			sh.mu.Unlock()
			sh.cond.Broadcast()
			return nil, nil, false
		}
		b := w.dive[n-1]
		w.dive = w.dive[:n-1]
		worst := sh.worstLocked()
		sh.mu.Unlock()
		return b, worst, true
	}
	for sh.open.Len() == 0 && sh.busy > 0 && !sh.stopped {
		sh.cond.Wait()
	}
	if sh.open.Len() == 0 || sh.stopped {
		sh.mu.Unlock()
		sh.cond.Broadcast()
		return nil, nil, false
	}
	b := heap.Pop(&sh.open).(*box)
	sh.busy++
	worst := sh.worstLocked()
	if ctx.Err() != nil {
		heap.Push(&sh.open, b) // still open: it counts in the bound
		sh.stopped = true
		sh.busy--
		sh.mu.Unlock()
		sh.cond.Broadcast()
		return nil, nil, false
	}
	sh.mu.Unlock()
	return b, worst, true
}

// put hands on the halves of a box that are still open: to open, or, while
// open holds more than its budget (Settings.OpenBytes), to the worker's own
// dive, the better half last so that it is taken next. A dive holds at
// most one box per level of the split tree beside the one in hand, so
// memory stops growing however wide the tree is; other workers go on
// taking the best of open meanwhile. The worker stays busy until its dive
// is done.
func (w *bbWorker) put(kids []*box) {
	sh := w.sh
	sh.mu.Lock()
	for _, k := range kids {
		k.seq = sh.seq
		sh.seq++
	}
	if sh.open.bytes > sh.budget {
		if len(kids) == 2 && sh.open.before(kids[0], kids[1]) {
			kids[0], kids[1] = kids[1], kids[0]
		}
		w.dive = append(w.dive, kids...)
	} else {
		for _, k := range kids {
			heap.Push(&sh.open, k)
		}
	}
	if len(w.dive) == 0 {
		sh.busy--
	}
	sh.mu.Unlock()
	sh.cond.Broadcast()
}

// splitBox halves a box (bbShared.split), first choosing its split
// position from its kept corner records where bounding left that for now.
func (w *bbWorker) splitBox(b *box) (*box, *box) {
	if b.dim == dimFromRecords {
		w.vary = varying(b, w.vary)
		b.dim = w.influence(b.recs, len(b.sgns)/w.lay.ns)
	}
	return w.sh.split(b)
}

// progress counts a finished box's candidates as done.
func (w *bbWorker) progress(set *Settings, b *box) {
	if set.Progress != nil {
		set.Progress.done.Add(b.sizeOf())
	}
}

// count records an infeasible box's candidates against the limit that ruled
// it out, while no answer is known (as the rows method counts), for the
// message when nothing is feasible.
func (w *bbWorker) count(b *box) {
	if b.infeasible && w.rw.top.worst() == nil {
		w.rw.viol.add(b.viol, b.sizeOf())
	}
}

// sync offers the worker's new answers (leaf answers and scored corners) to
// the shared bar and returns a copy of its last entry.
func (w *bbWorker) sync() *candidate {
	sh := w.sh
	sh.mu.Lock()
	defer sh.mu.Unlock()
	if w.rw.top.kept != w.synced[0] {
		for _, c := range w.rw.top.items {
			sh.bar.offerUnique(c)
		}
		w.synced[0] = w.rw.top.kept
	}
	if w.inc.kept != w.synced[1] {
		for _, c := range w.inc.items {
			sh.bar.offerUnique(c)
		}
		w.synced[1] = w.inc.kept
	}
	return sh.worstLocked()
}

// searchLeaf has the rows method score every row of the box, with the
// shared bar as the threshold.
func (w *bbWorker) searchLeaf(b *box, worst *candidate) {
	rw, sh := w.rw, w.sh
	rw.bar = worst
	for _, i := range sh.outer {
		rw.cur[i] = b.lo[i]
	}
	lo, hi := int(b.lo[sh.j]), int(b.hi[sh.j])
	ref := (lo + hi + 1) / 2
	// The rows come in lines along the outer position with the most
	// values in the box, taken fastest, and the lines in planes along
	// the one with the next most: each plane's first row is solved, each
	// line's first updated from it and the line's other rows from that
	// (searchLine), so a solve serves a whole plane.
	line, plane := -1, -1
	for _, i := range sh.outer {
		switch d := b.hi[i] - b.lo[i]; {
		case d == 0:
		case line < 0 || d > b.hi[line]-b.lo[line]:
			line, plane = i, line
		case plane < 0 || d > b.hi[plane]-b.lo[plane]:
			plane = i
		}
	}
	order := w.order[:0]
	for _, i := range sh.outer {
		if i != line && i != plane {
			order = append(order, i)
		}
	}
	for _, i := range []int{plane, line} {
		if i >= 0 {
			order = append(order, i)
		}
	}
	w.order = order
	how := freshRow
	for {
		if line < 0 {
			rw.searchRange(lo, hi, ref)
		} else {
			rw.searchLine(lo, hi, ref, line, plane, how)
		}
		rw.stats.Rows++
		k := len(order) - 1
		for ; k >= 0; k-- {
			i := order[k]
			rw.cur[i]++
			if rw.cur[i] <= b.hi[i] {
				break
			}
			rw.cur[i] = b.lo[i]
		}
		if k < 0 {
			break
		}
		switch order[k] {
		case line:
			how = alongLine
		case plane:
			how = nextLine
		default:
			how = freshRow // a carry past the plane's position starts a new plane
		}
	}
	rw.line, rw.plane = -1, -1
	rw.bar = nil
}
