package variation

import (
	"math"
	"strings"
	"testing"
)

// The fixed point against a closed form: a current source I drives an RTD
// whose coefficients are A alone (B = C = 0), so R(T) = R0·(1 + A·T). Its
// power is I²·R(T) (Ohm's law) and the settled temperature solves
// T = T0 + I²·R0·(1 + A·T)/δ, which is linear in T:
// T = (T0 + k)/(1 − k·A) with k = I²·R0/δ. The first-order rise is
// I²·R(T0)/δ. The current is large on purpose, so that the two differ.
func TestSelfHeatingFixedPointClosedForm(t *testing.T) {
	const (
		i0    = 5e-3
		r0    = 100.0
		a     = 3.9083e-3
		delta = 2e-3
	)
	tpl := `ohmfit: 1
parts:
  - {name: I1, type: current-source, from: gnd, to: s, amps: 5m}
  - {name: PT, type: rtd, from: s, to: gnd, r0: 100, coefficients: [3.9083e-3, 0, 0], tolerance: 0.1%, dissipation: 2mW/K}
conditions:
  - {name: ice, temperature: 0}
  - {name: warm, temperature: 60}
targets:
  - {self_heating: PT, max: 10}
`
	d := design(t, tpl)
	r, err := Check(d, &Settings{Samples: -1})
	if err != nil {
		t.Fatal(err)
	}
	if len(r.Heating) != 2 {
		t.Fatalf("%d heating rows, want 2", len(r.Heating))
	}
	k := i0 * i0 * r0 / delta
	for n, t0 := range []float64{0, 60} {
		h := r.Heating[n]
		rise := i0 * i0 * r0 * (1 + a*t0) / delta
		settled := (t0+k)/(1-k*a) - t0
		if math.Abs(h.Rise-rise) > 1e-12*rise {
			t.Errorf("%s: rise %.15g °C, closed form %.15g", h.CondName, h.Rise, rise)
		}
		if !h.Converged || math.Abs(h.ReadingError-settled) > 1e-8 {
			t.Errorf("%s: reading error %.15g °C (converged %v), closed form %.15g", h.CondName, h.ReadingError, h.Converged, settled)
		}
		if h.Steps > 10 {
			t.Errorf("%s: %d steps; the map contracts by k·A = %.3g per step", h.CondName, h.Steps, k*a)
		}
		// The self_heating goal reads the same first-order rise.
		for _, g := range r.Goals {
			if g.Condition == h.Condition && math.Abs(g.Nominal-rise) > 1e-12*rise {
				t.Errorf("%s: goal reads %g °C, rise %g", h.CondName, g.Nominal, rise)
			}
		}
	}
}

// A sensor whose power grows faster with its temperature than its
// dissipation can carry has no fixed point: the check says so instead of
// giving a reading error. With R(T) = R0·(1 + A·T) the map's slope is k·A;
// above 1 the iteration runs away (same closed form as above).
func TestSelfHeatingRunawaySaysSo(t *testing.T) {
	tpl := `ohmfit: 1
parts:
  - {name: I1, type: current-source, from: gnd, to: s, amps: 100m}
  - {name: PT, type: rtd, from: s, to: gnd, r0: 100, coefficients: [3.9083e-3, 0, 0], tolerance: 0.1%, dissipation: 2mW/K}
`
	r, err := Check(design(t, tpl), &Settings{Samples: -1})
	if err != nil {
		t.Fatal(err)
	}
	if len(r.Heating) != 1 || r.Heating[0].Converged || !math.IsNaN(r.Heating[0].ReadingError) {
		t.Fatalf("heating %+v: want not converged", r.Heating)
	}
	found := false
	for _, w := range r.Warnings {
		found = found || strings.Contains(w, "does not settle")
	}
	if !found {
		t.Errorf("no warning of the runaway in %q", r.Warnings)
	}
}

// check solves with the ADC's input load (Thevenin: the 10k/10k divider
// from 3.3 V is 1.65 V behind 5 kΩ; an input of 45 kΩ reads
// 1.65·45/(5 + 45) = 1.485 V, and a leakage of 10 µA out of the node takes
// a further 10 µA·(5k∥45k) = 45 mV by superposition), and the parts that
// model the input are neither varied nor on the BOM.
func TestCheckSeesADCLoad(t *testing.T) {
	d := design(t, `ohmfit: 1
parts:
  - {name: V1, type: voltage-source, plus: vcc, minus: gnd, volts: 3.3}
  - {name: R1, type: resistor, from: vcc, to: s, value: 10k, tolerance: 1%}
  - {name: R2, type: resistor, from: s, to: gnd, value: 10k, tolerance: 1%}
  - {name: ADC1, type: adc, in: s, ref: 3.3, bits: 12, input: 45k, leakage: 10u}
targets:
  - {voltage: s, min: 0}
`)
	r, err := Check(d, &Settings{Samples: -1})
	if err != nil {
		t.Fatal(err)
	}
	want := 1.65*45/50 - 10e-6*4.5e3
	if g := r.Goals[0]; math.Abs(g.Nominal-want) > 1e-12 {
		t.Errorf("nominal %.15g V, closed form %.15g V", g.Nominal, want)
	}
	for _, v := range d.Parts {
		if strings.HasPrefix(v.Name, "ADC1") {
			t.Errorf("%s is varied as a part", v.Name)
		}
	}
	for _, l := range BOM(d, r) {
		for _, n := range l.Designators {
			if strings.HasPrefix(n, "ADC1") {
				t.Errorf("%s is on the BOM", n)
			}
		}
	}
}
