package variation

import (
	"math"
	"strings"
	"testing"

	"github.com/ohmfit/ohmfit/constraints/sensors"
)

// sensorTolTemplate drives a thermistor and an RTD each from a 1 mA current
// source, so that each node voltage is I·R of its sensor (Ohm's law) and its
// extremes are the sensor's.
const sensorTolTemplate = `ohmfit: 1
parts:
  - {name: I1, type: current-source, from: gnd, to: s, amps: 100u}
  - {name: RT1, type: ntc, from: s, to: gnd, r25: 10k, beta: 3950, tolerance: 2%, beta_tolerance: 1.5%}
  - {name: I2, type: current-source, from: gnd, to: x, amps: 1m}
  - {name: PT, type: rtd, from: x, to: gnd, r0: 100, class: CLASS}
conditions:
  - {name: cold, temperature: -40}
  - {name: room, temperature: 25}
  - {name: hot, temperature: 150}
targets:
  - {voltage: s, min: 0}
  - {voltage: x, min: 0}
`

// The corners of a sensor's tolerances against closed forms, by every
// worst-case method and the Monte Carlo.
//
// NTC (Beta equation R = R25·exp(B·(1/T − 1/T25))): with R25 within ±tr and
// B within ±tb, V = I·R is largest at R25(1+tr) and the B that moves
// exp(B·x), x = 1/T − 1/T25, up: V_max = I·R25·(1+tr)·exp(B·x + B·tb·|x|),
// and V_min the opposite.
//
// RTD: a sensor of IEC 60751 class K reads within ±(a + b·|t|) °C of the
// standard curve at t °C (IEC 60751, values from memory: AA 0.1 + 0.0017|t|,
// A 0.15 + 0.002|t|, B 0.3 + 0.005|t|, C 0.6 + 0.01|t|), so its resistance at t
// lies between the standard curve's at t ∓ (a + b·|t|), which is monotone:
// V_max = I·R(t + a + b|t|), V_min = I·R(t − a − b|t|).
func TestSensorTolerancesClosedForm(t *testing.T) {
	class := map[string][2]float64{"AA": {0.1, 0.0017}, "A": {0.15, 0.002}, "B": {0.3, 0.005}, "C": {0.6, 0.01}} // IEC 60751, values from memory
	for name, ab := range class {
		for _, corners := range []int{0, 2} { // every corner; linearised (fewer corner parts than vary)
			t.Run(name, func(t *testing.T) {
				d := design(t, strings.Replace(sensorTolTemplate, "CLASS", name, 1))
				r, err := Check(d, &Settings{Samples: 4000, MaxCornerParts: corners, KeepSamples: true})
				if err != nil {
					t.Fatal(err)
				}
				if want := map[int]string{0: MethodCorners, 2: MethodLinearised}[corners]; corners > 0 && r.Method != want {
					t.Fatalf("method %s, want %s", r.Method, want)
				}
				pt := sensors.IEC60751(100)
				for _, g := range r.Goals {
					tc := d.Problem.Template.Conditions[g.Condition].Temperature
					var lo, hi float64
					switch g.Label {
					case "voltage s":
						x := 1/(tc+273.15) - 1/298.15
						lo = 100e-6 * 10e3 * 0.98 * math.Exp(3950*x-3950*0.015*math.Abs(x))
						hi = 100e-6 * 10e3 * 1.02 * math.Exp(3950*x+3950*0.015*math.Abs(x))
					case "voltage x":
						tol := ab[0] + ab[1]*math.Abs(tc)
						rlo, _ := pt.Resistance(tc - tol)
						rhi, _ := pt.Resistance(tc + tol)
						lo, hi = 1e-3*rlo, 1e-3*rhi
					}
					if math.Abs(g.WorstMin-lo) > 1e-9*lo || math.Abs(g.WorstMax-hi) > 1e-9*hi {
						t.Errorf("%s in %s: worst %.12g … %.12g, closed form %.12g … %.12g", g.Label, g.CondName, g.WorstMin, g.WorstMax, lo, hi)
					}
					// Every Monte Carlo draw lies within the corners, and the
					// draws spread over most of the range (uniform draws).
					mn, mx := math.Inf(1), math.Inf(-1)
					for _, v := range g.Samples {
						mn, mx = math.Min(mn, v), math.Max(mx, v)
					}
					if mn < lo*(1-1e-12) || mx > hi*(1+1e-12) {
						t.Errorf("%s in %s: Monte Carlo %g … %g outside the corners %g … %g", g.Label, g.CondName, mn, mx, lo, hi)
					}
					if mx-mn < 0.5*(hi-lo) {
						t.Errorf("%s in %s: Monte Carlo spans %g of the corners' %g", g.Label, g.CondName, mx-mn, hi-lo)
					}
				}
			})
		}
	}
}

// The BOM line of a sensor carries its tolerance and class: an NTC's R25
// tolerance in the tolerance column and its B tolerance in the model; an
// RTD's class, with the tolerance it gives R0 at 0 °C (class B: 0.3 °C
// times dR/dT/R0 = A = 3.9083e-3 /°C, IEC 60751 coefficients; values from
// memory).
func TestBOMSensorTolerance(t *testing.T) {
	d := design(t, strings.Replace(sensorTolTemplate, "CLASS", "B", 1))
	r, err := Check(d, &Settings{Samples: -1})
	if err != nil {
		t.Fatal(err)
	}
	lines := BOM(d, r)
	if len(lines) != 2 {
		t.Fatalf("%d lines: %+v", len(lines), lines)
	}
	ntc, rtd := lines[0], lines[1]
	if ntc.Tolerance != 0.02 || ntc.BetaTolerance != 0.015 || !strings.Contains(ntc.Model, "B 3950 K ±1.5%") {
		t.Errorf("NTC line %+v", ntc)
	}
	if rtd.Class != "B" || rtd.TolFrom != "class" || math.Abs(rtd.Tolerance-0.3*3.9083e-3) > 1e-8 || !strings.Contains(rtd.Model, "class B") {
		t.Errorf("RTD line %+v", rtd)
	}
}

// A sensor without a tolerance is assumed ±1 % with a warning, whatever
// else it carries: an NTC with only a B tolerance still has its R25
// assumed; an RTD with a class needs no assumption (the class is its
// tolerance) and gets no warning.
func TestSensorAssumedToleranceWithNewKeys(t *testing.T) {
	d := design(t, `ohmfit: 1
parts:
  - {name: I1, type: current-source, from: gnd, to: s, amps: 100u, tolerance: 1%}
  - {name: RT1, type: ntc, from: s, to: gnd, r25: 10k, beta: 3950, beta_tolerance: 1%}
  - {name: I2, type: current-source, from: gnd, to: x, amps: 1m, tolerance: 1%}
  - {name: PT, type: rtd, from: x, to: gnd, r0: 100, class: AA}
targets:
  - {voltage: s, min: 0}
`)
	w := strings.Join(d.Warnings(), "\n")
	if !strings.Contains(w, "RT1: an NTC thermistor without a tolerance; assumed ±1%") {
		t.Errorf("no assumed-R25 warning for RT1 in %q", w)
	}
	if strings.Contains(w, "PT") {
		t.Errorf("a warning for the classed RTD: %q", w)
	}
	for _, v := range d.Parts {
		if v.Name == "PT" && (v.TolFrom != "class" || v.Tol != 0) {
			t.Errorf("PT: tolerance %g from %q, want the class's", v.Tol, v.TolFrom)
		}
		if v.Name == "RT1" && v.TolFrom != "assumed" {
			t.Errorf("RT1: tolerance from %q, want assumed", v.TolFrom)
		}
	}
}

// The adjoint sensitivities to a sensor's extra parameters (B, class
// offset and slope) and of self-heating targets against central finite
// differences of full solves, in conditions away from 25 °C.
func TestSensorParamSensitivities(t *testing.T) {
	d := design(t, `ohmfit: 1
parts:
  - {name: V1, type: voltage-source, plus: vcc, minus: gnd, volts: 3.3}
  - {name: R1, type: resistor, from: vcc, to: s, value: 10k, tolerance: 1%}
  - {name: RT1, type: ntc, from: s, to: gnd, r25: 10k, beta: 3950, tolerance: 2%, beta_tolerance: 1%, dissipation: 2mW/K}
  - {name: R2, type: resistor, from: vcc, to: x, value: 1k, tolerance: 1%}
  - {name: PT, type: rtd, from: x, to: gnd, r0: 100, class: B, dissipation: 3mW/K}
conditions:
  - {name: cold, temperature: -25}
  - {name: hot, temperature: 70}
targets:
  - {voltage: s, min: 0}
  - {voltage: x, min: 0}
  - {self_heating: RT1, max: 1}
  - {self_heating: PT, max: 1}
`)
	r, err := Check(d, &Settings{Samples: -1})
	if err != nil {
		t.Fatal(err)
	}
	s := d.Problem.Network.NewSolver()
	// Sensitivities are at nominal values without TCR drift: hold every
	// coefficient at zero, as a Monte Carlo draw of zero would.
	d.tcrDraw = make([]float64, len(d.Parts))
	read := func(g Goal, dev []float64) float64 {
		d.setValues(s, g.Condition, dev)
		if err := s.Solve(); err != nil {
			t.Fatal(err)
		}
		x, err := d.Problem.Probes[g.Target].Read(s)
		if err != nil {
			t.Fatal(err)
		}
		return x
	}
	for _, g := range r.Goals {
		for j, v := range d.Parts {
			const h = 1e-6
			dev := make([]float64, len(d.Parts))
			dev[j] = h
			up := read(g, dev)
			dev[j] = -h
			down := read(g, dev)
			fd := (up - down) / (2 * h) // per unit of dev
			if v.Relative {
				fd /= v.Nominal // dev is dx/x
			}
			a := g.Sens[j].Absolute
			if math.Abs(fd-a) > 1e-5*math.Max(math.Abs(fd), 1e-12) {
				t.Errorf("%s in %s: d/d%s adjoint %.9g, finite difference %.9g", g.Label, g.CondName, v.Name, a, fd)
			}
		}
	}
}
