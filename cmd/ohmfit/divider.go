package main

import (
	"fmt"
	"io"
	"math"

	"github.com/ohmfit/ohmfit/constraints"
	"github.com/ohmfit/ohmfit/eseries/units"
	"github.com/ohmfit/ohmfit/solver"
	"github.com/spf13/cobra"
)

// choiceFlags are the value-range flags of the commands that build their
// template from flags.
type choiceFlags struct {
	Min, Max  string
	Combine   string
	Tolerance string
}

func bindChoiceFlags(cmd *cobra.Command, c *choiceFlags) {
	f := cmd.Flags()
	f.StringVar(&c.Min, "min", "1k", "smallest resistor to use (`R`)")
	f.StringVar(&c.Max, "max", "1M", "largest resistor to use (`R`)")
	f.StringVar(&c.Combine, "combine", "single", "`HOW` each position is made: single, series, parallel or any (single or a pair)")
	f.StringVar(&c.Tolerance, "tolerance", "", "hard limit on the output (`TOLERANCE`): a percentage (0.5%) or volts (5m); none by default")
}

// apply reads the flags into the template's default choice and returns the
// output tolerance (relative when rel).
func (c *choiceFlags) apply(t *constraints.Template, series string) (tol float64, rel bool, err error) {
	ch := &t.Choose.Default
	if series != "" {
		ch.Series = series
	}
	if ch.Min, err = readValue("--min", c.Min, units.Ohm); err != nil {
		return 0, false, err
	}
	if ch.Max, err = readValue("--max", c.Max, units.Ohm); err != nil {
		return 0, false, err
	}
	if !(ch.Min > 0) || ch.Max < ch.Min {
		return 0, false, badInputf("--min and --max must be positive with min <= max (got %s and %s)", c.Min, c.Max)
	}
	switch c.Combine {
	case "single":
		ch.Combine = constraints.Single
	case "series":
		ch.Combine = constraints.Series
	case "parallel":
		ch.Combine = constraints.Parallel
	case "any":
		ch.Combine = constraints.Any
	default:
		return 0, false, badInputf("--combine must be single, series, parallel or any, not %q", c.Combine)
	}
	if c.Tolerance == "" {
		return 0, false, nil
	}
	q, perr := units.Parse(c.Tolerance)
	if perr != nil || !(q.Value > 0) || (q.Unit != units.Percent && q.Unit != units.Volt && q.Unit != units.NoUnit) {
		return 0, false, badInputf("--tolerance: want a percentage like 0.5%% or volts like 5m, not %q", c.Tolerance)
	}
	return q.Value, q.Unit == units.Percent, nil
}

// dividerOptions are the inputs of `ohmfit divider`.
type dividerOptions struct {
	Vin, Vout, Load, MaxCurrent string
	choiceFlags
	searchOptions
}

// newDividerCmd builds `ohmfit divider`.
func newDividerCmd(out, errOut io.Writer, errIsTTY bool) *cobra.Command {
	o := &dividerOptions{searchOptions: searchOptions{Out: out, ErrOut: errOut, ErrIsTTY: errIsTTY}}
	cmd := &cobra.Command{
		Use:   "divider --vin V --vout V [options]",
		Short: "Choose a two-resistor divider without writing a template",
		Long: `Choose R1 (from the input to the output) and R2 (from the output to ground)
so that the output sits as close as possible to --vout when the input is at
--vin, optionally with a fixed load from the output to ground and a limit on
the divider's current. The network is solved node by node, as fit does; the output
is the same as ` + "`ohmfit fit`" + `'s. The series defaults to E24 and the values to
1k … 1M; --series, --min and --max change them.`,
		Example: `  # 0.8 V from a 3.3 V rail, E96, at most 100 µA
  ohmfit divider --vin 3.3 --vout 0.8 --series E96 --max-current 100u

  # an ADC input that loads the node like 100k
  ohmfit divider --vin 12 --vout 2.5 --load 100k --tolerance 1%`,
		Args: argsExactly(0, "no arguments, only options"),
		RunE: func(cmd *cobra.Command, args []string) error {
			if err := checkSearchFlags(cmd, &o.searchOptions); err != nil {
				return err
			}
			t, err := o.template()
			if err != nil {
				return err
			}
			o.searchOptions.Series = "" // already the template's series
			outs, err := newOutputs(nil, &o.Out, o.Output)
			if err != nil {
				return err
			}
			o.outs = outs
			return outs.finish(runSearch(&o.searchOptions, t))
		},
	}
	f := cmd.Flags()
	f.StringVar(&o.Vin, "vin", "", "input voltage (`V`); required")
	f.StringVar(&o.Vout, "vout", "", "output voltage wanted (`V`); required")
	f.StringVar(&o.Load, "load", "", "fixed load from the output to ground (`R`)")
	f.StringVar(&o.MaxCurrent, "max-current", "", "most current the divider may draw through R1 (`I`)")
	bindChoiceFlags(cmd, &o.choiceFlags)
	bindSearchFlags(cmd, &o.searchOptions)
	builtInSeries(cmd)
	return cmd
}

// template builds the divider's template from the flags.
func (o *dividerOptions) template() (*constraints.Template, error) {
	if o.Vin == "" || o.Vout == "" {
		return nil, badInputf("divider needs both --vin and --vout")
	}
	vin, err := readValue("--vin", o.Vin, units.Volt)
	if err != nil {
		return nil, err
	}
	vout, err := readValue("--vout", o.Vout, units.Volt)
	if err != nil {
		return nil, err
	}
	if vin == 0 || vout == 0 || math.Signbit(vin) != math.Signbit(vout) || math.Abs(vout) >= math.Abs(vin) {
		return nil, badInputf("a divider makes a voltage between 0 and --vin: --vout %s cannot come from --vin %s",
			units.FormatUnit(vout, units.Volt), units.FormatUnit(vin, units.Volt))
	}
	t := constraints.New(fmt.Sprintf("Divider %s to %s", units.FormatUnit(vin, units.Volt), units.FormatUnit(vout, units.Volt)))
	tol, rel, err := o.choiceFlags.apply(t, o.searchOptions.Series)
	if err != nil {
		return nil, err
	}
	t.AddPart(constraints.PartSpec{Part: solver.Part{Name: "Vin", Kind: solver.VoltageSource, From: "in", To: "gnd", Value: vin}})
	t.AddPart(constraints.PartSpec{Part: solver.Part{Name: "R1", Kind: solver.Resistor, From: "in", To: "out"}})
	t.AddPart(constraints.PartSpec{Part: solver.Part{Name: "R2", Kind: solver.Resistor, From: "out", To: "gnd"}})
	if o.Load != "" {
		rl, err := readValue("--load", o.Load, units.Ohm)
		if err != nil {
			return nil, err
		}
		if !(rl > 0) || math.IsInf(rl, 0) {
			return nil, badInputf("--load must be a positive resistance, not %s", o.Load)
		}
		t.AddPart(constraints.PartSpec{Part: solver.Part{Name: "RL", Kind: solver.Resistor, From: "out", To: "gnd", Value: rl}})
	}
	t.Targets = append(t.Targets, constraints.Target{Kind: constraints.Voltage, Nodes: []string{"out"},
		HasEquals: true, Equals: vout, Tolerance: tol, TolRelative: rel})
	// The current through R1 flows in -> out, with the sign of vin.
	if err := addCurrentLimit(t, "R1", o.MaxCurrent, vin > 0); err != nil {
		return nil, err
	}
	return t, nil
}

// addCurrentLimit adds `--max-current` as a limit on the current through
// part, whose reference direction carries positive current when positive is
// set (a negative rail reverses it). An empty flag adds nothing.
func addCurrentLimit(t *constraints.Template, part, text string, positive bool) error {
	if text == "" {
		return nil
	}
	imax, err := readValue("--max-current", text, units.Amp)
	if err != nil {
		return err
	}
	if !(imax > 0) {
		return badInputf("--max-current must be positive, not %s", text)
	}
	tg := constraints.Target{Kind: constraints.Current, Part: part}
	if positive {
		tg.HasMax, tg.Max = true, imax
	} else {
		tg.HasMin, tg.Min = true, -imax
	}
	t.Targets = append(t.Targets, tg)
	return nil
}

// builtInSeries rewords --series for the commands that build their network
// from flags, where there is no template to override.
func builtInSeries(cmd *cobra.Command) {
	cmd.Flags().Lookup("series").Usage = "take both resistors from this `SERIES` (E3 … E192; default E24)"
}
