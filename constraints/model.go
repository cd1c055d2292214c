package constraints

import (
	"github.com/ohmfit/ohmfit/constraints/sensors"
	"github.com/ohmfit/ohmfit/solver"
)

// SchemaVersion is the template schema this package reads (the `ohmfit:` key).
const SchemaVersion = 1

// DefaultGround is the reference node's name when a template gives none.
const DefaultGround = "gnd"

// Pos is a position in a template file, 1-based. A zero Pos means "unknown".
type Pos struct {
	Line, Col int
}

// Template is a loaded schema-1 template: the network, what to aim for, what
// not to exceed, how to choose free values, and under which conditions.
type Template struct {
	File       string // file name used in messages ("" for text not from a file)
	Dir        string // directory relative paths in the template are resolved against
	Name       string
	Ground     string // never empty after loading
	Parts      []PartSpec
	Targets    []Target
	Limits     Limits
	Choose     Choose
	Conditions []Condition // never empty after loading: at least {Name: "nominal"}
	Rank       []RankKey   // never empty after loading: default error, power, parts
	Ambient    Ambient     // ambient temperature range for TCR; zero value: none given
	ADCs       []ADC       // ADC inputs, in file order
	// OnFraction is the fraction of the time the network is powered (a
	// sensor switched on only while it is read); every power figure is the
	// average, OnFraction times the power while on. 1 when not given.
	OnFraction float64
}

// ReferenceCelsius is the temperature at which part values are nominal: the
// usual reference of resistor TCR figures (common practice, no source).
const ReferenceCelsius = 25.0

// Ambient is the range of ambient temperature, in °C (the scale a
// condition's `temperature` uses), over which `check` spreads each resistor
// by its TCR. The template key is `ambient: {min: -20, max: 70}`.
type Ambient struct {
	Set      bool // false when the template gives no range
	Min, Max float64
	Pos      Pos
}

// PartSpec is one part of a template. Free resistors (no value given) are the
// positions ohmfit chooses; their Value is zero until a candidate fills it.
type PartSpec struct {
	solver.Part
	Free bool // a resistor without a value: ohmfit chooses it
	Pos  Pos

	// Tolerance of the part's value (`tolerance:` on a resistor or a
	// source). With TolRelative it is a fraction ("1%" gives 0.01);
	// otherwise an absolute amount in the part's unit (ohms, volts, amps).
	// Zero means not given: a resistor then takes its choice's tolerance
	// or its series' usual one, a source is taken as exact.
	Tolerance   float64
	TolRelative bool
	// TCR is a resistor's temperature coefficient per °C (`tcr: 100ppm`
	// gives 1e-4), taken as ± that much; HasTCR says it was given.
	TCR    float64
	HasTCR bool
	// Package is a resistor's package (`package: 0603`), as
	// ratings.Lookup names it; "" when not given.
	Package string

	// Sensor is set for a thermistor or RTD (`type: ntc` / `rtd`): a
	// resistor whose value follows each condition's temperature. Its Value
	// is the resistance at ReferenceCelsius.
	Sensor     sensors.Model
	SensorType string // "ntc" or "rtd"
	// BetaTolerance is an NTC's tolerance on its B constant as a fraction
	// (`beta_tolerance: 1%`); zero means not given (B is taken as exact).
	BetaTolerance float64
	// Class is an RTD's IEC 60751 tolerance class (`class: A`), one of
	// sensors.Classes; "" when not given.
	Class string
	// Dissipation is a sensor's dissipation constant in W/K (`dissipation:
	// 1.5mW/K`): the power that raises it one kelvin above its
	// surroundings. Zero means not given.
	Dissipation float64

	// ADC is set on the parts ohmfit adds for an ADC's input (`input:`, a
	// resistor from its node to ground, and `leakage:`, a current source
	// from its node to ground): the ADC's name. They load the node in every
	// solve; they are no parts to buy or to vary, and are exact.
	ADC string
}

// ADC is an analog-to-digital converter input (`type: adc`) whose reading
// targets can be written in codes: ideal and unloading unless it has an
// input resistance or a leakage current, which the loader adds as parts
// (see PartSpec.ADC).
type ADC struct {
	Name string
	Node string  // the node it reads, against ground
	Ref  float64 // full-scale reference, volts
	Bits int
	Pos  Pos
	// Input is the input's resistance to ground in ohms (`input: 1M`);
	// zero means none (an ideal input).
	Input float64
	// Leakage is the current the input draws out of the node, in amps
	// (`leakage: 100n`; negative when it drives current into the node);
	// HasLeakage says it was given.
	Leakage    float64
	HasLeakage bool
}

// Step is the voltage of one code step: Ref / 2^Bits.
func (a ADC) Step() float64 { return a.Ref / float64(uint64(1)<<uint(a.Bits)) }

// TargetKind says which quantity a target measures.
type TargetKind int

// The quantities a target can name.
const (
	Voltage     TargetKind = iota // node voltage to ground, or a difference of two nodes
	Current                       // current through a part in its edge direction
	Power                         // watts absorbed by a part
	Ratio                         // V(a) / V(b)
	Resistance                    // resistance seen between two nodes, independent sources zeroed
	Code                          // an ADC's output code, V(in)/ref·2^bits (not rounded)
	Linearity                     // largest deviation of a node's voltage from the straight line through the ends of the temperature sweep, in °C of reading
	Sensitivity                   // |dV/dT| of a node at a temperature, volts per °C
	Resolution                    // °C per ADC step at a temperature
	SelfHeating                   // a sensor's temperature rise above its surroundings, °C: its power over its dissipation constant
)

// Target is one requirement on one quantity. A target with HasEquals is a
// goal (it contributes an error); Tolerance, Min and Max are hard limits.
type Target struct {
	Kind  TargetKind
	Nodes []string // Voltage: 1 or 2 nodes; Ratio and Resistance: exactly 2
	Part  string   // Current, Power and SelfHeating

	HasEquals bool
	Equals    float64

	// Tolerance band around Equals, a hard limit. Zero means none.
	// TolRelative: the band is Tolerance*|Equals|; otherwise it is absolute.
	Tolerance   float64
	TolRelative bool

	HasMin, HasMax bool
	Min, Max       float64

	When []string // condition names; empty means every condition
	Pos  Pos

	ADC string  // Code and Resolution: the ADC part read
	At  float64 // Sensitivity and Resolution: the temperature, °C
}

// Limits are hard limits on the network as a whole.
type Limits struct {
	// SupplyPowerMax bounds the total power dissipated in all resistors, in
	// watts, in the worst condition. Zero means no limit.
	SupplyPowerMax float64
	// MaxPackage is the largest resistor package allowed (`max_package:
	// 0805`), as ratings names it; a part that needs a larger one fails
	// `check`. "" means no limit.
	MaxPackage string
	Pos        Pos
}

// Combine says how a free position may be realised from physical parts.
type Combine int

// Ways to realise a free position.
const (
	Single   Combine = iota // one part
	Series                  // two parts in series (or one, when one is enough: see synth)
	Parallel                // two parts in parallel
	Any                     // one part, or two in series or in parallel
)

// ParallelOf is the parallel law for two resistances, 1/R = 1/a + 1/b: the
// one place ohmfit writes it.
func ParallelOf(a, b float64) float64 { return a * b / (a + b) }

// Join returns the resistance of two parts a and b joined as c says:
// ParallelOf for Parallel, the sum otherwise (a pair is never Single or Any
// once chosen; a lone part is not joined).
func (c Combine) Join(a, b float64) float64 {
	if c == Parallel {
		return ParallelOf(a, b)
	}
	return a + b
}

// Choice says where a free position's values come from.
type Choice struct {
	Series string    // "E24" etc.; "" when Stock is used
	Stock  []float64 // an inventory of values, ascending, no duplicates; nil when Series is used
	// StockFile is the file Stock was read from, resolved against the
	// template's directory; "" for a series or an inline list.
	StockFile string
	Min       float64 // ohms, inclusive bound on each physical part; default 10
	Max       float64 // ohms, inclusive; default 10M
	Combine   Combine
	// Tolerance of each chosen part as a fraction; zero means the series'
	// usual tolerance (eseries.Series.Tolerance).
	Tolerance float64
	// TCR of each chosen part per °C, when HasTCR.
	TCR    float64
	HasTCR bool
	// Package of each chosen part; "" lets `check` pick the smallest that
	// carries it.
	Package string
	Pos     Pos
}

// Choose holds the default choice and per-part overrides.
type Choose struct {
	Default   Choice
	Overrides map[string]Choice // fully resolved: unspecified keys inherit Default
}

// For returns the choice that applies to the named part.
func (c Choose) For(part string) Choice {
	if o, ok := c.Overrides[part]; ok {
		return o
	}
	return c.Default
}

// Setting overrides one part's value in a condition.
type Setting struct {
	Part  string
	Value float64
}

// Condition is one operating point: a set of overridden values and a
// temperature, which every sensor part follows.
type Condition struct {
	Name string
	Set  []Setting // in file order
	Pos  Pos

	Temperature    float64 // °C; ReferenceCelsius when not given
	HasTemperature bool
}

// RankKey is one key of the ranking order.
type RankKey int

// Ranking keys.
const (
	ByError RankKey = iota
	ByPower
	ByParts
)
