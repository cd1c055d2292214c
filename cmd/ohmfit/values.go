package main

import (
	"errors"
	"fmt"
	"io"
	"math"
	"strconv"
	"strings"

	"github.com/ohmfit/ohmfit/constraints"
	"github.com/ohmfit/ohmfit/eseries"
	"github.com/ohmfit/ohmfit/eseries/units"
	"github.com/spf13/cobra"
)

// valuesOptions are the inputs of `ohmfit values`. Values are kept as the
// text the user typed and read in runValues, so that a message can quote it.
type valuesOptions struct {
	Series   string // series name as typed, e.g. "E24" or "e24"
	From, To string // range, inclusive; defaults "10" and "10M"
	Near     string // the value given with --near
	NearSet  bool   // --near was given: show neighbours instead of a list
	RangeSet bool   // --from or --to was given (they conflict with --near)
	Format   string // "table" or "json"

	Out, ErrOut io.Writer
}

// newValuesCmd builds `ohmfit values`.
func newValuesCmd(out, errOut io.Writer) *cobra.Command {
	o := &valuesOptions{Out: out, ErrOut: errOut}
	cmd := &cobra.Command{
		Use:   "values SERIES [--from R] [--to R] [--near R] [--format FORMAT]",
		Short: "List a preferred-number series, or the values nearest one value",
		Long: `List the values of an IEC 60063 series (E3, E6, E12, E24, E48, E96, E192),
one per line in engineering form, from --from to --to inclusive. The default
range, 10 Ω to 10 MΩ, is the range templates choose from unless they say
otherwise, so the list is what ohmfit would consider by default.

With --near R, show instead the nearest series value at or below R and at or
above R, each with its error relative to R ((value - R) / R). When R is itself
a series value it is reported once, as an exact hit.

Values are read as everywhere in ohmfit: 4700, 4.7k, 4k7, 4.7kΩ.

JSON output (--format json):
  list:  {"series": "E24", "values": [10, 11, ...]}                (ohms)
  near:  {"series": "E24", "near": 4320, "exact": false,
          "below": {"value": 4300, "error": -0.00463},
          "above": {"value": 4700, "error": 0.0880}}
  "error" is a fraction, not a percentage; "below" or "above" is left out
  when the series has no such value.`,
		Example: `  # which E12 values fit between a 1 kΩ and a 10 kΩ pull-up?
  ohmfit values E12 --from 1k --to 10k

  # the bias resistor came out at 4.32 kΩ: what is stocked in E24 around it?
  ohmfit values E24 --near 4k32

  # all E96 values for a script
  ohmfit values E96 --format json`,
		Args:              argsExactly(1, "one argument, the series name (E3 … E192)"),
		ValidArgsFunction: cobra.NoFileCompletions,
		RunE: func(cmd *cobra.Command, args []string) error {
			o.Series = args[0]
			o.RangeSet = changed(cmd.Flags(), "from") || changed(cmd.Flags(), "to")
			o.NearSet = changed(cmd.Flags(), "near")
			if err := checkFormat(cmd, o.Format, "table", "json"); err != nil {
				return err
			}
			if o.RangeSet && o.NearSet {
				return usagef(cmd.CommandPath(), "--near cannot be combined with --from or --to")
			}
			return runValues(o)
		},
	}
	f := cmd.Flags()
	f.StringVar(&o.From, "from", "10", "list from `R` upwards, inclusive")
	f.StringVar(&o.To, "to", "10M", "list up to `R`, inclusive")
	f.StringVar(&o.Near, "near", "", "show the series values either side of `R` instead of a list")
	f.StringVar(&o.Format, "format", "table", "`FORMAT` of the output: table or json")
	return cmd
}

// runValues lists a series or the values near one value.
func runValues(o *valuesOptions) error {
	s, err := lookupSeries(o.Series)
	if err != nil {
		return err
	}
	if o.NearSet {
		return runNear(o, s)
	}
	lo, err := readValue("--from", o.From, units.Ohm)
	if err != nil {
		return err
	}
	hi, err := readValue("--to", o.To, units.Ohm)
	if err != nil {
		return err
	}
	switch {
	case lo <= 0:
		return badInputf("--from must be above zero, not %s", o.From)
	case lo > hi:
		return badInputf("--from %s is above --to %s", o.From, o.To)
	}
	vals := s.Values(lo, hi)
	if o.Format == "json" {
		return writeJSON(o.Out, object{{"series", s.Name}, {"values", nonNil(vals)}})
	}
	if len(vals) == 0 {
		// Not an error: the range is valid, it just falls between two values.
		notef(o.ErrOut, "no %s value lies between %s and %s", s.Name, units.Format(lo), units.Format(hi))
		return nil
	}
	var b strings.Builder
	for _, v := range vals {
		b.WriteString(units.Format(v))
		b.WriteByte('\n')
	}
	_, err = io.WriteString(o.Out, b.String())
	return err
}

// nearValue is one neighbour of the value asked about.
type nearValue struct {
	side  string  // "below" or "above"
	value float64 // ohms
	err   float64 // (value - x) / x
}

// runNear shows the series values nearest o.Near.
func runNear(o *valuesOptions, s *eseries.Series) error {
	x, err := readValue("--near", o.Near, units.Ohm)
	if err != nil {
		return err
	}
	if !(x > 0) || math.IsInf(x, 0) {
		return badInputf("--near must be above zero, not %s", o.Near)
	}
	exact := s.Contains(x)
	var near []nearValue
	if v, ok := s.Below(x); ok {
		near = append(near, nearValue{"below", v, (v - x) / x})
	}
	if v, ok := s.Above(x); ok {
		near = append(near, nearValue{"above", v, (v - x) / x})
	}
	if exact {
		// Below and Above both return x itself; say it once.
		x = near[0].value
		near[0].err = 0
		if len(near) > 1 {
			near[1].err = 0
		}
	}
	if o.Format == "json" {
		obj := object{{"series", s.Name}, {"near", x}, {"exact", exact}}
		for _, n := range near {
			obj = append(obj, member{n.side, object{{"value", n.value}, {"error", n.err}}})
		}
		return writeJSON(o.Out, obj)
	}
	if _, err := fmt.Fprintf(o.Out, "%s around %s\n", s.Name, units.FormatUnit(x, units.Ohm)); err != nil {
		return err
	}
	t := table{indent: "  ", cols: []column{{gap: 2}, {right: true, gap: 1}, {gap: 2}, {right: true}}}
	if exact {
		num, unit := splitUnit(units.FormatUnit(x, units.Ohm))
		t.add("exact", num, unit, "an "+s.Name+" value")
	} else {
		for _, n := range near {
			num, unit := splitUnit(units.FormatUnit(n.value, units.Ohm))
			t.add(n.side, num, unit, percent(n.err))
		}
	}
	return t.write(o.Out)
}

// lookupSeries finds a series by name, suggesting the closest name when
// the one given does not exist.
func lookupSeries(name string) (*eseries.Series, error) {
	s, err := eseries.Lookup(name)
	if err != nil {
		if errors.Is(err, eseries.ErrUnknownSeries) {
			return nil, badInputf("unknown series %q%s; the series are %s", name,
				didYouMean(name, eseries.Names()), strings.Join(eseries.Names(), ", "))
		}
		return nil, err
	}
	return s, nil
}

// readValue reads a flag's value in unit want, naming the flag when the text
// cannot be read.
func readValue(flag, text string, want units.Unit) (float64, error) {
	v, err := units.ParseAs(text, want)
	if err != nil {
		var pe *units.ParseError
		if errors.As(err, &pe) {
			return 0, badInputf("%s: cannot read %s (%s); want %s", flag, quoteValue(text), pe.Reason, units.Example(want))
		}
		return 0, badInputf("%s: %s; want %s", flag, constraints.Message(err), units.Example(want))
	}
	return v, nil
}

// percent writes a fraction as a signed percentage with three significant
// digits and no exponent: -0.00463 -> "-0.463%", 0.088 -> "+8.80%".
func percent(f float64) string {
	p := f * 100
	if p == 0 {
		return "±0%"
	}
	dec := 2 - int(math.Floor(math.Log10(math.Abs(p))))
	s := strconv.FormatFloat(p, 'f', max(dec, 0), 64)
	if p > 0 {
		s = "+" + s
	}
	return s + "%"
}

// nonNil turns a nil slice into an empty one so that JSON shows [] not null.
func nonNil[T any](v []T) []T {
	if v == nil {
		return []T{}
	}
	return v
}
