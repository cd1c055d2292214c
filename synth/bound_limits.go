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
