package synth

import (
	"container/heap"
	"context"
	"math"
	"sync"
	"unsafe"

	"github.com/ohmfit/ohmfit/constraints"
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
// as candidates and tighten the bar early. A box's corners come from its
// parent's where the two share them; a corner on the new face a split
// makes lies on a line between two of the parent's corners that differ in
// the split position alone, and is given by an update along that line
// (solver.Solver.SolveBetween, the bilinear theorem) instead of a solve.
type BranchBound struct {
	// LeafRows is the largest number of rows (combinations of every
	// position but the row position) of a box that the rows method
	// finishes. Zero means 128 (measured best on the four- and
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

// dimFromRecords marks a box whose split position is chosen from its kept
// corner records when it is split (bbWorker.splitBox): most boxes are ruled
// out or finished as leaves and never need one.
const dimFromRecords = -2

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
	// viol is the limit that showed it.
	viol constraints.Violation
	dim  int // the position to split on, chosen from the corners; -1: by width; dimFromRecords: not chosen yet

	recs     []float64 // its corners' records (bound_corners.go), or nil
	sgns     []int8
	parent   *box // the box it was split from, until it is bounded
	splitPos int  // the position that split made it on
}

// bytes returns the memory a box holds: the struct, its ranges and its
// kept corner records. It is what Settings.OpenBytes counts; a box in
// the open set is not changed, so it holds the same on leaving it.
func (b *box) bytes() int64 {
	return int64(unsafe.Sizeof(*b)) + 4*int64(cap(b.lo)+cap(b.hi)) + 8*int64(cap(b.recs)) + int64(cap(b.sgns))
}

func (b *box) clone() *box {
	c := *b
	c.lo = append([]int32(nil), b.lo...)
	c.hi = append([]int32(nil), b.hi...)
	c.recs, c.sgns, c.parent = nil, nil, nil
	return &c
}

// boxHeap orders open boxes by their power bound when power ranks first,
// else by their error bound (also when part count ranks first), then by
// their bounds on the rank keys in rank order, then deepest first (a dive
// to a leaf finds answers early), then creation order. Breaking equal
// error bounds by the power bound matters where many boxes can only tie on
// error (exact ties ranked by power): the lowest power ones are finished
// first and set the bar the others are ruled out by. (Measured on diff4-e96: a fifteenth of the solves of a dive by depth.
// Before the split choice of bbWorker.influence, depth was the faster.)
type boxHeap struct {
	items []*box
	keys  []constraints.RankKey
	bytes int64 // what its boxes hold (box.bytes)
}

// first returns a box's bound on the first rank key.
func (h *boxHeap) first(b *box) float64 {
	if len(h.keys) > 0 && h.keys[0] == constraints.ByPower {
		return b.power
	}
	return b.err
}

func (h *boxHeap) Len() int           { return len(h.items) }
func (h *boxHeap) Less(i, j int) bool { return h.before(h.items[i], h.items[j]) }

// before reports whether box a is to be taken before box b.
func (h *boxHeap) before(a, b *box) bool {
	if ka, kb := h.first(a), h.first(b); ka != kb {
		return ka < kb
	}
	for _, k := range h.keys {
		switch {
		case k == constraints.ByError && a.err != b.err:
			return a.err < b.err
		case k == constraints.ByPower && a.power != b.power:
			return a.power < b.power
		case k == constraints.ByParts && a.parts != b.parts:
			return a.parts < b.parts
		}
	}
	if a.depth != b.depth {
		return a.depth > b.depth
	}
	return a.seq < b.seq
}
func (h *boxHeap) Swap(i, j int) { h.items[i], h.items[j] = h.items[j], h.items[i] }
func (h *boxHeap) Push(x any) {
	b := x.(*box)
	h.bytes += b.bytes()
	h.items = append(h.items, b)
}
func (h *boxHeap) Pop() any {
	n := len(h.items)
	b := h.items[n-1]
	h.items[n-1] = nil
	h.items = h.items[:n-1]
	h.bytes -= b.bytes()
	return b
}

// bbShared is what the workers of one branch-and-bound run share.
type bbShared struct {
	p     *Problem
	r     *ranker
	keys  []constraints.RankKey
	j     int   // row position
	outer []int // the other positions
	leaf  float64
	front float64 // Settings.FrontErrorCap
	// errorFirst: error ranks first and no front is kept, so a box whose
	// error bound passes the bar's is ruled out whatever else it holds.
	errorFirst bool
	single     [][]int32 // per position: prefix counts of single-part options

	mu   sync.Mutex
	cond *sync.Cond
	open boxHeap
	// budget is Settings.OpenBytes: past it, a worker keeps the halves of
	// its box to itself (bbWorker.dive) instead of adding them to open.
	budget  int64
	busy    int // workers holding a box (or a dive) out of open
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
		// Since a leaf's rows are updated along lines (searchLine),
		// 128 to 256 rows beat 64 on every scale case but ladder4-e96;
		// see DEVELOPERS.md.
		leaf = 128
	}
	sh := newBBShared(p, set, st, float64(leaf))
	if set.Progress != nil {
		set.Progress.start(p.Space(), "candidates")
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
	st.status = Proven
	st.open = math.Inf(1)
	if sh.stopped {
		st.status = Interrupted
		if ctx.Err() == context.DeadlineExceeded {
			st.status = TimeLimit
		}
		// What is not ruled out: the open boxes the final bar does not
		// rule out (best first, a box the bar has passed may wait in open
		// unexamined; it is done, not left).
		st.left = 0
		worst := sh.worst()
		for _, b := range sh.open.items {
			if sh.ruledOut(b, worst) {
				ws[0].count(b)
				ws[0].progress(set, b)
				continue
			}
			st.open = math.Min(st.open, b.err)
			st.left += b.sizeOf()
		}
	}
	for _, w := range ws {
		st.merge(w.rw.top, w.rw.front, w.rw.viol, w.stats())
	}
	if sh.stopped {
		// The best found so far includes the scored corners, which only
		// the bar holds until a leaf scores them again.
		for _, c := range sh.bar.items {
			st.top.offerUnique(c)
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
		leaf: leaf, front: set.FrontErrorCap, budget: set.OpenBytes}
	sh.errorFirst = len(sh.keys) > 0 && sh.keys[0] == constraints.ByError && sh.front == 0
	sh.cond = sync.NewCond(&sh.mu)
	sh.open.keys = sh.keys
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
	d := b.dim
	if d < 0 || b.lo[d] >= b.hi[d] {
		d = sh.splitDim(b) // the widest, only when the corners chose none
	}
	mid := (b.lo[d] + b.hi[d]) / 2
	a, c := b.clone(), b.clone()
	a.hi[d] = mid
	c.lo[d] = mid + 1
	a.depth, c.depth = b.depth+1, b.depth+1
	a.dim, c.dim = -1, -1 // until bounded
	a.parent, c.parent = b, b
	a.splitPos, c.splitPos = d, d
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
	if sh.front > 0 && !(b.err > constraints.ErrorTie.Above(sh.front)) {
		return false // it may hold a member of the trade-off front
	}
	if worst == nil {
		return false
	}
	for _, k := range sh.keys {
		var lb, w float64
		tie := constraints.TieOf(k)
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
		if lb > tie.Above(w) {
			return true
		}
		if !(lb >= w-tie.Below(w)) {
			return false
		}
	}
	return false
}
