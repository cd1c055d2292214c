package synth

import (
	"math"
)

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
