package main

import (
	"encoding/json"
	"fmt"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/ohmfit/ohmfit/constraints"
	"github.com/ohmfit/ohmfit/synth"
)

// fit --shard K/N for every K, then merge: the same ranked list as one whole
// run (byte for byte), exhaustive, and the whole run's bound; for N = 1, 2
// and 5, with the rows method and with branch and bound.
func TestShardMergeMatchesWholeRun(t *testing.T) {
	type doc struct {
		Exhaustive bool              `json:"exhaustive"`
		Bound      float64           `json:"bound"`
		Evaluated  int64             `json:"evaluated"`
		Solutions  []json.RawMessage `json:"solutions"`
	}
	for _, method := range []string{"bound", "exhaustive"} {
		whole, errOut, code := runCLI(t, "fit", "testdata/shard.yaml", "--format", "json", "--top", "6", "--method", method)
		if code != ExitOK {
			t.Fatalf("whole run: %d %s", code, errOut)
		}
		var w doc
		if err := json.Unmarshal([]byte(whole), &w); err != nil {
			t.Fatal(err)
		}
		for _, n := range []int{1, 2, 5} {
			t.Run(fmt.Sprintf("%s/%d", method, n), func(t *testing.T) {
				dir := t.TempDir()
				var files []string
				var sum int64
				for k := 1; k <= n; k++ {
					out, errOut, code := runCLI(t, "fit", "testdata/shard.yaml", "--format", "json", "--top", "6", "--method", method, "--shard", fmt.Sprintf("%d/%d", k, n))
					if code != ExitOK && code != ExitNoSolution {
						t.Fatalf("shard %d/%d: %d %s", k, n, code, errOut)
					}
					var d doc
					if err := json.Unmarshal([]byte(out), &d); err != nil {
						t.Fatal(err)
					}
					if n > 1 && d.Exhaustive {
						t.Errorf("shard %d/%d says exhaustive: true, but it covers part of the space only", k, n)
					}
					sum += d.Evaluated
					f := filepath.Join(dir, fmt.Sprintf("s%d.json", k))
					if err := os.WriteFile(f, []byte(out), 0o644); err != nil {
						t.Fatal(err)
					}
					files = append(files, f)
				}
				out, errOut, code := runCLI(t, append([]string{"merge"}, files...)...)
				if code != ExitOK {
					t.Fatalf("merge: %d %s", code, errOut)
				}
				var m doc
				if err := json.Unmarshal([]byte(out), &m); err != nil {
					t.Fatal(err)
				}
				if !m.Exhaustive || m.Bound != w.Bound || m.Evaluated != sum {
					t.Errorf("merged exhaustive %v bound %g evaluated %d; whole %v %g, shards' sum %d", m.Exhaustive, m.Bound, m.Evaluated, w.Exhaustive, w.Bound, sum)
				}
				if len(m.Solutions) != len(w.Solutions) {
					t.Fatalf("merged %d answers, whole run %d", len(m.Solutions), len(w.Solutions))
				}
				for i := range w.Solutions {
					a, _ := json.Marshal(m.Solutions[i])
					b, _ := json.Marshal(w.Solutions[i])
					if string(a) != string(b) {
						t.Errorf("rank %d:\nmerged %s\nwhole  %s", i+1, a, b)
					}
				}
			})
		}
	}
}

// merge refuses an incomplete or mixed set of shards with a one-line error.
func TestMergeRefusesIncomplete(t *testing.T) {
	dir := t.TempDir()
	out, _, _ := runCLI(t, "fit", "testdata/shard.yaml", "--format", "json", "--shard", "1/2")
	f := filepath.Join(dir, "a.json")
	if err := os.WriteFile(f, []byte(out), 0o644); err != nil {
		t.Fatal(err)
	}
	for _, args := range [][]string{{"merge", f}, {"merge", f, f}, {"merge"}} {
		t.Run(strings.Join(args, " "), func(t *testing.T) {
			_, errOut, code := runCLI(t, args...)
			if code != ExitBadInput {
				t.Errorf("%v: exit %d, want 2 (%s)", args, code, errOut)
			}
		})
	}
}

// A result that is not proven says how far from proven it is when the
// search proved a positive bound, and says nothing of the kind otherwise.
func TestBoundLine(t *testing.T) {
	tp, err := loadTemplate("testdata/shard.yaml", nil)
	if err != nil {
		t.Fatal(err)
	}
	cp, err := constraints.Compile(tp)
	if err != nil {
		t.Fatal(err)
	}
	p, err := synth.NewProblem(cp, "")
	if err != nil {
		t.Fatal(err)
	}
	sol := []synth.Solution{{Score: &constraints.Score{Error: 0.0012}}}
	for _, c := range []struct {
		status synth.Status
		bound  float64
		want   string
	}{
		{synth.TimeLimit, 0.001, "best 0.120%; nothing better than 0.100% can exist"},
		{synth.TimeLimit, 0, ""},
		{synth.Proven, 0.0012, ""},
	} {
		t.Run(fmt.Sprint(c.status, " ", c.bound), func(t *testing.T) {
			got := boundLine(p, &synth.Result{Status: c.status, Bound: c.bound, Solutions: sol})
			if got != c.want {
				t.Errorf("%v bound %g: %q, want %q", c.status, c.bound, got, c.want)
			}
		})
	}
}

// TestShardSummarySaysShard: a shard's table never claims the whole space,
// and a shard with nothing feasible says the others may hold some.
func TestShardSummarySaysShard(t *testing.T) {
	out, _, code := runCLI(t, "fit", "example:gain-stage", "--shard", "2/4", "--top", "1")
	if code != ExitOK || strings.Contains(out, "whole space") && !strings.Contains(out, "merge the shards") || !strings.Contains(out, "within shard 2/4") {
		t.Errorf("exit %d, summary:\n%s", code, out)
	}
	_, errOut, code := runCLI(t, "fit", "example:divider", "--shard", "1/9999")
	if code != ExitNoSolution || !strings.Contains(errOut, "no candidate in shard 1/9999") {
		t.Errorf("exit %d, stderr %q", code, errOut)
	}
}

// The not-met message never shows a blank limit: when the target that
// rejected the most candidates has no limits (a goal whose figure the
// candidates do not define), it says so; when it has one, it names it.
func TestNoSolutionMessageNamesTheLimit(t *testing.T) {
	tp, err := loadTemplate("testdata/shard.yaml", nil)
	if err != nil {
		t.Fatal(err)
	}
	tp.Targets[1].HasMax, tp.Targets[1].Max = true, 1.5
	cp, err := constraints.Compile(tp)
	if err != nil {
		t.Fatal(err)
	}
	p, err := synth.NewProblem(cp, "")
	if err != nil {
		t.Fatal(err)
	}
	for _, c := range []struct {
		target int
		want   string
	}{
		{0, "most were rejected because voltage t1 is undefined for them in condition \"nominal\" (line 11)"},
		{1, "most were rejected by voltage t2 max 1.5 V in condition \"nominal\" (line 12)"},
	} {
		t.Run(fmt.Sprint("target ", c.target), func(t *testing.T) {
			res := &synth.Result{Status: synth.NoFeasible, Blocking: &synth.Violation{Violation: constraints.Violation{Kind: constraints.TargetLimit, Target: c.target}}}
			got := noSolutionMessage(p, res, nil)
			if !strings.Contains(got, c.want) || strings.Contains(got, "  ") {
				t.Errorf("target %d: %q, want it to contain %q and no blank limit", c.target, got, c.want)
			}
		})
	}
}
