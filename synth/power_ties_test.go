package synth_test

import (
	"context"
	"fmt"
	"os"
	"strings"
	"testing"

	"github.com/ohmfit/ohmfit/synth"
)

// TestMicrowattPowerTies: a ladder feeding an op-amp stage, ranked power
// first, whose lowest-power designs draw about 13 µW. Their powers differ by
// about 1e-10 relative, real differences that must rank. Were powers to tie
// within the errors' 1e-15 absolute allowance, chains of "ties" wider than the
// allowance would make the list depend on the order candidates are met, so
// branch and bound and the rows method, or 1, 2 and 8 workers, would each print
// a different "proven" list ("the same input always gives the same list",
// shared/contract.md).
func TestMicrowattPowerTies(t *testing.T) {
	text, err := os.ReadFile("testdata/ties/microwatt-power.yaml")
	if err != nil {
		t.Fatal(err)
	}
	p := problemFromYAML(t, string(text), "E12")
	list := func(m synth.Method, workers int) string {
		res, err := synth.Search(context.Background(), p, &synth.Settings{Top: 8, Workers: workers, MaxRows: 1e9}, m)
		if err != nil {
			t.Fatal(err)
		}
		if res.Status != synth.Proven {
			t.Fatalf("%T, %d workers: status %v", m, workers, res.Status)
		}
		var b strings.Builder
		for _, s := range res.Solutions {
			fmt.Fprintf(&b, "%v %.17g %.17g\n", s.Values(), s.Score.Power, s.Score.Error)
		}
		return b.String()
	}
	want := list(synth.Rows{}, 1)
	for _, run := range []struct {
		m       synth.Method
		workers int
	}{{synth.Rows{}, 2}, {synth.BranchBound{}, 1}, {synth.BranchBound{}, 2}, {synth.BranchBound{}, 8}} {
		if got := list(run.m, run.workers); got != want {
			t.Errorf("%T with %d workers:\n%s\nrows with 1 worker:\n%s", run.m, run.workers, got, want)
		}
	}
}
