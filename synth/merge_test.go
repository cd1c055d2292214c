package synth

import (
	"math/rand/v2"
	"testing"

	"github.com/ohmfit/ohmfit/constraints"
)

// TestRankMerged checks the merged ranking on small integer scores (no
// ties within tolerance but exact ones) against the definitions written out
// here: rank order by error, then power, then count, then values; kept
// answers are the first top; an answer is Pareto-optimal in the kept list
// when no other kept answer is no worse in all three and better in one.
func TestRankMerged(t *testing.T) {
	rng := rand.New(rand.NewPCG(1, 2))
	for _, tc := range []struct {
		name string
		n    int
		top  int
	}{
		{"all kept", 12, 20},
		{"cut", 30, 7},
		{"none", 0, 5},
	} {
		t.Run(tc.name, func(t *testing.T) {
			sols := make([]ScoreKey, tc.n)
			for i := range sols {
				sols[i] = ScoreKey{Error: float64(rng.IntN(4)), Power: float64(rng.IntN(4)), Parts: rng.IntN(3) + 2, Values: []float64{float64(i)}}
			}
			keys := []constraints.RankKey{constraints.ByError, constraints.ByPower, constraints.ByParts}
			order, pareto := RankMerged(keys, sols, tc.top)
			if want := min(tc.n, tc.top); len(order) != want || len(pareto) != want {
				t.Fatalf("%d ranked, %d marks; want %d", len(order), len(pareto), want)
			}
			before := func(a, b ScoreKey) bool {
				if a.Error != b.Error {
					return a.Error < b.Error
				}
				if a.Power != b.Power {
					return a.Power < b.Power
				}
				if a.Parts != b.Parts {
					return a.Parts < b.Parts
				}
				return a.Values[0] < b.Values[0]
			}
			kept := map[int]bool{}
			for i := range order {
				kept[order[i]] = true
				if i > 0 && !before(sols[order[i-1]], sols[order[i]]) {
					t.Errorf("rank %d (%v) before rank %d (%v)", i, sols[order[i-1]], i+1, sols[order[i]])
				}
			}
			for i := range sols {
				if kept[i] {
					continue
				}
				if last := sols[order[len(order)-1]]; before(sols[i], last) {
					t.Errorf("%v left out but ranks before the last kept %v", sols[i], last)
				}
			}
			for i, a := range order {
				want := true
				for _, b := range order {
					x, y := sols[b], sols[a]
					if x.Error <= y.Error && x.Power <= y.Power && x.Parts <= y.Parts && (x.Error < y.Error || x.Power < y.Power || x.Parts < y.Parts) {
						want = false
					}
				}
				if pareto[i] != want {
					t.Errorf("rank %d %v: Pareto %v, want %v", i+1, sols[a], pareto[i], want)
				}
			}
		})
	}
}
