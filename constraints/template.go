package constraints

import (
	"fmt"
	"math"
	"slices"
	"strconv"
	"strings"

	"github.com/ohmfit/ohmfit/eseries/units"
	"github.com/ohmfit/ohmfit/solver"
)

// Circuit returns the template's network for the solver: the parts in
// template order, free resistors with Value 0 (the caller fills them in).
func (t *Template) Circuit() solver.Circuit {
	parts := make([]solver.Part, len(t.Parts))
	for i, p := range t.Parts {
		parts[i] = p.Part
		if p.Free {
			parts[i].Value = 0
		}
	}
	return solver.Circuit{Ground: t.Ground, Parts: parts}
}

// ConditionValues returns every part's value in condition ci, template
// order: the fixed values, the condition's settings, and each sensor's
// resistance at the condition's temperature. Free parts hold 0.
func (t *Template) ConditionValues(ci int) ([]float64, error) {
	return t.ValuesAt(ci, t.Conditions[ci].Temperature)
}

// ValuesAt is ConditionValues with every sensor at celsius instead of the
// condition's own temperature: for a curve drawn between the conditions.
func (t *Template) ValuesAt(ci int, celsius float64) ([]float64, error) {
	return t.valuesWith(t.Conditions[ci].Name, t.Conditions[ci].Set, celsius)
}

// valuesWith returns every part's value with the settings set and every
// sensor at celsius, in a condition named name (for messages).
func (t *Template) valuesWith(name string, set []Setting, celsius float64) ([]float64, error) {
	vals := make([]float64, len(t.Parts))
	for i, ps := range t.Parts {
		if !ps.Free {
			vals[i] = ps.Value
		}
	}
	for _, st := range set {
		i, ok := t.Part(st.Part)
		if !ok {
			return nil, fmt.Errorf("constraints: condition %q sets unknown part %q", name, st.Part)
		}
		vals[i] = st.Value
	}
	for i, ps := range t.Parts {
		if ps.Sensor == nil {
			continue
		}
		r, err := ps.Sensor.Resistance(celsius)
		if err != nil {
			return nil, &Error{Msg: fmt.Sprintf("part %s in condition %q: %s", ps.Name, name, Message(err)), Err: err}
		}
		vals[i] = r
	}
	return vals, nil
}

// ConditionCircuit is Circuit with condition ci's values (see
// ConditionValues).
func (t *Template) ConditionCircuit(ci int) (solver.Circuit, error) {
	c := t.Circuit()
	vals, err := t.ConditionValues(ci)
	if err != nil {
		return c, err
	}
	for i := range c.Parts {
		c.Parts[i].Value = vals[i]
	}
	return c, nil
}

// FreeParts returns the indices in Parts of the free resistors, in order.
func (t *Template) FreeParts() []int {
	var idx []int
	for i, p := range t.Parts {
		if p.Free {
			idx = append(idx, i)
		}
	}
	return idx
}

// Part returns the index in Parts of the named part.
func (t *Template) Part(name string) (int, bool) {
	for i, p := range t.Parts {
		if p.Name == name {
			return i, true
		}
	}
	return -1, false
}

// ADC returns the ADC input of that name.
func (t *Template) ADC(name string) (ADC, bool) {
	for _, a := range t.ADCs {
		if a.Name == name {
			return a, true
		}
	}
	return ADC{}, false
}

// Valued reports whether every part has a value, so the template describes
// one network that can be analysed as it stands.
func (t *Template) Valued() bool {
	return len(t.FreeParts()) == 0
}

// ConditionIndex returns the index in Conditions of the named condition.
func (t *Template) ConditionIndex(name string) (int, bool) {
	for i, c := range t.Conditions {
		if c.Name == name {
			return i, true
		}
	}
	return -1, false
}

// String returns the quantity's template key: "voltage", "current", "power",
// "ratio" or "resistance".
func (k TargetKind) String() string {
	if k >= 0 && int(k) < len(targetKeys) {
		return targetKeys[k]
	}
	return "TargetKind(" + strconv.Itoa(int(k)) + ")"
}

// Unit returns the unit the quantity is measured in; NoUnit for a ratio.
func (k TargetKind) Unit() units.Unit {
	switch k {
	case Voltage:
		return units.Volt
	case Current:
		return units.Amp
	case Power:
		return units.Watt
	case Resistance:
		return units.Ohm
	}
	return units.NoUnit
}

// UnitText is the unit of a quantity that eseries has no unit for, as
// output writes it after the number: "°C", "V/°C", "°C/step"; "" otherwise.
func (k TargetKind) UnitText() string {
	switch k {
	case Linearity:
		return "°C"
	case Sensitivity:
		return "V/°C"
	case Resolution:
		return "°C/step"
	case SelfHeating:
		return "°C"
	}
	return ""
}

// QuantityDigits is how many significant digits output gives a target's
// value: enough to tell 595.99 mV from its goal of 596 mV.
const QuantityDigits = 5

// Format writes a value of this kind with its unit for people, the one rule
// every command's tables and messages use: "699.97 mV", "16.353 mV/°C",
// "3.3562 °C", codes with one decimal, open bounds as "∞".
func (k TargetKind) Format(v float64) string { return k.FormatSig(v, QuantityDigits) }

// FormatSig is Format with sig significant digits (a spread such as σ needs
// fewer than the value it spreads).
func (k TargetKind) FormatSig(v float64, sig int) string {
	switch {
	case math.IsInf(v, 0):
		return units.FormatUnitSig(v, units.NoUnit, sig)
	case k == Code:
		return strconv.FormatFloat(v, 'f', 1, 64)
	case k == Sensitivity:
		return units.FormatUnitSig(v, units.Volt, sig) + "/°C"
	}
	if u := k.UnitText(); u != "" {
		// No SI prefix before °C: "0.0423 °C/step", not "42.3m °C/step".
		return strconv.FormatFloat(v, 'g', sig, 64) + " " + u
	}
	return units.FormatUnitSig(v, k.Unit(), sig)
}

// Derived reports whether the kind is computed from several conditions at
// once (a temperature sweep) rather than in each condition.
func (k TargetKind) Derived() bool {
	return k == Linearity || k == Sensitivity || k == Resolution
}

// Label names the target as output shows it: "voltage fb", "voltage a-b",
// "current R1", "power R1", "ratio fb/out", "resistance out-gnd".
func (t Target) Label() string {
	switch t.Kind {
	case Current, Power, SelfHeating:
		return t.Kind.String() + " " + t.Part
	case Code:
		return t.Kind.String() + " " + t.ADC
	case Sensitivity:
		return fmt.Sprintf("sensitivity %s at %g°C", strings.Join(t.Nodes, "-"), t.At)
	case Resolution:
		return fmt.Sprintf("resolution %s at %g°C", t.ADC, t.At)
	case Ratio:
		return t.Kind.String() + " " + strings.Join(t.Nodes, "/")
	}
	return t.Kind.String() + " " + strings.Join(t.Nodes, "-")
}

// Applies reports whether the target is checked in the named condition:
// a target without `when` applies everywhere.
func (t Target) Applies(cond string) bool {
	if len(t.When) == 0 {
		return true
	}
	for _, w := range t.When {
		if w == cond {
			return true
		}
	}
	return false
}

// String returns the combine mode as templates and output spell it:
// "single", "series", "parallel" or "any".
func (c Combine) String() string {
	if c >= 0 && int(c) < len(combineNames) {
		return combineNames[c]
	}
	return "Combine(" + strconv.Itoa(int(c)) + ")"
}

// String returns the key as templates spell it: "error", "power" or "parts".
func (k RankKey) String() string {
	if k >= 0 && int(k) < len(rankNames) {
		return rankNames[k]
	}
	return "RankKey(" + strconv.Itoa(int(k)) + ")"
}

// ParseRankKey reads a rank key as String spells it (and as templates and
// the JSON "rank" list write it); false for any other text.
func ParseRankKey(s string) (RankKey, bool) {
	k := slices.Index(rankNames, s)
	return RankKey(k), k >= 0
}

// Spellings, indexed by the constants they name.
var (
	targetKeys   = []string{"voltage", "current", "power", "ratio", "resistance", "code", "linearity", "sensitivity", "resolution", "self_heating"}
	combineNames = []string{"single", "series", "parallel", "any"}
	rankNames    = []string{"error", "power", "parts"}
)
