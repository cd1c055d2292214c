package variation

import (
	"math"
	"testing"

	"github.com/ohmfit/ohmfit/constraints/examples"
	"github.com/ohmfit/ohmfit/synth"
)

// TestSweepCornersSolvedOnce: the worst case of the sweep-wide goals solves
// each corner once in every condition any of them reads and reads every
// goal from those solutions. Each goal's range is bit for bit the one
// derivedAt gives when the goal is taken alone over the same corners
// (solving the conditions it reads afresh for it, as each goal once did),
// and the pass spends corners × (conditions read) solves, fewer than the
// sum over goals of corners × (its conditions) when goals share conditions
// (a sensitivity and a resolution at one temperature read the same two).
func TestSweepCornersSolvedOnce(t *testing.T) {
	battery, ok := examples.Get("battery-sense")
	if !ok {
		t.Fatal("no battery-sense example")
	}
	cases := []struct {
		name   string
		text   string
		opts   []synth.Option
		shared bool // two goals read the same conditions
	}{
		{"ntc-linearity-sensitivity", sweepDesign, nil, false},
		{"ntc-shared-point", sweepDesign + "  - {resolution: A, at: 40, max: 1}\n", nil, true},
		{"battery-sense", string(battery), []synth.Option{single(10e3), single(1e6)}, false},
		{"rtd-pair", rtdPairDesign, rtdPairAnswer, false},
		{"ntc-parallel-ambient", ntcAmbientDesign, ntcAmbientAnswer, false},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			d := designAt(t, c.text, c.opts)
			cp := d.Problem
			st := &Settings{MaxCornerParts: DefaultMaxCornerParts}
			s := cp.Network.NewSolver()
			s.SetRefinement(true)
			r := &Report{Parts: d.Parts}
			if err := d.nominal(s, r); err != nil {
				t.Fatal(err)
			}
			alone := &Report{Parts: d.Parts, Goals: append([]Goal(nil), r.Goals...)}

			w := d.newWorstRun(s, r, newRatingTracker(d, cp.Network))
			if len(w.varying) > st.MaxCornerParts {
				t.Fatalf("%d varying parts: the linearised method would run", len(w.varying))
			}
			if len(w.sweep) < 2 {
				t.Fatalf("%d sweep-wide goals, want two or more", len(w.sweep))
			}
			w.everyCorner(st)

			// Each sweep-wide goal on its own, every corner solved for it.
			wa := d.newWorstRun(s, alone, newRatingTracker(d, cp.Network))
			alone.Corners = 1 << len(wa.varying)
			tcrBits := wa.sweepTCRBits(st)
			perGoal := 0
			for _, gi := range wa.sweep {
				for mask := range wa.sweepCorners(tcrBits) {
					wa.sweepCorner(mask, tcrBits)
					wa.visitSweep(gi)
				}
				d.tcrDraw = nil
				perGoal += wa.sweepCorners(tcrBits) * len(cp.Derived[alone.Goals[gi].Target].Conds)
			}
			for _, gi := range w.sweep {
				g, a := r.Goals[gi], alone.Goals[gi]
				if math.Float64bits(g.WorstMin) != math.Float64bits(a.WorstMin) || math.Float64bits(g.WorstMax) != math.Float64bits(a.WorstMax) {
					t.Errorf("%s: %v … %v, taken alone %v … %v", g.Label, g.WorstMin, g.WorstMax, a.WorstMin, a.WorstMax)
				}
				if !(g.WorstMin < g.Nominal && g.Nominal < g.WorstMax) {
					t.Errorf("%s: worst case %v … %v does not straddle the nominal %v", g.Label, g.WorstMin, g.WorstMax, g.Nominal)
				}
			}
			visible := 0 // the per-condition pass solves every corner in each visible condition
			for range cp.VisibleConditions() {
				visible++
			}
			sweepSolves := w.solves - r.Corners*visible
			if want := w.sweepCorners(tcrBits) * len(w.sweepConditions()); sweepSolves != want {
				t.Errorf("the sweep-wide pass solved %d networks, want %d (%d corners × %d conditions)",
					sweepSolves, want, w.sweepCorners(tcrBits), len(w.sweepConditions()))
			}
			if c.shared != (sweepSolves < perGoal) || sweepSolves > perGoal {
				t.Errorf("%d solves for the sweep-wide goals together, %d one goal at a time (goals share conditions: %v)", sweepSolves, perGoal, c.shared)
			}
			t.Logf("%d sweep-wide goals, %d corners (%d TCR bits): %d solves together, %d one goal at a time",
				len(w.sweep), w.sweepCorners(tcrBits), tcrBits, sweepSolves, perGoal)
		})
	}
}
