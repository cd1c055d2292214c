package variation

import (
	"math"
	"slices"
	"testing"

	"github.com/ohmfit/ohmfit/eseries/units"
)

// sharedValue is a template where a resistor and a thermistor share 10k
// (the thermistor's R25) and two resistors are the same part.
const sharedValue = `ohmfit: 1
parts:
  - {name: V, type: voltage-source, plus: vcc, minus: gnd, volts: 3.3}
  - {name: R1, type: resistor, from: vcc, to: s, value: 10k, tolerance: 1%, tcr: 50ppm}
  - {name: RT1, type: ntc, from: s, to: gnd, r25: 10k, beta: 3435, tolerance: 2%}
  - {name: R2, type: resistor, from: vcc, to: t, value: 10k, tolerance: 1%, tcr: 50ppm}
  - {name: RT2, type: ntc, from: t, to: gnd, steinhart: [1.129e-3, 2.341e-4, 8.775e-8]}
ambient: {min: -20, max: 70}
sweep: {temperature: [0, 25, 50]}
targets:
  - {voltage: s, min: 0}
`

// TestBOMSensorLines checks the BOM lines of resistors beside thermistors:
// the two equal resistors share a line, each thermistor has its own, with
// its model and the tolerance the check assumed, and no series, TCR,
// package or rating of a resistor. A sensor's spread is its tolerance
// alone: the ambient range drifts resistors by their TCR, not a sensor,
// whose model is its temperature dependence.
func TestBOMSensorLines(t *testing.T) {
	d := design(t, sharedValue)
	r, err := Check(d, &Settings{Samples: -1})
	if err != nil {
		t.Fatal(err)
	}
	lines := BOM(d, r)
	// RT2's R25 from the Steinhart–Hart equation 1/T = A + B·ln R + C·ln³R
	// at T = 298.15 K, by bisection (the right side rises with R).
	lo, hi := 0.0, 30.0
	for range 200 {
		m := (lo + hi) / 2
		if 1.129e-3+2.341e-4*m+8.775e-8*m*m*m < 1/298.15 {
			lo = m
		} else {
			hi = m
		}
	}
	r25 := units.FormatUnit(math.Exp(lo), units.Ohm)
	type want struct {
		names      []string
		typ, model string
		tol        float64
		from       string
		hasTCR     bool
	}
	wants := []want{
		{[]string{"R1", "R2"}, TypeResistor, "", 0.01, "part", true},
		{[]string{"RT1"}, TypeNTC, "R25 10 kΩ, B 3435 K", 0.02, "part", false},
		{[]string{"RT2"}, TypeNTC, "R25 " + r25 + ", Steinhart–Hart A 0.001129, B 0.0002341, C 8.775e-08", AssumedTolerance, "assumed", false},
	}
	if len(lines) != len(wants) {
		t.Fatalf("%d lines, want %d: %+v", len(lines), len(wants), lines)
	}
	for i, w := range wants {
		l := lines[i]
		if !slices.Equal(l.Designators, w.names) || l.Type != w.typ || l.Tolerance != w.tol || l.TolFrom != w.from || l.HasTCR != w.hasTCR {
			t.Errorf("line %d: %+v, want %+v", i+1, l, w)
		}
		if w.typ != TypeResistor && (l.Model != w.model || l.Package != "" || l.RatedWatts != 0 || l.Series != "" || l.Code != "") {
			t.Errorf("line %d: sensor line %+v, want model %q and no resistor fields", i+1, l, w.model)
		}
	}
	for j, v := range d.Parts {
		if v.Sensor == "" {
			continue
		}
		if v.Series != "" || v.TCR != 0 {
			t.Errorf("%s: series %q, TCR %g; a sensor has neither", v.Name, v.Series, v.TCR)
		}
		lo, hi := d.Bounds(j)
		if math.Abs(lo+v.Tol) > 1e-15 || math.Abs(hi-v.Tol) > 1e-15 {
			t.Errorf("%s: bounds %g … %g with the ambient range, want ±%g", v.Name, lo, hi, v.Tol)
		}
	}
	for _, rg := range r.Ratings {
		if rg.Part == "RT1" || rg.Part == "RT2" {
			t.Errorf("%s rated against a resistor package: %+v", rg.Part, rg)
		}
	}
	if len(r.Sensors) != 2 || !(r.Sensors[0].Watts > 0) {
		t.Errorf("sensor loads %+v", r.Sensors)
	}
}

// TestMergeBOM checks the merge a board's BOM relies on: equal items join
// in first-appearance order, a resistor never joins a sensor of the same
// value, and the input is left as it was.
func TestMergeBOM(t *testing.T) {
	res := BOMItem{Type: TypeResistor, Value: 10e3, Tolerance: 0.01, HasTCR: true, TCR: 1e-4, Package: "0402", RatedWatts: 0.0625}
	ntc := BOMItem{Type: TypeNTC, Value: 10e3, Tolerance: 0.01, Model: "R25 10 kΩ, B 3435 K"}
	in := []BOMLine{
		{BOMItem: res, Designators: []string{"U3-R1"}, TolFrom: "part"},
		{BOMItem: ntc, Designators: []string{"U9-RT1"}, TolFrom: "part"},
		{BOMItem: res, Designators: []string{"U9-R2"}, TolFrom: "series"},
	}
	out := MergeBOM(in)
	if len(out) != 2 || !slices.Equal(out[0].Designators, []string{"U3-R1", "U9-R2"}) || out[0].TolFrom != "part, series" ||
		out[1].Type != TypeNTC || out[1].Quantity() != 1 {
		t.Errorf("merged %+v", out)
	}
	if len(in[0].Designators) != 1 || in[0].TolFrom != "part" {
		t.Errorf("input changed: %+v", in[0])
	}
	// Two stand-ins of one value in two networks are one item to order,
	// although their tolerance is unknown (NaN, never == itself).
	stand := BOMItem{Type: TypeStandIn, Value: 8.2e3, Tolerance: math.NaN(), Model: "set by the conditions"}
	two := MergeBOM([]BOMLine{{BOMItem: stand, Designators: []string{"U1-RS"}}, {BOMItem: stand, Designators: []string{"U2-RS"}}})
	if len(two) != 1 || two[0].Quantity() != 2 {
		t.Errorf("two stand-ins of one value: %+v", two)
	}
}

// A fixed resistor whose value the conditions set stands in for a part that
// varies (a sensor or a load modelled as a resistor): the buyer must not be
// told to order a resistor of its nominal value, nor one merged with a real
// 8.2k resistor on the same line.
func TestBOMStandIn(t *testing.T) {
	d := design(t, `ohmfit: 1
parts:
  - {name: V, type: voltage-source, plus: vcc, minus: gnd, volts: 3.3}
  - {name: R1, type: resistor, from: vcc, to: s, value: 8.2k, tolerance: 1%}
  - {name: RS, type: resistor, from: s, to: gnd, value: 8.2k, tolerance: 1%}
conditions:
  - {name: cold, set: {RS: 15k}}
  - {name: hot, set: {RS: 4.2k}}
targets:
  - {voltage: s, min: 0}
`)
	r, err := Check(d, &Settings{Samples: -1})
	if err != nil {
		t.Fatal(err)
	}
	lines := BOM(d, r)
	if len(lines) != 2 {
		t.Fatalf("%d lines, want R1 and RS apart: %+v", len(lines), lines)
	}
	rs := lines[1]
	if !slices.Equal(rs.Designators, []string{"RS"}) || rs.Type != TypeStandIn {
		t.Fatalf("line %+v, want RS alone, type %q", rs, TypeStandIn)
	}
	if rs.Series != "" || rs.Code != "" || rs.Package != "" || rs.RatedWatts != 0 || rs.HasTCR {
		t.Errorf("a stand-in carries no resistor ordering data: %+v", rs)
	}
	if rs.Model == "" {
		t.Error("a stand-in's line should say what it stands for")
	}
	if lines[0].Type != TypeResistor || !slices.Equal(lines[0].Designators, []string{"R1"}) {
		t.Errorf("R1's line: %+v", lines[0])
	}
}
