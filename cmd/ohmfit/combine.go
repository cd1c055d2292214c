package main

import (
	"fmt"
	"io"
	"math"
	"strconv"
	"strings"

	"github.com/ohmfit/ohmfit/constraints"
	"github.com/ohmfit/ohmfit/eseries/units"
	"github.com/ohmfit/ohmfit/synth"
	"github.com/spf13/cobra"
)

// combineOptions are the inputs of `ohmfit combine`.
type combineOptions struct {
	Value    string
	Series   string
	Min, Max string
	MaxParts int
	Top      int
	Format   string

	Out, ErrOut io.Writer
}

// newCombineCmd builds `ohmfit combine`.
func newCombineCmd(out, errOut io.Writer) *cobra.Command {
	o := &combineOptions{Out: out, ErrOut: errOut}
	cmd := &cobra.Command{
		Use:   "combine VALUE [options]",
		Short: "Make one resistance from standard parts in series or parallel",
		Long: `List the best ways to make one resistance from standard values: a single
part, two in series or in parallel, and with --max-parts 3 also three parts
(all in series, all in parallel, one in series with a parallel pair, or a
series pair in parallel with a third). Ranked by error, then fewer parts,
then arrangement, then larger parts first.

A combination whose value equals (within 1e-12 relative) that of an
arrangement with fewer parts is left out: 3.3k + 1k is not listed when the
single 4.3k exists. Apart from those, the list is exact at every rank: it is
the first --top of all singles, pairs and triples ranked this way.

JSON output (--format json):
  {"target": 4320, "series": "E24", "solutions": [{"rank": 1, "value": 4330,
    "parts": [3900, 430], "combine": "series", "arrangement": {"series": [3900, 430]},
    "error": 0.0023, "deviation": 0.0023, "part_count": 2}]}

"error" is |value - target| / target, as in fit; "deviation" keeps the sign,
(value - target) / target, as the table shows it. "arrangement" is the
circuit as data: a number is one part in ohms, {"series": [...]} and
{"parallel": [...]} join what they list.`,
		Example: `  # 4.32k from E24 parts
  ohmfit combine 4.32k

  # 1.5 ohm for a current shunt from E12 parts, up to three of them
  ohmfit combine 1R5 --series E12 --min 1 --max 100 --max-parts 3`,
		Args:        argsExactly(1, "one argument, the resistance to make"),
		Annotations: map[string]string{negativeArgNote: "a resistance cannot be negative; give VALUE as a positive resistance like 4.7k"},
		RunE: func(cmd *cobra.Command, args []string) error {
			o.Value = args[0]
			if err := checkFormat(cmd, o.Format, "table", "json"); err != nil {
				return err
			}
			return runCombine(o)
		},
	}
	f := cmd.Flags()
	f.StringVar(&o.Series, "series", "E24", "`SERIES` to take parts from (E3 … E192)")
	f.StringVar(&o.Min, "min", "10", "smallest part to use (`R`)")
	f.StringVar(&o.Max, "max", "10M", "largest part to use (`R`)")
	countVar(f, &o.MaxParts, "max-parts", 2, 1, 3, "most parts to combine (`N`: 1, 2 or 3)")
	countVar(f, &o.Top, "top", 10, 1, maxListed, "how many ways to show (`N`, at most 10,000)")
	f.StringVar(&o.Format, "format", "table", "`FORMAT` of the output: table or json")
	return cmd
}

func runCombine(o *combineOptions) error {
	target, err := readValue("VALUE", o.Value, units.Ohm)
	if err != nil {
		return err
	}
	if !(target > 0) {
		return badInputf("VALUE must be a positive resistance, not %s", o.Value)
	}
	s, err := lookupSeries(o.Series)
	if err != nil {
		return err
	}
	lo, err := readValue("--min", o.Min, units.Ohm)
	if err != nil {
		return err
	}
	hi, err := readValue("--max", o.Max, units.Ohm)
	if err != nil {
		return err
	}
	if !(lo > 0) || hi < lo {
		return badInputf("--min and --max must be positive with min <= max (got %s and %s)", o.Min, o.Max)
	}
	base := s.Values(lo, hi)
	if len(base) == 0 {
		return badInputf("no %s value between %s and %s", s.Name, units.Format(lo), units.Format(hi))
	}
	combs, err := synth.Combine(target, base, synth.CombineSettings{MaxParts: o.MaxParts, Top: o.Top})
	if err != nil {
		return badInputf("%s", constraints.Message(err))
	}
	if o.Format == "json" {
		sols := make([]object, len(combs))
		for i, c := range combs {
			sols[i] = object{{"rank", i + 1}, {"value", c.Value}, {"parts", c.Parts},
				{"combine", c.Arrangement.String()}, {"arrangement", arrangementData(c)},
				{"error", c.Error}, {"deviation", (c.Value - target) / target}, {"part_count", c.Arrangement.Count()}}
		}
		return writeJSON(o.Out, object{{"target", target}, {"series", s.Name}, {"solutions", sols}})
	}
	var b strings.Builder
	fmt.Fprintf(&b, "%s from %s parts (%s … %s), up to %d parts\n\n", units.FormatUnit(target, units.Ohm), s.Name, units.Format(lo), units.Format(hi), o.MaxParts)
	tb := table{indent: "  ", cols: []column{{right: true, gap: 2}, {gap: 3}, {right: true, gap: 3}, {right: true, gap: 3}, {}}}
	tb.add("rank", "arrangement", "value", "deviation", wordCount)
	for i, c := range combs {
		tb.add(strconv.Itoa(i+1), arrangementText(c), units.Format(c.Value), signedError(c.Value, target), strconv.Itoa(c.Arrangement.Count()))
	}
	if err := tb.write(&b); err != nil {
		return err
	}
	_, err = io.WriteString(o.Out, b.String())
	return err
}

// arrangementData is an arrangement as nested JSON: a number is one part,
// {"series": [...]} and {"parallel": [...]} join what they list.
func arrangementData(c synth.Combination) any {
	p := c.Parts
	ser := func(xs ...any) object { return object{{"series", xs}} }
	par := func(xs ...any) object { return object{{"parallel", xs}} }
	switch c.Arrangement {
	case synth.ArrSeries:
		return ser(p[0], p[1])
	case synth.ArrParallel:
		return par(p[0], p[1])
	case synth.ArrSeries3:
		return ser(p[0], p[1], p[2])
	case synth.ArrParallel3:
		return par(p[0], p[1], p[2])
	case synth.ArrSeriesParallel:
		return ser(p[0], par(p[1], p[2]))
	case synth.ArrParallelSeries:
		return par(ser(p[0], p[1]), p[2])
	}
	return p[0]
}

// arrangementText draws an arrangement with its values: "3.9k + 430",
// "10k ∥ 4.7k", "1k + (2.2k ∥ 3.3k)", "(1k + 2.2k) ∥ 4.7k".
func arrangementText(c synth.Combination) string {
	f := make([]string, len(c.Parts))
	for i, v := range c.Parts {
		f[i] = units.Format(v)
	}
	switch c.Arrangement {
	case synth.ArrSeries:
		return f[0] + " + " + f[1]
	case synth.ArrParallel:
		return f[0] + " ∥ " + f[1]
	case synth.ArrSeries3:
		return f[0] + " + " + f[1] + " + " + f[2]
	case synth.ArrParallel3:
		return f[0] + " ∥ " + f[1] + " ∥ " + f[2]
	case synth.ArrSeriesParallel:
		return f[0] + " + (" + f[1] + " ∥ " + f[2] + ")"
	case synth.ArrParallelSeries:
		return "(" + f[0] + " + " + f[1] + ") ∥ " + f[2]
	}
	return f[0]
}

// signedError shows (value - target)/target as a signed percentage in the
// error columns' format, "0%" for an exact hit.
func signedError(v, target float64) string {
	e := (v - target) / target
	if math.Abs(e) <= constraints.TieRelative {
		return "0%"
	}
	return percent(e)
}
