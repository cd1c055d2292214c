package synth

import (
	"math"
	"sort"

	"github.com/ohmfit/ohmfit/constraints"
	"github.com/ohmfit/ohmfit/eseries"
	"github.com/ohmfit/ohmfit/eseries/units"
)

// Option is one way to realise a free position: one standard part, or two in
// series or in parallel.
type Option struct {
	Value   float64             // effective resistance, ohms
	Parts   [2]float64          // physical parts' ohms; Parts[1] is 0 for a single part
	Count   int                 // physical parts: 1 or 2
	Combine constraints.Combine // Single, Series or Parallel
}

// PartValues returns the physical parts' values as a slice.
func (o Option) PartValues() []float64 {
	if o.Count == 1 {
		return []float64{o.Parts[0]}
	}
	return []float64{o.Parts[0], o.Parts[1]}
}

// Domain is the sorted list of options of one free position.
type Domain struct {
	Part    int    // part index in the template
	Name    string // part name
	Options []Option
}

// MaxOptions bounds the options of one position (about 64 MB of options);
// a choice that would give more is refused with a message saying how many.
const MaxOptions = 2_000_000

// BaseValues returns the standard values a choice allows for one physical
// part: its series or stock list within [Min, Max], inclusive.
func BaseValues(c constraints.Choice) ([]float64, error) {
	if c.Min <= 0 || c.Max < c.Min || math.IsNaN(c.Min) || math.IsInf(c.Max, 0) {
		return nil, errorf(nil, "bad value range %g .. %g", c.Min, c.Max)
	}
	if c.Stock != nil {
		var out []float64
		for _, v := range c.Stock {
			if inRange(v, c.Min, c.Max) {
				out = append(out, v)
			}
		}
		return out, nil
	}
	s, err := eseries.Lookup(c.Series)
	if err != nil {
		return nil, err
	}
	return s.Values(c.Min, c.Max), nil
}

// inRange is an inclusive range test that tolerates the rounding of a
// parsed bound (10k typed as 1e4 vs a table's 10000).
func inRange(v, lo, hi float64) bool {
	return (v >= lo || constraints.Same(v, lo)) && (v <= hi || constraints.Same(v, hi))
}

// OptionCount returns how many options a choice gives before duplicates of
// the same value are merged: an upper bound used to size a search up front.
func OptionCount(n int, comb constraints.Combine) float64 {
	pairs := float64(n) * float64(n+1) / 2
	switch comb {
	case constraints.Series, constraints.Parallel:
		return pairs
	case constraints.Any:
		return float64(n) + 2*pairs
	}
	return float64(n)
}

// BuildDomain lists the options of one position, sorted by effective value.
//
// Of several realisations with the same effective value, one is kept: the
// single part if there is one (fewer parts, same value), otherwise among pairs
// of the same kind the one whose larger part is largest — a main part plus a
// small trim, which is how a pair is usually fitted. Series pairs sort before
// parallel pairs of the same value.
func BuildDomain(part int, name string, c constraints.Choice) (Domain, error) {
	base, err := BaseValues(c)
	if err != nil {
		return Domain{}, err
	}
	d := Domain{Part: part, Name: name}
	if len(base) == 0 {
		return d, errorf(nil, "position %s: no standard value between %s and %s", name, units.Format(c.Min), units.Format(c.Max))
	}
	if n := OptionCount(len(base), c.Combine); n > MaxOptions {
		return d, errorf(nil, "position %s: %.3g options (%d base values, combine %s) is more than %d; narrow its min/max or use a coarser series", name, n, len(base), c.Combine, MaxOptions)
	}
	single := c.Combine == constraints.Single || c.Combine == constraints.Any
	series := c.Combine == constraints.Series || c.Combine == constraints.Any
	parallel := c.Combine == constraints.Parallel || c.Combine == constraints.Any
	opts := make([]Option, 0, int(OptionCount(len(base), c.Combine)))
	if single {
		for _, v := range base {
			opts = append(opts, Option{Value: v, Parts: [2]float64{v, 0}, Count: 1, Combine: constraints.Single})
		}
	}
	for i, a := range base {
		for _, b := range base[i:] {
			// b >= a: the larger part is listed first.
			if series {
				opts = append(opts, Option{Value: a + b, Parts: [2]float64{b, a}, Count: 2, Combine: constraints.Series})
			}
			if parallel {
				opts = append(opts, Option{Value: constraints.ParallelOf(a, b), Parts: [2]float64{b, a}, Count: 2, Combine: constraints.Parallel})
			}
		}
	}
	sort.Slice(opts, func(i, j int) bool { return optionLess(opts[i], opts[j]) })
	// Merge equal values: after sorting, the first of each run is the one to keep.
	out := opts[:0]
	for _, o := range opts {
		if n := len(out); n > 0 && constraints.Same(out[n-1].Value, o.Value) {
			continue
		}
		out = append(out, o)
	}
	d.Options = out
	return d, nil
}

// optionLess orders options by value, then fewer parts, then series before
// parallel, then larger main part.
func optionLess(a, b Option) bool {
	if !constraints.Same(a.Value, b.Value) {
		return a.Value < b.Value
	}
	if a.Count != b.Count {
		return a.Count < b.Count
	}
	if a.Combine != b.Combine {
		return a.Combine < b.Combine
	}
	if a.Parts[0] != b.Parts[0] {
		return a.Parts[0] > b.Parts[0]
	}
	return a.Parts[1] > b.Parts[1]
}
