package synth

import (
	"container/heap"
	"context"
	"math"
	"sync"

	"github.com/ohmfit/ohmfit/constraints"
	"github.com/ohmfit/ohmfit/solver"
)

// BranchBound is the exhaustive method for spaces too large for Rows. It
// searches boxes of values: a box is an index range of each position's sorted
// options. In a network of resistors, sources and ideal op-amps every node
// voltage and branch current is a ratio of multi-affine polynomials in the
// conductances (Cramer's rule on the MNA matrix, in which each conductance
// stamps a rank-one term), so with the other values fixed it is a
// linear-fractional function of any one conductance. Where the MNA
// determinant keeps its sign over a box, each such quantity is monotone in
// each value separately and its range over the box is spanned by the box's
// corners; the determinant is multi-affine itself, so its sign over a box is
// settled by its corners too (solver.Solver.DetSign).
//
// From the corners the method bounds, for every box: the goal error (the
// distance from each goal to its corner range), the hard limits, and the
// total power (by Tellegen's theorem, the sum of what the sources and op-amp
// outputs deliver; a source's power is its fixed value times a monotone
// quantity, an op-amp output's is bounded as a product of two ranges). Which
// quantities qualify:
//   - node voltages and their differences, ADC codes, branch currents and
//     the resistance seen between two nodes: wherever the determinant keeps
//     its sign;
//   - a ratio V(a)/V(b): where, in addition, V(b) keeps its sign at every
//     corner (the ratio is then linear-fractional with a denominator that
//     does not vanish);
//   - a part's power: the product of its voltage range and its current
//     range, a sound enclosure though not a tight one;
//   - sweep-wide targets (linearity, sensitivity, resolution): not bounded.
//     A box is never ruled out by them; they are checked per candidate when
//     the rows method finishes the box.
//
// A box whose corners disagree in determinant sign (a pole inside) or whose
// corner solve fails gets no bound and is split. A box is ruled out when its
// bounds show that no candidate in it can meet the hard limits, or can enter
// the kept list under the rank keys with the contract's tie tolerances (or
// the trade-off front, when one is kept). Boxes are split on the position
// whose values move the goals (or the power) most over the corners, lowest
// error bound first; a box with few
// enough rows is finished by the rows method, so every candidate that is
// not ruled out is scored exactly once. The corners themselves are scored
// with full solves and tighten the bar early.
type BranchBound struct {
	// LeafRows is the largest number of rows (combinations of every
	// position but the row position) of a box that the rows method
	// finishes. Zero means 64 (measured best on the four- and
	// five-position cases; see DEVELOPERS.md).
	LeafRows int
}

// Name returns "bound", the --method word for this method.
func (BranchBound) Name() string { return "bound" }

var _ Method = BranchBound{}

// boundSlack is the relative allowance for rounding added to every corner
// range before it is used to rule a box out: the corners are solved in
// float64, and a candidate inside the box is scored by another path (the
// rows method's update formula), so the two can differ by a few ulps times
// the matrix's condition. Widening only makes the bounds weaker.
const boundSlack = 1e-9

// Applies reports whether the branch-and-bound bounds apply to every goal of
// the problem: every goal is a quantity the corners bound (not a sweep-wide
// target). Where they do not, the method is still exact but cannot rule a
// box out by its error.
func (BranchBound) Applies(p *Problem) bool {
	for ti, tg := range p.Spec.Template.Targets {
		if tg.HasEquals && p.Spec.Derived[ti] != nil {
			return false
		}
	}
	return true
}

// box is an index range of each position's options, with its bounds.
type box struct {
	lo, hi []int32
	depth  int
	seq    int64
	size   float64

	bounded    bool    // the corners gave bounds (no pole, every solve succeeded)
	err, power float64 // lower bounds on goal error and power (0 when not bounded)
	parts      int     // lower bound on the part count
	infeasible bool    // no candidate can meet the hard limits
	violTarget int     // the limit that showed it, as in Violation
	violCond   int
	dim        int // the position to split on, chosen from the corners; -1: by width
}

func (b *box) clone() *box {
	c := *b
	c.lo = append([]int32(nil), b.lo...)
	c.hi = append([]int32(nil), b.hi...)
	return &c
}

// boxHeap orders open boxes by the lower bound on the first rank key, then
// deepest first (a dive to a leaf finds answers early), then creation order.
// (Breaking equal bounds by the next rank key instead was measured slower:
// the dive to a first leaf matters more.)
type boxHeap struct {
	items []*box
	power bool // the first rank key is power
}

// key returns a box's bound on the first rank key.
func (h *boxHeap) key(b *box) float64 {
	if h.power {
		return b.power
	}
	return b.err
}

func (h *boxHeap) Len() int { return len(h.items) }
func (h *boxHeap) Less(i, j int) bool {
	a, b := h.items[i], h.items[j]
	if ka, kb := h.key(a), h.key(b); ka != kb {
		return ka < kb
	}
	if a.depth != b.depth {
		return a.depth > b.depth
	}
	return a.seq < b.seq
}
func (h *boxHeap) Swap(i, j int) { h.items[i], h.items[j] = h.items[j], h.items[i] }
func (h *boxHeap) Push(x any)    { h.items = append(h.items, x.(*box)) }
func (h *boxHeap) Pop() any {
	n := len(h.items)
	b := h.items[n-1]
	h.items[n-1] = nil
	h.items = h.items[:n-1]
	return b
}

// bbShared is what the workers of one branch-and-bound run share.
type bbShared struct {
	p      *Problem
	r      *ranker
	keys   []constraints.RankKey
	j      int   // row position
	outer  []int // the other positions
	leaf   float64
	front  float64   // Settings.FrontErrorCap
	single [][]int32 // per position: prefix counts of single-part options

	mu      sync.Mutex
	cond    *sync.Cond
	open    boxHeap
	busy    int
	stopped bool
	seq     int64
	bar     *topList // best distinct candidates seen anywhere: the bar to beat
}

func (m BranchBound) run(ctx context.Context, p *Problem, set *Settings, st *runState) error {
	if len(p.Domains) == 0 {
		return runNoFree(p, st)
	}
	leaf := m.LeafRows
	if leaf <= 0 {
		// Larger leaves are faster on three positions (a single goal
		// leaves a surface of near answers that every row crosses), but
		// a long row's update formula rounds enough to hide exact ties
		// from the tie tolerance; see DEVELOPERS.md.
		leaf = 64
	}
	sh := newBBShared(p, set, st, float64(leaf))
	if set.Progress != nil {
		set.Progress.start(int64(p.Space()), "candidates")
	}
	workers := max(1, set.Workers)
	st.stats.Workers = workers
	ws := make([]*bbWorker, workers)
	for i := range ws {
		ws[i] = newBBWorker(sh, set, st)
	}
	root := rootBox(p)
	for _, b := range shardBoxes(sh, root, set.Shard, set.Shards) {
		b.seq = sh.seq
		sh.seq++
		ws[0].bound(b, nil)
		ws[0].sync()
		if sh.ruledOut(b, sh.worst()) {
			ws[0].count(b)
			ws[0].progress(set, b)
			continue
		}
		heap.Push(&sh.open, b)
	}
	var wg sync.WaitGroup
	for _, w := range ws {
		wg.Go(func() { w.loop(ctx, set) })
	}
	wg.Wait()
	for _, w := range ws {
		st.merge(w.rw.top, w.rw.front, w.rw.viol, w.stats())
	}
	st.status = Proven
	st.open = math.Inf(1)
	if sh.stopped {
		st.status = Interrupted
		if ctx.Err() == context.DeadlineExceeded {
			st.status = TimeLimit
		}
		// What was not ruled out: every box still open.
		for _, b := range sh.open.items {
			st.open = math.Min(st.open, b.err)
		}
	}
	return nil
}

// newBBShared prepares what the workers of one run share.
func newBBShared(p *Problem, set *Settings, st *runState, leaf float64) *bbShared {
	j := rowPosition(p)
	var outer []int
	for i := range p.Domains {
		if i != j {
			outer = append(outer, i)
		}
	}
	sh := &bbShared{p: p, r: st.r, keys: p.Spec.Template.Rank, j: j, outer: outer,
		leaf: leaf, front: set.FrontErrorCap}
	sh.cond = sync.NewCond(&sh.mu)
	sh.open.power = len(sh.keys) > 0 && sh.keys[0] == constraints.ByPower
	sh.bar = newTopList(st.r, set.Top+topMargin, len(p.Domains))
	for _, d := range p.Domains {
		pre := make([]int32, len(d.Options)+1)
		for i, o := range d.Options {
			pre[i+1] = pre[i]
			if o.Count == 1 {
				pre[i+1]++
			}
		}
		sh.single = append(sh.single, pre)
	}
	return sh
}

// rootBox is the box of the whole space: every option of every position.
func rootBox(p *Problem) *box {
	root := &box{lo: make([]int32, len(p.Domains)), hi: make([]int32, len(p.Domains)), dim: -1}
	for i, d := range p.Domains {
		root.hi[i] = int32(len(d.Options) - 1)
	}
	return root
}

// shardBoxes splits the root into pieces by value (always the same way for
// the same problem) and returns those of shard k of n (1-based); all of it
// when n <= 1. The pieces of the n shards are disjoint and cover the space.
func shardBoxes(sh *bbShared, root *box, k, n int) []*box {
	if n <= 1 {
		return []*box{root}
	}
	pieces := []*box{root}
	for len(pieces) < 4*n {
		// Split the largest piece (the first of equal size).
		big := -1
		for i, b := range pieces {
			if sh.splitDim(b) >= 0 && (big < 0 || b.sizeOf() > pieces[big].sizeOf()) {
				big = i
			}
		}
		if big < 0 {
			break
		}
		a, c := sh.split(pieces[big])
		pieces = append(pieces[:big], append([]*box{a, c}, pieces[big+1:]...)...)
	}
	var out []*box
	for i, b := range pieces {
		if i%n == k-1 {
			out = append(out, b)
		}
	}
	return out
}

func (b *box) sizeOf() float64 {
	n := 1.0
	for i := range b.lo {
		n *= float64(b.hi[i] - b.lo[i] + 1)
	}
	return n
}

// worst returns a copy of the bar's last candidate, or nil while the bar is
// not full. The caller holds no lock.
func (sh *bbShared) worst() *candidate {
	sh.mu.Lock()
	defer sh.mu.Unlock()
	return sh.worstLocked()
}

func (sh *bbShared) worstLocked() *candidate {
	w := sh.bar.worst()
	if w == nil {
		return nil
	}
	return &candidate{Opt: append([]int32(nil), w.Opt...), Error: w.Error, Power: w.Power, Parts: w.Parts}
}

// splitDim returns the position to split a box on: the one whose values span
// the widest ratio; -1 for a box of one candidate.
func (sh *bbShared) splitDim(b *box) int {
	best, width := -1, 0.0
	for i, d := range sh.p.Domains {
		if b.lo[i] == b.hi[i] {
			continue
		}
		w := math.Log(d.Options[b.hi[i]].Value / d.Options[b.lo[i]].Value)
		if best < 0 || w > width {
			best, width = i, w
		}
	}
	return best
}

// split halves a box by index: on the position its corners chose
// (influence), else on the widest.
func (sh *bbShared) split(b *box) (*box, *box) {
	d := sh.splitDim(b)
	if b.dim >= 0 && b.lo[b.dim] < b.hi[b.dim] {
		d = b.dim
	}
	mid := (b.lo[d] + b.hi[d]) / 2
	a, c := b.clone(), b.clone()
	a.hi[d] = mid
	c.lo[d] = mid + 1
	a.depth, c.depth = b.depth+1, b.depth+1
	a.dim, c.dim = -1, -1 // until bounded
	a.size, c.size = a.sizeOf(), c.sizeOf()
	return a, c
}

// isLeaf reports whether the rows method should finish the box.
func (sh *bbShared) isLeaf(b *box) bool {
	rows := 1.0
	for _, i := range sh.outer {
		rows *= float64(b.hi[i] - b.lo[i] + 1)
	}
	return rows <= sh.leaf || sh.splitDim(b) < 0
}

// ruledOut reports whether no candidate in the box can meet the hard limits,
// or enter the kept list (whose last entry is worst), or the front.
//
// Keys are taken in rank order: a box whose bound on a key is worse than
// worst's beyond the tie tolerance is out; one whose bound cannot be better
// (every candidate is worse or ties) passes the decision to the next key;
// otherwise it stays. A box that could tie on every key stays too.
func (sh *bbShared) ruledOut(b *box, worst *candidate) bool {
	if b.infeasible {
		return true
	}
	if !b.bounded {
		return false
	}
	if sh.front > 0 && !(b.err > widen(sh.front)) {
		return false // it may hold a member of the trade-off front
	}
	if worst == nil {
		return false
	}
	for _, k := range sh.keys {
		var lb, w float64
		switch k {
		case constraints.ByError:
			lb, w = b.err, worst.Error
		case constraints.ByPower:
			lb, w = b.power, worst.Power
		case constraints.ByParts:
			if b.parts > worst.Parts {
				return true
			}
			if b.parts < worst.Parts {
				return false
			}
			continue
		}
		if lb > widen(w) {
			return true
		}
		if !(lb >= w-math.Max(constraints.TieAbsolute, constraints.TieRelative*math.Abs(w))) {
			return false
		}
	}
	return false
}

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

	// Corner ranges per condition (index ×nc + condition).
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
	cval       []float64 // per corner: its goal slots' values, scaled
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
			if p.Spec.Applies[ti][c] && !p.Spec.Conditions[c].Hidden {
				w.gslot = append(w.gslot, ti*nc+c)
				sc := 1.0
				if tg.Equals != 0 {
					sc = 1 / math.Abs(tg.Equals)
				}
				w.gscale = append(w.gscale, sc)
			}
		}
	}
	w.rvlo, w.rvhi = make([]float64, len(w.res)*nc), make([]float64, len(w.res)*nc)
	w.det = make([]int8, nc)
	w.den = make([]int8, len(p.Spec.Probes)*nc)
	w.qlo, w.qhi = make([]float64, len(p.Spec.Probes)*nc), make([]float64, len(p.Spec.Probes)*nc)
	w.qnan = make([]bool, len(p.Spec.Probes)*nc)
	np, ns, no := len(w.pparts)*nc, len(w.srcs)*nc, len(w.amps)*nc
	w.vlo, w.vhi, w.ilo, w.ihi = make([]float64, np), make([]float64, np), make([]float64, np), make([]float64, np)
	w.wlo, w.whi = make([]float64, ns), make([]float64, ns)
	w.ovlo, w.ovhi, w.oilo, w.oihi = make([]float64, no), make([]float64, no), make([]float64, no), make([]float64, no)
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
		sh.mu.Lock()
		for sh.open.Len() == 0 && sh.busy > 0 && !sh.stopped {
			sh.cond.Wait()
		}
		if sh.open.Len() == 0 || sh.stopped {
			sh.mu.Unlock()
			sh.cond.Broadcast()
			return
		}
		b := heap.Pop(&sh.open).(*box)
		sh.busy++
		worst := sh.worstLocked()
		sh.mu.Unlock()
		if ctx.Err() != nil {
			sh.mu.Lock()
			heap.Push(&sh.open, b) // still open: it counts in the bound
			sh.stopped = true
			sh.busy--
			sh.mu.Unlock()
			sh.cond.Broadcast()
			return
		}
		var kids []*box
		switch {
		case sh.ruledOut(b, worst):
			w.count(b)
			w.progress(set, b)
		case sh.isLeaf(b):
			w.searchLeaf(b, worst)
			w.sync()
			w.progress(set, b)
		default:
			a, c := sh.split(b)
			w.bound(a, worst)
			w.bound(c, worst)
			worst = w.sync()
			for _, k := range []*box{a, c} {
				if sh.ruledOut(k, worst) {
					w.count(k)
					w.progress(set, k)
				} else {
					kids = append(kids, k)
				}
			}
		}
		sh.mu.Lock()
		for _, k := range kids {
			k.seq = sh.seq
			sh.seq++
			heap.Push(&sh.open, k)
		}
		sh.busy--
		sh.mu.Unlock()
		sh.cond.Broadcast()
	}
}

// progress counts a finished box's candidates as done.
func (w *bbWorker) progress(set *Settings, b *box) {
	if set.Progress != nil {
		set.Progress.done.Add(int64(b.sizeOf()))
	}
}

// count records an infeasible box's candidates against the limit that ruled
// it out, while no answer is known (as the rows method counts), for the
// message when nothing is feasible.
func (w *bbWorker) count(b *box) {
	if b.infeasible && w.rw.top.worst() == nil {
		w.rw.viol[b.violTarget*w.nc+b.violCond] += int64(b.sizeOf())
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
	for {
		rw.searchRange(lo, hi, ref)
		rw.stats.Rows++
		k := len(sh.outer) - 1
		for ; k >= 0; k-- {
			i := sh.outer[k]
			rw.cur[i]++
			if rw.cur[i] <= b.hi[i] {
				break
			}
			rw.cur[i] = b.lo[i]
		}
		if k < 0 {
			break
		}
	}
	rw.bar = nil
}

// afterCond records, for the corner being scored, what its solution in
// condition ci says about the box: the determinant's sign, the ratio
// denominators' signs and the parts' voltages, currents and powers.
func (w *bbWorker) afterCond(ci int) {
	if w.p.Spec.Conditions[ci].Hidden {
		return
	}
	s, nc := w.s, w.nc
	first := w.det[ci] == 0
	w.det[ci] = mergeSign(w.det[ci], s.DetSign())
	for _, ti := range w.ratios {
		if !w.p.Spec.Applies[ti][ci] {
			continue
		}
		v := s.Voltage(w.p.Spec.Probes[ti].B)
		sg := 0
		if v > 0 {
			sg = 1
		} else if v < 0 {
			sg = -1
		}
		k := ti*nc + ci
		if sg == 0 {
			w.den[k] = 2
		} else {
			w.den[k] = mergeSign(w.den[k], sg)
		}
	}
	for k, part := range w.pparts {
		e := w.edges[part]
		v := s.Voltage(e.From) - s.Voltage(e.To)
		widenRange(w.vlo, w.vhi, k*nc+ci, v, first)
		widenRange(w.ilo, w.ihi, k*nc+ci, s.Amps(part), first)
	}
	for k, part := range w.srcs {
		widenRange(w.wlo, w.whi, k*nc+ci, s.Watts(part), first)
	}
	for k, part := range w.res {
		e := w.edges[part]
		widenRange(w.rvlo, w.rvhi, k*nc+ci, s.Voltage(e.From)-s.Voltage(e.To), first)
	}
	for k, part := range w.amps {
		widenRange(w.ovlo, w.ovhi, k*nc+ci, s.Voltage(w.edges[part].To), first)
		widenRange(w.oilo, w.oihi, k*nc+ci, s.Amps(part), first)
	}
}

func mergeSign(seen int8, sg int) int8 {
	switch {
	case sg == 0 || seen == 2:
		return 2
	case seen == 0:
		return int8(sg)
	case int(seen) != sg:
		return 2
	}
	return seen
}

func widenRange(lo, hi []float64, k int, v float64, first bool) {
	if first {
		lo[k], hi[k] = v, v
		return
	}
	lo[k] = math.Min(lo[k], v)
	hi[k] = math.Max(hi[k], v)
}

// padded returns [lo, hi] widened by the rounding allowance.
func padded(lo, hi float64) (float64, float64) {
	d := boundSlack * math.Max(math.Abs(lo), math.Abs(hi))
	return lo - d, hi + d
}

// product returns the range of x·y for x in [a, b] and y in [c, d].
func product(a, b, c, d float64) (float64, float64) {
	p := [4]float64{a * c, a * d, b * c, b * d}
	lo, hi := p[0], p[0]
	for _, v := range p[1:] {
		lo, hi = math.Min(lo, v), math.Max(hi, v)
	}
	return lo, hi
}

// bound scores the box's corners and derives its bounds. worst is the bar's
// last candidate when the box is made (nil while there is none): a
// candidate whose goal error is beyond it is ruled out by error whatever its
// power, so the power bound may assume every goal within that error (see
// voltBand).
func (w *bbWorker) bound(b *box, worst *candidate) {
	p, nc := w.p, w.nc
	b.bounded, b.infeasible, b.err, b.power = false, false, 0, 0
	b.dim = -1
	b.size = b.sizeOf()
	b.parts = 0
	for i, pre := range w.sh.single {
		if pre[b.hi[i]+1]-pre[b.lo[i]] > 0 {
			b.parts++
		} else {
			b.parts += 2
		}
	}
	clear(w.det)
	clear(w.den)
	clear(w.qnan)
	var vary []int
	for i := range b.lo {
		if b.lo[i] != b.hi[i] {
			vary = append(vary, i)
		}
	}
	ng := len(w.gslot) + 1
	if need := ng << len(vary); len(w.cval) < need {
		w.cval = make([]float64, need)
	}
	for mask := 0; mask < 1<<len(vary); mask++ {
		copy(w.corner, b.lo)
		for k, i := range vary {
			if mask>>k&1 == 1 {
				w.corner[i] = b.hi[i]
			}
		}
		for i, d := range p.Domains {
			w.free[i] = d.Options[w.corner[i]].Value
		}
		w.corners++
		w.solves += int64(nc)
		if err := p.Spec.EvaluateWith(w.s, w.free, w.sc, w.after); err != nil {
			return // a corner that cannot be solved: no bound, split
		}
		for ti := range p.Spec.Probes {
			for c := 0; c < nc; c++ {
				if !p.Spec.Applies[ti][c] {
					continue
				}
				k := ti*nc + c
				v := w.sc.Values[k]
				if math.IsNaN(v) || math.IsInf(v, 0) {
					w.qnan[k] = true
					continue
				}
				widenRange(w.qlo, w.qhi, k, v, mask == 0)
			}
		}
		for g, k := range w.gslot {
			w.cval[mask*ng+g] = w.sc.Values[k] * w.gscale[g]
		}
		w.cval[mask*ng+ng-1] = w.sc.Power
		if w.sc.Feasible {
			copy(w.cand.Opt, w.corner)
			w.cand.Error, w.cand.Power, w.cand.Parts = w.sc.Error, w.sc.Power, 0
			for i, d := range p.Domains {
				w.cand.Parts += d.Options[w.corner[i]].Count
			}
			w.inc.offerUnique(&w.cand)
		}
	}
	b.bounded = true
	b.dim = w.influence(vary, ng)
	lim := p.Spec.Template.Limits.SupplyPowerMax
	for c := 0; c < nc; c++ {
		if p.Spec.Conditions[c].Hidden || w.det[c] == 2 || w.det[c] == 0 {
			continue // a pole inside: nothing is monotone in this condition
		}
		for ti := range p.Spec.Probes {
			if !p.Spec.Applies[ti][c] {
				continue
			}
			lo, hi, ok := w.enclose(ti, c)
			if !ok {
				continue
			}
			tg := &p.Spec.Template.Targets[ti]
			blo, bhi := tg.Band()
			if (hi < blo && !constraints.Same(hi, blo)) || (lo > bhi && !constraints.Same(lo, bhi)) {
				b.infeasible, b.violTarget, b.violCond = true, ti, c
			}
			if tg.HasEquals {
				d := 0.0
				if tg.Equals < lo {
					d = lo - tg.Equals
				} else if tg.Equals > hi {
					d = tg.Equals - hi
				}
				if tg.Equals != 0 {
					d /= math.Abs(tg.Equals)
				}
				b.err = math.Max(b.err, d)
			}
		}
		// Tellegen: the resistors dissipate what the sources and op-amp
		// outputs deliver, minus nothing else.
		pw, scale := 0.0, 0.0
		for k := range w.srcs {
			_, hi := padded(w.wlo[k*nc+c], w.whi[k*nc+c])
			pw -= hi
			scale += math.Abs(hi)
		}
		for k := range w.amps {
			vlo, vhi := padded(w.ovlo[k*nc+c], w.ovhi[k*nc+c])
			ilo, ihi := padded(w.oilo[k*nc+c], w.oihi[k*nc+c])
			lo, _ := product(vlo, vhi, ilo, ihi) // delivered V(out)·I
			pw += lo
			scale += math.Abs(lo)
		}
		pw = math.Max(0, pw-boundSlack*scale)
		// Each resistor dissipates V²·G: at least the smallest V² of its
		// voltage range times its smallest conductance. The sum is often
		// the tighter bound where an op-amp output's product is loose.
		sum := 0.0
		for k, part := range w.res {
			lo, hi := padded(w.rvlo[k*nc+c], w.rvhi[k*nc+c])
			lo, hi = w.voltBand(k, c, lo, hi, worst)
			if lo > hi {
				sum = math.Inf(1) // no candidate left to count: nothing here can rank
				break
			}
			if lo <= 0 && hi >= 0 {
				continue
			}
			v := math.Min(math.Abs(lo), math.Abs(hi))
			r := p.Spec.Conditions[c].Values[part]
			if i := w.pos[part]; i >= 0 {
				r = p.Domains[i].Options[b.hi[i]].Value
			}
			sum += v * v / r
		}
		pw = math.Max(pw, sum*(1-boundSlack)) * p.Spec.OnFraction
		b.power = math.Max(b.power, pw)
		if lim > 0 && pw > lim && !constraints.Same(pw, lim) {
			b.infeasible, b.violTarget, b.violCond = true, p.Spec.SupplyLimit(), c
		}
	}
}

// voltBand narrows resistor k's voltage range in condition c to what a
// candidate that is not ruled out can have: where a voltage target reads the
// same two nodes, within its hard limits and, when the ranking puts error
// first, within the bar's error of its goal. Candidates outside are
// infeasible or rank after the bar on error, so the power bound need not
// cover them.
func (w *bbWorker) voltBand(k, c int, lo, hi float64, worst *candidate) (float64, float64) {
	p := w.p
	e := w.edges[w.res[k]]
	errFirst := len(w.sh.keys) > 0 && w.sh.keys[0] == constraints.ByError && w.sh.front == 0
	for ti, pr := range p.Spec.Probes {
		if pr.Kind != constraints.Voltage || !p.Spec.Applies[ti][c] {
			continue
		}
		sign := 0.0
		switch {
		case pr.A == e.From && pr.B == e.To:
			sign = 1
		case pr.A == e.To && pr.B == e.From:
			sign = -1
		default:
			continue
		}
		tg := &p.Spec.Template.Targets[ti]
		blo, bhi := tg.Band()
		if tg.HasEquals && errFirst && worst != nil {
			t := widen(worst.Error)
			d := t
			if tg.Equals != 0 {
				d *= math.Abs(tg.Equals)
			}
			blo, bhi = math.Max(blo, tg.Equals-d), math.Min(bhi, tg.Equals+d)
		}
		// Inclusive bands, widened for the tie tolerance and rounding.
		blo, bhi = padded(blo, bhi)
		blo -= constraints.TieAbsolute
		bhi += constraints.TieAbsolute
		if sign < 0 {
			blo, bhi = -bhi, -blo
		}
		lo, hi = math.Max(lo, blo), math.Min(hi, bhi)
	}
	return lo, hi
}

// partPower encloses the power of target ti's part in condition c over the
// box just scored: the product of its voltage and current ranges.
func (w *bbWorker) partPower(ti, c int) (float64, float64) {
	s := w.pslot[ti]*w.nc + c
	vlo, vhi := padded(w.vlo[s], w.vhi[s])
	ilo, ihi := padded(w.ilo[s], w.ihi[s])
	return product(vlo, vhi, ilo, ihi)
}

// enclose returns a range holding target ti's value in condition c for every
// candidate of the box just scored, or false when the corners do not bound
// it.
func (w *bbWorker) enclose(ti, c int) (float64, float64, bool) {
	p, nc := w.p, w.nc
	k := ti*nc + c
	switch p.Spec.Probes[ti].Kind {
	case constraints.Voltage, constraints.Code, constraints.Current, constraints.Resistance:
		if w.qnan[k] {
			return 0, 0, false
		}
		lo, hi := padded(w.qlo[k], w.qhi[k])
		return lo, hi, true
	case constraints.Ratio:
		if w.qnan[k] || (w.den[k] != 1 && w.den[k] != -1) {
			return 0, 0, false
		}
		lo, hi := padded(w.qlo[k], w.qhi[k])
		return lo, hi, true
	case constraints.Power:
		lo, hi := w.partPower(ti, c)
		return lo, hi, true
	case constraints.SelfHeating:
		// The part's power range scaled by 1/δ > 0.
		lo, hi := w.partPower(ti, c)
		k := p.Spec.Probes[ti].Scale
		return lo * k, hi * k, true
	}
	return 0, 0, false
}

// influence returns the varying position whose values move the goals or
// the power most over the box's corners, to split the box on: a box is
// ruled out when a goal's range, or the power's, moves clear of the bar,
// and halving the position that spans most of a range narrows it most. The
// measure is the mean change, over the corner pairs that differ in that
// position alone, of each goal's value relative to the goal and of the power
// relative to its largest corner value; the largest of these counts. -1
// when nothing moves or a value is not finite (the caller then splits by
// width). (Measured on synth/testdata/scale: a half to a quarter of the
// solves of splitting the widest position, which halves the row position as
// often as any other although the leaves score it along a row at the cost
// of one solve.)
func (w *bbWorker) influence(vary []int, ng int) int {
	n := 1 << len(vary)
	top := 0.0 // the largest corner power
	for mask := 0; mask < n; mask++ {
		top = math.Max(top, math.Abs(w.cval[mask*ng+ng-1]))
	}
	best, most := -1, 0.0
	for k, i := range vary {
		bit := 1 << k
		eff := 0.0
		for g := 0; g < ng; g++ {
			sum := 0.0
			for mask := 0; mask < n; mask++ {
				if mask&bit == 0 {
					sum += math.Abs(w.cval[(mask|bit)*ng+g] - w.cval[mask*ng+g])
				}
			}
			sum /= float64(n / 2)
			if g == ng-1 {
				if top == 0 {
					continue
				}
				sum /= top
			}
			eff = math.Max(eff, sum)
		}
		if math.IsNaN(eff) || math.IsInf(eff, 0) {
			return -1
		}
		if eff > most {
			best, most = i, eff
		}
	}
	return best
}
