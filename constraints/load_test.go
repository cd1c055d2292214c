package constraints

import (
	"errors"
	"io/fs"
	"os"
	"path/filepath"
	"reflect"
	"strings"
	"testing"

	"github.com/ohmfit/ohmfit/solver"
)

// head is a valid start that most bad cases extend; its parts are a 5 V
// source, a free divider R1/R2 and a fixed R3.
const head = `ohmfit: 1
parts:
  - {name: V1, type: voltage-source, plus: in, minus: gnd, volts: 5}
  - {name: R1, type: resistor, from: in, to: out}
  - {name: R2, type: resistor, from: out, to: gnd}
  - {name: R3, type: resistor, from: out, to: gnd, value: 10k}
`

// marked splits a case's text at its "@@" marker, returning the text
// without it and the 1-based line and column where the marker stood
// (0, 0 when there is none).
func marked(src string) (text string, line, col int) {
	i := strings.Index(src, "@@")
	if i < 0 {
		return src, 0, 0
	}
	before := src[:i]
	line = strings.Count(before, "\n") + 1
	col = i - strings.LastIndex(before, "\n")
	return before + src[i+2:], line, col
}

func TestParseBad(t *testing.T) {
	cases := []struct {
		name string
		src  string // "@@" marks where the error must point; none: position unchecked
		frag string // must appear in the message
		key  string // expected Error.Key, when not ""
	}{
		{"empty", "", "empty template", ""},
		{"comments only", "# nothing here\n", "empty template", ""},
		{"binary", "ohmfit: 1\n@@\x00\x01\x02", "not a text file", ""},
		{"invalid utf8", "ohmfit: 1\nname: @@\xff\xfe", "not a text file", ""},
		{"not yaml", "ohmfit: 1\nparts: [\n", "not valid YAML", ""},
		{"not a mapping", "@@- a\n- b\n", "a template is a mapping", ""},
		{"several documents", head + "---\nohmfit: 1\n", "several", ""},
		{"missing version", "@@name: x\nparts: []\n", "missing `ohmfit: 1`", "ohmfit"},
		{"other version", "ohmfit: @@2\nparts: []\n", "unsupported schema version 2; this ohmfit reads version 1", "ohmfit"},
		{"version not a number", "ohmfit: @@one\n", "expected the schema version 1", "ohmfit"},
		{"unknown top key", head + "@@targts: []\n", `unknown key "targts" (did you mean "targets"?)`, "targts"},
		{"unrelated top key", head + "@@colour: red\n", `unknown key "colour"; expected one of ohmfit, name, ground`, "colour"},
		{"misspelt parts", "ohmfit: 1\n@@prats: []\n", `(did you mean "parts"?)`, "prats"},
		{"sweep too short", head + "sweep: {temperature: @@[25]}\n", "a sweep needs at least two temperatures", "sweep.temperature"},
		{"sweep bad range", head + "sweep: {temperature: @@{from: 50, to: 0, step: 5}}\n", "want from <= to", "sweep.temperature"},
		{"on_fraction above one", head + "on_fraction: @@2\n", "above 0 and at most 1", "on_fraction"},
		{"duplicate top key", head + "name: a\n@@name: b\n", `key "name" appears twice (first on line 7)`, "name"},
		{"no parts", "ohmfit: 1\nparts: @@[]\n", "at least one part", "parts"},
		{"parts not a list", "ohmfit: 1\nparts: @@{R1: 1k}\n", "parts: expected a list, got a mapping", "parts"},
		{"part not a mapping", "ohmfit: 1\nparts:\n  - @@R1\n", "expected a mapping such as", "parts[0]"},
		{"unknown part key", "ohmfit: 1\nparts:\n  - {name: R1, type: resistor, from: in, @@too: gnd}\n",
			`part "R1": unknown key "too" (did you mean "to"?)`, "parts[0].too"},
		{"key of another type", "ohmfit: 1\nparts:\n  - {name: R1, type: resistor, from: in, to: gnd, @@volts: 5}\n",
			`unknown key "volts"; expected one of name, type, from, to, value`, "parts[0].volts"},
		{"missing part key", "ohmfit: 1\nparts:\n  - @@{name: R1, type: resistor, from: in}\n", `part "R1": missing key "to"`, "parts[0].to"},
		{"missing type", "ohmfit: 1\nparts:\n  - @@{name: R1, from: in, to: gnd}\n", `missing key "type"`, "parts[0].type"},
		{"duplicate part key", "ohmfit: 1\nparts:\n  - {name: R1, type: resistor, from: in, to: out, @@to: gnd}\n",
			`key "to" appears twice`, "parts[0].to"},
		{"wrong shape", "ohmfit: 1\nparts:\n  - {name: R1, type: resistor, from: @@[a, b], to: gnd}\n",
			`part "R1": from: expected a name, got a list`, "parts[0].from"},
		{"name with space", "ohmfit: 1\nparts:\n  - {name: @@\"R 1\", type: resistor, from: a, to: gnd}\n",
			"contains a space", "parts[0].name"},
		{"duplicate part name", head + "  - {name: @@R1, type: resistor, from: in, to: gnd}\n",
			`part name "R1" is already used on line 4`, "parts[4].name"},
		{"ntc without beta", head + "  - @@{name: RT1, type: ntc, from: out, to: gnd, r25: 10k}\n",
			`a thermistor needs r25 and beta`, "parts[4].r25"},
		{"dissipation unreadable", head + "  - {name: RT1, type: ntc, from: out, to: gnd, r25: 10k, beta: 3950, dissipation: @@1.5mA/K}\n",
			"expected watts per kelvin", "parts[4].dissipation"},
		{"dissipation in W/K meant mW/K", head + "  - {name: RT1, type: ntc, from: out, to: gnd, r25: 10k, beta: 3950, dissipation: @@1.5}\n",
			"lies outside", "parts[4].dissipation"},
		{"dissipation negative", head + "  - {name: RT1, type: rtd, from: out, to: gnd, r0: 100, dissipation: @@-2mW/K}\n",
			"must be positive", "parts[4].dissipation"},
		{"dissipation on a resistor", head + "  - {name: R4, type: resistor, from: out, to: gnd, @@dissipation: 2mW/K}\n",
			"dissipation", "parts[4].dissipation"},
		{"self_heating on a resistor", head + "targets:\n  - {self_heating: @@R3, max: 0.1}\n",
			`self_heating names part "R3", which is not a sensor`, "targets[0].self_heating"},
		{"self_heating without dissipation", head + "  - {name: RT1, type: ntc, from: out, to: gnd, r25: 10k, beta: 3950}\ntargets:\n  - {self_heating: @@RT1, max: 0.1}\n",
			"has no dissipation constant", "targets[0].self_heating"},
		{"self_heating unknown part", head + "  - {name: RT1, type: ntc, from: out, to: gnd, r25: 10k, beta: 3950, dissipation: 2mW/K}\ntargets:\n  - {self_heating: @@RT2, max: 0.1}\n",
			`(did you mean "RT1"?)`, "targets[0].self_heating"},
		{"rtd class unknown", head + "  - {name: PT, type: rtd, from: out, to: gnd, r0: 100, class: @@D}\n",
			"expected an IEC 60751 class, one of AA, A, B, C", "parts[4].class"},
		{"rtd class and tolerance", head + "  - {name: PT, type: rtd, from: out, to: gnd, r0: 100, class: A, @@tolerance: 1%}\n",
			"give class or tolerance, not both", "parts[4].tolerance"},
		{"beta tolerance zero", head + "  - {name: RT1, type: ntc, from: out, to: gnd, r25: 10k, beta: 3950, beta_tolerance: @@0%}\n",
			"above 0% and below 100%", "parts[4].beta_tolerance"},
		{"beta tolerance with steinhart", head + "  - {name: RT1, type: ntc, from: out, to: gnd, steinhart: [1.129e-3, 2.341e-4, 8.775e-8], @@beta_tolerance: 1%}\n",
			"beta_tolerance goes with r25 and beta", "parts[4].beta_tolerance"},
		{"class on an ntc", head + "  - {name: RT1, type: ntc, from: out, to: gnd, r25: 10k, beta: 3950, @@class: A}\n",
			"class", "parts[4].class"},
		{"adc input zero", head + "  - {name: ADC1, type: adc, in: out, ref: 3.3, bits: 12, input: @@0}\n",
			"must be positive", "parts[4].input"},
		{"adc leakage in volts", head + "  - {name: ADC1, type: adc, in: out, ref: 3.3, bits: 12, leakage: @@1V}\n",
			"want A", "parts[4].leakage"},
		{"adc input on a misspelt node", head + "  - {name: ADC1, type: adc, in: @@ot, ref: 3.3, bits: 12, input: 1M}\n",
			`names node "ot"`, ""},
		{"adc load name taken", head + "  - @@{name: ADC1, type: adc, in: out, ref: 3.3, bits: 12, input: 1M}\n  - {name: \"ADC1:input\", type: resistor, from: out, to: gnd, value: 1k}\n",
			`part name "ADC1:input" is taken`, ""},
		{"ntc both models", head + "  - {name: RT1, type: ntc, from: out, to: gnd, r25: 10k, beta: 3950, @@steinhart: [1, 2, 3]}\n",
			`either r25 and beta or steinhart`, "parts[4].steinhart"},
		{"rtd without r0", head + "  - @@{name: RT1, type: rtd, from: out, to: gnd}\n", "an RTD needs r0", "parts[4].r0"},
		{"adc bits", head + "  - {name: A1, type: adc, in: out, ref: 3.3, bits: @@0}\n", "whole number of bits from 1 to 32", "parts[4].bits"},
		{"misspelt type", head + "  - {name: R4, type: @@resistr, from: out, to: gnd}\n",
			`unknown part type "resistr" (did you mean "resistor"?)`, "parts[4].type"},
		{"same node twice", head + "  - {name: R4, type: resistor, from: out, to: @@out}\n", "both ends are on node", "parts[4].to"},
		{"unreadable value", head + "  - {name: R4, type: resistor, from: out, to: gnd, value: @@4.7x}\n",
			`part "R4": value: cannot read value "4.7x"`, "parts[4].value"},
		{"zero resistor", head + "  - {name: R4, type: resistor, from: out, to: gnd, value: @@0}\n", "must be positive", "parts[4].value"},
		{"empty value", head + "  - {name: R4, type: resistor, from: out, to: gnd, value: @@null}\n", "leave the key out", "parts[4].value"},
		{"volts in amps", head + "  - {name: V2, type: voltage-source, plus: out, minus: gnd, volts: @@5A}\n", "want V", "parts[4].volts"},
		{"ground unconnected", "ohmfit: 1\nground: @@0\nparts:\n  - {name: R1, type: resistor, from: a, to: gnd}\n",
			`no part connects to the ground node "0"`, "ground"},
		{"target node unknown", head + "targets:\n  - {voltage: @@ot, equals: 2}\n",
			`target names node "ot", which no part connects (did you mean "out"?)`, "targets[0].voltage"},
		{"target second node unknown", head + "targets:\n  - {voltage: [out, @@vfb], min: 1}\n",
			`names node "vfb"`, "targets[0].voltage"},
		{"target part unknown", head + "targets:\n  - {current: @@R9, max: 1m}\n",
			`target names part "R9", which is not in parts (did you mean "R1"?)`, "targets[0].current"},
		{"two quantities", head + "targets:\n  - {voltage: out, @@current: R1, max: 1}\n", "names both voltage and current", "targets[0].current"},
		{"no quantity", head + "targets:\n  - @@{equals: 1}\n", "needs one of voltage, current, power, ratio, resistance", "targets[0]"},
		{"no bound", head + "targets:\n  - @@{voltage: out}\n", "voltage out has no equals, min or max", "targets[0]"},
		{"unknown target key", head + "targets:\n  - {voltage: out, @@equal: 2}\n", `(did you mean "equals"?)`, "targets[0].equal"},
		{"tolerance without equals", head + "targets:\n  - {voltage: out, max: 3, @@tolerance: 1%}\n", "tolerance needs equals", "targets[0].tolerance"},
		{"tolerance wrong unit", head + "targets:\n  - {voltage: out, equals: 2, tolerance: @@5mA}\n", "want V", "targets[0].tolerance"},
		{"relative tolerance of zero", head + "targets:\n  - {voltage: [in, out], equals: 0, tolerance: @@1%}\n", "absolute tolerance", "targets[0].tolerance"},
		{"min above max", head + "targets:\n  - {voltage: out, min: 3, max: @@2}\n", "min (3) is above max (2)", "targets[0].max"},
		{"max before min", head + "targets:\n  - {power: R1, max: 1, min: @@2}\n", "min (2) is above max (1)", "targets[0].min"},
		{"equals outside", head + "targets:\n  - {voltage: out, equals: @@4, max: 3}\n", "lies outside min..max", "targets[0].equals"},
		{"ratio of one node", head + "targets:\n  - {ratio: @@out, equals: 0.5}\n", "expected a list of two nodes", "targets[0].ratio"},
		{"ratio same nodes", head + "targets:\n  - {ratio: [out, @@out], equals: 0.5}\n", "name two different nodes", "targets[0].ratio"},
		{"resistance in volts", head + "targets:\n  - {resistance: [out, gnd], min: @@10V}\n", "want Ω", "targets[0].min"},
		{"when unknown", head + "targets:\n  - {voltage: out, equals: 2, when: @@vin-lo}\nconditions:\n  - {name: vin-low, set: {V1: 4.5}}\n",
			`when names condition "vin-lo", which is not in conditions (did you mean "vin-low"?)`, "targets[0].when"},
		{"when without conditions", head + "targets:\n  - {voltage: out, equals: 2, when: [nominal, @@hot]}\n", `condition "hot"`, "targets[0].when"},
		{"when empty", head + "targets:\n  - {voltage: out, equals: 2, when: @@[]}\n", "the list is empty", "targets[0].when"},
		{"limit zero", head + "limits:\n  supply_power_max: @@0\n", "must be positive", "limits.supply_power_max"},
		{"limit unknown key", head + "limits:\n  @@supply_power: 1m\n", `(did you mean "supply_power_max"?)`, "limits.supply_power"},
		{"unknown series", head + "choose:\n  series: @@E25\n", `unknown series "E25" (did you mean "E24"?)`, "choose.series"},
		{"choose min above max", head + "choose:\n  min: 1M\n  max: @@1k\n", "min (1M) is above max (1k)", "choose"},
		{"choose no series value", head + "choose:\n  series: E3\n  min: 2.5k\n  max: @@3k\n", "no E3 value lies between", "choose"},
		{"combine misspelt", head + "choose:\n  combine: @@paralel\n", `(did you mean "parallel"?)`, "choose.combine"},
		{"stock not positive", head + "choose:\n  series: [1k, @@0]\n", "must be positive", "choose.series"},
		{"stock empty", head + "choose:\n  series: @@[]\n", "stock list is empty", "choose.series"},
		{"stock out of range", head + "choose:\n  series: [1k, 2k]\n  min: @@5k\n", "no stock value lies between", "choose"},
		{"stock file missing", head + "choose:\n  series: @@no-such-stock.txt\n", `no series or stock file named "no-such-stock.txt"`, "choose.series"},
		{"override fixed part", head + "choose:\n  overrides:\n    @@R3: {series: E12}\n", `part "R3" is a resistor with a value`, "choose.overrides.R3"},
		{"override source", head + "choose:\n  overrides:\n    @@V1: {series: E12}\n", `part "V1" is a voltage-source`, "choose.overrides.V1"},
		{"override unknown part", head + "choose:\n  overrides:\n    @@R5: {min: 1k}\n", `no part named "R5" (did you mean "R1"?)`, "choose.overrides.R5"},
		{"override bad key", head + "choose:\n  overrides:\n    R2: {@@overrides: {}}\n", `unknown key "overrides"`, "choose.overrides.R2.overrides"},
		{"override min above inherited max", head + "choose:\n  max: 100k\n  overrides:\n    R2: {min: @@1M}\n", "min (1M) is above max (100k)", "choose.overrides.R2"},
		{"condition missing name", head + "conditions:\n  - @@{set: {V1: 4}}\n", `missing key "name"`, "conditions[0].name"},
		{"condition duplicate", head + "conditions:\n  - {name: a}\n  - {name: @@a}\n", `condition name "a" is already used on line 8`, "conditions[1].name"},
		{"condition temperature", head + "conditions:\n  - {name: hot, temperature: @@hot}\n", `cannot read value "hot"`, "conditions[0].temperature"},
		{"curve without condition", head + "sweep: {temperature: [0, 25]}\ntargets:\n  - {voltage: out, curve: {0: 2, @@50: 1}}\n",
			"curve point at 50 °C: no condition has that temperature", "targets[0].curve"},
		{"linearity needs three", head + "sweep: {temperature: [0, 25]}\ntargets:\n  - @@{linearity: out, max: 1}\n",
			"linearity needs at least three temperatures", "targets[0]"},
		{"sensitivity needs at", head + "targets:\n  - @@{sensitivity: out, min: 1m}\n", "sensitivity needs at", "targets[0].at"},
		{"code names unknown adc", head + "targets:\n  - {code: @@ADC9, equals: 100}\n", `target names ADC "ADC9"`, "targets[0].code"},
		{"set unknown part", head + "conditions:\n  - {name: low, set: {@@Vin: 4}}\n", `no part named "Vin"`, "conditions[0].set.Vin"},
		{"set free part", head + "conditions:\n  - {name: low, set: {@@R1: 4k}}\n", "a condition cannot set it", "conditions[0].set.R1"},
		{"set resistor negative", head + "conditions:\n  - {name: low, set: {R3: @@-1k}}\n", "must be positive", "conditions[0].set.R3"},
		{"set source wrong unit", head + "conditions:\n  - {name: low, set: {V1: @@4mA}}\n", "want V", "conditions[0].set.V1"},
		{"set twice", head + "conditions:\n  - {name: low, set: {V1: 4, @@V1: 5}}\n", "appears twice", "conditions[0].set.V1"},
		{"rank unknown", head + "rank: [error, @@powr]\n", `(did you mean "power"?)`, "rank[1]"},
		{"rank twice", head + "rank: [error, @@error]\n", `"error" appears twice`, "rank[1]"},
		{"alias", head + "targets:\n  - &t {voltage: out, equals: 2}\n  - @@*t\n", "aliases (*t) are not supported", ""},
		{"deep", head + "name: " + strings.Repeat("[", 40) + strings.Repeat("]", 40) + "\n", "nested more than", ""},
		// The earliest of several problems wins, whatever the section order.
		{"first in file order", "ohmfit: 1\ntargets:\n  - {voltage: @@nowhere, equals: 1}\nparts:\n  - {name: R1, type: resistor, from: a, to: gnd, value: 0}\n",
			"must be positive", ""},
		{"cross refs after syntax", "ohmfit: 1\ntargets:\n  - {voltage: nowhere, equals: 1}\nparts:\n  - {name: R1, type: resistor, from: a, to: gnd, value: @@0}\n",
			"must be positive", "parts[0].value"},
	}
	// "first in file order" has two mistakes of different phases: the
	// value is checked first, so the unknown node must not be reported.
	cases[len(cases)-2].src = strings.Replace(cases[len(cases)-2].src, "@@", "", 1)
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			src, line, col := marked(c.src)
			tpl, err := Parse("t.yaml", []byte(src))
			if err == nil {
				t.Fatalf("no error; template %+v", tpl)
			}
			var e *Error
			if !errors.As(err, &e) {
				t.Fatalf("error %T %q is not an *Error", err, err)
			}
			if !strings.Contains(e.Msg, c.frag) {
				t.Errorf("message %q lacks %q", e.Msg, c.frag)
			}
			if line > 0 && (e.Line != line || e.Col != col) {
				t.Errorf("position %d:%d, want %d:%d (%s)", e.Line, e.Col, line, col, e)
			}
			if c.key != "" && e.Key != c.key {
				t.Errorf("key %q, want %q", e.Key, c.key)
			}
			if e.File != "t.yaml" {
				t.Errorf("file %q", e.File)
			}
			if strings.HasPrefix(e.Msg, ":") || strings.Contains(err.Error(), "\n") {
				t.Errorf("message spans lines: %q", err)
			}
		})
	}
}

// zeroPos clears positions so templates can be compared by value.
func zeroPos(t *Template) {
	for i := range t.Parts {
		t.Parts[i].Pos = Pos{}
	}
	for i := range t.Targets {
		t.Targets[i].Pos = Pos{}
	}
	for i := range t.Conditions {
		t.Conditions[i].Pos = Pos{}
	}
	t.Limits.Pos = Pos{}
	t.Choose.Default.Pos = Pos{}
	for k, o := range t.Choose.Overrides {
		o.Pos = Pos{}
		t.Choose.Overrides[k] = o
	}
}

func TestParseGood(t *testing.T) {
	defChoice := Choice{Series: "E24", Min: 10, Max: 10e6, Combine: Single}
	nominal := []Condition{{Name: "nominal", Temperature: ReferenceCelsius}}
	defRank := []RankKey{ByError, ByPower, ByParts}
	cases := []struct {
		name string
		src  string
		want Template
	}{
		{"minimal, defaults filled", head, Template{
			File: "t.yaml", Dir: ".", Ground: "gnd",
			Parts: []PartSpec{
				{Part: solver.Part{Name: "V1", Kind: solver.VoltageSource, From: "in", To: "gnd", Value: 5}},
				{Part: solver.Part{Name: "R1", Kind: solver.Resistor, From: "in", To: "out"}, Free: true},
				{Part: solver.Part{Name: "R2", Kind: solver.Resistor, From: "out", To: "gnd"}, Free: true},
				{Part: solver.Part{Name: "R3", Kind: solver.Resistor, From: "out", To: "gnd", Value: 10e3}},
			},
			Choose:     Choose{Default: defChoice},
			Conditions: nominal, Rank: defRank, OnFraction: 1,
		}},
		{"everything", `ohmfit: 1
name: Every key
ground: "0"
parts:
  - {name: Vs, type: voltage-source, plus: top, minus: "0", volts: 12V}
  - {name: Is, type: current-source, from: mid, to: "0", amps: 20nA}
  - {name: Ra, type: resistor, from: top, to: mid}
  - {name: Rb, type: resistor, from: mid, to: "0", value: 4k7}
  - {name: U1, type: opamp, plus: mid, minus: o, out: o}
targets:
  - {voltage: mid, equals: 2.5, tolerance: 1%}
  - {voltage: [top, mid], min: 1, max: 10, when: hot}
  - {current: Ra, max: 1m, when: [hot, cold]}
  - {power: Ra, max: 50mW}
  - {ratio: [mid, top], equals: 0.25, tolerance: 0.001}
  - {resistance: [mid, "0"], equals: 3k, tolerance: 100}
limits: {supply_power_max: 2m}
choose:
  series: e96
  min: 1k
  max: 1M
  combine: any
  overrides:
    Ra: {series: [2k2, 1k, 1k, 4.7k], max: 3k}
conditions:
  - {name: hot, set: {Vs: 13, Is: 30n, Rb: 4.3k}}
  - {name: cold}
rank: [parts]
`, Template{
			File: "t.yaml", Dir: ".", Name: "Every key", Ground: "0",
			Parts: []PartSpec{
				{Part: solver.Part{Name: "Vs", Kind: solver.VoltageSource, From: "top", To: "0", Value: 12}},
				{Part: solver.Part{Name: "Is", Kind: solver.CurrentSource, From: "mid", To: "0", Value: 20e-9}},
				{Part: solver.Part{Name: "Ra", Kind: solver.Resistor, From: "top", To: "mid"}, Free: true},
				{Part: solver.Part{Name: "Rb", Kind: solver.Resistor, From: "mid", To: "0", Value: 4700}},
				{Part: solver.Part{Name: "U1", Kind: solver.OpAmp, Plus: "mid", Minus: "o", Out: "o"}},
			},
			Targets: []Target{
				{Kind: Voltage, Nodes: []string{"mid"}, HasEquals: true, Equals: 2.5, Tolerance: 0.01, TolRelative: true},
				{Kind: Voltage, Nodes: []string{"top", "mid"}, HasMin: true, Min: 1, HasMax: true, Max: 10, When: []string{"hot"}},
				{Kind: Current, Part: "Ra", HasMax: true, Max: 1e-3, When: []string{"hot", "cold"}},
				{Kind: Power, Part: "Ra", HasMax: true, Max: 50e-3},
				{Kind: Ratio, Nodes: []string{"mid", "top"}, HasEquals: true, Equals: 0.25, Tolerance: 0.001},
				{Kind: Resistance, Nodes: []string{"mid", "0"}, HasEquals: true, Equals: 3000, Tolerance: 100},
			},
			Limits: Limits{SupplyPowerMax: 2e-3},
			Choose: Choose{
				Default: Choice{Series: "E96", Min: 1e3, Max: 1e6, Combine: Any},
				Overrides: map[string]Choice{
					"Ra": {Stock: []float64{1000, 2200, 4700}, Min: 1e3, Max: 3e3, Combine: Any},
				},
			},
			Conditions: []Condition{
				{Name: "hot", Set: []Setting{{"Vs", 13}, {"Is", 30e-9}, {"Rb", 4300}}, Temperature: ReferenceCelsius},
				{Name: "cold", Temperature: ReferenceCelsius},
			},
			Rank:       []RankKey{ByParts, ByError, ByPower},
			OnFraction: 1,
		}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			got, err := Parse("t.yaml", []byte(c.src))
			if err != nil {
				t.Fatal(err)
			}
			zeroPos(got)
			if !reflect.DeepEqual(*got, c.want) {
				t.Errorf("got  %+v\nwant %+v", *got, c.want)
			}
		})
	}
}

func TestPositionsKept(t *testing.T) {
	tpl, err := Parse("t.yaml", []byte(head+"targets:\n  - {voltage: out, equals: 2}\n"))
	if err != nil {
		t.Fatal(err)
	}
	if got := tpl.Parts[1].Pos; got != (Pos{4, 5}) {
		t.Errorf("R1 at %v, want 4:5", got)
	}
	if got := tpl.Targets[0].Pos; got != (Pos{8, 5}) {
		t.Errorf("target at %v, want 8:5", got)
	}
}

func TestContractExample(t *testing.T) {
	tpl, err := Load(filepath.Join("testdata", "contract.yaml"))
	if err != nil {
		t.Fatal(err)
	}
	if tpl.Name != "Feedback divider, 3.3 V rail" || len(tpl.Parts) != 6 || len(tpl.Targets) != 7 {
		t.Fatalf("name %q, %d parts, %d targets", tpl.Name, len(tpl.Parts), len(tpl.Targets))
	}
	if got := tpl.FreeParts(); !reflect.DeepEqual(got, []int{1, 2}) {
		t.Errorf("free parts %v", got)
	}
	r2 := tpl.Choose.For("R2")
	if r2.Series != "E24" || r2.Min != 10e3 || r2.Max != 1e6 || r2.Combine != Single {
		t.Errorf("R2 choice %+v: want E24 10k..1M single (max inherited)", r2)
	}
	if r1 := tpl.Choose.For("R1"); r1.Series != "E96" || r1.Min != 1e3 {
		t.Errorf("R1 choice %+v", r1)
	}
	var labels []string
	for _, tg := range tpl.Targets {
		labels = append(labels, tg.Label())
	}
	want := []string{"voltage fb", "voltage out-fb", "current R1", "power R1", "ratio fb/out", "resistance out-gnd", "voltage fb"}
	if !reflect.DeepEqual(labels, want) {
		t.Errorf("labels %q, want %q", labels, want)
	}
	last := tpl.Targets[6]
	if last.Applies("vin-high") || !last.Applies("vin-low") || !tpl.Targets[0].Applies("vin-high") {
		t.Error("Applies does not follow when")
	}
	if tpl.Conditions[1].Set[0] != (Setting{"Vout", 3.4}) {
		t.Errorf("condition %+v", tpl.Conditions[1])
	}
	if tpl.Valued() {
		t.Error("Valued with free parts")
	}
}

func TestCircuit(t *testing.T) {
	tpl, err := Parse("t.yaml", []byte(head))
	if err != nil {
		t.Fatal(err)
	}
	// A candidate's value written into the template must not leak into
	// the circuit: free parts always come out as zero.
	tpl.Parts[1].Value = 123
	c := tpl.Circuit()
	if c.Ground != "gnd" || len(c.Parts) != 4 {
		t.Fatalf("circuit %+v", c)
	}
	for i, want := range []float64{5, 0, 0, 10e3} {
		if c.Parts[i].Value != want || c.Parts[i].Name != tpl.Parts[i].Name {
			t.Errorf("part %d = %+v, want value %g", i, c.Parts[i], want)
		}
	}
	if i, ok := tpl.Part("R3"); !ok || i != 3 {
		t.Errorf("Part(R3) = %d, %v", i, ok)
	}
	if _, ok := tpl.Part("R9"); ok {
		t.Error("Part(R9) found")
	}
}

func TestStockFile(t *testing.T) {
	dir := t.TempDir()
	write := func(name, text string) string {
		p := filepath.Join(dir, name)
		if err := os.WriteFile(p, []byte(text), 0o644); err != nil {
			t.Fatal(err)
		}
		return p
	}
	write("drawer.txt", "# reel inventory\n4k7\n\n1k   # cut tape\n2.2kohm\n1000\n")
	tpl, err := Load(write("t.yaml", head+"choose:\n  series: drawer.txt\n"))
	if err != nil {
		t.Fatal(err)
	}
	c := tpl.Choose.Default
	if !reflect.DeepEqual(c.Stock, []float64{1000, 2200, 4700}) || c.Series != "" {
		t.Errorf("stock %v series %q, want [1000 2200 4700]", c.Stock, c.Series)
	}
	if c.StockFile != filepath.Join(dir, "drawer.txt") {
		t.Errorf("stock file %q", c.StockFile)
	}
	if tpl.Dir != dir {
		t.Errorf("Dir %q, want %q", tpl.Dir, dir)
	}

	write("bad.txt", "1k\n# next is wrong\n  4.7q\n")
	_, err = Load(write("t2.yaml", head+"choose:\n  series: bad.txt\n"))
	var e *Error
	if !errors.As(err, &e) {
		t.Fatalf("error %v is not an *Error", err)
	}
	if e.File != filepath.Join(dir, "bad.txt") || e.Line != 3 || e.Col != 3 || !strings.Contains(e.Msg, `"4.7q"`) {
		t.Errorf("got %v, want bad.txt:3:3 naming 4.7q", e)
	}
}

func TestLoadFileProblems(t *testing.T) {
	dir := t.TempDir()
	_, err := Load(filepath.Join(dir, "absent.yaml"))
	if !errors.Is(err, fs.ErrNotExist) {
		t.Errorf("missing file: %v does not wrap fs.ErrNotExist", err)
	}
	big := filepath.Join(dir, "big.yaml")
	if err := os.WriteFile(big, make([]byte, MaxFileSize+1), 0o644); err != nil {
		t.Fatal(err)
	}
	_, err = Load(big)
	if err == nil || !strings.Contains(err.Error(), "larger than 4 MiB") {
		t.Errorf("large file: %v", err)
	}
	_, err = Load(dir)
	if err == nil || !strings.Contains(err.Error(), "not a regular file") {
		t.Errorf("directory: %v", err)
	}
}

func TestErrorString(t *testing.T) {
	cases := []struct {
		e    Error
		want string
	}{
		{Error{File: "a.yaml", Line: 3, Col: 7, Msg: "m"}, "a.yaml:3:7: m"},
		{Error{File: "a.yaml", Line: 3, Msg: "m"}, "a.yaml:3: m"},
		{Error{File: "a.yaml", Msg: "m"}, "a.yaml: m"},
		{Error{Line: 3, Col: 7, Msg: "m"}, "3:7: m"},
		{Error{Msg: "m"}, "m"},
	}
	for _, c := range cases {
		if got := c.e.Error(); got != c.want {
			t.Errorf("%+v: got %q, want %q", c.e, got, c.want)
		}
	}
}

func TestSuggest(t *testing.T) {
	cases := []struct {
		word       string
		candidates []string
		want       string
	}{
		{"vfb", []string{"in", "fb", "out"}, "fb"},
		{"valeu", []string{"name", "value"}, "value"}, // transposition costs one
		{"r1", []string{"R1", "R2"}, "R1"},            // case is ignored
		{"x", []string{"gnd", "y"}, ""},               // nothing in common
		{"resistor", []string{"resistor"}, ""},        // the word itself is no suggestion
		{"overides", []string{"series", "overrides"}, "overrides"},
		{"zzzzzz", []string{"series"}, ""},
	}
	for _, c := range cases {
		got := suggest(c.word, c.candidates)
		want := ""
		if c.want != "" {
			want = ` (did you mean "` + c.want + `"?)`
		}
		if got != want {
			t.Errorf("suggest(%q) = %q, want %q", c.word, got, want)
		}
	}
}

func TestEditDistance(t *testing.T) {
	cases := []struct {
		a, b string
		want int
	}{
		{"", "", 0}, {"abc", "", 3}, {"kitten", "sitting", 3}, {"ab", "ba", 1}, {"µA", "uA", 1},
	}
	for _, c := range cases {
		if got := editDistance(c.a, c.b); got != c.want {
			t.Errorf("editDistance(%q, %q) = %d, want %d", c.a, c.b, got, c.want)
		}
	}
}
