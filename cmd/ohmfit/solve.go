package main

import (
	"fmt"
	"io"
	"math"
	"strings"

	"github.com/ohmfit/ohmfit/constraints"
	"github.com/ohmfit/ohmfit/constraints/ratings"
	"github.com/ohmfit/ohmfit/eseries/units"
	"github.com/ohmfit/ohmfit/solver"
	"github.com/ohmfit/ohmfit/synth/variation"
	"github.com/spf13/cobra"
)

// solveOptions are the inputs of `ohmfit solve`.
type solveOptions struct {
	File   string    // template path, "example:NAME", or "-" for standard input
	In     io.Reader // standard input
	Format string    // "table" or "json"
	Output string    // write the result here instead of stdout; "" for stdout

	Out, ErrOut io.Writer
}

// newSolveCmd builds `ohmfit solve`.
func newSolveCmd(out, errOut io.Writer) *cobra.Command {
	o := &solveOptions{Out: out, ErrOut: errOut}
	cmd := &cobra.Command{
		Use:   "solve FILE [--format FORMAT]",
		Short: "Analyse a network whose values are all known",
		Long: `Work out every node voltage, and each part's voltage, current and power, for
a template in which every resistor has a value, once per condition.

FILE is a template file, example:NAME for a built-in example (see
` + "`ohmfit examples`" + `), or - for standard input. A template with resistors left to choose is refused:
` + "`ohmfit fit`" + ` chooses them.

Signs follow the template's directions: a part's voltage is V(from) - V(to)
(V(plus) - V(minus) for a voltage source, V(out) for an op-amp), its current
flows from -> to (plus -> minus inside a voltage source), and its power is
what it absorbs, negative where it delivers: the passive sign convention, so
that the watts sum to zero. A current target on a voltage source reads the
other way, the current it delivers out of plus (see the template reference). The table ends with the power the resistors dissipate and the power
the sources deliver; the two agree (Tellegen's theorem), which is a quick
check that the analysis is sound.

JSON output (--format json), nodes and parts in template order, numbers in
volts, amps and watts at full precision:
  {"conditions": [{"name": "nominal",
     "nodes": {"gnd": 0, "mid": 4.05},
     "parts": {"R1": {"volts": 7.95, "amps": 0.00135, "watts": 0.0107}}}]}`,
		Example: `  # the bias bench as built, at both ends of the rail's range
  ohmfit solve example:bias-bench

  # the same numbers for a script
  ohmfit solve example:bias-bench --format json`,
		Args: argsExactly(1, "one argument, the template file"),
		RunE: func(cmd *cobra.Command, args []string) error {
			o.File = args[0]
			if err := checkFormat(cmd, o.Format, "table", "json"); err != nil {
				return err
			}
			o.In = cmd.InOrStdin()
			return runSolve(o)
		},
	}
	cmd.Flags().StringVar(&o.Format, "format", "table", "`FORMAT` of the output: table or json")
	cmd.Flags().StringVarP(&o.Output, "output", "o", "", "write the result to `FILE` instead of standard output (atomically, through a symbolic link to its target; never over an input file)")
	return cmd
}

// conditionResult is the analysis of one condition.
type conditionResult struct {
	name string
	sol  *solver.Solution
}

// runSolve loads the template, analyses it in every condition and renders.
func runSolve(o *solveOptions) error {
	t, err := loadTemplate(o.File, o.In)
	if err != nil {
		return err
	}
	if err := requireValued(t); err != nil {
		return err
	}
	results, err := analyzeAll(t)
	if err != nil {
		return err
	}
	var w ratings.Watch
	for _, r := range results {
		variation.WatchSolution(&w, t, nil, nil, r.name, r.sol)
	}
	writeCautions(o.ErrOut, &w)
	outs, err := newOutputs(inputFiles(t), &o.Out, o.Output)
	if err != nil {
		return err
	}
	return outs.finish(renderSolve(o, t, results))
}

// renderSolve writes the analysis in the chosen format.
func renderSolve(o *solveOptions, t *constraints.Template, results []conditionResult) error {
	if o.Format == "json" {
		return writeJSON(o.Out, solveJSON(results))
	}
	return writeSolveTable(o.Out, t, results)
}

// requireValued refuses a template with free resistors, naming them all.
func requireValued(t *constraints.Template) error {
	free := t.FreeParts()
	if len(free) == 0 {
		return nil
	}
	names := make([]string, len(free))
	for i, idx := range free {
		names[i] = t.Parts[idx].Name
	}
	verb := "has"
	if len(names) > 1 {
		verb = "have"
	}
	first := t.Parts[free[0]].Pos
	return &exitError{code: ExitBadInput, err: &constraints.Error{
		File: t.File, Line: first.Line, Col: first.Col,
		Msg: fmt.Sprintf("solve needs every resistor valued; %s %s no value — use `ohmfit fit` to choose",
			strings.Join(names, ", "), verb),
	}}
}

// analyzeAll solves the network once per condition, each on its own copy of
// the circuit with the condition's settings applied.
func analyzeAll(t *constraints.Template) ([]conditionResult, error) {
	results := make([]conditionResult, 0, len(t.Conditions))
	for ci, cond := range t.Conditions {
		c, err := t.ConditionCircuit(ci)
		if err != nil {
			// The loader checks settings; this guards a template built in code.
			return nil, badInputf("%s%s", filePrefix(t, cond.Pos), constraints.Message(err))
		}
		sol, err := solver.Analyze(c)
		if err != nil {
			return nil, templateError(t, t.ConditionError(ci, err))
		}
		results = append(results, conditionResult{name: cond.Name, sol: sol})
	}
	return results, nil
}

// filePrefix is "file:line:col: " for a message about t, leaving out what
// is unknown.
func filePrefix(t *constraints.Template, p constraints.Pos) string {
	// An Error without a message renders as just its position and ": ".
	return (&constraints.Error{File: t.File, Line: p.Line, Col: p.Col}).Error()
}

// solveJSON builds the contract's JSON document.
func solveJSON(results []conditionResult) object {
	conds := make([]object, len(results))
	for i, r := range results {
		nodes := make(object, len(r.sol.Nodes))
		for j, n := range r.sol.Nodes {
			nodes[j] = member{n.Name, n.Volts}
		}
		parts := make(object, len(r.sol.Parts))
		for j, p := range r.sol.Parts {
			parts[j] = member{p.Name, object{{"volts", p.Volts}, {"amps", p.Amps}, {"watts", p.Watts}}}
		}
		conds[i] = object{{"name", r.name}, {"nodes", nodes}, {"parts", parts}}
	}
	return object{{"conditions", conds}}
}

// writeSolveTable renders each condition as a block: a heading, the node
// voltages, the parts, and a power balance line.
func writeSolveTable(w io.Writer, t *constraints.Template, results []conditionResult) error {
	var b strings.Builder
	if t.Name != "" {
		fmt.Fprintf(&b, "%s\n", t.Name)
	}
	for _, r := range results {
		fmt.Fprintf(&b, "\nIn condition %s:\n\n", r.name)

		vs, as, ws := scales(r.sol)
		nodes := table{indent: "  ", cols: []column{{gap: 3}, {right: true, gap: 1}, {gap: 2}, {}}}
		nodes.add("node", "voltage")
		for _, n := range r.sol.Nodes {
			num, unit := splitUnit(units.FormatUnit(tidy(n.Volts, vs), units.Volt))
			note := ""
			if n.Name == t.Ground {
				note = "(reference)"
			}
			nodes.add(n.Name, num, unit, note)
		}
		if err := nodes.write(&b); err != nil {
			return err
		}
		b.WriteByte('\n')

		parts := table{indent: "  ", cols: []column{
			{gap: 2}, {gap: 3},
			{right: true, gap: 1}, {gap: 3},
			{right: true, gap: 1}, {gap: 3},
			{right: true, gap: 1}, {},
		}}
		parts.add("part", "type", "voltage", "", "current", "", "power")
		delivered, opamps := 0.0, false
		for j, p := range r.sol.Parts {
			v, vu := splitUnit(units.FormatUnit(tidy(p.Volts, vs), units.Volt))
			a, au := splitUnit(units.FormatUnit(tidy(p.Amps, as), units.Amp))
			pw, pu := splitUnit(units.FormatUnit(tidy(p.Watts, ws), units.Watt))
			kind := p.Kind.String()
			if st := t.Parts[j].SensorType; st != "" {
				kind = st // a thermistor or RTD, at the condition's temperature
			}
			parts.add(p.Name, kind, v, vu, a, au, pw, pu)
			if p.Kind != solver.Resistor {
				delivered -= p.Watts
				opamps = opamps || p.Kind == solver.OpAmp
			}
		}
		if err := parts.write(&b); err != nil {
			return err
		}
		who := "sources deliver"
		if opamps {
			who = "sources and op-amp outputs deliver"
		}
		b.WriteString("  (passive signs: current into a part's first terminal, power absorbed; a delivering source reads negative)\n")
		fmt.Fprintf(&b, "\n  resistors dissipate %s; %s %s\n",
			units.FormatUnit(r.sol.ResistorPower, units.Watt), who, units.FormatUnit(delivered, units.Watt))
	}
	_, err := io.WriteString(w, b.String())
	return err
}

// scales returns the largest magnitude of the voltages, currents and powers
// in a solution, the yardsticks tidy measures rounding noise against.
func scales(sol *solver.Solution) (volts, amps, watts float64) {
	for _, n := range sol.Nodes {
		volts = max(volts, math.Abs(n.Volts))
	}
	for _, p := range sol.Parts {
		volts = max(volts, math.Abs(p.Volts))
		amps = max(amps, math.Abs(p.Amps))
		watts = max(watts, math.Abs(p.Watts))
	}
	return volts, amps, watts
}

// tidy shows as zero a value that is only floating-point residue next to the
// largest of its kind (the current in a balanced bridge's detector comes out
// as 1e-19 A, not 0); the table would otherwise print "0.0001 pA". JSON keeps
// the solver's numbers as they are.
func tidy(v, scale float64) float64 {
	if math.Abs(v) <= 1e-12*scale {
		return 0
	}
	return v
}
