package synth_test

import (
	"context"
	"fmt"
	"os"
	"strings"
	"sync/atomic"
	"testing"

	"github.com/ohmfit/ohmfit/synth"
)

// The scale cases, depth first throughout, give the list of the default
// budget, for 1, 2 and 8 workers; diff4-e96's exact ties (ranked by power)
// are the sharpest test of the order not mattering.
func TestOpenBudgetScaleCases(t *testing.T) {
	cases := []string{"ladder4-e96", "diff4-e96", "loaded3-e96"}
	if !testing.Short() {
		cases = append(cases, "taps5-e24")
	}
	for _, name := range cases {
		t.Run(name, func(t *testing.T) {
			text, err := os.ReadFile("testdata/scale/" + name + ".yaml")
			if err != nil {
				t.Fatal(err)
			}
			p := problemFromYAML(t, string(text), "")
			want := listText(t, p, &synth.Settings{Top: 10, Workers: 1})
			for _, w := range []int{1, 2, 8} {
				if got := listText(t, p, &synth.Settings{Top: 10, Workers: w, OpenBytes: 1}); got != want {
					t.Errorf("workers=%d, depth first:\n%s\ndefault budget:\n%s", w, got, want)
				}
			}
		})
	}
}

// listText runs branch and bound, which must prove its list, and writes the
// list with full precision.
func listText(t *testing.T, p *synth.Problem, set *synth.Settings) string {
	t.Helper()
	res, err := synth.Search(context.Background(), p, set, bb)
	if err != nil {
		t.Fatal(err)
	}
	if res.Status != synth.Proven {
		t.Fatalf("status %v", res.Status)
	}
	var b strings.Builder
	for _, s := range res.Solutions {
		fmt.Fprintf(&b, "%v %.17g %.17g\n", s.Values(), s.Score.Error, s.Score.Power)
	}
	return b.String()
}

// stopAfter is a context that reports itself cancelled from the n-th call
// of Err on: with one worker, a stop at a chosen point of the search.
type stopAfter struct {
	context.Context
	left atomic.Int64
}

func (c *stopAfter) Err() error {
	if c.left.Add(-1) < 0 {
		return context.Canceled
	}
	return nil
}

// A search stopped while workers are deep in dives must still account for
// every candidate: those it has not ruled out or scored are in the boxes
// left open, which the bound (the least error bound of those boxes) then
// covers. Stopped at many points of the scale cases, depth first from the
// start, mixed and best first, with one worker (the same stop each run)
// and two: counted done plus left open must be the whole space, and the
// bound must not pass the proven best error.
func TestStopInDiveKeepsEveryCandidate(t *testing.T) {
	for _, name := range []string{"skew4-e96", "ladder4-e96"} {
		text, err := os.ReadFile("testdata/scale/" + name + ".yaml")
		if err != nil {
			t.Fatal(err)
		}
		p := problemFromYAML(t, string(text), "")
		full, err := synth.Search(context.Background(), p, &synth.Settings{Top: 1, Workers: 1}, bb)
		if err != nil {
			t.Fatal(err)
		}
		best := full.Solutions[0].Score.Error
		if full.Left != 0 {
			t.Errorf("%s proven with %g candidates left", name, full.Left)
		}
		growth, budgets, workerCounts := 1.3, []int64{1, 1 << 16, 0}, []int{1, 2}
		if testing.Short() {
			growth, budgets, workerCounts = 3, []int64{1, 0}, []int{1}
		}
		for _, budget := range budgets {
			for _, workers := range workerCounts {
				stops := 0
				for k := 1.0; ; k *= growth {
					ctx := &stopAfter{Context: context.Background()}
					ctx.left.Store(int64(k))
					pr := &synth.Progress{}
					res, err := synth.Search(ctx, p, &synth.Settings{Top: 1, Workers: workers, OpenBytes: budget, Progress: pr}, bb)
					if err != nil {
						t.Fatal(err)
					}
					if res.Status == synth.Proven {
						break
					}
					stops++
					done, total := pr.Counts()
					if done+res.Left != total {
						t.Fatalf("%s, budget %d, %d workers, stopped at call %d: %g done + %g left open, space %g",
							name, budget, workers, int64(k), done, res.Left, total)
					}
					// skew4-e96 has no hard limits: every scored corner is an
					// answer, and the best of them must be listed.
					if name == "skew4-e96" && res.Stats.Evaluated > 0 && len(res.Solutions) == 0 {
						t.Fatalf("%s, budget %d, %d workers, stopped at call %d: %d scored, none listed",
							name, budget, workers, int64(k), res.Stats.Evaluated)
					}
					if res.Bound > best {
						t.Fatalf("%s, budget %d, %d workers, stopped at call %d: bound %.6g above the proven best %.6g",
							name, budget, workers, int64(k), res.Bound, best)
					}
				}
				if stops < 5 {
					t.Errorf("%s, budget %d, %d workers: only %d stops before the proof", name, budget, workers, stops)
				}
			}
		}
	}
}

// A stopped search's trade-off front covers what its list shows: every
// listed answer within the cap is on the front or beaten there (the front
// is "every answer scored that nothing beats"), the scored corners
// included.
func TestStoppedFrontCoversList(t *testing.T) {
	text, err := os.ReadFile("testdata/scale/skew4-e96.yaml")
	if err != nil {
		t.Fatal(err)
	}
	p := problemFromYAML(t, string(text), "")
	const limit = 0.05
	for k := 1.0; k < 5000; k *= 2 {
		ctx := &stopAfter{Context: context.Background()}
		ctx.left.Store(int64(k))
		res, err := synth.Search(ctx, p, &synth.Settings{Top: 5, Workers: 1, FrontErrorCap: limit}, bb)
		if err != nil {
			t.Fatal(err)
		}
		if res.Status == synth.Proven {
			break
		}
		for _, s := range res.Solutions {
			if s.Score.Error > limit {
				continue
			}
			key := synth.ScoreKey{Error: s.Score.Error, Power: s.Score.Power, Parts: s.Parts}
			covered := false
			for _, f := range res.Front {
				fk := synth.ScoreKey{Error: f.Score.Error, Power: f.Score.Power, Parts: f.Parts}
				if synth.DominatesScore(fk, key) || (fk.Error == key.Error && fk.Power == key.Power && fk.Parts == key.Parts) {
					covered = true
				}
			}
			if !covered {
				t.Fatalf("stopped at call %d: rank %d %v (error %g, power %g) is neither on the front of %d nor beaten there",
					int64(k), s.Rank, s.Values(), s.Score.Error, s.Score.Power, len(res.Front))
			}
		}
	}
}
