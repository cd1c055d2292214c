package synth_test

import (
	"context"
	"fmt"
	"math"
	"math/rand/v2"
	"sync"
	"testing"

	"github.com/ohmfit/ohmfit/synth"
)

// Branch and bound gives most corners of a box by an update along a line
// from two corners of its parent (solver.Solver.SolveBetween: the bilinear
// theorem) instead of a solve. Every such corner, on random networks with
// op-amps, pairs, several conditions and every target kind, and on coarse
// versions of the scale cases, agrees with full nodal solves of the same
// values to within a small fraction of the bounds' rounding allowance (1e-9
// relative), however many updates deep it is.
func TestCornerUpdatesMatchSolves(t *testing.T) {
	var problems []*synth.Problem
	rng := rand.New(rand.NewPCG(71, 73))
	trials := 30
	if testing.Short() {
		trials = 8
	}
	for range trials {
		problems = append(problems, problemFromYAML(t, randomBoundTemplate(rng), ""))
		problems = append(problems, problemFromYAML(t, randomDeepTemplate(rng), ""))
	}
	for _, c := range scaleCases {
		if c.file != "ladder6-e96" {
			problems = append(problems, scaleProblem(t, c, "E12"))
		} else if !testing.Short() {
			problems = append(problems, scaleProblem(t, c, "")) // the deepest updates: 45
		}
	}
	var mu sync.Mutex
	var checked, deepest int
	worst := 0.0
	defer synth.SetUpdatedHook(nil)
	for k, p := range problems {
		s := p.Spec.Network.NewSolver()
		sc := p.Spec.NewScore()
		free := make([]float64, len(p.Domains))
		nc := len(p.Spec.Conditions)
		synth.SetUpdatedHook(func(hp *synth.Problem, corner []int32, values []float64, power float64, gen int) {
			if hp != p {
				return
			}
			mu.Lock()
			defer mu.Unlock()
			for i, d := range p.Domains {
				free[i] = d.Options[corner[i]].Value
			}
			if err := p.Spec.Evaluate(s, free, sc); err != nil {
				t.Errorf("problem %d: corner %v: updated, but a full solve fails: %v", k, corner, err)
				return
			}
			checked++
			deepest = max(deepest, gen)
			dev := func(got, want float64) float64 {
				if math.IsNaN(want) {
					if !math.IsNaN(got) {
						return math.Inf(1)
					}
					return 0
				}
				return math.Abs(got-want) / math.Max(math.Abs(want), 1e-12)
			}
			d := dev(power, sc.Power)
			for ti := range p.Spec.Probes {
				for c := range nc {
					d = math.Max(d, dev(values[ti*nc+c], sc.Value(ti, c)))
				}
			}
			worst = math.Max(worst, d)
			if d > 1e-11 {
				t.Errorf("problem %d: corner %v (%d updates deep): relative deviation %g from full solves", k, corner, gen, d)
			}
		})
		if _, err := synth.Search(context.Background(), p, &synth.Settings{Top: 6, Workers: 1 + k%2}, synth.BranchBound{}); err != nil {
			t.Fatal(err)
		}
	}
	t.Log(fmt.Sprintf("%d updated corners checked, up to %d updates deep; largest relative deviation %g", checked, deepest, worst))
	if checked < 1000 {
		t.Errorf("only %d updated corners checked", checked)
	}
}
