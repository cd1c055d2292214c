package synth_test

import (
	"math"
	"reflect"
	"strings"
	"testing"

	"github.com/ohmfit/ohmfit/synth"
)

// TestChoose: the one rule every command uses to pick a search method.
func TestChoose(t *testing.T) {
	small := problemFromYAML(t, loadedDividerYAML("E6"), "")
	ladder := problemFromYAML(t, ladderYAML("E96", 4), "")
	sweep := problemFromYAML(t, sensorSweep, "")
	// A sweep-wide goal (not only a limit) has no box bound.
	sweepGoal := problemFromYAML(t, strings.Replace(sensorSweep, "{linearity: s, max: 3.7}", "{linearity: s, equals: 0, tolerance: 3.7}", 1), "")
	for _, c := range []struct {
		name   string
		p      *synth.Problem
		method string
		shards int
		want   synth.Method
		inf    bool // MaxRows raised to cover the space
	}{
		{"small auto", small, "auto", 0, synth.Rows{}, false},
		{"ladder auto", ladder, "auto", 0, synth.BranchBound{}, false},
		{"ladder exhaustive", ladder, "exhaustive", 0, synth.Rows{}, true},
		{"ladder heuristic", ladder, "heuristic", 0, synth.Relax{}, false},
		{"small bound", small, "bound", 0, synth.BranchBound{}, false},
		// Sweep-wide limits are checked per candidate in the leaves.
		{"sweep sharded", sweep, "auto", 3, synth.BranchBound{}, false},
		// A sweep-wide goal has no box bound: a shard must still cover
		// its part, so the rows method with no budget.
		{"sweep goal sharded", sweepGoal, "auto", 3, synth.Rows{}, true},
		{"sweep goal", sweepGoal, "auto", 0, synth.Rows{}, false},
		{"small sharded", small, "auto", 2, synth.BranchBound{}, false},
	} {
		t.Run(c.name, func(t *testing.T) {
			s := &synth.Settings{Shards: c.shards, Shard: 1}
			m, _, err := synth.Choose(c.method, c.p, s)
			if err != nil {
				t.Fatal(err)
			}
			if reflect.TypeOf(m) != reflect.TypeOf(c.want) {
				t.Errorf("method %T, want %T", m, c.want)
			}
			if math.IsInf(s.MaxRows, 1) != c.inf {
				t.Errorf("MaxRows %g", s.MaxRows)
			}
		})
	}
	// Branch and bound asked for where a goal has no box bound still
	// covers the space, and says what it cannot use.
	for _, c := range []struct {
		p    *synth.Problem
		note bool
	}{{sweepGoal, true}, {sweep, false}, {ladder, false}} {
		m, note, err := synth.Choose("bound", c.p, &synth.Settings{})
		if err != nil || reflect.TypeOf(m) != reflect.TypeOf(synth.BranchBound{}) {
			t.Fatalf("bound: %T, %v", m, err)
		}
		if (note != "") != c.note || (c.note && !strings.Contains(note, "no box bound")) {
			t.Errorf("bound on a sweep-wide goal %v: note %q", c.note, note)
		}
	}
	if _, _, err := synth.Choose("fast", small, &synth.Settings{}); err == nil {
		t.Error("an unknown method name was accepted")
	}
}
