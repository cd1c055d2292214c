package constraints

import "github.com/ohmfit/ohmfit/solver"

// New returns an empty template with every default a loaded template gets:
// ground "gnd", the default choice (E24, 10 Ω … 10 MΩ, single parts), one
// condition "nominal" and the default rank order. Commands that build a
// template from flags start from it, so that they behave like a file.
func New(name string) *Template {
	return &Template{
		Name:       name,
		Ground:     DefaultGround,
		Choose:     Choose{Default: Choice{Series: defaultSeries, Min: defaultMin, Max: defaultMax, Combine: Single}},
		Conditions: []Condition{{Name: "nominal", Temperature: ReferenceCelsius}},
		Rank:       []RankKey{ByError, ByPower, ByParts},
		OnFraction: 1,
	}
}

// AddPart appends a part; a resistor with value 0 is free.
func (t *Template) AddPart(p PartSpec) {
	if p.Kind == solver.Resistor && p.Value == 0 {
		p.Free = true
	}
	t.Parts = append(t.Parts, p)
}
