package synth

import (
	"math"
	"slices"

	"github.com/ohmfit/ohmfit/constraints"
	"github.com/ohmfit/ohmfit/solver"
)

// bound scores the box's corners and derives its bounds. worst is the bar's
// last candidate when the box is made (nil while there is none): a
// candidate whose goal error is beyond it is ruled out by error whatever its
// power, so the power bound may assume every goal within that error (see
// voltBand).
func (w *bbWorker) bound(b *box, worst *candidate) {
	b.bounded, b.infeasible, b.err, b.power, b.dim = false, false, 0, 0, -1
	b.size = b.sizeOf()
	b.parts = w.partsBound(b)
	// Once the joint bound passes the bar's error the box is ruled out
	// whatever the rest of it says, when error ranks first.
	stop := math.Inf(1)
	if worst != nil && w.sh.errorFirst {
		stop = constraints.ErrorTie.Above(worst.Error)
	}
	recs, n, ok := w.takeCorners(b)
	if !ok {
		return // a corner that cannot be solved: no bound, split
	}
	b.bounded = true
	for c := 0; c < w.nc; c++ {
		if !w.p.Spec.Visible(c) || w.det[c] == 2 || w.det[c] == 0 {
			continue // a pole inside: nothing is monotone in this condition
		}
		w.boundTargets(b, c)
		pw := w.powerBound(b, c, worst)
		b.power = math.Max(b.power, pw)
		if constraints.OverPowerLimit(pw, w.p.Spec.Template.Limits.SupplyPowerMax) {
			b.infeasible, b.viol = true, constraints.Violation{Kind: constraints.SupplyPowerLimit, Target: -1, Condition: c}
		}
	}
	if !b.infeasible && !(b.err > stop) {
		b.err = w.pairBound(recs, n, b.err, stop)
	}
}

// partsBound returns the fewest parts a candidate of the box can have: one
// per position that offers a single part in its range, else two.
func (w *bbWorker) partsBound(b *box) int {
	n := 0
	for i, pre := range w.sh.single {
		if pre[b.hi[i]+1]-pre[b.lo[i]] > 0 {
			n++
		} else {
			n += 2
		}
	}
	return n
}

// boundTargets bounds the box's goal error and checks its hard limits in
// condition c from the corner ranges.
func (w *bbWorker) boundTargets(b *box, c int) {
	p := w.p
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
			b.infeasible, b.viol = true, constraints.Violation{Kind: constraints.TargetLimit, Target: ti, Condition: c}
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
}

// powerBound returns a lower bound on the total power in condition c of
// every candidate of the box that is not ruled out (see voltBand).
func (w *bbWorker) powerBound(b *box, c int, worst *candidate) float64 {
	p, nc := w.p, w.nc
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
	return math.Max(pw, sum*(1-boundSlack)) * p.Spec.OnFraction
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
		if tg.HasEquals && w.sh.errorFirst && worst != nil {
			t := constraints.ErrorTie.Above(worst.Error)
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

// goalPair is a joint bound on two goals a and b, Voltage or Code targets
// (slots target×nc + condition, goals ga and gb, error scales sa and sb:
// |goal|, or 1 for a goal of 0). Any combination α·qa + β·qb is linear in
// the MNA solution, and when both goals are read in one condition, or in
// two whose matrices are the same (they differ only in source values), it
// is a linear function of the solution of one matrix (superposition): a
// ratio of multi-affine polynomials over the MNA determinant, so monotone
// in each value where the determinant keeps its sign, and its range over a
// box is spanned by the corners. Every direction's projection of the box's
// image in the (qa, qb) plane then lies within that of the corners' images,
// so the image lies in their convex hull. A candidate's error is at least
// max(|qa − ga|/sa, |qb − gb|/sb), so the least such distance from the hull
// to (ga, gb) is a lower bound on the error of every candidate of the box.
// Two goals that each leave a surface of near answers in the box rarely
// meet on the same part of it; this rules out boxes that cross both
// surfaces apart.
type goalPair struct {
	ka, kb int
	ga, gb float64
	sa, sb float64
}

// goalPairs returns the joint bounds of the problem's goals: every two
// Voltage or Code goals in one condition, or in two conditions with the
// same matrix.
func goalPairs(p *Problem, edges []solver.Edge) []goalPair {
	nc := len(p.Spec.Conditions)
	type slot struct {
		k, c  int
		g, sc float64
	}
	var slots []slot
	for ti, tg := range p.Spec.Template.Targets {
		kind := p.Spec.Probes[ti].Kind
		if !tg.HasEquals || p.Spec.Derived[ti] != nil || (kind != constraints.Voltage && kind != constraints.Code) {
			continue
		}
		for c := 0; c < nc; c++ {
			if !p.Spec.Applies[ti][c] || !p.Spec.Visible(c) {
				continue
			}
			sc := 1.0
			if tg.Equals != 0 {
				sc = math.Abs(tg.Equals)
			}
			slots = append(slots, slot{ti*nc + c, c, tg.Equals, sc})
		}
	}
	var out []goalPair
	for i, a := range slots {
		for _, b := range slots[i+1:] {
			if sameMatrix(p, edges, a.c, b.c) {
				out = append(out, goalPair{ka: a.k, kb: b.k, ga: a.g, gb: b.g, sa: a.sc, sb: b.sc})
			}
		}
	}
	return out
}

// sameMatrix reports whether conditions a and b stamp the same MNA matrix:
// every part that is not a source has the same value in both.
func sameMatrix(p *Problem, edges []solver.Edge, a, b int) bool {
	if a == b {
		return true
	}
	va, vb := p.Spec.Conditions[a].Values, p.Spec.Conditions[b].Values
	for i, e := range edges {
		if e.Kind == solver.VoltageSource || e.Kind == solver.CurrentSource {
			continue
		}
		if va[i] != vb[i] {
			return false
		}
	}
	return true
}

// pairBound returns the greater of from and the joint bounds' lower bound
// on the goal error of every candidate of a box from its n corner records
// (see goalPair); a pair adds nothing when its conditions have a pole in
// the box or a value is not finite. The records' rounding (boundSlack) is
// taken off. It stops once the bound is above stop: the box is then ruled
// out on error whatever the other pairs say. A pair is skipped, without its
// hull, when a corner lies within the bound so far of both goals: the hull
// holds that corner, so its distance cannot be greater.
func (w *bbWorker) pairBound(recs []float64, n int, from, stop float64) float64 {
	l, t := &w.lay, from
	for _, gp := range w.pairs {
		ca, cb := gp.ka%w.nc, gp.kb%w.nc
		if w.det[ca] == 2 || w.det[ca] == 0 || w.det[cb] == 2 || w.det[cb] == 0 {
			continue
		}
		pts, mag, near, ok := w.pts[:0], 0.0, math.Inf(1), true
		for mask := 0; mask < n; mask++ {
			qa, qb := recs[mask*l.n+l.oq+gp.ka], recs[mask*l.n+l.oq+gp.kb]
			x, y := (qa-gp.ga)/gp.sa, (qb-gp.gb)/gp.sb
			if math.IsNaN(x) || math.IsInf(x, 0) || math.IsNaN(y) || math.IsInf(y, 0) {
				ok = false
				break
			}
			mag = math.Max(mag, math.Abs(qa)/gp.sa+math.Abs(qb)/gp.sb)
			near = math.Min(near, math.Max(math.Abs(x), math.Abs(y)))
			pts = append(pts, point2{x, y})
		}
		w.pts = pts
		if !ok || near <= t {
			continue
		}
		w.hull = convexHull(pts, w.hull[:0])
		t = math.Max(t, separation(w.hull)-boundSlack*mag)
		if t > stop {
			break
		}
	}
	return t
}

// sortPoints sorts finite points by x, then y: by insertion for a box's
// few corners (32 for five varying positions), which beats a general sort
// there, else by slices.SortFunc.
func sortPoints(pts []point2) {
	before := func(a, b point2) bool { return a.x < b.x || (a.x == b.x && a.y < b.y) }
	if len(pts) > 64 {
		slices.SortFunc(pts, func(a, b point2) int {
			switch {
			case before(a, b):
				return -1
			case before(b, a):
				return 1
			}
			return 0
		})
		return
	}
	for i := 1; i < len(pts); i++ {
		p := pts[i]
		j := i
		for ; j > 0 && before(p, pts[j-1]); j-- {
			pts[j] = pts[j-1]
		}
		pts[j] = p
	}
}

// point2 is a point of the plane.
type point2 struct{ x, y float64 }

func cross(o, a, b point2) float64 { return (a.x-o.x)*(b.y-o.y) - (a.y-o.y)*(b.x-o.x) }

// convexHull returns the convex hull of pts (which it sorts) in
// counter-clockwise order, without repeating the first point (Andrew's
// monotone chain), appended to out.
func convexHull(pts []point2, out []point2) []point2 {
	sortPoints(pts)
	if len(pts) < 3 {
		return append(out, pts...)
	}
	for _, p := range pts { // lower hull
		for len(out) >= 2 && cross(out[len(out)-2], out[len(out)-1], p) <= 0 {
			out = out[:len(out)-1]
		}
		out = append(out, p)
	}
	low := len(out) + 1
	for i := len(pts) - 2; i >= 0; i-- { // upper hull
		p := pts[i]
		for len(out) >= low && cross(out[len(out)-2], out[len(out)-1], p) <= 0 {
			out = out[:len(out)-1]
		}
		out = append(out, p)
	}
	return out[:len(out)-1]
}

// separation returns a lower bound on max(|x|, |y|) over the convex hull
// h of a point set (as convexHull gives it): the largest, over the axes and
// the normals of h's edges (both ways), of a direction d's least d·p over
// h's vertices divided by |d.x| + |d.y|. Every such figure is a lower bound
// on its own, since d·p ≤ (|d.x| + |d.y|)·max(|p.x|, |p.y|); the least d·p
// over the set is at a vertex of its hull, and a point the hull left out by
// rounding lies within rounding of an edge (the caller takes boundSlack
// off). By the separating axis theorem one of the directions (an edge
// normal of h or of the square max(|x|, |y|) ≤ t) gives the exact
// distance, so no inside test is needed: with near-duplicate corners the
// tiny edges rounding leaves point anywhere, and one such test once said
// outside for a hull that held the origin. 0 when the hull holds it.
func separation(h []point2) float64 {
	best := 0.0
	try := func(dx, dy float64) {
		n := math.Abs(dx) + math.Abs(dy)
		if !(n > 0) {
			return
		}
		m := math.Inf(1)
		for _, p := range h {
			if v := dx*p.x + dy*p.y; v < m {
				m = v
			}
		}
		if m/n > best {
			best = m / n
		}
	}
	try(1, 0)
	try(-1, 0)
	try(0, 1)
	try(0, -1)
	for i := range h {
		a, b := h[i], h[(i+1)%len(h)]
		dx, dy := b.x-a.x, b.y-a.y
		try(-dy, dx)
		try(dy, -dx)
	}
	return best
}
