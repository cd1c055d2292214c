package variation

import (
	"context"
	"fmt"
	"math"
	"sort"
	"testing"

	"github.com/ohmfit/ohmfit/constraints"
	"github.com/ohmfit/ohmfit/synth"
)

// robustDivider is a loaded divider with mixed tolerances: R1 5 %, R2 1 %,
// a fixed 22k ±1 % load. Its robust best is not its nominal best, because
// the worst case weighs each design's sensitivity to the loose R1.
const robustDivider = `ohmfit: 1
parts:
  - {name: V, type: voltage-source, plus: in, minus: gnd, volts: 5}
  - {name: R1, type: resistor, from: in, to: mid}
  - {name: R2, type: resistor, from: mid, to: gnd}
  - {name: RL, type: resistor, from: mid, to: gnd, value: 22k, tolerance: 1%}
targets:
  - {voltage: mid, equals: 1.2}
choose:
  series: E12
  min: 1k
  max: 100k
  tolerance: 1%
  overrides:
    R1: {tolerance: 5%}
`

// bruteWorst is the worst goal error of a design over its tolerance box by
// corner enumeration, by the loaded-divider law written out here:
// V = Vin·Rp/(R1+Rp) with Rp = R2·RL/(R2+RL) (divider and parallel laws).
// V is monotone in each resistor, so its extremes over the box are at
// corners.
func bruteWorst(r1, r2 float64) float64 {
	worst := 0.0
	for _, a := range []float64{-1, 1} {
		for _, b := range []float64{-1, 1} {
			for _, c := range []float64{-1, 1} {
				x1, x2, xl := r1*(1+0.05*a), r2*(1+0.01*b), 22e3*(1+0.01*c)
				rp := x2 * xl / (x2 + xl)
				v := 5 * rp / (x1 + rp)
				worst = math.Max(worst, math.Abs(v-1.2)/1.2)
			}
		}
	}
	return worst
}

// TestRankRobustAgainstBruteForce ranks every feasible design of a small
// space by its worst case, independently, and checks that RankRobust,
// starting from a pool far too small and widening it, returns the same
// first answers and says they are proven.
func TestRankRobustAgainstBruteForce(t *testing.T) {
	p := robustProblem(t, "")
	search := func(top int) (*synth.Result, error) {
		return synth.Search(context.Background(), p, &synth.Settings{Top: top, Workers: 1}, synth.Rows{})
	}
	all, err := search(100000)
	if err != nil {
		t.Fatal(err)
	}
	type ranked struct {
		r1, r2, worst float64
		nominal       int
	}
	var want []ranked
	for i, s := range all.Solutions {
		v := s.Values()
		want = append(want, ranked{v[0], v[1], bruteWorst(v[0], v[1]), i})
	}
	sort.SliceStable(want, func(a, b int) bool {
		if !constraints.Same(want[a].worst, want[b].worst) {
			return want[a].worst < want[b].worst
		}
		return want[a].nominal < want[b].nominal
	})
	if want[0].nominal == 0 {
		t.Fatalf("the robust best is the nominal best here; the test would not tell a re-ranking of the nominal list from a proof")
	}
	for _, top := range []int{1, 3, 5} {
		t.Run(fmt.Sprint("top ", top), func(t *testing.T) {
			res, err := search(4)
			if err != nil {
				t.Fatal(err)
			}
			got, _, err := RankRobust(p, res, 4, top, "", constraints.Ambient{}, search)
			if err != nil {
				t.Fatal(err)
			}
			if !got.Proven {
				t.Fatalf("top %d: not proven (%s) with a pool of %d", top, got.Reason, got.Pool)
			}
			for i := 0; i < top; i++ {
				v := got.Solutions[i].Values()
				if v[0] != want[i].r1 || v[1] != want[i].r2 {
					t.Errorf("top %d, rank %d: R1 %g R2 %g, brute force R1 %g R2 %g", top, i+1, v[0], v[1], want[i].r1, want[i].r2)
				}
				if math.Abs(got.Robust[i].WorstError-want[i].worst) > 1e-9 {
					t.Errorf("top %d, rank %d: worst error %g, corners give %g", top, i+1, got.Robust[i].WorstError, want[i].worst)
				}
			}
		})
	}
	// Without a way to widen, a pool of 4 proves nothing beyond itself.
	res, _ := search(4)
	got, _, err := RankRobust(p, res, 4, 3, "", constraints.Ambient{}, nil)
	if err != nil {
		t.Fatal(err)
	}
	if got.Proven || !(got.Bound > 0) {
		t.Errorf("pool of 4 without widening: proven %v, reason %q, bound %g", got.Proven, got.Reason, got.Bound)
	}
}
