package synth

import (
	"math"

	"github.com/ohmfit/ohmfit/solver"
)

// A corner record is what one corner's solve says about a box: every
// target's value per condition, the total power, the parts' voltages,
// currents and powers that the bounds read, and the signs of the
// determinant and of the ratio denominators. A box keeps the records of
// its corners, so that each of its two halves takes half of its own from
// it (the face on its side of the split) and gives the new face at the
// split point by updates along lines from the parent's (updateCorner).

// rowInfluence discounts the row position's influence in the split choice:
// a leaf scores that position along each row at the cost of one solve, so
// a box left wide in it costs little more to finish. (Measured on
// synth/testdata/scale, in solves: 0.25 saves 40 % on taps5-e24 and 20 % on
// diff4-e96 against no discount, and changes skew4-e96 by 1 %; 0.5 saves
// less on those and 12 % on skew4; 0.15 and 2 were worse.)
const rowInfluence = 0.25

// maxKeptDims is the most varying positions whose corner records a box
// keeps (2^maxKeptDims records); a box with more is bounded from scratch
// each time.
const maxKeptDims = 10

// recordLayout places the slots of a corner record: floats first (the
// quantities the bounds read, the total power, then the MNA solution of
// every condition and the corner's generation), then the signs (an int8
// each: the determinant's per condition, the ratio denominators', the
// failure flag).
type recordLayout struct {
	n, ns                         int // floats and signs per record
	oq, ov, oi, ow, orv, oov, ooi int // float offsets, each ×nc per item
	opow                          int // the total power
	ox, nx                        int // the solutions: nx unknowns per condition
	ogen                          int // how many updates along a line led to it (0: solved)
	sden, sfail                   int // sign offsets (the determinant's are 0…nc-1)
}

func newRecordLayout(probes, pparts, srcs, res, amps, unknowns, nc int) recordLayout {
	var l recordLayout
	at := 0
	next := func(items int) int {
		o := at
		at += items * nc
		return o
	}
	l.oq = next(probes)
	l.ov, l.oi = next(pparts), next(pparts)
	l.ow = next(srcs)
	l.orv = next(res)
	l.oov, l.ooi = next(amps), next(amps)
	l.opow = at
	at++
	l.nx = unknowns
	l.ox = next(unknowns)
	l.ogen = at
	l.n = at + 1
	l.sden = nc
	l.sfail = nc + probes*nc
	l.ns = l.sfail + 1
	return l
}

// varying returns the positions whose range in the box holds more than
// one option.
func varying(b *box, vary []int) []int {
	vary = vary[:0]
	for i := range b.lo {
		if b.lo[i] != b.hi[i] {
			vary = append(vary, i)
		}
	}
	return vary
}

// cornerOf writes the box's corner mask (a bit per varying position: its
// lowest or highest option) into corner.
func cornerOf(b *box, vary []int, mask int, corner []int32) {
	copy(corner, b.lo)
	for k, i := range vary {
		if mask>>k&1 == 1 {
			corner[i] = b.hi[i]
		}
	}
}

// solveCorner scores the corner with full solves into record rec and signs
// sg, and offers it to the worker's corner list when it is feasible.
func (w *bbWorker) solveCorner(corner []int32, rec []float64, sg []int8) {
	w.scoreCorner(corner, rec, sg, nil)
	rec[w.lay.ogen] = 0
}

// maxLineGen is the most updates along a line (SolveBetween) between a
// corner and a full solve: each update adds its rounding to its ends', so
// a corner that many updates from a solve is solved afresh. (Measured on
// synth/testdata/scale: the deepest corners are 19 to 25 updates from a
// solve, 45 on ladder6-e96, and deviate from full solves by at most about
// 1e-12 relative in their targets and 1.7e-11 in any quantity the bounds
// read, a sixtieth of boundSlack; TestCornerUpdatesMatchSolves.)
const maxLineGen = 64

// updateCorner scores the corner into rec and sg from the records ra and
// rb of two corners it lies between on a line along position d (the
// parent's corners at either end of the split position), by
// solver.Solver.SolveBetween; a condition the update cannot give is solved.
// It reports false, scoring nothing, when the corner is too many updates
// from a solve (maxLineGen) or an end's solve failed.
func (w *bbWorker) updateCorner(corner []int32, rec []float64, sg []int8, d int, ra, rb []float64, sa, sb []int8, lo, hi int32) bool {
	l := &w.lay
	gen := math.Max(ra[l.ogen], rb[l.ogen]) + 1
	if gen > maxLineGen || sa[l.sfail] != 0 || sb[l.sfail] != 0 {
		return false
	}
	opts := w.p.Domains[d].Options
	ln := &w.ln
	ln.part, ln.ra, ln.rb, ln.sa, ln.sb = w.p.Domains[d].Part, ra, rb, sa, sb
	ln.a.R, ln.b.R = opts[lo].Value, opts[hi].Value
	w.scoreCorner(corner, rec, sg, w.along)
	rec[l.ogen] = gen
	if testHookUpdated != nil && sg[l.sfail] == 0 {
		testHookUpdated(w, corner, rec, sg, int(gen))
	}
	return true
}

// testHookUpdated, when not nil, is called with every corner updateCorner
// scored: the worker, the corner's options, its record and signs and its
// generation; for a test that compares updates with full solves
// (export_test.go). It may be called from several goroutines.
var testHookUpdated func(w *bbWorker, corner []int32, rec []float64, sg []int8, gen int)

// lineEnds is what solveAlong reads: the two records a corner is updated
// between and the varying part's values there.
type lineEnds struct {
	part   int
	ra, rb []float64
	sa, sb []int8
	a, b   solver.Endpoint
}

// solveAlong gives condition ci's solution by an update along the line
// of w.ln, or by a full solve where the update does not apply.
func (w *bbWorker) solveAlong(ci int) error {
	l, ln := &w.lay, &w.ln
	x := l.ox + ci*l.nx
	ln.a.X, ln.a.Sign = ln.ra[x:x+l.nx], int(ln.sa[ci])
	ln.b.X, ln.b.Sign = ln.rb[x:x+l.nx], int(ln.sb[ci])
	if w.s.SolveBetween(ln.part, ln.a, ln.b) == nil {
		return nil
	}
	w.solves++
	return w.s.Solve()
}

// scoreCorner scores the corner into record rec and signs sg, each
// condition solved by solve (nil: a full solve), and offers it to the
// worker's corner list when it is feasible.
func (w *bbWorker) scoreCorner(corner []int32, rec []float64, sg []int8, solve func(int) error) {
	w.corners++
	if solve == nil {
		w.solves += int64(w.nc)
	}
	if w.recordCorner(corner, rec, sg, solve) && w.sc.Feasible {
		w.offerCorner(corner)
	}
}

// recordCorner scores the corner into record rec and signs sg with the
// worker's solver and score (w.free holds its values after), each
// condition solved by solve (nil: a full solve); false, with the record's
// failure flag set, when a solve failed.
func (w *bbWorker) recordCorner(corner []int32, rec []float64, sg []int8, solve func(int) error) bool {
	p, l := w.p, &w.lay
	for i, d := range p.Domains {
		w.free[i] = d.Options[corner[i]].Value
	}
	w.rec, w.rsg = rec, sg
	clear(sg)
	if err := p.Spec.EvaluateBy(w.s, w.free, w.sc, solve, w.after); err != nil {
		sg[l.sfail] = 1 // a corner that cannot be solved: no bound, split
		return false
	}
	for ti := range p.Spec.Probes {
		for c := 0; c < w.nc; c++ {
			rec[l.oq+ti*w.nc+c] = w.sc.Value(ti, c)
		}
	}
	rec[l.opow] = w.sc.Power
	return true
}

// offerCorner offers a feasible corner, just scored into w.sc by plain
// solves, to the worker's corner list. One that could enter is scored
// again by refined solves first (rowWorker.fine), so that the bar, like the
// answers, holds the figures the results show: plain figures of exact ties
// differ by rounding beyond the contract's tie, and a bar made of them
// could rule out a box that holds a tie it should keep.
func (w *bbWorker) offerCorner(corner []int32) {
	p := w.p
	copy(w.cand.Opt, corner)
	w.cand.Parts = partCount(p.Domains, corner)
	w.cand.atLeast(w.sc.Error, w.sc.Power)
	rw := w.rw
	// The trade-off front takes corners too, so that a stopped search's
	// front holds every answer it scored, as its list does.
	if !rw.mayFront(&w.cand, w.sc.Error) && w.inc.full() && !w.inc.r.less(&w.cand, w.inc.worst()) {
		return
	}
	w.solves += int64(w.nc)
	// An error cap is a hard limit: a corner over it is no answer, and
	// in the bar it would rule out boxes holding answers.
	if err := p.Spec.Evaluate(rw.fine, w.free, w.sc); err != nil || !w.sc.Feasible || !withinCap(w.sc.Error, rw.errCap) {
		return
	}
	w.cand.Error, w.cand.Power = w.sc.Error, w.sc.Power
	w.inc.offerUnique(&w.cand)
	rw.offerFront(&w.cand)
}

// afterCond records, for the corner being scored, what its solution in
// condition ci says about the box: the determinant's sign, the ratio
// denominators' signs and the parts' voltages, currents and powers.
func (w *bbWorker) afterCond(ci int) {
	s, nc, l, rec := w.s, w.nc, &w.lay, w.rec
	// Every condition's solution and determinant sign, for the corners
	// that will be updated from this one (updateCorner).
	copy(rec[l.ox+ci*l.nx:l.ox+(ci+1)*l.nx], s.X())
	w.rsg[ci] = int8(s.DetSign())
	if !w.p.Spec.Visible(ci) {
		// No bound reads a helper condition's parts; zeros keep a
		// reused record's old figures out of gather's finiteness check.
		for off := l.ov; off < l.opow; off += nc {
			rec[off+ci] = 0
		}
		return
	}
	for _, ti := range w.ratios {
		if !w.p.Spec.Applies[ti][ci] {
			continue
		}
		v := s.Voltage(w.p.Spec.Probes[ti].B)
		sg := int8(0)
		if v > 0 {
			sg = 1
		} else if v < 0 {
			sg = -1
		}
		w.rsg[l.sden+ti*nc+ci] = sg
	}
	for k, part := range w.pparts {
		e := w.edges[part]
		rec[l.ov+k*nc+ci] = s.Voltage(e.From) - s.Voltage(e.To)
		rec[l.oi+k*nc+ci] = s.Amps(part)
	}
	for k, part := range w.srcs {
		rec[l.ow+k*nc+ci] = s.Watts(part)
	}
	for k, part := range w.res {
		e := w.edges[part]
		rec[l.orv+k*nc+ci] = s.Voltage(e.From) - s.Voltage(e.To)
	}
	for k, part := range w.amps {
		rec[l.oov+k*nc+ci] = s.Voltage(w.edges[part].To)
		rec[l.ooi+k*nc+ci] = s.Amps(part)
	}
}

// takeCorners gives the box the records of every corner, from its parent
// (the box it was just split from) where they share a face, else from new
// solves, and gathers them into the worker's ranges. It reports false when
// a corner's solve failed. It returns the records, n corners of them, for
// pairBound; they stay valid until the worker's next box.
func (w *bbWorker) takeCorners(b *box) (recs []float64, n int, ok bool) {
	par := b.parent
	b.parent = nil
	w.vary = varying(b, w.vary)
	n = 1 << len(w.vary)
	keep := len(w.vary) <= maxKeptDims
	l := &w.lay
	var sgns []int8
	if keep {
		recs, sgns = w.newRecords(n) // kept with the box, for its halves
	} else {
		recs, sgns = w.scratch(n)
	}
	if par != nil && par.recs != nil {
		w.inherit(b, par, recs, sgns)
	} else {
		for mask := 0; mask < n; mask++ {
			cornerOf(b, w.vary, mask, w.corner)
			w.solveCorner(w.corner, recs[mask*l.n:(mask+1)*l.n], sgns[mask*l.ns:(mask+1)*l.ns])
		}
	}
	if keep {
		b.recs, b.sgns = recs, sgns
	}
	if !w.gather(recs, sgns, n) {
		return nil, 0, false
	}
	if keep {
		b.dim = dimFromRecords
	} else {
		b.dim = w.influence(recs, n)
	}
	return recs, n, true
}

// newRecords returns record space for n corners a box will keep: from the
// worker's pool of released ones when it has one of that size.
func (w *bbWorker) newRecords(n int) ([]float64, []int8) {
	if k := len(w.pool[n]); k > 0 {
		r := w.pool[n][k-1]
		w.pool[n] = w.pool[n][:k-1]
		return r.recs, r.sgns
	}
	return make([]float64, n*w.lay.n), make([]int8, n*w.lay.ns)
}

// release returns a box's records to the worker's pool: the box will not
// be split again (it was split, ruled out or is a leaf).
func (w *bbWorker) release(b *box) {
	if b.recs != nil {
		n := len(b.sgns) / w.lay.ns
		w.pool[n] = append(w.pool[n], records{b.recs, b.sgns})
		b.recs, b.sgns = nil, nil
	}
}

// records is the record space of one box.
type records struct {
	recs []float64
	sgns []int8
}

// scratch returns the worker's reusable record space for n corners.
func (w *bbWorker) scratch(n int) ([]float64, []int8) {
	if len(w.tmpRecs) < n*w.lay.n {
		w.tmpRecs, w.tmpSgns = make([]float64, n*w.lay.n), make([]int8, n*w.lay.ns)
	}
	return w.tmpRecs[:n*w.lay.n], w.tmpSgns[:n*w.lay.ns]
}

// inherit fills the records of box b, just split from par on position
// b.splitPos: the corners on par's face that b keeps come from par's
// records, those on the new face are updated from two of them
// (updateCorner), or solved where no update applies.
func (w *bbWorker) inherit(b, par *box, recs []float64, sgns []int8) {
	l := &w.lay
	d := b.splitPos
	w.pvary = varying(par, w.pvary)
	for mask := 0; mask < 1<<len(w.vary); mask++ {
		cornerOf(b, w.vary, mask, w.corner)
		rec, sg := recs[mask*l.n:(mask+1)*l.n], sgns[mask*l.ns:(mask+1)*l.ns]
		pm, dbit := 0, 0
		for k, i := range w.pvary {
			if i == d {
				dbit = 1 << k
			}
			if w.corner[i] == par.hi[i] {
				pm |= 1 << k
			}
		}
		if v := w.corner[d]; v != par.lo[d] && v != par.hi[d] {
			// On the new face: between the parent's corners at either
			// end of d, which differ from it in d alone.
			lo, hi := pm&^dbit, pm|dbit
			if !w.lineOK || !w.updateCorner(w.corner, rec, sg, d,
				par.recs[lo*l.n:(lo+1)*l.n], par.recs[hi*l.n:(hi+1)*l.n],
				par.sgns[lo*l.ns:(lo+1)*l.ns], par.sgns[hi*l.ns:(hi+1)*l.ns], par.lo[d], par.hi[d]) {
				w.solveCorner(w.corner, rec, sg)
			}
			continue
		}
		copy(rec, par.recs[pm*l.n:(pm+1)*l.n])
		copy(sg, par.sgns[pm*l.ns:(pm+1)*l.ns])
	}
}

// gather takes n corner records into the worker's ranges (qlo/qhi, det,
// …), as the bounds read them; false when a corner's solve failed or a
// quantity other than a target's is not finite (no bound then: the box is
// split). A target's value that is not finite marks it unbounded (qnan).
func (w *bbWorker) gather(recs []float64, sgns []int8, n int) bool {
	p, nc, l := w.p, w.nc, &w.lay
	clear(w.det)
	clear(w.den)
	clear(w.qnan)
	nq := len(p.Spec.Probes) * nc
	lo, hi := w.glo, w.ghi
	for mask := 0; mask < n; mask++ {
		rec, sg := recs[mask*l.n:mask*l.n+l.opow], sgns[mask*l.ns:(mask+1)*l.ns]
		if sg[l.sfail] != 0 {
			return false
		}
		// v − v is 0 for a finite v, NaN for NaN and ±Inf.
		for k, v := range rec[:nq] {
			if v-v != 0 {
				w.qnan[k] = true
			}
		}
		bad := 0.0
		for _, v := range rec[nq:] {
			bad += v - v
		}
		if bad != 0 {
			return false
		}
		if mask == 0 {
			copy(lo, rec)
			copy(hi, rec)
		} else {
			// Plain comparisons: a NaN never widens a range (and marks
			// its target unbounded above).
			for k, v := range rec {
				if v < lo[k] {
					lo[k] = v
				}
				if v > hi[k] {
					hi[k] = v
				}
			}
		}
		for c := 0; c < nc; c++ {
			if !p.Spec.Visible(c) {
				continue
			}
			w.det[c] = mergeSign(w.det[c], int(sg[c]))
			for _, ti := range w.ratios {
				if k := ti*nc + c; p.Spec.Applies[ti][c] {
					if s := sg[l.sden+k]; s == 0 {
						w.den[k] = 2
					} else {
						w.den[k] = mergeSign(w.den[k], int(s))
					}
				}
			}
		}
	}
	return true
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

// influence returns the varying position whose values move the goals or
// the power most over the box's corners (records recs, n of them), to
// split the box on: a box is ruled out when a goal's range, or the
// power's, moves clear of the bar, and halving the position that spans
// most of a range narrows it most. The measure is the mean change, over the
// corner pairs that differ in that position alone, of each goal's value
// relative to the goal and of the power relative to its largest corner
// value; the largest of these counts, the row position's discounted by
// rowInfluence. -1 when nothing moves or a value is not finite (the caller
// then splits by width). (Measured on synth/testdata/scale: a half to a
// quarter of the solves of splitting the widest position.)
func (w *bbWorker) influence(recs []float64, n int) int {
	l := &w.lay
	top := 0.0 // the largest corner power
	for mask := 0; mask < n; mask++ {
		top = math.Max(top, math.Abs(recs[mask*l.n+l.opow]))
	}
	best, most := -1, 0.0
	for k, i := range w.vary {
		bit := 1 << k
		eff := 0.0
		for g := 0; g <= len(w.gslot); g++ {
			off, scale := l.opow, 1.0
			if g < len(w.gslot) {
				off, scale = l.oq+w.gslot[g], w.gscale[g]
			} else if top == 0 {
				continue
			} else {
				scale = 1 / top
			}
			sum := 0.0
			for mask := 0; mask < n; mask++ {
				if mask&bit == 0 {
					sum += math.Abs(recs[(mask|bit)*l.n+off] - recs[mask*l.n+off])
				}
			}
			eff = math.Max(eff, sum*scale/float64(n/2))
		}
		if math.IsNaN(eff) || math.IsInf(eff, 0) {
			return -1
		}
		if i == w.sh.j {
			eff *= rowInfluence
		}
		if eff > most {
			best, most = i, eff
		}
	}
	return best
}
