package variation

import (
	"context"
	"math"
	"strings"
	"testing"

	"github.com/ohmfit/ohmfit/constraints"
	"github.com/ohmfit/ohmfit/synth"
)

// robustProblem compiles robustDivider with band added to its goal
// (", tolerance: 6%" or "").
func robustProblem(t *testing.T, band string) *synth.Problem {
	t.Helper()
	src := strings.Replace(robustDivider, "equals: 1.2}", "equals: 1.2"+band+"}", 1)
	tpl, err := constraints.Parse("robust.yaml", []byte(src))
	if err != nil {
		t.Fatal(err)
	}
	cp, err := constraints.Compile(tpl)
	if err != nil {
		t.Fatal(err)
	}
	p, err := synth.NewProblem(cp, "")
	if err != nil {
		t.Fatal(err)
	}
	return p
}

// searchRobustDivider is robustProblem's problem and its top best answers.
func searchRobustDivider(t *testing.T, band string, top int) (*synth.Problem, *synth.Result) {
	t.Helper()
	p := robustProblem(t, band)
	res, err := synth.Search(context.Background(), p, &synth.Settings{Top: top, Workers: 1}, synth.Rows{})
	if err != nil {
		t.Fatal(err)
	}
	return p, res
}

// TestCheckAnswersAgainstCorners checks each answer's worst-case error and
// its verdict on the limits against bruteWorst, the loaded-divider law
// evaluated at every corner of the tolerance box (divider and parallel
// laws; the extremes of a monotone function of each part are at corners).
func TestCheckAnswersAgainstCorners(t *testing.T) {
	for _, tc := range []struct {
		name string
		band string
		cap  float64 // the goal's hard limit as a relative error; Inf for none
	}{
		{"no limit", "", math.Inf(1)},
		{"6% limit", ", tolerance: 6%", 0.06},
	} {
		t.Run(tc.name, func(t *testing.T) {
			p, res := searchRobustDivider(t, tc.band, 40)
			designs, reps, err := CheckAnswers(p.Spec, res.Solutions, "", constraints.Ambient{}, &Settings{Samples: -1})
			if err != nil {
				t.Fatal(err)
			}
			if len(reps) != len(res.Solutions) || len(designs) != len(reps) {
				t.Fatalf("%d answers, %d designs, %d reports", len(res.Solutions), len(designs), len(reps))
			}
			pass, fail := 0, 0
			for i, s := range res.Solutions {
				v := s.Values()
				want := bruteWorst(v[0], v[1])
				if got := reps[i].WorstErrorDesign; math.Abs(got-want) > 1e-9 {
					t.Errorf("answer %d (R1 %g, R2 %g): worst error %g, corners give %g", i+1, v[0], v[1], got, want)
				}
				if got, want := reps[i].LimitsMet(), want <= tc.cap; got != want {
					t.Errorf("answer %d (R1 %g, R2 %g): LimitsMet %v, corners give worst error %g against a limit of %g", i+1, v[0], v[1], got, reps[i].WorstErrorDesign, tc.cap)
				}
				if reps[i].LimitsMet() {
					pass++
				} else {
					fail++
				}
				if designs[i].Options[0].Value != v[0] || designs[i].Options[1].Value != v[1] {
					t.Errorf("answer %d: design holds %v, the answer %v", i+1, designs[i].Options, s.Options)
				}
			}
			if !math.IsInf(tc.cap, 1) && (pass == 0 || fail == 0) {
				t.Errorf("%d answers keep the limit at every corner and %d do not: the case tells nothing", pass, fail)
			}
		})
	}
}

// TestAnswerBOM checks an answer's bill of materials against the template:
// the answer's two values with their tolerances (R1 5 % by its override,
// R2 1 % from choose) and the fixed 22k at 1 % from its part.
func TestAnswerBOM(t *testing.T) {
	p, res := searchRobustDivider(t, "", 1)
	s := res.Solutions[0]
	lines, err := AnswerBOM(p.Spec, s.Options, "", constraints.Ambient{})
	if err != nil {
		t.Fatal(err)
	}
	want := map[string]struct{ value, tol float64 }{
		"R1": {s.Options[0].Value, 0.05},
		"R2": {s.Options[1].Value, 0.01},
		"RL": {22e3, 0.01},
	}
	seen := 0
	for _, l := range lines {
		for _, d := range l.Designators {
			w, ok := want[d]
			if !ok {
				t.Errorf("unexpected designator %s", d)
				continue
			}
			seen++
			if l.Value != w.value || math.Abs(l.Tolerance-w.tol) > 1e-15 {
				t.Errorf("%s: %g at %g, want %g at %g", d, l.Value, l.Tolerance, w.value, w.tol)
			}
		}
	}
	if seen != len(want) {
		t.Errorf("%d designators on the BOM, want %d", seen, len(want))
	}
}

// TestRobustShown checks the result a robust ranking shows: its first top
// answers, its own verdict as the status, and no nominal bound.
func TestRobustShown(t *testing.T) {
	p, res := searchRobustDivider(t, "", 4)
	r, res, err := RankRobust(p, res, 4, 3, "", constraints.Ambient{}, nil)
	if err != nil {
		t.Fatal(err)
	}
	shown := r.Shown(res, 3)
	if len(shown.Solutions) != 3 || shown.Solutions[0].Rank != 1 || shown.Solutions[0].Options[0] != r.Solutions[0].Options[0] {
		t.Fatalf("shown %v, ranking %v", shown.Solutions, r.Solutions[:3])
	}
	want := synth.Partial
	if r.Proven {
		want = synth.Proven
	}
	if shown.Status != want || shown.Bound != 0 {
		t.Errorf("status %v bound %g, want %v and 0", shown.Status, shown.Bound, want)
	}
	if res.Bound == 0 && res.Status == shown.Status {
		t.Errorf("the nominal result already has status %v and bound 0: the case tells nothing", res.Status)
	}
}
