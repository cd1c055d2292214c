package constraints

import (
	"math"
	"strings"
	"testing"

	"github.com/ohmfit/ohmfit/constraints/sensors"
	"github.com/ohmfit/ohmfit/solver"
)

const sweepTemplate = `ohmfit: 1
name: sweep test
parts:
  - {name: V1, type: voltage-source, plus: vcc, minus: gnd, volts: 3}
  - {name: R1, type: resistor, from: vcc, to: s}
  - {name: RT1, type: ntc, from: s, to: gnd, r25: 10k, beta: 3435}
  - {name: PT, type: rtd, from: vcc, to: x, r0: 1000}
  - {name: RX, type: resistor, from: x, to: gnd, value: 1k}
  - {name: ADC1, type: adc, in: s, ref: 3, bits: 12}
conditions:
  - {name: cold-start, temperature: -40}
sweep: {temperature: {from: 0, to: 50, step: 12.5}}
targets:
  - {code: ADC1, curve: {0: 3000, 25: 2048, 50: 1100}, tolerance: 5%}
  - {linearity: s, max: 5}
  - {sensitivity: s, at: 25, min: 5m}
  - {resolution: ADC1, at: 50, max: 0.5}
on_fraction: 2%
`

// Sweeps, curves and derivative conditions expand as documented: one
// condition per temperature named like "12.5C", one goal per curve point in
// the condition at its temperature, and two hidden conditions half a degree
// either side of each sensitivity or resolution temperature.
func TestSweepExpansion(t *testing.T) {
	tp, err := Parse("s.yaml", []byte(sweepTemplate))
	if err != nil {
		t.Fatal(err)
	}
	// The template holds the conditions it states; Compile adds the
	// derivative's, hidden, after them.
	names := func(conds []string) string { return strings.Join(conds, " ") }
	var tn []string
	for _, c := range tp.Conditions {
		tn = append(tn, c.Name)
	}
	wantVisible := "cold-start 0C 12.5C 25C 37.5C 50C"
	if got := names(tn); got != wantVisible {
		t.Errorf("template's conditions %q, want %q", got, wantVisible)
	}
	p, err := Compile(tp)
	if err != nil {
		t.Fatal(err)
	}
	var all, visible []string
	for ci, c := range p.Conditions {
		all = append(all, c.Name)
		if p.Visible(ci) == strings.HasPrefix(c.Name, "~") {
			t.Errorf("%s: visible %v", c.Name, p.Visible(ci))
		}
	}
	for ci, c := range p.VisibleConditions() {
		visible = append(visible, c.Name)
		if !p.Visible(ci) {
			t.Errorf("%s yielded but not visible", c.Name)
		}
	}
	if got, want := names(all), wantVisible+" ~24.5C ~25.5C ~49.5C ~50.5C"; got != want {
		t.Errorf("problem's conditions %q, want %q", got, want)
	}
	if got := names(visible); got != wantVisible {
		t.Errorf("problem's visible conditions %q, want %q", got, wantVisible)
	}
	for ci, c := range p.Conditions {
		if want := ci >= len(tp.Conditions); !p.Visible(ci) != want {
			t.Errorf("%s: hidden %v, want %v", c.Name, !p.Visible(ci), want)
		}
		if ci >= len(tp.Conditions) && (!c.HasTemperature || "~"+TemperatureName(c.Temperature) != c.Name) {
			t.Errorf("%s: temperature %g (given %v)", c.Name, c.Temperature, c.HasTemperature)
		}
	}
	for ti := range p.Probes {
		for ci := range p.Conditions {
			if p.Applies[ti][ci] && !p.Visible(ci) {
				t.Errorf("target %d applies in added condition %s", ti, p.Conditions[ci].Name)
			}
		}
	}
	if tp.OnFraction != 0.02 {
		t.Errorf("on_fraction %g", tp.OnFraction)
	}
	// The curve became three goals, one per point, in order.
	var curve []string
	for _, tg := range tp.Targets {
		if tg.Kind == Code {
			curve = append(curve, tg.When[0]+"="+strings.TrimSpace(strings.Split(tg.Label(), " ")[1]))
			if tg.Tolerance != 0.05 || !tg.TolRelative {
				t.Errorf("curve point lost its tolerance: %+v", tg)
			}
		}
	}
	if got := strings.Join(curve, " "); got != "0C=ADC1 25C=ADC1 50C=ADC1" {
		t.Errorf("curve goals %q", got)
	}
	if len(tp.ADCs) != 1 || tp.ADCs[0].Node != "s" || tp.ADCs[0].Step() != 3.0/4096 {
		t.Errorf("ADCs %+v", tp.ADCs)
	}
}

// Each condition gives every sensor its resistance at that temperature (the
// models' own values, checked against their references in package
// sensors), and Compile carries them, the on_fraction and the code scale
// into the problem.
func TestSensorValuesPerCondition(t *testing.T) {
	tp, err := Parse("s.yaml", []byte(sweepTemplate))
	if err != nil {
		t.Fatal(err)
	}
	p, err := Compile(tp)
	if err != nil {
		t.Fatal(err)
	}
	ntc := sensors.Beta{R25: 10e3, Beta: 3435}
	pt := sensors.IEC60751(1000)
	for ci, c := range tp.Conditions {
		rn, _ := ntc.Resistance(c.Temperature)
		rp, _ := pt.Resistance(c.Temperature)
		if got := p.Conditions[ci].Values[2]; got != rn {
			t.Errorf("%s: NTC %g Ω, model %g Ω", c.Name, got, rn)
		}
		if got := p.Conditions[ci].Values[3]; got != rp {
			t.Errorf("%s: RTD %g Ω, model %g Ω", c.Name, got, rp)
		}
	}
	if p.OnFraction != 0.02 {
		t.Errorf("on_fraction %g", p.OnFraction)
	}
	if p.Probes[0].Scale != 4096.0/3 {
		t.Errorf("code scale %g", p.Probes[0].Scale)
	}
}

// The sweep-wide targets against closed forms on a network whose voltage is
// known: with R1 fixed and the sensor below it, V = Vcc·R(T)/(R1+R(T))
// (voltage divider formula); the linearity, sensitivity and resolution the
// problem computes must equal those computed here directly from the formula
// and the definitions (end-point linearity: the largest distance from the
// chord through the first and last points, divided by the chord's slope;
// sensitivity: |dV/dT| by central difference over ±0.5 °C; resolution: the
// code step over the sensitivity).
func TestDerivedTargetsClosedForm(t *testing.T) {
	tp, _, sc := evaluateText(t, valuedSweep(sweepTemplate))
	ntc := sensors.Beta{R25: 10e3, Beta: 3435}
	v := func(c float64) float64 {
		r, _ := ntc.Resistance(c)
		return 3 * r / (10e3 + r)
	}
	// Every condition with a temperature takes part: cold-start too.
	temps := []float64{-40, 0, 12.5, 25, 37.5, 50}
	slope := (v(50) - v(-40)) / 90
	lin := 0.0
	for _, c := range temps[1:5] {
		lin = math.Max(lin, math.Abs((v(c)-v(-40)-slope*(c+40))/slope))
	}
	sens25 := math.Abs(v(25.5)-v(24.5)) / 1
	sens50 := math.Abs(v(50.5)-v(49.5)) / 1
	want := map[TargetKind]float64{Linearity: lin, Sensitivity: sens25, Resolution: (3.0 / 4096) / sens50}
	for ti, tg := range tp.Targets {
		w, ok := want[tg.Kind]
		if !ok {
			continue
		}
		if got := sc.Value(ti, 0); math.Abs(got-w) > 1e-9*w {
			t.Errorf("%s: %g, closed form %g", tg.Label(), got, w)
		}
	}
	// The central difference is close to the analytic derivative of the
	// divider: dV/dT = Vcc·R1·(dR/dT)/(R1+R)², dR/dT = -B·R/T² (Beta model).
	r, _ := ntc.Resistance(25)
	tk := 25 + sensors.ZeroCelsius
	exact := math.Abs(3 * 10e3 * (-3435 * r / (tk * tk)) / ((10e3 + r) * (10e3 + r)))
	if math.Abs(sens25-exact) > 1e-4*exact {
		t.Errorf("central difference %g, analytic derivative %g", sens25, exact)
	}
	// A parabola's chord: V = a + bT + cT² deviates from the line through
	// its ends by at most |c|·h²/4 at the midpoint (h the span), so its
	// end-point linearity in °C is |c|·h²/(4·|slope|).
	d := DerivedProbe{Kind: Linearity, Temps: []float64{0, 10, 20, 30, 40}}
	pts := make([]float64, 5)
	for i, x := range d.Temps {
		pts[i] = 1 + 0.01*x - 2e-5*x*x
	}
	slopeP := (pts[4] - pts[0]) / 40
	if got, w := d.Value(pts), 2e-5*40*40/4/math.Abs(slopeP); math.Abs(got-w) > 1e-9 {
		t.Errorf("parabola linearity %g °C, closed form %g °C", got, w)
	}
}

// on_fraction scales every power figure: the average power of a supply that
// is on for that fraction of the time.
func TestOnFractionScalesPower(t *testing.T) {
	full := valuedSweep(strings.Replace(sweepTemplate, "on_fraction: 2%", "", 1))
	duty := strings.Replace(full, "targets:", "on_fraction: 0.25\ntargets:", 1)
	var power [2]float64
	for i, text := range []string{full, duty} {
		_, _, sc := evaluateText(t, text)
		power[i] = sc.Power
	}
	if math.Abs(power[1]-0.25*power[0]) > 1e-15 {
		t.Errorf("power %g with on_fraction 0.25, %g without", power[1], power[0])
	}
}

// valuedSweep gives the sweep template's free R1 a value of 10k.
func valuedSweep(text string) string {
	return strings.Replace(text, "{name: R1, type: resistor, from: vcc, to: s}", "{name: R1, type: resistor, from: vcc, to: s, value: 10k}", 1)
}

// evaluateText parses, compiles and scores a fully valued template.
func evaluateText(t *testing.T, text string) (*Template, *Problem, *Score) {
	t.Helper()
	tp, err := Parse("s.yaml", []byte(text))
	if err != nil {
		t.Fatal(err)
	}
	p, err := Compile(tp)
	if err != nil {
		t.Fatal(err)
	}
	sc := p.NewScore()
	if err := p.Evaluate(p.Network.NewSolver(), nil, sc); err != nil {
		t.Fatal(err)
	}
	return tp, p, sc
}

// Self-heating in a divider, by hand: a 3.3 V source, R1 = 10k on top and an
// NTC of R25 = 10k at 25 °C below. By the divider law and Ohm's law the
// sensor carries I = 3.3 / 20k and takes P = I²·R = 272.25 µW; with
// δ = 1.5 mW/K its rise is P/δ = 0.1815 °C (the dissipation constant's
// definition). At 0 °C the sensor is R(0) = R25·exp(B·(1/273.15 − 1/298.15))
// (the Beta equation) and the rise follows from the same two laws.
func TestSelfHeatingDividerClosedForm(t *testing.T) {
	text := `ohmfit: 1
parts:
  - {name: V1, type: voltage-source, plus: vcc, minus: gnd, volts: 3.3}
  - {name: R1, type: resistor, from: vcc, to: s, value: 10k}
  - {name: RT1, type: ntc, from: s, to: gnd, r25: 10k, beta: 3950, dissipation: 1.5mW/K}
conditions:
  - {name: room, temperature: 25}
  - {name: cold, temperature: 0}
targets:
  - {self_heating: RT1, max: 0.2}
`
	tp, p, sc := evaluateText(t, text)
	if got := tp.Parts[2].Dissipation; math.Abs(got-1.5e-3) > 1e-18 {
		t.Fatalf("dissipation %g W/K, want 1.5e-3", got)
	}
	rise := func(r float64) float64 {
		i := 3.3 / (10e3 + r)
		return i * i * r / 1.5e-3
	}
	r0 := 10e3 * math.Exp(3950*(1/273.15-1/298.15))
	want := []float64{0.1815, rise(r0)}
	for ci, w := range want {
		if got := sc.Value(0, ci); math.Abs(got-w) > 1e-12*w {
			t.Errorf("%s: rise %.15g °C, closed form %.15g °C", p.Conditions[ci].Name, got, w)
		}
	}
	if !sc.Feasible {
		t.Errorf("rises %v within 0.2 °C, but the score is infeasible", sc.values)
	}
	// A limit below the room rise rejects the design.
	_, _, sc = evaluateText(t, strings.Replace(text, "max: 0.2", "max: 0.18", 1))
	if sc.Feasible {
		t.Errorf("rise 0.1815 °C passed a 0.18 °C limit")
	}
}

// A failure in a condition Compile added for a derivative names it, even
// in a template with one condition of its own (whose failures need no
// name); the conditions it adds carry their temperature, so that TCR drift
// and sensors follow it.
func TestAddedConditionError(t *testing.T) {
	text := `ohmfit: 1
parts:
  - {name: V1, type: voltage-source, plus: vcc, minus: gnd, volts: 3}
  - {name: R1, type: resistor, from: vcc, to: s}
  - {name: RT1, type: ntc, from: s, to: gnd, r25: 10k, beta: 3435}
targets:
  - {voltage: s, equals: 1.5}
  - {sensitivity: s, at: 25, min: 1m}
`
	tp, err := Parse("one.yaml", []byte(text))
	if err != nil {
		t.Fatal(err)
	}
	p, err := Compile(tp)
	if err != nil {
		t.Fatal(err)
	}
	if len(tp.Conditions) != 1 || len(p.Conditions) != 3 {
		t.Fatalf("%d template conditions, %d compiled; want 1 and 3", len(tp.Conditions), len(p.Conditions))
	}
	for ci, want := range []string{"", `condition "~24.5C": `, `condition "~25.5C": `} {
		e := p.ConditionError(ci, solver.ErrSingular)
		if got := strings.TrimSuffix(e.Msg, Message(solver.ErrSingular)); got != want {
			t.Errorf("condition %d: %q, want the prefix %q", ci, e.Msg, want)
		}
	}
	for ci, want := range []float64{24.5, 25.5} {
		c := p.Conditions[ci+1]
		if !c.HasTemperature || c.Temperature != want {
			t.Errorf("%s: temperature %g (given %v), want %g", c.Name, c.Temperature, c.HasTemperature, want)
		}
	}
}
