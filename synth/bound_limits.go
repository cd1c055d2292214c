package synth

import (
	"math"

	"github.com/ohmfit/ohmfit/constraints"
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
	if !w.takeCorners(b) {
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
		if lim := w.p.Spec.Template.Limits.SupplyPowerMax; lim > 0 && pw > lim && !constraints.Same(pw, lim) {
			b.infeasible, b.viol = true, constraints.Violation{Kind: constraints.SupplyPowerLimit, Target: -1, Condition: c}
		}
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
