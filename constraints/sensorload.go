package constraints

import (
	"fmt"
	"math"
	"strconv"
	"strings"

	"github.com/ohmfit/ohmfit/constraints/sensors"
	"github.com/ohmfit/ohmfit/eseries/units"
	"github.com/ohmfit/ohmfit/solver"
	"gopkg.in/yaml.v3"
)

// This file reads what sensor networks need: thermistor and RTD parts, ADC
// inputs, a condition's temperature, temperature sweeps, transfer curves,
// the sweep-wide targets (linearity, sensitivity, resolution) and the
// on_fraction of a duty-cycled supply.

// sensorKeys are the keys of each sensor part type beyond name, type, from
// and to; all are optional to the generic check and validated here.
var sensorKeys = map[string][]string{
	"ntc": {"r25", "beta", "steinhart", "tolerance", "beta_tolerance", "package", "dissipation"},
	"rtd": {"r0", "coefficients", "tolerance", "class", "package", "dissipation"},
}

// sensorModel reads an ntc or rtd part's model and sets its Value to the
// resistance at ReferenceCelsius.
func (d *decoder) sensorModel(p *PartSpec, typ string, n *yaml.Node, byName map[string]entry, path, ctx string) bool {
	p.SensorType = typ
	switch typ {
	case "ntc":
		sh, hasSH := byName["steinhart"]
		r25, hasR := byName["r25"]
		beta, hasB := byName["beta"]
		switch {
		case hasSH && (hasR || hasB):
			d.errorf(sh.key, joinKey(path, "steinhart"), "%s: give either r25 and beta or steinhart, not both", ctx)
			return false
		case hasSH:
			if e, ok := byName["beta_tolerance"]; ok {
				d.errorf(e.key, joinKey(path, "beta_tolerance"), "%s: beta_tolerance goes with r25 and beta; a Steinhart–Hart model has no B constant", ctx)
				return false
			}
			c, ok := d.numbers(sh.val, joinKey(path, "steinhart"), label(ctx, "steinhart"), 3, "[1.129e-3, 2.341e-4, 8.775e-8]")
			if !ok {
				return false
			}
			p.Sensor = sensors.SteinhartHart{A: c[0], B: c[1], C: c[2]}
		case hasR && hasB:
			r, ok1 := d.positive(r25.val, joinKey(path, "r25"), label(ctx, "r25"), units.Ohm)
			b, ok2 := d.positive(beta.val, joinKey(path, "beta"), label(ctx, "beta"), units.NoUnit)
			if !ok1 || !ok2 || !d.within(r25.val, joinKey(path, "r25"), label(ctx, "r25"), r, r25Range) ||
				!d.within(beta.val, joinKey(path, "beta"), label(ctx, "beta"), b, betaRange) {
				return false
			}
			p.Sensor = sensors.Beta{R25: r, Beta: b}
			if e, ok := byName["beta_tolerance"]; ok {
				bt, ok := d.fraction(e.val, joinKey(path, "beta_tolerance"), label(ctx, "beta_tolerance"), "1%")
				if !ok {
					return false
				}
				p.BetaTolerance = bt
			}
		default:
			d.missingf(n, joinKey(path, "r25"), "%s: a thermistor needs r25 and beta (e.g. r25: 10k, beta: 3950) or steinhart: [A, B, C]", ctx)
			return false
		}
	case "rtd":
		r0, ok := byName["r0"]
		if !ok {
			d.missingf(n, joinKey(path, "r0"), "%s: an RTD needs r0, its resistance at 0 °C (100 for a Pt100)", ctx)
			return false
		}
		r, ok := d.positive(r0.val, joinKey(path, "r0"), label(ctx, "r0"), units.Ohm)
		if !ok || !d.within(r0.val, joinKey(path, "r0"), label(ctx, "r0"), r, r0Range) {
			return false
		}
		m := sensors.IEC60751(r)
		if e, ok := byName["coefficients"]; ok {
			c, ok := d.numbers(e.val, joinKey(path, "coefficients"), label(ctx, "coefficients"), 3, "[3.9083e-3, -5.775e-7, -4.183e-12]")
			if !ok {
				return false
			}
			m.A, m.B, m.C = c[0], c[1], c[2]
		}
		p.Sensor = m
		if e, ok := byName["class"]; ok {
			cpath := joinKey(path, "class")
			if t, has := byName["tolerance"]; has {
				d.errorf(t.key, joinKey(path, "tolerance"), "%s: give class or tolerance, not both (the class is the tolerance)", ctx)
				return false
			}
			var names []string
			for _, c := range sensors.Classes {
				names = append(names, c.Name)
			}
			c, ok := sensors.LookupClass(e.val.Value)
			if e.val.Kind != yaml.ScalarNode || !ok {
				d.errorf(e.val, cpath, "%s: expected an IEC 60751 class, one of %s, got %s", label(ctx, "class"), strings.Join(names, ", "), describe(e.val))
				return false
			}
			p.Class = c.Name
		}
	}
	if e, ok := byName["dissipation"]; ok {
		if p.Dissipation, ok = d.dissipation(e.val, joinKey(path, "dissipation"), label(ctx, "dissipation")); !ok {
			return false
		}
	}
	v, err := p.Sensor.Resistance(ReferenceCelsius)
	if err != nil || !(v > 0) || math.IsInf(v, 0) {
		d.errorf(n, path, "%s: the model gives no usable resistance at %g °C", ctx, ReferenceCelsius)
		return false
	}
	p.Value = v
	return true
}

// fraction reads a percentage above 0 % and below 100 % (`1%`) or the
// same as a plain fraction (`0.01`).
func (d *decoder) fraction(n *yaml.Node, path, ctx, example string) (float64, bool) {
	if n.Kind == yaml.ScalarNode && !isNull(n) {
		if q, err := units.Parse(n.Value); err == nil && (q.Unit == units.Percent || q.Unit == units.NoUnit) && q.Value > 0 && q.Value < 1 {
			return q.Value, true
		}
	}
	d.errorf(n, path, "%s: expected a percentage above 0%% and below 100%% such as %s, got %s", ctx, example, describe(n))
	return 0, false
}

// dissipation reads a dissipation constant: `1.5mW/K`, `1.5 mW/K`, or a
// value in watts per kelvin without the unit (`1.5m`).
func (d *decoder) dissipation(n *yaml.Node, path, ctx string) (float64, bool) {
	if n.Kind != yaml.ScalarNode || isNull(n) {
		d.errorf(n, path, "%s: expected a dissipation constant such as 1.5mW/K, got %s", ctx, describe(n))
		return 0, false
	}
	text := strings.TrimSpace(n.Value)
	for _, per := range []string{"/K", "/°C"} {
		if strings.HasSuffix(text, per) {
			text = strings.TrimSuffix(text, per)
			if !strings.HasSuffix(text, "W") {
				d.errorf(n, path, "%s: expected watts per kelvin such as 1.5mW/K, got %s", ctx, units.Quote(n.Value))
				return 0, false
			}
			break
		}
	}
	v, err := units.ParseAs(text, units.Watt)
	if err != nil {
		d.errorf(n, path, "%s: expected a dissipation constant such as 1.5mW/K, got %s", ctx, units.Quote(n.Value))
		return 0, false
	}
	if !(v > 0) {
		d.errorf(n, path, "%s: must be positive, got %s", ctx, units.Clip(n.Value))
		return 0, false
	}
	if v < dissipationRange.lo || v > dissipationRange.hi {
		d.errorf(n, path, "%s: %s lies outside %s/K … %s/K, %s; check the value and its unit (mW/K is written 1.5mW/K)", ctx, units.Clip(n.Value),
			units.FormatUnit(dissipationRange.lo, units.Watt), units.FormatUnit(dissipationRange.hi, units.Watt), dissipationRange.what)
		return 0, false
	}
	return v, true
}

// paramRange is the usual range of a sensor parameter, for refusing a
// value no real part has (a typo, or the wrong unit).
type paramRange struct {
	lo, hi float64
	unit   units.Unit
	what   string // what the range is, for the message
}

// Usual ranges of sensor parameters (common practice, no source): NTC
// datasheets give B from about 2000 to 5000 K and R25 from 100 Ω to 1 MΩ;
// platinum sensors are Pt10 to Pt10000. The bounds leave a margin.
var (
	betaRange = paramRange{1000, 10000, units.NoUnit, "K, the usual range of an NTC's B constant (common practice, no source)"}
	r25Range  = paramRange{1, 100e6, units.Ohm, "Ω, the usual range of an NTC's resistance at 25 °C (common practice, no source)"}
	r0Range   = paramRange{1, 100e3, units.Ohm, "Ω, the usual range of a platinum sensor's resistance at 0 °C, Pt10 to Pt10000 (common practice, no source)"}
	// Datasheets give dissipation constants from about 0.5 mW/K (a bare
	// bead in still air) to tens of mW/K (a probe in a stirred liquid or a
	// large disc): the bounds leave a decade of margin each side, and catch
	// a constant written in W/K that meant mW/K.
	dissipationRange = paramRange{10e-6, 1, units.NoUnit, "the usual range of a sensor's dissipation constant (common practice, no source)"}
)

// within reports v inside r, reporting it at n otherwise.
func (d *decoder) within(n *yaml.Node, path, ctx string, v float64, r paramRange) bool {
	if v >= r.lo && v <= r.hi {
		return true
	}
	lo, hi := units.Format(r.lo), units.Format(r.hi)
	if r.unit == units.NoUnit {
		lo, hi = strconv.FormatFloat(r.lo, 'g', -1, 64), strconv.FormatFloat(r.hi, 'g', -1, 64)
	}
	d.errorf(n, path, "%s: %s lies outside %s … %s %s; check the value and its unit", ctx, units.Clip(n.Value), lo, hi, r.what)
	return false
}

// checkSensorRanges refuses a condition whose temperature lies outside the
// range of a sensor part's model (an RTD at −250 °C, an NTC at −270 °C),
// at the condition, or a sensitivity or resolution target whose derivative
// would need a condition there (half a degree either side of its
// temperature: Problem adds those conditions), at the target.
func (d *decoder) checkSensorRanges() {
	t := d.t
	for _, c := range t.Conditions {
		if !d.sensorsWork(c.Temperature, c.Pos, fmt.Sprintf("condition %q", c.Name)) {
			return
		}
	}
	for _, tg := range t.Targets {
		if tg.Kind != Sensitivity && tg.Kind != Resolution {
			continue
		}
		for _, dt := range []float64{-HalfStep, HalfStep} {
			if !d.sensorsWork(tg.At+dt, tg.Pos, fmt.Sprintf("the %s target at %g °C", tg.Kind, tg.At)) {
				return
			}
		}
	}
}

// sensorsWork reports whether every sensor part's model gives a usable
// resistance at celsius, and refuses the first that does not, at at, for
// what (the condition or target that needs the temperature).
func (d *decoder) sensorsWork(celsius float64, at Pos, what string) bool {
	for _, p := range d.t.Parts {
		if p.Sensor == nil {
			continue
		}
		r, err := p.Sensor.Resistance(celsius)
		if err == nil && r >= MinMagnitude && r <= MaxMagnitude {
			continue
		}
		why := fmt.Sprintf("its model gives no usable resistance at %g °C", celsius)
		if err != nil {
			why = Message(err)
		}
		d.errorf(&yaml.Node{Line: at.Line, Column: at.Col}, "conditions",
			"%s: part %q: %s; keep the temperatures within the sensor's range", what, p.Name, why)
		return false
	}
	return true
}

// numbers reads a list of exactly k plain numbers.
func (d *decoder) numbers(n *yaml.Node, path, ctx string, k int, example string) ([]float64, bool) {
	if n.Kind != yaml.SequenceNode || len(n.Content) != k {
		d.errorf(n, path, "%s: expected a list of %d numbers such as %s, got %s", ctx, k, example, describe(n))
		return nil, false
	}
	out := make([]float64, k)
	for i, it := range n.Content {
		v, ok := d.value(it, path, ctx, units.NoUnit)
		if !ok {
			return nil, false
		}
		out[i] = v
	}
	return out, true
}

// adc reads `{name: ADC1, type: adc, in: node, ref: 3.3, bits: 12}`.
func (d *decoder) adc(n *yaml.Node, path, ctx string) (ADC, *yaml.Node, bool) {
	// Name the ADC by its name where it has a usable one, as parts do.
	if n.Kind == yaml.MappingNode {
		for j := 0; j+1 < len(n.Content); j += 2 {
			if k, v := n.Content[j], n.Content[j+1]; k.Value == "name" && v.Kind == yaml.ScalarNode && v.Value != "" {
				ctx = "part " + units.Quote(v.Value)
				break
			}
		}
	}
	byName, _ := d.fields(n, path, ctx, []string{"name", "type", "in", "ref", "bits", "max_source", "input", "leakage"})
	for _, k := range []string{"name", "in", "ref", "bits"} {
		if _, ok := byName[k]; !ok {
			d.missingf(n, joinKey(path, k), "%s: missing key %q for an adc (e.g. {name: ADC1, type: adc, in: sense, ref: 3.3, bits: 12})", ctx, k)
			return ADC{}, nil, false
		}
	}
	a := ADC{Pos: Pos{n.Line, n.Column}}
	var ok bool
	if a.Name, ok = d.name(byName["name"].val, joinKey(path, "name"), label(ctx, "name")); !ok {
		return a, nil, false
	}
	if a.Node, ok = d.name(byName["in"].val, joinKey(path, "in"), label(ctx, "in")); !ok {
		return a, nil, false
	}
	d.nodeRefs = append(d.nodeRefs, nameRef{a.Node, byName["in"].val, joinKey(path, "in")})
	if a.Ref, ok = d.positive(byName["ref"].val, joinKey(path, "ref"), label(ctx, "ref"), units.Volt); !ok {
		return a, nil, false
	}
	b := byName["bits"].val
	bits, err := strconv.Atoi(b.Value)
	if b.Kind != yaml.ScalarNode || err != nil || bits < 1 || bits > 32 {
		d.errorf(b, joinKey(path, "bits"), "%s: expected a whole number of bits from 1 to 32, got %s", label(ctx, "bits"), describe(b))
		return a, nil, false
	}
	a.Bits = bits
	if e, ok := byName["max_source"]; ok {
		// The source resistance the input sees, for its sampling capacitor
		// to settle: a resistance target from the input to ground.
		max, ok := d.positive(e.val, joinKey(path, "max_source"), label(ctx, "max_source"), units.Ohm)
		if !ok {
			return a, nil, false
		}
		d.t.Targets = append(d.t.Targets, Target{Kind: Resistance, Nodes: []string{a.Node, d.t.Ground}, HasMax: true, Max: max, Pos: Pos{e.val.Line, e.val.Column}})
	}
	if e, ok := byName["input"]; ok {
		if a.Input, ok = d.positiveOr(e.val, joinKey(path, "input"), label(ctx, "input"), units.Ohm, zeroADCInput); !ok {
			return a, nil, false
		}
	}
	if e, ok := byName["leakage"]; ok {
		if a.Leakage, ok = d.value(e.val, joinKey(path, "leakage"), label(ctx, "leakage"), units.Amp); !ok {
			return a, nil, false
		}
		a.HasLeakage = true
	}
	return a, byName["name"].val, true
}

// addADCLoads adds, once every name is checked, the parts that model each
// ADC's input: its resistance and its leakage, each from its node to
// ground, named "ADC1:input" and "ADC1:leakage" and placed at the ADC.
func (d *decoder) addADCLoads() {
	t := d.t
	for _, a := range t.ADCs {
		add := func(suffix string, p solver.Part) {
			p.Name, p.From, p.To = a.Name+suffix, a.Node, t.Ground
			if _, dup := t.Part(p.Name); dup {
				d.errorf(&yaml.Node{Line: a.Pos.Line, Column: a.Pos.Col}, "parts", "part name %q is taken; ohmfit names the part that models the input of ADC %q so: rename one", p.Name, a.Name)
				return
			}
			t.Parts = append(t.Parts, PartSpec{Part: p, Pos: a.Pos, ADC: a.Name})
		}
		if a.Input > 0 {
			add(":input", solver.Part{Kind: solver.Resistor, Value: a.Input})
		}
		if a.HasLeakage {
			add(":leakage", solver.Part{Kind: solver.CurrentSource, Value: a.Leakage})
		}
	}
}

// temperature reads a temperature in °C: a plain number (85, -20, 25.5).
func (d *decoder) temperature(n *yaml.Node, path, ctx string) (float64, bool) {
	v, ok := d.number(n, path, ctx, units.NoUnit)
	if ok && !(v > -sensors.ZeroCelsius && v < 1e4) {
		d.errorf(n, path, "%s: %s °C is not a temperature a circuit meets", ctx, units.Clip(n.Value))
		return 0, false
	}
	return v, ok
}

// sweep reads `sweep: {temperature: [-20, 0, 25]}` or
// `sweep: {temperature: {from: -20, to: 85, step: 5}}` and adds one
// condition per temperature, named like "-20C".
func (d *decoder) sweep(n *yaml.Node) {
	if !d.expectMapping(n, "sweep", "sweep", "{temperature: [-20, 0, 25, 50]}") {
		return
	}
	byName, _ := d.fields(n, "sweep", "sweep", []string{"temperature"})
	e, ok := byName["temperature"]
	if !ok {
		d.missingf(n, "sweep.temperature", "sweep: missing key \"temperature\"")
		return
	}
	path, ctx := "sweep.temperature", "sweep: temperature"
	var temps []float64
	switch e.val.Kind {
	case yaml.SequenceNode:
		for _, it := range e.val.Content {
			v, ok := d.temperature(it, path, ctx)
			if !ok {
				return
			}
			temps = append(temps, v)
		}
	case yaml.MappingNode:
		r, _ := d.fields(e.val, path, ctx, []string{"from", "to", "step"})
		var lim [3]float64
		for i, k := range []string{"from", "to", "step"} {
			x, ok := r[k]
			if !ok {
				d.missingf(e.val, joinKey(path, k), "%s: missing key %q (a range is {from: -20, to: 85, step: 5})", ctx, k)
				return
			}
			if lim[i], ok = d.temperature(x.val, joinKey(path, k), label(ctx, k)); !ok {
				return
			}
		}
		from, to, step := lim[0], lim[1], lim[2]
		if !(step > 0) || to < from || (to-from)/step > 1000 {
			d.errorf(e.val, path, "%s: want from <= to and a positive step giving at most 1000 points", ctx)
			return
		}
		for k := 0; ; k++ {
			t := from + float64(k)*step
			if t > to+1e-9*math.Max(1, math.Abs(to)) {
				break
			}
			temps = append(temps, math.Round(t*1e9)/1e9)
		}
	default:
		d.errorf(e.val, path, "%s: expected a list of temperatures or {from, to, step}, got %s", ctx, describe(e.val))
		return
	}
	if len(temps) < 2 {
		d.errorf(e.val, path, "%s: a sweep needs at least two temperatures", ctx)
		return
	}
	for _, t := range temps {
		name := TemperatureName(t)
		if _, dup := d.t.ConditionIndex(name); dup {
			d.errorf(e.val, path, "%s: %g °C appears twice (condition %q)", ctx, t, name)
			return
		}
		d.t.Conditions = append(d.t.Conditions, Condition{Name: name, Pos: Pos{e.val.Line, e.val.Column}, Temperature: t, HasTemperature: true})
	}
}

// TemperatureName is the name a sweep gives the condition at t °C: "-20C",
// "25C", "37.5C".
func TemperatureName(t float64) string {
	return strconv.FormatFloat(t, 'g', -1, 64) + "C"
}

// curveRef is a transfer-curve target waiting for the conditions to be read.
type curveRef struct {
	target int // index into Targets of the template target it expands
	points []curvePoint
	n      *yaml.Node
	path   string
}

type curvePoint struct {
	celsius, value float64
	n              *yaml.Node
}

// curve reads `curve: {-20: 2.9, 25: 1.65, 85: 0.42}` (temperature: value).
func (d *decoder) curve(n *yaml.Node, path, ctx string, unit units.Unit) ([]curvePoint, bool) {
	if !d.expectMapping(n, path, ctx, "{-20: 2.9, 25: 1.65, 85: 0.42}") {
		return nil, false
	}
	_, order := d.fields(n, path, ctx, nil)
	var pts []curvePoint
	for _, e := range order {
		t, ok := d.temperature(e.key, joinKey(path, e.name), ctx)
		if !ok {
			return nil, false
		}
		v, ok := d.value(e.val, joinKey(path, e.name), label(ctx, e.name), unit)
		if !ok {
			return nil, false
		}
		pts = append(pts, curvePoint{t, v, e.key})
	}
	if len(pts) == 0 {
		d.errorf(n, path, "%s: the curve has no points", ctx)
		return nil, false
	}
	return pts, true
}

// conditionAt finds the visible condition at a temperature.
func (t *Template) conditionAt(celsius float64) (int, bool) {
	for i, c := range t.Conditions {
		if c.HasTemperature && math.Abs(c.Temperature-celsius) <= 1e-9 {
			return i, true
		}
	}
	return -1, false
}

// temperatureNames lists the temperatures the conditions have, for messages.
func (t *Template) temperatureNames() string {
	var out []string
	for _, c := range t.Conditions {
		if c.HasTemperature {
			out = append(out, strconv.FormatFloat(c.Temperature, 'g', -1, 64))
		}
	}
	if len(out) == 0 {
		return "none"
	}
	return strings.Join(out, ", ")
}

// expandCurves replaces each transfer-curve target by one goal per point,
// each in the condition at that temperature.
func (d *decoder) expandCurves() {
	if len(d.curveRefs) == 0 {
		return
	}
	t := d.t
	byTarget := map[int]curveRef{}
	for _, c := range d.curveRefs {
		byTarget[c.target] = c
	}
	var out []Target
	for i, tg := range t.Targets {
		c, ok := byTarget[i]
		if !ok {
			out = append(out, tg)
			continue
		}
		for _, p := range c.points {
			ci, ok := t.conditionAt(p.celsius)
			if !ok {
				d.errorf(p.n, c.path, "curve point at %g °C: no condition has that temperature (the conditions have %s); add it to sweep", p.celsius, t.temperatureNames())
				return
			}
			pt := tg
			pt.HasEquals, pt.Equals = true, p.value
			pt.When = []string{t.Conditions[ci].Name}
			out = append(out, pt)
		}
	}
	t.Targets = out
}

// HalfStep is half the temperature step of the central difference behind
// sensitivity and resolution targets, °C.
const HalfStep = 0.5

// onFraction reads `on_fraction: 0.05` or `on_fraction: 5%`.
func (d *decoder) onFraction(n *yaml.Node) {
	v, ok := 0.0, false
	if n.Kind == yaml.ScalarNode {
		if q, err := units.Parse(n.Value); err == nil && (q.Unit == units.Percent || q.Unit == units.NoUnit) {
			v, ok = q.Value, true
		}
	}
	if !ok || !(v > 0 && v <= 1) {
		d.errorf(n, "on_fraction", "on_fraction: expected the fraction of time the network is powered, above 0 and at most 1 (0.05 or 5%%), got %s", describe(n))
		return
	}
	d.t.OnFraction = v
}

// checkSensors resolves the sensor-related names once every section is read.
func (d *decoder) checkSensors() {
	t := d.t
	var adcNames []string
	for _, a := range t.ADCs {
		adcNames = append(adcNames, a.Name)
	}
	d.unknownNames(d.adcRefs, adcNames, "target names ADC %q, which is not in parts%s")
	for _, r := range d.heatRefs {
		i, ok := t.Part(r.name)
		var names []string
		for _, p := range t.Parts {
			if p.Sensor != nil {
				names = append(names, p.Name)
			}
		}
		switch {
		case !ok:
			d.errorf(r.n, r.key, "self_heating names part %q, which is not in parts%s", r.name, suggest(r.name, names))
		case t.Parts[i].Sensor == nil:
			d.errorf(r.n, r.key, "self_heating names part %q, which is not a sensor; it goes with an ntc or rtd part", r.name)
		case t.Parts[i].Dissipation == 0:
			d.errorf(r.n, r.key, "self_heating names %s %q, which has no dissipation constant; give the part `dissipation:` from its datasheet (e.g. dissipation: 1.5mW/K)", t.Parts[i].SensorType, r.name)
		}
	}
	for i := range t.Targets {
		tg := &t.Targets[i]
		if a, ok := t.ADC(tg.ADC); ok && (tg.Kind == Code || tg.Kind == Resolution) {
			tg.Nodes = []string{a.Node}
		}
		if tg.Kind == Linearity {
			n := 0
			for _, c := range t.Conditions {
				if c.HasTemperature {
					n++
				}
			}
			if n < 3 {
				d.errorf(&yaml.Node{Line: tg.Pos.Line, Column: tg.Pos.Col}, fmt.Sprintf("targets[%d]", i), "linearity needs at least three temperatures to measure against the line through the ends; the conditions have %s (use sweep)", t.temperatureNames())
			}
		}
	}
}

// isADC reports whether a part mapping has `type: adc`.
func isADC(n *yaml.Node) bool {
	if n.Kind != yaml.MappingNode {
		return false
	}
	for i := 0; i+1 < len(n.Content); i += 2 {
		if k := n.Content[i]; k.Kind == yaml.ScalarNode && k.Value == "type" {
			v := n.Content[i+1]
			return v.Kind == yaml.ScalarNode && v.Value == "adc"
		}
	}
	return false
}
