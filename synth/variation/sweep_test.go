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

// TCR follows each condition's temperature when the template gives no
// ambient range: R(T) = R25·(1 ± tol)·(1 ± α·|T − 25 °C|) at the corners.
// The divider's extremes then follow from the voltage divider formula
// V = Vin·R2/(R1 + R2) with R1 and R2 at those corners (R1 low and R2 high
// for the maximum).
func TestTCRAtConditionTemperature(t *testing.T) {
	d := design(t, `ohmfit: 1
parts:
  - {name: V, type: voltage-source, plus: in, minus: gnd, volts: 10}
  - {name: R1, type: resistor, from: in, to: mid, value: 10k, tolerance: 1%, tcr: 100ppm}
  - {name: R2, type: resistor, from: mid, to: gnd, value: 10k, tolerance: 1%, tcr: 0ppm}
targets:
  - {voltage: mid, min: 0}
conditions:
  - {name: room, temperature: 25}
  - {name: hot, temperature: 125}
`)
	r, err := Check(d, &Settings{Samples: 2000, Seed: 5})
	if err != nil {
		t.Fatal(err)
	}
	div := func(r1, r2 float64) float64 { return 10 * r2 / (r1 + r2) }
	want := map[string][2]float64{
		"room": {div(10e3*1.01, 10e3*0.99), div(10e3*0.99, 10e3*1.01)},
		"hot":  {div(10e3*1.01*1.01, 10e3*0.99), div(10e3*0.99*0.99, 10e3*1.01)},
	}
	for _, g := range r.Goals {
		w := want[g.CondName]
		if math.Abs(g.WorstMin-w[0]) > 1e-12 || math.Abs(g.WorstMax-w[1]) > 1e-12 {
			t.Errorf("%s: worst case %.9f … %.9f, closed form %.9f … %.9f", g.CondName, g.WorstMin, g.WorstMax, w[0], w[1])
		}
		if g.MonteCarlo.Low < w[0]-1e-12 || g.MonteCarlo.High > w[1]+1e-12 {
			t.Errorf("%s: Monte Carlo %g … %g outside the closed-form extremes", g.CondName, g.MonteCarlo.Low, g.MonteCarlo.High)
		}
	}
}
