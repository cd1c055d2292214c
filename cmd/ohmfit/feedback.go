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

// feedbackOptions are the inputs of `ohmfit feedback`.
type feedbackOptions struct {
	Vref, Vout, Bias, MaxCurrent string
	choiceFlags
	searchOptions
}

// newFeedbackCmd builds `ohmfit feedback`.
func newFeedbackCmd(out, errOut io.Writer, errIsTTY bool) *cobra.Command {
	o := &feedbackOptions{searchOptions: searchOptions{Out: out, ErrOut: errOut, ErrIsTTY: errIsTTY}}
	cmd := &cobra.Command{
		Use:   "feedback --vref V --vout V [options]",
		Short: "Choose an adjustable regulator's feedback resistors",
		Long: `Choose R1 (top, output to the feedback pin) and R2 (bottom, feedback pin to
ground) for an adjustable regulator whose control loop holds its feedback pin
at --vref, so that the output settles at --vout.

The regulator is modelled as a network, not as a formula: an ideal amplifier
drives the output so that the feedback pin equals the reference, and the
pin's bias current (--bias-current, flowing into the pin) is a current source
from the pin to ground. The output then obeys
Vout = Vref·(1 + R1/R2) + Ibias·R1, which the tests check. The output is the
same as ` + "`ohmfit fit`" + `'s.`,
		Example: `  # a 3.3 V rail from a 0.8 V reference, E96, pin bias 20 nA
  ohmfit feedback --vref 0.8 --vout 3.3 --series E96 --bias-current 20n

  # keep the divider under 50 µA and within 0.5 %
  ohmfit feedback --vref 1.25 --vout 5 --max-current 50u --tolerance 0.5%`,
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
	f.StringVar(&o.Vref, "vref", "", "the regulator's feedback reference (`V`); required")
	f.StringVar(&o.Vout, "vout", "", "output voltage wanted (`V`); required")
	f.StringVar(&o.Bias, "bias-current", "0", "current flowing into the feedback pin (`I`)")
	f.StringVar(&o.MaxCurrent, "max-current", "", "most current the divider may draw from the output (`I`)")
	bindChoiceFlags(cmd, &o.choiceFlags)
	bindSearchFlags(cmd, &o.searchOptions)
	builtInSeries(cmd)
	return cmd
}

// template builds the feedback network's template from the flags.
func (o *feedbackOptions) template() (*constraints.Template, error) {
	if o.Vref == "" || o.Vout == "" {
		return nil, badInputf("feedback needs both --vref and --vout")
	}
	vref, err := readValue("--vref", o.Vref, units.Volt)
	if err != nil {
		return nil, err
	}
	vout, err := readValue("--vout", o.Vout, units.Volt)
	if err != nil {
		return nil, err
	}
	bias, err := readValue("--bias-current", o.Bias, units.Amp)
	if err != nil {
		return nil, err
	}
	if vref == 0 || math.Signbit(vref) != math.Signbit(vout) || math.Abs(vout) <= math.Abs(vref) {
		return nil, badInputf("the output must be beyond the reference on the same side of ground: --vout %s cannot come from --vref %s",
			units.FormatUnit(vout, units.Volt), units.FormatUnit(vref, units.Volt))
	}
	t := constraints.New(fmt.Sprintf("Regulator feedback, %s from a %s reference", units.FormatUnit(vout, units.Volt), units.FormatUnit(vref, units.Volt)))
	tol, rel, err := o.choiceFlags.apply(t, o.searchOptions.Series)
	if err != nil {
		return nil, err
	}
	add := func(p solver.Part) { t.AddPart(constraints.PartSpec{Part: p}) }
	add(solver.Part{Name: "Vref", Kind: solver.VoltageSource, From: "ref", To: "gnd", Value: vref})
	add(solver.Part{Name: "U1", Kind: solver.OpAmp, Plus: "ref", Minus: "fb", Out: "out"})
	add(solver.Part{Name: "R1", Kind: solver.Resistor, From: "out", To: "fb"})
	add(solver.Part{Name: "R2", Kind: solver.Resistor, From: "fb", To: "gnd"})
	if bias != 0 {
		add(solver.Part{Name: "Ibias", Kind: solver.CurrentSource, From: "fb", To: "gnd", Value: bias})
	}
	t.Targets = append(t.Targets, constraints.Target{Kind: constraints.Voltage, Nodes: []string{"out"},
		HasEquals: true, Equals: vout, Tolerance: tol, TolRelative: rel})
	if err := addCurrentLimit(t, "R1", o.MaxCurrent, vout > 0); err != nil {
		return nil, err
	}
	return t, nil
}
