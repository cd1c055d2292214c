package variation

import (
	"math"
	"testing"
)

const sweepDesign = `ohmfit: 1
parts:
  - {name: V, type: voltage-source, plus: vcc, minus: gnd, volts: 3}
  - {name: R1, type: resistor, from: vcc, to: s, value: 10k, tolerance: 1%}
  - {name: RT, type: ntc, from: s, to: gnd, r25: 10k, beta: 3435, tolerance: 2%}
  - {name: A, type: adc, in: s, ref: 3, bits: 12}
sweep: {temperature: [0, 20, 40, 60]}
targets:
  - {voltage: s, min: 0, when: 40C}
  - {code: A, min: 0, when: 40C}
  - {linearity: s, max: 10}
  - {sensitivity: s, at: 40, min: 1m}
`

// Sweep-wide targets in a check: one goal each over the sweep, its nominal
// value the same as the problem's own scoring, its worst case bracketing the
// nominal, and the Monte Carlo spread around it. An ADC code is the node
// voltage scaled by 2^bits/ref, so its normalised sensitivities (adjoint
// method) equal the voltage's (chain rule: a constant factor cancels).
func TestSweepGoals(t *testing.T) {
	d := design(t, sweepDesign)
	r, err := Check(d, &Settings{Samples: 400, Seed: 3})
	if err != nil {
		t.Fatal(err)
	}
	p := d.Problem
	sc := p.NewScore()
	if err := p.Evaluate(p.Network.NewSolver(), nil, sc); err != nil {
		t.Fatal(err)
	}
	nc := len(p.Conditions)
	var volt, code *Goal
	sweep := 0
	for gi := range r.Goals {
		g := &r.Goals[gi]
		if p.Conditions[max(g.Condition, 0)].Hidden {
			t.Errorf("goal %s shows a hidden condition", g.Label)
		}
		switch g.Label {
		case "voltage s":
			volt = g
		case "code A":
			code = g
		}
		if g.Condition != SweepCondition {
			continue
		}
		sweep++
		want := sc.Values[g.Target*nc]
		if math.Abs(g.Nominal-want) > 1e-12*math.Abs(want) {
			t.Errorf("%s: nominal %g, problem scores %g", g.Label, g.Nominal, want)
		}
		if !(g.WorstMin <= g.Nominal && g.Nominal <= g.WorstMax) || g.WorstMax == g.WorstMin {
			t.Errorf("%s: worst case %g … %g does not bracket %g", g.Label, g.WorstMin, g.WorstMax, g.Nominal)
		}
		mc := g.MonteCarlo
		if !(mc.Low >= g.WorstMin-1e-9*math.Abs(g.WorstMin) && mc.High <= g.WorstMax+1e-9*math.Abs(g.WorstMax)) {
			t.Errorf("%s: Monte Carlo %g … %g outside the worst case %g … %g", g.Label, mc.Low, mc.High, g.WorstMin, g.WorstMax)
		}
	}
	if sweep != 2 {
		t.Fatalf("%d sweep-wide goals, want 2", sweep)
	}
	if volt == nil || code == nil {
		t.Fatal("missing voltage or code goal")
	}
	for j := range volt.Sens {
		if a, b := volt.Sens[j].Normalised, code.Sens[j].Normalised; math.Abs(a-b) > 1e-12 {
			t.Errorf("part %s: voltage sensitivity %g, code %g", volt.Sens[j].Part, a, b)
		}
	}
}
