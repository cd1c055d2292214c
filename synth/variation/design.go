package variation

import (
	"fmt"
	"math"

	"github.com/ohmfit/ohmfit/constraints"
	"github.com/ohmfit/ohmfit/constraints/sensors"
	"github.com/ohmfit/ohmfit/eseries"
	"github.com/ohmfit/ohmfit/eseries/units"
	"github.com/ohmfit/ohmfit/solver"
	"github.com/ohmfit/ohmfit/synth"
)

// AssumedTolerance is the tolerance given to a chosen part whose values come
// from a stock list (no series to take a usual tolerance from) and to a
// fixed resistor whose value is in no series: 1 %, with a warning (common
// practice, no source: 1 % chip resistors are the usual default stock).
const AssumedTolerance = 0.01

// Default TCRs for resistors without a `tcr`, used only when an ambient
// range is given: typical thick-film figures, from memory (common
// practice; thin-film and metal-foil parts are far better).
const (
	DefaultTCRPrecise = 100e-6 // parts of 1 % or tighter
	DefaultTCR        = 200e-6 // looser parts
)

// Varied is one physical part whose value varies: a resistor (a position
// made of two parts has two Varied entries) or a source with a tolerance.
type Varied struct {
	Name     string // designator: the part's name, or name+"a"/"b" for a pair
	Position string // the template part it realises
	Part     int    // index of that part in the network
	Kind     solver.Kind
	Nominal  float64 // this physical part's nominal value (ohms, volts, amps); a sensor's R25 (thermistor) or R0 (RTD)
	// Tol is the tolerance: a fraction when Relative, else absolute in the
	// part's unit.
	Tol      float64
	Relative bool
	TCR      float64 // per °C, resistors only (0 for a sensor, whose model is its temperature dependence)
	// Sensor is "ntc" or "rtd" for a thermistor or RTD, "" otherwise. A
	// sensor varies by its tolerance alone, which scales its resistance at
	// every temperature alike; it has no series, no TCR and no package
	// rating of a resistor.
	Sensor string
	// Series is the preferred-number series the value comes from, "" when
	// unknown (a stock list, a fixed value in no series, a source).
	Series string
	// TolFrom says where the tolerance came from: "part", "choose",
	// "series", "assumed" or "none".
	TolFrom string
	// Param says what of a sensor this entry varies: ParamValue (its
	// resistance, by Tol; every part that is not a sensor), or one of the
	// extra parameters a sensor may carry, each an entry of its own after
	// the sensor's: its B constant (ParamBeta, Tol relative, Nominal the B
	// in kelvin) or the two terms of its IEC 60751 class, a temperature
	// error e(t) = offset + slope·t within ±(Offset + Slope·|t|) °C
	// (ParamClassOffset, Tol absolute in °C; ParamClassSlope, Tol absolute
	// in °C per °C; Nominal 0). An extra entry is no part to buy.
	Param int
	// Class is an RTD's IEC 60751 class ("A"), on its ParamValue entry.
	Class   string
	Package string // package named in the template, "" to choose one
	pair    int    // 0 single; 1 or 2: first or second of a series/parallel pair
	combine constraints.Combine
	other   int // index in Design.Parts of the pair's other part, or -1
}

// What a Varied entry varies: see Varied.Param.
const (
	ParamValue       = iota // the part's value (a sensor's R25 or R0)
	ParamBeta               // an NTC's B constant
	ParamClassOffset        // the constant term of an RTD's class error, °C
	ParamClassSlope         // the term of an RTD's class error proportional to t, °C/°C
)

// Extra reports whether the entry is a sensor's extra parameter rather than
// a physical part.
func (v Varied) Extra() bool { return v.Param != ParamValue }

// Design is a template with every resistor valued, ready for analysis.
type Design struct {
	Problem *constraints.Problem
	// Options are the chosen realisations of the free positions, in
	// Problem.Free order; empty for a fully valued template.
	Options []synth.Option
	Parts   []Varied
	// position[i] lists, per network part, the indices into Parts that
	// realise it.
	position [][]int
	ambient  constraints.Ambient
	warnings []string
	// tcrDraw, during a Monte Carlo sample, holds each part's drawn
	// temperature coefficient (per °C, signed) for conditions with a
	// temperature; nil outside the Monte Carlo, where a corner's drift
	// pushes the same way as its tolerance.
	tcrDraw []float64
}

// NewDesign prepares a compiled template for analysis. options fill its free
// positions (in Problem.Free order; nil for a fully valued template); series,
// when not empty, is the series that overrode the template's (`--series`).
// ambient replaces the template's ambient range when Set.
func NewDesign(p *constraints.Problem, options []synth.Option, series string, ambient constraints.Ambient) (*Design, error) {
	t := p.Template
	if len(options) != len(p.Free) {
		return nil, errorf(nil, "%d free positions but %d options", len(p.Free), len(options))
	}
	d := &Design{Problem: p, Options: options, position: make([][]int, len(t.Parts)), ambient: t.Ambient}
	if ambient.Set {
		d.ambient = ambient
	}
	free := map[int]int{}
	for k, i := range p.Free {
		free[i] = k
	}
	for i, ps := range t.Parts {
		if ps.ADC != "" {
			continue // an ADC's input: exact, and no part to buy
		}
		switch ps.Kind {
		case solver.OpAmp:
			continue
		case solver.VoltageSource, solver.CurrentSource:
			v := Varied{Name: ps.Name, Position: ps.Name, Part: i, Kind: ps.Kind, Nominal: ps.Value,
				Tol: ps.Tolerance, Relative: ps.TolRelative, TolFrom: "part", other: -1}
			if ps.Tolerance == 0 {
				v.TolFrom = "none"
			}
			d.add(i, v)
			continue
		}
		if ps.Sensor != nil {
			nom, _ := sensorSpec(ps) // R25 or R0, the value it is ordered by
			v := Varied{Name: ps.Name, Position: ps.Name, Part: i, Kind: solver.Resistor, Nominal: nom,
				Package: ps.Package, Sensor: ps.SensorType, Relative: true, other: -1}
			d.sensorTolerance(&v, ps)
			d.add(i, v)
			d.sensorParams(i, ps)
			continue
		}
		k, isFree := free[i]
		if !isFree {
			v := Varied{Name: ps.Name, Position: ps.Name, Part: i, Kind: solver.Resistor, Nominal: ps.Value,
				Package: ps.Package, other: -1}
			ch := t.Choose.Default
			v.Series = seriesOf(ps.Value, ch.Series)
			d.tolerance(&v, ps, ch)
			d.tcr(&v, ps, ch)
			d.add(i, v)
			continue
		}
		ch := t.Choose.For(ps.Name)
		if series != "" {
			ch.Series, ch.Stock = series, nil
		}
		o := options[k]
		vals := o.PartValues()
		idx := make([]int, len(vals))
		for j, pv := range vals {
			name := ps.Name
			if len(vals) > 1 {
				name += string(rune('a' + j))
			}
			v := Varied{Name: name, Position: ps.Name, Part: i, Kind: solver.Resistor, Nominal: pv,
				Series: ch.Series, Package: ch.Package, pair: 0, combine: o.Combine, other: -1}
			if len(vals) > 1 {
				v.pair = j + 1
			}
			if ch.Stock != nil {
				v.Series = ""
			}
			d.tolerance(&v, ps, ch)
			d.tcr(&v, ps, ch)
			idx[j] = len(d.Parts)
			d.add(i, v)
		}
		if len(idx) == 2 {
			d.Parts[idx[0]].other, d.Parts[idx[1]].other = idx[1], idx[0]
		}
	}
	return d, nil
}

func (d *Design) add(part int, v Varied) {
	d.position[part] = append(d.position[part], len(d.Parts))
	d.Parts = append(d.Parts, v)
}

// seriesOf names the series a fixed value belongs to: the template's own
// series when the value is in it, else "".
func seriesOf(v float64, name string) string {
	s, err := eseries.Lookup(name)
	if err == nil && s.Contains(v) {
		return s.Name
	}
	return ""
}

// tolerance fills a resistor's tolerance: the part's own, the choice's, the
// series' usual one, or AssumedTolerance with a warning.
func (d *Design) tolerance(v *Varied, ps constraints.PartSpec, ch constraints.Choice) {
	v.Relative = true
	switch {
	case ps.Tolerance > 0:
		v.Tol, v.Relative, v.TolFrom = ps.Tolerance, ps.TolRelative, "part"
		if !ps.TolRelative && v.pair > 0 {
			// An absolute tolerance on a position of two parts: share it in
			// proportion to the values.
			v.Tol, v.Relative = ps.Tolerance/ps.Value, true
		}
	case ch.Tolerance > 0:
		v.Tol, v.TolFrom = ch.Tolerance, "choose"
	default:
		if s, err := eseries.Lookup(v.Series); err == nil && v.Series != "" {
			v.Tol, v.TolFrom = s.Tolerance, "series"
			return
		}
		v.Tol, v.TolFrom = AssumedTolerance, "assumed"
		d.warnings = append(d.warnings, fmt.Sprintf("%s: no tolerance given and no series to take one from; assumed ±%s (give `tolerance:` on the part or in choose)",
			v.Name, units.FormatUnit(AssumedTolerance, units.Percent)))
	}
}

// sensorTolerance fills a thermistor's or RTD's tolerance: its own, taken
// relative to its R25 (R0) when given in ohms, or AssumedTolerance with a
// warning. A resistor series' usual tolerance says nothing about a sensor.
func (d *Design) sensorTolerance(v *Varied, ps constraints.PartSpec) {
	switch {
	case ps.Class != "":
		// The class is the tolerance: its two terms are entries of their
		// own (sensorParams), the resistance entry varies no further.
		v.Tol, v.TolFrom, v.Class = 0, "class", ps.Class
	case ps.Tolerance > 0 && ps.TolRelative:
		v.Tol, v.TolFrom = ps.Tolerance, "part"
	case ps.Tolerance > 0:
		v.Tol, v.TolFrom = ps.Tolerance/v.Nominal, "part"
	default:
		v.Tol, v.TolFrom = AssumedTolerance, "assumed"
		d.warnings = append(d.warnings, fmt.Sprintf("%s: an %s without a tolerance; assumed ±%s of its %s (give `tolerance:` on the part, from its datasheet)",
			v.Name, SensorKind(ps.SensorType), units.FormatUnit(AssumedTolerance, units.Percent), sensorValueName(ps.SensorType)))
	}
}

// sensorParams adds the extra entries of sensor part i: its B tolerance,
// or the two terms of its IEC 60751 class.
func (d *Design) sensorParams(i int, ps constraints.PartSpec) {
	base := Varied{Position: ps.Name, Part: i, Kind: solver.Resistor, Sensor: ps.SensorType, TolFrom: "part", other: -1}
	if b, ok := ps.Sensor.(sensors.Beta); ok && ps.BetaTolerance > 0 {
		v := base
		v.Name, v.Param, v.Nominal, v.Tol, v.Relative = ps.Name+":B", ParamBeta, b.Beta, ps.BetaTolerance, true
		d.add(i, v)
	}
	if c, ok := sensors.LookupClass(ps.Class); ok {
		v := base
		v.Name, v.Param, v.Tol, v.TolFrom = ps.Name+":offset", ParamClassOffset, c.Offset, "class"
		d.add(i, v)
		v.Name, v.Param, v.Tol = ps.Name+":slope", ParamClassSlope, c.Slope
		d.add(i, v)
	}
}

// sensorValue is sensor part i's resistance in condition c with its
// entries idx at deviations dev: the model's resistance at the condition's
// temperature, scaled by its value tolerance, with its B constant moved
// (R = R25·exp(B·(1/T − 1/T25)), so a relative change δB multiplies R by
// exp(B·δB·(1/T − 1/T25))), and read at the temperature its class error
// puts it at (a sensor e °C off the standard curve has, at t, the
// resistance the standard sensor has at t + e).
func (d *Design) sensorValue(i, c int, idx []int, dev []float64) float64 {
	t := d.Problem.Template
	ps := t.Parts[i]
	celsius := d.Problem.Conditions[c].Temperature
	r := d.Problem.Conditions[c].Values[i]
	e := 0.0
	for _, j := range idx {
		v := d.Parts[j]
		switch v.Param {
		case ParamValue:
			r *= 1 + dev[j]
		case ParamBeta:
			x := 1/(celsius+sensors.ZeroCelsius) - 1/(constraints.ReferenceCelsius+sensors.ZeroCelsius)
			r *= math.Exp(v.Nominal * dev[j] * x)
		case ParamClassOffset:
			e += dev[j]
		case ParamClassSlope:
			e += dev[j] * celsius
		}
	}
	if e != 0 {
		base := d.Problem.Conditions[c].Values[i]
		if moved, err := ps.Sensor.Resistance(celsius + e); err == nil {
			r *= moved / base
		} else if k, err := sensors.Slope(ps.Sensor, celsius); err == nil {
			r *= 1 + k*e/base // at the end of the model's range: its tangent
		}
	}
	return r
}

// paramSlope is dR/dx of sensor entry j in condition c at nominal values,
// for x the entry's parameter (its B in kelvin, its class offset in °C,
// its class slope in °C/°C), with r the sensor's resistance there.
func (d *Design) paramSlope(j, c int, r float64) float64 {
	v := d.Parts[j]
	celsius := d.Problem.Conditions[c].Temperature
	switch v.Param {
	case ParamBeta:
		return r * (1/(celsius+sensors.ZeroCelsius) - 1/(constraints.ReferenceCelsius+sensors.ZeroCelsius))
	case ParamClassOffset, ParamClassSlope:
		k, err := sensors.Slope(d.Problem.Template.Parts[v.Part].Sensor, celsius)
		if err != nil {
			return math.NaN()
		}
		if v.Param == ParamClassSlope {
			k *= celsius
		}
		return k
	}
	return math.NaN()
}

// tcr fills a resistor's TCR: the part's, the choice's, or the default for
// its tolerance class (1 % or tighter, relative to its value).
func (d *Design) tcr(v *Varied, ps constraints.PartSpec, ch constraints.Choice) {
	switch {
	case ps.HasTCR:
		v.TCR = ps.TCR
	case ch.HasTCR:
		v.TCR = ch.TCR
	case v.Relative && v.Tol <= 0.01, !v.Relative && v.Tol <= 0.01*v.Nominal:
		// An absolute tolerance classes the part by its relative size.
		v.TCR = DefaultTCRPrecise
	default:
		v.TCR = DefaultTCR
	}
}

// Ambient returns the ambient range the analysis uses.
func (d *Design) Ambient() constraints.Ambient { return d.ambient }

// deltaT is the largest distance of the ambient range from the reference
// temperature, 0 without a range.
func (d *Design) deltaT() float64 {
	if !d.ambient.Set {
		return 0
	}
	return math.Max(math.Abs(d.ambient.Min-constraints.ReferenceCelsius), math.Abs(d.ambient.Max-constraints.ReferenceCelsius))
}

// Bounds returns a part's worst-case factor range: tolerance and TCR drift
// over the ambient range, pushing the same way. For an absolute tolerance
// the values are the deviation in the part's unit.
func (d *Design) Bounds(j int) (lo, hi float64) {
	v := d.Parts[j]
	if !v.Relative {
		return -v.Tol, v.Tol
	}
	drift := 0.0
	if v.Kind == solver.Resistor {
		drift = v.TCR * d.deltaT()
	}
	return (1-v.Tol)*(1-drift) - 1, (1+v.Tol)*(1+drift) - 1
}

// varies reports whether part j has any spread.
func (d *Design) varies(j int) bool {
	lo, hi := d.Bounds(j)
	return lo != 0 || hi != 0
}

// setValues loads condition c into the solver with deviations dev (one per
// Varied: relative for relative parts, absolute otherwise).
func (d *Design) setValues(s *solver.Solver, c int, dev []float64) {
	cv := d.Problem.Conditions[c]
	for i, v := range cv.Values {
		s.SetValue(i, v)
	}
	for i, idx := range d.position {
		if len(idx) > 0 && d.Parts[idx[0]].Sensor != "" {
			s.SetValue(i, d.sensorValue(i, c, idx, dev))
			continue
		}
		switch len(idx) {
		case 1:
			v := d.Parts[idx[0]]
			nom := cv.Values[i]
			if nom == 0 && v.Kind == solver.Resistor {
				nom = v.Nominal // a free position
			}
			if v.Relative {
				s.SetValue(i, nom*d.factor(idx[0], c, dev))
			} else {
				s.SetValue(i, nom+dev[idx[0]])
			}
		case 2:
			a := d.Parts[idx[0]].Nominal * d.factor(idx[0], c, dev)
			b := d.Parts[idx[1]].Nominal * d.factor(idx[1], c, dev)
			s.SetValue(i, d.Parts[idx[0]].combine.Join(a, b))
		}
	}
}

// physical returns the volts across and watts in varied resistor j, from
// its position's solution (a pair shares current in series, voltage in
// parallel).
func (d *Design) physical(s *solver.Solver, j int, dev []float64) (volts, watts float64) {
	v := d.Parts[j]
	pv, pa := s.Volts(v.Part), s.Amps(v.Part)
	if v.pair == 0 {
		return pv, pv * pa
	}
	return PartLoad(v.combine, v.Nominal*(1+dev[j]), pv, pa)
}

// Warnings returns what NewDesign had to assume.
func (d *Design) Warnings() []string { return append([]string(nil), d.warnings...) }

// factor is the relative value of varied part j in condition c: its
// tolerance deviation dev[j] and, when the condition has a temperature and
// no ambient range is given (which would govern instead), its TCR drift at
// that temperature: R = R25·(1 + dev)·(1 + α·(T − 25 °C)). A corner takes α
// at ±TCR with the sign of its tolerance deviation (both push the value the
// same way); a Monte Carlo sample takes the α it drew. Sensors are left
// alone: their temperature dependence is their model's.
func (d *Design) factor(j, c int, dev []float64) float64 {
	f := 1 + dev[j]
	v := d.Parts[j]
	cond := d.Problem.Conditions[c]
	if d.ambient.Set || !cond.HasTemperature || v.Kind != solver.Resistor || !v.Relative ||
		d.Problem.Template.Parts[v.Part].Sensor != nil {
		return f
	}
	dt := cond.Temperature - constraints.ReferenceCelsius
	switch {
	case d.tcrDraw != nil:
		return f * (1 + d.tcrDraw[j]*dt)
	case dev[j] > 0:
		return f * (1 + v.TCR*math.Abs(dt))
	case dev[j] < 0:
		return f * (1 - v.TCR*math.Abs(dt))
	}
	return f
}

// conditionTemperatures reports whether TCR drift follows the conditions'
// temperatures (some condition has one and no ambient range is given).
func (d *Design) conditionTemperatures() bool {
	if d.ambient.Set {
		return false
	}
	for _, c := range d.Problem.Conditions {
		if c.HasTemperature {
			return true
		}
	}
	return false
}
