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
// values to within a tenth of the bounds' rounding allowance (1e-9
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
	synth.SetUpdatedHook(func(c synth.UpdateCheck) {
		mu.Lock()
		defer mu.Unlock()
		checked++
		deepest = max(deepest, c.Gen)
		worst = math.Max(worst, c.Deviation)
		switch {
		case c.Failed:
			t.Errorf("corner %v: updated, but a full solve fails", c.Corner)
		case !c.Signs:
			t.Errorf("corner %v (%d updates deep): a determinant or denominator sign differs from a full solve's", c.Corner, c.Gen)
		case c.Deviation > 1e-10: // a tenth of boundSlack; measured up to 1.7e-11 (an op-amp's µA output current beside mA elsewhere)
			t.Errorf("corner %v (%d updates deep): relative deviation %g from a full solve", c.Corner, c.Gen, c.Deviation)
		}
	})
	for k, p := range problems {
		if _, err := synth.Search(context.Background(), p, &synth.Settings{Top: 6, Workers: 1 + k%2}, synth.BranchBound{}); err != nil {
			t.Fatal(err)
		}
	}
	t.Log(fmt.Sprintf("%d updated corners checked, up to %d updates deep; largest relative deviation %g", checked, deepest, worst))
	if checked < 1000 {
		t.Errorf("only %d updated corners checked", checked)
	}
}
