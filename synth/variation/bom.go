package variation

import (
	"fmt"
	"math"
	"slices"
	"strconv"
	"strings"

	"github.com/ohmfit/ohmfit/constraints"
	"github.com/ohmfit/ohmfit/constraints/sensors"
	"github.com/ohmfit/ohmfit/eseries/units"
	"github.com/ohmfit/ohmfit/solver"
)

// Part types of a BOM line.
const (
	TypeResistor = "resistor"
	TypeNTC      = "ntc"
	TypeRTD      = "rtd"
	// TypeStandIn is a fixed resistor whose value the conditions set: the
	// template models with it a part that varies (a sensor, a load), so
	// the line names what to order, not a resistor.
	TypeStandIn = "stand-in"
)

// BOMLine is one line of a bill of materials: physical parts a buyer orders
// as one item, with the designators that take them. Every figure on it is
// what the check of the design assumed.
type BOMLine struct {
	BOMItem
	Designators []string
	// TolFrom says where the tolerance came from: "part", "choose",
	// "series" (the series' usual one) or "assumed" (nothing gave one; a
	// warning says so); several, joined by ", ", when the line's parts
	// differ in that.
	TolFrom string
}

// BOMItem is what is ordered: two parts with equal items are one line.
type BOMItem struct {
	// Type is TypeResistor, TypeNTC, TypeRTD or TypeStandIn. A sensor or a
	// stand-in is never on the same line as a resistor.
	Type string
	// Value is a resistor's ohms, a thermistor's R25 or an RTD's R0.
	Value float64
	// Code is the IEC 60062 code of a resistor's value; "" for a sensor
	// or a value the code cannot write.
	Code string
	// Series is the preferred-number series of a resistor's value; "" for
	// a value in none (a stock list) and for a sensor.
	Series string
	// Tolerance is the relative tolerance the check assumed (a fraction:
	// 0.01 for 1 %; an absolute tolerance in ohms is given relative to the
	// value). NaN for a stand-in, whose real part the template does not
	// describe.
	Tolerance float64
	// TCR is a resistor's temperature coefficient per °C, as the check
	// assumed it (given, or the default for its tolerance); HasTCR is false
	// for a sensor, whose model is its temperature dependence.
	TCR    float64
	HasTCR bool
	// Model describes a sensor as it is ordered: "R25 10 kΩ, B 3435 K",
	// the Steinhart–Hart coefficients, or R0 and the RTD's coefficients.
	// "" for a resistor.
	Model string
	// BetaTolerance is an NTC's tolerance on its B constant as a fraction,
	// 0 when not given; Class an RTD's IEC 60751 class, "" when not given
	// (Tolerance is then the class's at 0 °C, in terms of R0). Model
	// names both too.
	BetaTolerance float64
	Class         string
	// Package is a resistor's package, named in the template or the
	// smallest that carries it; for a sensor only the one the template
	// names, else "".
	Package string
	// RatedWatts is the resistor package's power rating; 0 for a sensor,
	// which the resistor package table does not rate.
	RatedWatts float64
}

// Quantity is the number of parts the line orders.
func (l BOMLine) Quantity() int { return len(l.Designators) }

// BOM returns the bill of materials of a checked design: one line per
// distinct item (see MergeBOM), in the order the parts first appear.
// Resistors, each part of a pair on its own, and sensors are listed; sources
// and op-amps are not parts to buy here. rep is the design's Check report,
// whose ratings give each resistor's package.
func BOM(d *Design, rep *Report) []BOMLine {
	rated := map[string]Rating{}
	for _, r := range rep.Ratings {
		rated[r.Part] = r
	}
	var lines []BOMLine
	for _, v := range d.Parts {
		typ := d.bomType(v)
		if typ == "" {
			continue
		}
		l := BOMLine{Designators: []string{v.Name}, TolFrom: v.TolFrom}
		l.Value, l.Tolerance = v.Nominal, v.Tol
		if !v.Relative {
			l.Tolerance = v.Tol / v.Nominal
		}
		if typ != TypeResistor && typ != TypeStandIn {
			ps := d.Problem.Template.Parts[v.Part]
			l.Type, l.Package = v.Sensor, v.Package
			l.Value, l.Model = sensorSpec(ps)
			l.BetaTolerance, l.Class = ps.BetaTolerance, ps.Class
			if c, ok := sensors.LookupClass(ps.Class); ok {
				// The class at 0 °C in terms of R0: dR/dT·tolerance / R0.
				if k, err := sensors.Slope(ps.Sensor, 0); err == nil {
					l.Tolerance = k * c.Tolerance(0) / l.Value
				}
			}
			lines = append(lines, l)
			continue
		}
		if typ == TypeStandIn {
			lo, hi, _ := conditionRange(d.Problem.Template, v.Name)
			l.Type, l.Tolerance, l.TolFrom = TypeStandIn, math.NaN(), ""
			l.Model = fmt.Sprintf("set by the conditions (%s to %s): a part that varies, modelled as a resistor; order the real part",
				units.FormatUnit(lo, units.Ohm), units.FormatUnit(hi, units.Ohm))
			lines = append(lines, l)
			continue
		}
		l.Type, l.Series, l.TCR, l.HasTCR = TypeResistor, v.Series, v.TCR, true
		if code, err := units.Code(v.Nominal); err == nil {
			l.Code = code
		}
		r := rated[v.Name]
		l.Package, l.RatedWatts = r.Package, r.Rated
		lines = append(lines, l)
	}
	return MergeBOM(lines)
}

// bomType is the one rule for what a part is on the bill of materials:
// TypeResistor, a sensor's type (TypeNTC, TypeRTD), TypeStandIn for a
// resistor the conditions set (a part that varies), or "" for what is not
// ordered (sources, op-amps, an ADC's modelled input).
func (d *Design) bomType(v Varied) string {
	switch {
	case v.Kind != solver.Resistor || v.Extra():
		return ""
	case v.Sensor != "":
		return v.Sensor
	}
	if _, _, set := conditionRange(d.Problem.Template, v.Name); set {
		return TypeStandIn
	}
	return TypeResistor
}

// FixedResistorValues returns the values of the template's fixed
// resistors (the parts the BOM lists as TypeResistor that are not free
// positions), ascending, once each: they are on the bill of materials
// whatever the free positions take.
func (d *Design) FixedResistorValues() []float64 {
	var out []float64
	for _, v := range d.Parts {
		if d.bomType(v) == TypeResistor && !d.Problem.Template.Parts[v.Part].Free {
			out = append(out, v.Nominal)
		}
	}
	slices.Sort(out)
	return slices.Compact(out)
}

// conditionRange returns the smallest and largest value the template's
// part takes over its value and the conditions that set it, and whether any
// condition sets it.
func conditionRange(t *constraints.Template, name string) (lo, hi float64, set bool) {
	i, ok := t.Part(name)
	if !ok {
		return 0, 0, false
	}
	lo, hi = t.Parts[i].Value, t.Parts[i].Value
	for _, c := range t.Conditions {
		for _, s := range c.Set {
			if s.Part == name {
				lo, hi, set = math.Min(lo, s.Value), math.Max(hi, s.Value), true
			}
		}
	}
	return lo, hi, set
}

// MergeBOM groups lines that order the same item (equal BOMItem: type,
// value, series, tolerance, TCR, model, package and rating) into one,
// designators in the order given, lines in the order of first appearance.
// A board's BOM is MergeBOM of its networks' lines.
func MergeBOM(lines []BOMLine) []BOMLine {
	var out []BOMLine
	for _, l := range lines {
		i := slices.IndexFunc(out, func(o BOMLine) bool { return o.BOMItem.same(l.BOMItem) })
		if i < 0 {
			l.Designators = slices.Clone(l.Designators)
			out = append(out, l)
			continue
		}
		o := &out[i]
		o.Designators = append(o.Designators, l.Designators...)
		for _, f := range strings.Split(l.TolFrom, ", ") {
			if !slices.Contains(strings.Split(o.TolFrom, ", "), f) {
				o.TolFrom += ", " + f
			}
		}
	}
	return out
}

// same reports whether two items are one thing to order. A stand-in's
// unknown tolerance (NaN) matches another's: == alone would never merge
// two stand-ins of one value.
func (a BOMItem) same(b BOMItem) bool {
	if math.IsNaN(a.Tolerance) && math.IsNaN(b.Tolerance) {
		a.Tolerance, b.Tolerance = 0, 0
	}
	return a == b
}

// SensorKind names a sensor type for people: "NTC thermistor" or "RTD".
func SensorKind(typ string) string {
	if typ == TypeNTC {
		return "NTC thermistor"
	}
	return "RTD"
}

// sensorValueName names the value a sensor's tolerance applies to.
func sensorValueName(typ string) string {
	if typ == TypeNTC {
		return "R25"
	}
	return "R0"
}

// sensorSpec returns the value that names a sensor part (R25, R0) and its
// model as a buyer orders it, with its B tolerance or IEC 60751 class when
// given.
func sensorSpec(ps constraints.PartSpec) (float64, string) {
	v, s := modelSpec(ps.Sensor, ps.Value)
	if ps.BetaTolerance > 0 {
		s += " ±" + units.FormatUnit(ps.BetaTolerance, units.Percent)
	}
	if c, ok := sensors.LookupClass(ps.Class); ok {
		g := func(x float64) string { return strconv.FormatFloat(x, 'g', -1, 64) }
		s += ", class " + c.Name + " (IEC 60751: ±(" + g(c.Offset) + " + " + g(c.Slope) + "·|t|) °C)"
	}
	return v, s
}

// modelSpec returns the value that names a sensor model (R25, R0) and the
// model as a buyer orders it. r25 is the model's resistance at 25 °C.
func modelSpec(m sensors.Model, r25 float64) (float64, string) {
	g := func(x float64) string { return strconv.FormatFloat(x, 'g', -1, 64) }
	switch m := m.(type) {
	case sensors.Beta:
		return m.R25, "R25 " + units.FormatUnit(m.R25, units.Ohm) + ", B " + g(m.Beta) + " K"
	case sensors.SteinhartHart:
		return r25, "R25 " + units.FormatUnit(r25, units.Ohm) + ", Steinhart–Hart A " + g(m.A) + ", B " + g(m.B) + ", C " + g(m.C)
	case sensors.RTD:
		coef := "IEC 60751 coefficients"
		if std := sensors.IEC60751(m.R0); m != std {
			coef = strings.Join([]string{"A " + g(m.A), "B " + g(m.B), "C " + g(m.C)}, ", ")
		}
		return m.R0, "R0 " + units.FormatUnit(m.R0, units.Ohm) + ", " + coef
	}
	return r25, ""
}

// SensorSpec describes a design's sensor part j (an index into
// Design.Parts) as its BOM line does: "R25 10 kΩ, B 3435 K"; "" for a part
// that is not a sensor.
func (d *Design) SensorSpec(j int) string {
	v := d.Parts[j]
	if v.Sensor == "" {
		return ""
	}
	_, s := sensorSpec(d.Problem.Template.Parts[v.Part])
	return s
}
