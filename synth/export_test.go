package synth

import "math"

// UpdateCheck is what SetUpdatedHook reports for one corner branch and bound
// updated along a line instead of solving.
type UpdateCheck struct {
	Problem *Problem
	Corner  []int32
	Gen     int // updates since a solve
	// Deviation is the largest relative deviation, over every quantity of
	// the record the bounds read (targets, power, parts' volts and amps,
	// sources' watts, op-amp outputs) in the conditions they read it, from
	// a full solve of the same corner.
	Deviation float64
	// Signs is false when a determinant or ratio-denominator sign differs
	// from the full solve's.
	Signs bool
	// Failed: the full solve failed where the update did not.
	Failed bool
}

// SetUpdatedHook sets a check on every corner branch and bound updates along
// a line (updateCorner): the corner is solved afresh, with a solver and score
// of its own, and compared with its record; nil removes it.
func SetUpdatedHook(f func(UpdateCheck)) {
	if f == nil {
		testHookUpdated = nil
		return
	}
	testHookUpdated = func(w *bbWorker, corner []int32, rec []float64, sg []int8, gen int) {
		l := w.lay
		ref, refSg := make([]float64, l.n), make([]int8, l.ns)
		s, sc, free := w.s, w.sc, append([]float64(nil), w.free...)
		w.s, w.sc = w.p.Spec.Network.NewSolver(), w.p.Spec.NewScore()
		ok := w.recordCorner(corner, ref, refSg, nil)
		w.s, w.sc, w.free = s, sc, free
		chk := UpdateCheck{Problem: w.p, Corner: append([]int32(nil), corner...), Gen: gen, Signs: true, Failed: !ok}
		if ok {
			nc := w.nc
			for k := 0; k < l.opow+1; k++ {
				// Only what a bound reads: a target where it applies,
				// anything else in a visible condition.
				if k < l.ov {
					if !w.p.Spec.Applies[k/nc][k%nc] {
						continue
					}
				} else if k < l.opow && !w.p.Spec.Visible((k-l.ov)%nc) {
					continue
				}
				got, want := rec[k], ref[k]
				if math.IsNaN(got) && math.IsNaN(want) {
					continue
				}
				d := math.Abs(got-want) / math.Max(math.Abs(want), 1e-12)
				if math.IsNaN(d) {
					d = math.Inf(1)
				}
				chk.Deviation = math.Max(chk.Deviation, d)
			}
			for k := 0; k < l.sfail; k++ {
				if sg[k] != refSg[k] {
					chk.Signs = false
				}
			}
		}
		f(chk)
	}
}
