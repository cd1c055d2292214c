package variation

import (
	"math"
	"slices"
	"testing"

	"github.com/ohmfit/ohmfit/constraints"
	"github.com/ohmfit/ohmfit/constraints/examples"
	"github.com/ohmfit/ohmfit/constraints/sensors"
	"github.com/ohmfit/ohmfit/synth"
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
	var volt, code *Goal
	sweep := 0
	for gi := range r.Goals {
		g := &r.Goals[gi]
		if !p.Visible(max(g.Condition, 0)) {
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
		want := sc.Value(g.Target, 0)
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

// scaledTemplate returns a fully valued copy of the design's template with
// the physical part named name scaled by f, and every free position filled
// from opts (a pair by the series law Ra + Rb or the parallel law
// RaRb/(Ra + Rb)). A sensor is scaled through its model: R25 of a B-model
// thermistor, R0 of an RTD, so that its resistance is f times as large at
// every temperature. It also returns the unscaled value of that part (ohms,
// volts, R25 or R0).
func scaledTemplate(t *testing.T, tpl *constraints.Template, opts []synth.Option, name string, f float64) (*constraints.Template, float64) {
	t.Helper()
	base := math.NaN()
	c := *tpl
	c.Parts = slices.Clone(tpl.Parts)
	k := 0
	for i := range c.Parts {
		ps := &c.Parts[i]
		if ps.Free {
			o := opts[k]
			k++
			a, b := o.Parts[0], o.Parts[1]
			switch {
			case name == ps.Name && o.Count == 1, name == ps.Name+"a" && o.Count == 2:
				base = a
				a *= f
			case name == ps.Name+"b" && o.Count == 2:
				base = b
				b *= f
			}
			switch o.Combine {
			case constraints.Series:
				ps.Value = a + b
			case constraints.Parallel:
				ps.Value = a * b / (a + b)
			default:
				ps.Value = a
			}
			ps.Free = false
			continue
		}
		if ps.Name != name {
			continue
		}
		switch m := ps.Sensor.(type) {
		case nil:
			base = ps.Value
			ps.Value *= f
		case sensors.Beta:
			base = m.R25
			m.R25 *= f
			ps.Sensor = m
		case sensors.RTD:
			base = m.R0
			m.R0 *= f
			ps.Sensor = m
		default:
			t.Fatalf("%s: no way to scale a %T", name, m)
		}
	}
	return &c, base
}

// resolvedTarget compiles a valued template afresh and returns target ti
// as the problem scores it (a sweep-wide target's value sits at condition 0).
func resolvedTarget(t *testing.T, tpl *constraints.Template, ti int) float64 {
	t.Helper()
	p, err := constraints.Compile(tpl)
	if err != nil {
		t.Fatal(err)
	}
	sc := p.NewScore()
	if err := p.Evaluate(p.Network.NewSolver(), nil, sc); err != nil {
		t.Fatal(err)
	}
	return sc.Value(ti, 0)
}

// rtdPairDesign is an RTD divider with all three sweep-wide kinds, TCR
// following the sweep's temperatures; its free Rtop takes 3.3k + 470 in
// series (rtdPairAnswer).
const rtdPairDesign = `ohmfit: 1
parts:
  - {name: Vref, type: voltage-source, plus: ref, minus: gnd, volts: 2.5, tolerance: 0.5%}
  - {name: Rtop, type: resistor, from: ref, to: s}
  - {name: PT1, type: rtd, from: s, to: gnd, r0: 1k, tolerance: 0.1%}
  - {name: Rsh, type: resistor, from: s, to: gnd, value: 22k, tolerance: 1%, tcr: 50ppm}
  - {name: A, type: adc, in: s, ref: 2.5, bits: 12}
sweep: {temperature: {from: -40, to: 120, step: 20}}
targets:
  - {linearity: s, max: 10}
  - {sensitivity: s, at: 100, min: 1m}
  - {resolution: A, at: 0, max: 1}
choose: {series: E24, min: 100, max: 100k, combine: any}
`

var rtdPairAnswer = []synth.Option{{Value: 3.3e3 + 470, Parts: [2]float64{3.3e3, 470}, Count: 2, Combine: constraints.Series}}

// ntcAmbientDesign is an NTC with a parallel top resistor and all three
// sweep-wide kinds, under an ambient range (which governs the TCR drift
// instead of the sweep); its free Rtop takes 68k ∥ 33k (ntcAmbientAnswer).
const ntcAmbientDesign = `ohmfit: 1
parts:
  - {name: Vcc, type: voltage-source, plus: vcc, minus: gnd, volts: 3.3}
  - {name: Rtop, type: resistor, from: vcc, to: s}
  - {name: RT1, type: ntc, from: s, to: gnd, r25: 47k, beta: 4050}
  - {name: Rs, type: resistor, from: s, to: m, value: 1k}
  - {name: Rb, type: resistor, from: m, to: gnd, value: 100k, tolerance: 0.1%}
  - {name: A, type: adc, in: m, ref: 3.3, bits: 10}
sweep: {temperature: [0, 15, 30, 45, 60, 75]}
ambient: {min: 0, max: 70}
targets:
  - {linearity: s, max: 20}
  - {sensitivity: m, at: 30, min: 1m}
  - {resolution: A, at: 60, max: 2}
choose: {series: E24, min: 1k, max: 1M, combine: any}
`

var ntcAmbientAnswer = []synth.Option{{Value: 68e3 * 33e3 / 101e3, Parts: [2]float64{68e3, 33e3}, Count: 2, Combine: constraints.Parallel}}

// TestSweepSensitivityByResolve checks the sensitivities of every
// sweep-wide kind (linearity, sensitivity, resolution) to every part
// against central finite differences of complete re-solves: the template is
// rewritten with one part scaled by 1 ± h, compiled and scored from
// scratch. The figure is defined as the normalised sensitivity
// (dX/X)/(dx/x) at nominal values (no tolerance, no TCR drift), and the
// absolute one as dX/dx per ohm (volt, ampere) of the part. A central
// difference is exact to O(h²) (Taylor's theorem).
func TestSweepSensitivityByResolve(t *testing.T) {
	battery, ok := examples.Get("battery-sense")
	if !ok {
		t.Fatal("no battery-sense example")
	}
	cases := []struct {
		name string
		text string
		opts []synth.Option
	}{
		// The built-in example at fit's answer, with TCR following each
		// condition's temperature.
		{"battery-sense", string(battery), []synth.Option{single(10e3), single(1e6)}},
		{"rtd-pair", rtdPairDesign, rtdPairAnswer},
		{"ntc-parallel-ambient", ntcAmbientDesign, ntcAmbientAnswer},
	}
	const h = 1e-5
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			d := designAt(t, c.text, c.opts)
			tpl := d.Problem.Template
			r, err := Check(d, &Settings{Samples: -1})
			if err != nil {
				t.Fatal(err)
			}
			kinds := map[constraints.TargetKind]bool{}
			for _, g := range r.Goals {
				if g.Condition != SweepCondition {
					continue
				}
				kinds[tpl.Targets[g.Target].Kind] = true
				nominal, _ := scaledTemplate(t, tpl, c.opts, "", 1)
				x := resolvedTarget(t, nominal, g.Target)
				if math.Abs(g.Nominal-x) > 1e-9*math.Abs(x) {
					t.Errorf("%s: nominal %.12g, re-solved %.12g", g.Label, g.Nominal, x)
				}
				if len(g.Sens) != len(d.Parts) {
					t.Fatalf("%s: %d sensitivities for %d parts", g.Label, len(g.Sens), len(d.Parts))
				}
				for j, v := range d.Parts {
					tUp, xj := scaledTemplate(t, tpl, c.opts, v.Name, 1+h)
					tDown, _ := scaledTemplate(t, tpl, c.opts, v.Name, 1-h)
					up, down := resolvedTarget(t, tUp, g.Target), resolvedTarget(t, tDown, g.Target)
					norm := (up - down) / (2 * h) / x // (dX/X)/(dx/x)
					abs := (up - down) / (2 * h * xj) // dX/dx
					s := g.Sens[j]
					if s.Part != v.Name {
						t.Errorf("%s: sensitivity %d names %s, part is %s", g.Label, j, s.Part, v.Name)
					}
					if !(math.Abs(s.Normalised-norm) <= 1e-5*math.Max(1, math.Abs(norm))) {
						t.Errorf("%s vs %s: normalised %.8g, re-solved %.8g", g.Label, v.Name, s.Normalised, norm)
					}
					if !(math.Abs(s.Absolute-abs) <= 1e-5*math.Max(math.Abs(abs), math.Abs(x/xj))) {
						t.Errorf("%s vs %s: absolute %.8g, re-solved %.8g", g.Label, v.Name, s.Absolute, abs)
					}
				}
			}
			if len(kinds) < 2 {
				t.Errorf("only %d sweep-wide kinds checked", len(kinds))
			}
		})
	}
}
