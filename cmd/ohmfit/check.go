package main

import (
	"errors"
	"fmt"
	"io"
	"math"
	"strconv"
	"strings"

	"github.com/ohmfit/ohmfit/constraints"
	"github.com/ohmfit/ohmfit/constraints/ratings"
	"github.com/ohmfit/ohmfit/eseries/units"
	"github.com/ohmfit/ohmfit/solver"
	"github.com/ohmfit/ohmfit/synth"
	"github.com/ohmfit/ohmfit/synth/variation"
	"github.com/spf13/cobra"
)

// maxSamples bounds --samples: more would take long and tell nothing new.
const maxSamples = 10_000_000

// realFlags are the settings of an analysis with real parts, shared by
// `check` and `fit --check`.
type realFlags struct {
	Samples    int
	Seed       uint64
	Dist       string // uniform or normal
	Ambient    string // "MIN..MAX" in °C, "" for the template's
	MaxPackage string
}

// bindRealFlags adds the analysis flags to a command.
func bindRealFlags(cmd *cobra.Command, r *realFlags) {
	f := cmd.Flags()
	countVar(f, &r.Samples, "samples", variation.DefaultSamples, 0, maxSamples, "Monte Carlo samples (`N`, at most 10,000,000; 0: none)")
	f.Uint64Var(&r.Seed, "seed", 1, "Monte Carlo seed (`N`); the same seed gives the same numbers")
	f.StringVar(&r.Dist, "dist", "uniform", "how each part spreads within its tolerance (`DISTRIBUTION`): uniform, or normal with tolerance = 3σ")
	f.StringVar(&r.Ambient, "ambient", "", "ambient range in °C as `MIN..MAX` (e.g. -20..70), spreading each resistor by its TCR; overrides the template's ambient")
	f.StringVar(&r.MaxPackage, "max-package", "", "largest resistor `PACKAGE` allowed (e.g. 0805); a part that needs more fails the run (exit 1)")
}

// settings checks the flags and turns them into variation settings and an
// ambient range (Set false when not given).
func (r *realFlags) settings(cmd *cobra.Command) (*variation.Settings, constraints.Ambient, error) {
	st := &variation.Settings{Samples: r.Samples, Seed: r.Seed}
	var amb constraints.Ambient
	if r.Samples == 0 {
		st.Samples = -1
	}
	switch r.Dist {
	case "uniform":
	case "normal":
		st.Distribution = variation.Normal
	default:
		return nil, amb, usagef(cmd.CommandPath(), "--dist must be uniform or normal, not %q", r.Dist)
	}
	if r.Ambient != "" {
		lo, hi, ok := strings.Cut(r.Ambient, "..")
		a, errA := constraints.ParseCelsius(lo)
		b, errB := constraints.ParseCelsius(hi)
		if !ok || errA != nil || errB != nil || a > b {
			return nil, amb, usagef(cmd.CommandPath(), "--ambient wants MIN..MAX in °C such as -20..70, not %q", r.Ambient)
		}
		amb = constraints.Ambient{Set: true, Min: a, Max: b}
	}
	if r.MaxPackage != "" {
		p, err := ratings.Lookup(r.MaxPackage)
		if err != nil {
			return nil, amb, usagef(cmd.CommandPath(), "--max-package: %s", constraints.Message(err))
		}
		st.MaxPackage = p.Name
	}
	return st, amb, nil
}

// checkOptions are the inputs of `ohmfit check`.
type checkOptions struct {
	File   string
	In     io.Reader // standard input, read for the FILE "-"
	Format string
	Rank   int
	BOM    string
	Plot   string
	Output string // write the report here instead of stdout; "" for stdout
	realFlags

	Out, ErrOut io.Writer
}

// newCheckCmd builds `ohmfit check`.
func newCheckCmd(out, errOut io.Writer) *cobra.Command {
	o := &checkOptions{Out: out, ErrOut: errOut}
	cmd := &cobra.Command{
		Use:   "check FILE [options]",
		Short: "Show what a valued design does with real parts",
		Long: `Analyse a design with real parts: every resistor within its tolerance (the
part's tolerance:, else choose's, else its series' usual one: E24 5 %, E96 1 %,
…) and drifting by its TCR over an ambient range (or, without one, at each
condition's temperature), every source within its own
tolerance: (taken as exact without one), every thermistor or RTD within its
own tolerance: on its R25 or R0 (1 % assumed, with a warning, without one)
and with no resistor TCR, series or package rating: its model is its
temperature dependence, its datasheet its rating.

For each target in each condition it shows:
  worst case   the extremes over every tolerance corner, each corner solved
               exactly while there are at most 16 varying parts (2^16 corners);
               beyond that the corners picked by the signs of the
               sensitivities, each solved (linearised worst case). The output
               says which ran.
  Monte Carlo  mean, σ, the 0.135 % and 99.865 % points and the yield
               against the target's limits, over --samples random builds.
  sensitivity  (dX/X)/(dx/x) of the target to each part: the relative change
               of the target per relative change of the part's value, at
               nominal values (no tolerance, no drift); for a thermistor or
               RTD the value is its R25 or R0, which scales its whole curve.
               By the adjoint method; sweep-wide targets (linearity,
               sensitivity, resolution) by central differences of full
               re-solves. JSON "sensitivities" holds the same figure.
For each resistor: its largest power and voltage over conditions and corners,
the smallest package that carries it at no more than half its rated power
(common practice), or the template's package:, with warnings near or beyond a
rating, and a caution when any two nodes differ by more than 60 V DC in any
condition or corner (ES1 of IEC 62368-1; 60.00 V is within ES1).

--bom writes one CSV line per item to order: resistors of equal value,
series, tolerance, TCR and package share a line; each sensor is a line of its
own, with its type (ntc, rtd) and model (R25 and B, the Steinhart–Hart
coefficients, or R0 and the RTD coefficients). The tolerance column is the
tolerance the check assumed, tolerance_from where it came from (part,
choose, series, assumed).

Package ratings are typical thick-film figures from memory; the datasheet of
the part you buy governs. ohmfit is a first check, not a safety assessment.

A template with resistors still to choose is first fitted like ` + "`ohmfit fit`" + `, and
the answer of --rank (default 1) is checked.

FILE is a template file, example:NAME for a built-in example, or - to read
the template from standard input.

Exit status, for a script to gate a design on:
  0  every hard limit (tolerance, min, max) holds over the whole worst-case
     range, and every part fits its package limit
  1  a hard limit fails in the worst case, or a part needs a package above
     --max-package (or the template's limits.max_package); the report is
     still written, and stderr says what broke ("ohmfit: not met: …")
  2  bad usage or bad input; nothing is written`,
		Example: `  # the built-in bench network, every value known, over 0 … 70 °C ambient
  ohmfit check example:bias-bench --ambient 0..70

  # the built-in feedback example, fitted then checked, as JSON
  ohmfit check example:feedback --format json --seed 7`,
		Args: argsExactly(1, "one argument, the template file"),
		RunE: func(cmd *cobra.Command, args []string) error {
			o.File = args[0]
			if err := checkFormat(cmd, o.Format, "table", "json"); err != nil {
				return err
			}
			st, amb, err := o.realFlags.settings(cmd)
			if err != nil {
				return err
			}
			if err := checkOutputFlags(cmd, o.BOM, o.Plot); err != nil {
				return err
			}
			o.In = cmd.InOrStdin()
			return runCheck(o, st, amb)
		},
	}
	f := cmd.Flags()
	f.StringVar(&o.Format, "format", "table", "`FORMAT` of the output: table or json")
	countVar(f, &o.Rank, "rank", 1, 1, maxListed, "for a template with free resistors, which fitted answer to check (`N`)")
	f.StringVar(&o.BOM, "bom", "", "also write a bill of materials to `FILE.csv`")
	f.StringVar(&o.Plot, "plot", "", "also draw the Monte Carlo histograms to `FILE.svg` or FILE.png")
	f.StringVarP(&o.Output, "output", "o", "", "write the report to `FILE` instead of standard output (atomically, through a symbolic link to its target; never over an input file)")
	bindRealFlags(cmd, &o.realFlags)
	return cmd
}

// checkOutputFlags checks the extensions of --bom and --plot.
func checkOutputFlags(cmd *cobra.Command, bom, plot string) error {
	if bom != "" && !strings.HasSuffix(strings.ToLower(bom), ".csv") {
		return usagef(cmd.CommandPath(), "--bom writes CSV; name a .csv file, not %q", bom)
	}
	if plot != "" {
		l := strings.ToLower(plot)
		if !strings.HasSuffix(l, ".svg") && !strings.HasSuffix(l, ".png") {
			return usagef(cmd.CommandPath(), "--plot draws SVG or PNG; name a .svg or .png file, not %q", plot)
		}
	}
	return nil
}

// runCheck loads, fits when needed, analyses and renders.
func runCheck(o *checkOptions, st *variation.Settings, amb constraints.Ambient) error {
	t, err := loadTemplate(o.File, o.In)
	if err != nil {
		return err
	}
	outs, err := newOutputs(inputFiles(t), &o.Out, o.Output, o.BOM, o.Plot)
	if err != nil {
		return err
	}
	return outs.finish(checkDesign(o, outs, t, st, amb))
}

// checkDesign fits when needed, analyses and renders, staging the files.
func checkDesign(o *checkOptions, outs *outputs, t *constraints.Template, st *variation.Settings, amb constraints.Ambient) error {
	cp, err := constraints.Compile(t)
	if err != nil {
		return templateError(t, err)
	}
	var opts []synth.Option
	if len(cp.Free) == 0 && o.Rank != 1 {
		return badInputf("--rank %d: %s has every value given, so there is one design to check and no fitted answers to choose from", o.Rank, t.File)
	}
	if len(cp.Free) > 0 {
		opts, err = fitForCheck(o, cp)
		if err != nil {
			return err
		}
	}
	d, err := variation.NewDesign(cp, opts, "", amb)
	if err != nil {
		return err
	}
	st.KeepSamples = o.Plot != ""
	phase("checking")
	rep, err := variation.Check(d, st)
	if err != nil {
		return templateError(t, err)
	}
	if o.Format == "json" {
		err = writeJSON(o.Out, checkJSON(t, d, rep))
	} else {
		err = writeCheckTable(o.Out, t, d, rep)
	}
	if err != nil {
		return err
	}
	if o.BOM != "" {
		if err := outs.stage(o.BOM, func(w io.Writer) error { return writeBOM(w, d, rep) }); err != nil {
			return err
		}
	}
	if o.Plot != "" {
		if err := outs.stage(o.Plot, func(w io.Writer) error { return plotHistograms(w, o.Plot, t, rep) }); err != nil {
			return err
		}
	}
	if n := len(rep.Failures); n > 0 {
		msg := rep.Failures[0]
		switch {
		case n == 2:
			msg += " (and 1 more hard limit broken; see the report)"
		case n > 2:
			msg += fmt.Sprintf(" (and %d more hard limits broken; see the report)", n-1)
		}
		return &exitError{code: ExitNoSolution, err: errors.New(msg)}
	}
	return nil
}

// fitForCheck searches a template with free resistors and returns the
// options of the answer of rank o.Rank, saying so on stderr.
func fitForCheck(o *checkOptions, cp *constraints.Problem) ([]synth.Option, error) {
	t := cp.Template
	p, err := synth.NewProblem(cp, "")
	if err != nil {
		return nil, templateError(t, err)
	}
	set := &synth.Settings{Top: o.Rank}
	m, reach, err := prepareSearch(o.ErrOut, "auto", p, set)
	if err != nil {
		return nil, err
	}
	ctx, searched, release := searchInterrupt()
	defer release()
	res, err := synth.Search(ctx, p, set, m)
	searched()
	if err != nil {
		return nil, templateError(t, err)
	}
	if len(res.Solutions) < o.Rank {
		if len(res.Solutions) == 0 {
			return nil, &exitError{code: ExitNoSolution, err: errors.New(noSolutionMessage(p, res, reach))}
		}
		return nil, badInputf("--rank %d: the fit has only %d answers", o.Rank, len(res.Solutions))
	}
	sol := res.Solutions[o.Rank-1]
	var desc []string
	for k, dm := range p.Domains {
		desc = append(desc, dm.Name+" "+positionText(sol.Options[k]))
	}
	proven := ""
	switch res.Status {
	case synth.Heuristic:
		proven = " (found by the heuristic, not proven best)"
	case synth.Interrupted:
		proven = " (the search was interrupted; not proven best)"
	}
	notef(o.ErrOut, "%s has resistors to choose; checking fit's answer %d%s: %s", t.File, o.Rank, proven, strings.Join(desc, ", "))
	return sol.Options, nil
}

// inputFiles lists the files a run read, which outputs must not replace.
func inputFiles(t *constraints.Template) []string {
	files := []string{}
	if !strings.HasPrefix(t.File, examplePrefix) && t.File != constraints.StdinName {
		files = append(files, t.File)
	}
	if f := t.Choose.Default.StockFile; f != "" {
		files = append(files, f)
	}
	for _, c := range t.Choose.Overrides {
		if c.StockFile != "" {
			files = append(files, c.StockFile)
		}
	}
	return files
}

// tolText shows a part's tolerance: "1%" or "±10 mV".
func tolText(v variation.Varied) string {
	if v.Class != "" {
		return "class " + v.Class
	}
	if v.Tol == 0 {
		return "exact"
	}
	if v.Relative {
		return units.FormatUnit(v.Tol, units.Percent)
	}
	return "±" + units.FormatUnit(v.Tol, unitOf(v.Kind))
}

func unitOf(k solver.Kind) units.Unit {
	switch k {
	case solver.VoltageSource:
		return units.Volt
	case solver.CurrentSource:
		return units.Amp
	}
	return units.Ohm
}

// ppm shows a TCR: "100 ppm/°C".
func ppm(tcr float64) string {
	return strconv.FormatFloat(tcr*1e6, 'g', 4, 64) + " ppm/°C"
}

// worstCaseText says which worst-case method ran.
func worstCaseText(rep *variation.Report, nc int) string {
	if rep.Method == variation.MethodCorners {
		conds := "1 condition"
		if nc != 1 {
			conds = fmt.Sprintf("%d conditions", nc)
		}
		return fmt.Sprintf("every tolerance corner solved (%d per condition, %s)", rep.Corners, conds)
	}
	return fmt.Sprintf("linearised: %d corners picked from the sensitivities, each solved exactly (too many varying parts to try all)", rep.Corners)
}

// writeCheckTable renders a check report for people.
func writeCheckTable(w io.Writer, t *constraints.Template, d *variation.Design, rep *variation.Report) error {
	var b strings.Builder
	if t.Name != "" {
		fmt.Fprintf(&b, "%s, with real parts\n", t.Name)
	}
	fmt.Fprintf(&b, "worst case: %s\n", worstCaseText(rep, len(d.Problem.Conditions)))
	if rep.Samples > 0 {
		fmt.Fprintf(&b, "Monte Carlo: %s samples, %s, seed %d; %s meet every limit\n", count(float64(rep.Samples)), rep.Distribution, rep.Seed, yieldText(rep.Yield))
	}
	if a := rep.Ambient; a.Set {
		fmt.Fprintf(&b, "ambient: %g … %g °C (TCR referred to %g °C)\n", a.Min, a.Max, constraints.ReferenceCelsius)
	} else if hasTemperatures(d.Problem) {
		fmt.Fprintf(&b, "temperature: each resistor drifts by its TCR at its condition's temperature (referred to %g °C)\n", constraints.ReferenceCelsius)
	}
	b.WriteByte('\n')
	if err := writeGoalTable(&b, t, rep); err != nil {
		return err
	}
	b.WriteString("\n  sensitivity (dX/X)/(dx/x): relative change of the target per relative change of a part's value, at nominal values\n")
	b.WriteString("  (a sensor's R25 or R0); adjoint method, sweep-wide targets by central differences of full re-solves\n\n")
	sens := table{indent: "  ", cols: []column{{gap: 3}, {gap: 3}}}
	head := []string{"target", "condition"}
	for _, v := range rep.Parts {
		head = append(head, v.Name)
		sens.cols = append(sens.cols, column{right: true, gap: 3})
	}
	sens.cols[len(sens.cols)-1].gap = 0
	sens.add(head...)
	for _, g := range rep.Goals {
		row := []string{g.Label, g.CondName}
		for _, s := range g.Sens {
			row = append(row, sensText(s))
		}
		sens.add(row...)
	}
	if err := sens.write(&b); err != nil {
		return err
	}
	b.WriteByte('\n')
	if err := writePartTable(&b, d, rep); err != nil {
		return err
	}
	if err := writeHeatingTable(&b, rep); err != nil {
		return err
	}
	writeNotes(&b, rep)
	_, err := io.WriteString(w, b.String())
	return err
}

func yieldText(y float64) string {
	return strconv.FormatFloat(100*y, 'f', 2, 64) + "%"
}

func sensText(s variation.Sensitivity) string {
	if math.IsNaN(s.Normalised) {
		return "n/a"
	}
	if math.Abs(s.Normalised) < 5e-5 {
		return "0"
	}
	return strconv.FormatFloat(s.Normalised, 'f', 4, 64)
}

// writeGoalTable writes one row per target and condition.
func writeGoalTable(b *strings.Builder, t *constraints.Template, rep *variation.Report) error {
	tb := table{indent: "  ", cols: []column{{gap: 3}, {gap: 3}}}
	head := []string{"target", "condition", "nominal", "worst min", "worst max", "limits"}
	if rep.Samples > 0 {
		head = append(head, "mean", "σ", "0.135%", "99.865%", "yield")
	}
	for range head[2:] {
		tb.cols = append(tb.cols, column{right: true, gap: 3})
	}
	tb.cols[len(tb.cols)-1].gap = 0
	tb.add(head...)
	// Two rows on one quantity in one condition (a goal and a separate
	// limit on it) would read alike: those say which is which.
	seen := map[[2]string]int{}
	for _, g := range rep.Goals {
		seen[[2]string{g.Label, g.CondName}]++
	}
	for _, g := range rep.Goals {
		tg := t.Targets[g.Target]
		label := g.Label
		if seen[[2]string{g.Label, g.CondName}] > 1 {
			label += " (" + targetKind(tg.HasEquals) + ")"
		}
		limit := wordNoLimit
		if g.HasBand {
			limit = verdictWord(g.InBand)
		}
		k := tg.Kind
		row := []string{label, g.CondName, k.Format(g.Nominal), k.Format(g.WorstMin), k.Format(g.WorstMax), limit}
		if rep.Samples > 0 {
			mc := g.MonteCarlo
			row = append(row, k.Format(mc.Mean), k.FormatSig(mc.Sigma, 4), k.Format(mc.Low), k.Format(mc.High), yieldText(mc.Yield))
		}
		tb.add(row...)
	}
	return tb.write(b)
}

// writePartTable writes one row per varied part with its rating; a sensor
// has no resistor TCR, package rating or verdict, and its model follows.
func writePartTable(b *strings.Builder, d *variation.Design, rep *variation.Report) error {
	rated := map[string]variation.Rating{}
	for _, r := range rep.Ratings {
		rated[r.Part] = r
	}
	sensed := map[string]variation.SensorLoad{}
	for _, s := range rep.Sensors {
		sensed[s.Part] = s
	}
	tb := table{indent: "  ", cols: []column{{gap: 3}, {right: true, gap: 3}, {right: true, gap: 3}, {right: true, gap: 3},
		{right: true, gap: 3}, {right: true, gap: 3}, {gap: 3}, {right: true, gap: 3}, {}}}
	tb.add("part", "value", "tolerance", "TCR", "worst power", "worst volts", "package", "load", "verdict")
	var models []string
	for j, v := range rep.Parts {
		if v.Extra() {
			continue // a sensor's B or class terms: on the sensor's line
		}
		if sl, ok := sensed[v.Name]; ok {
			pkg := v.Package
			if pkg == "" {
				pkg = "-"
			}
			tb.add(v.Name, units.FormatUnit(v.Nominal, units.Ohm), tolText(v), "-",
				units.FormatUnit(sl.Watts, units.Watt), units.FormatUnit(sl.Volts, units.Volt), pkg, "-", "sensor")
			tol := fmt.Sprintf(", ±%s (%s)", units.FormatUnit(v.Tol, units.Percent), v.TolFrom)
			if v.Class != "" {
				tol = "" // the class is in the model
			}
			models = append(models, fmt.Sprintf("  %s is an %s, %s%s: its datasheet rates it, not the package table.\n",
				v.Name, variation.SensorKind(v.Sensor), d.SensorSpec(j), tol))
			continue
		}
		r, ok := rated[v.Name]
		if !ok {
			tb.add(v.Name, units.FormatUnit(v.Nominal, unitOf(v.Kind)), tolText(v), "", "", "", "", "", "")
			continue
		}
		pkg := r.Package
		if r.Chosen {
			pkg += " (smallest)"
		}
		tb.add(v.Name, units.FormatUnit(v.Nominal, units.Ohm), tolText(v), ppm(v.TCR),
			units.FormatUnit(r.Watts, units.Watt), units.FormatUnit(r.Volts, units.Volt), pkg,
			loadText(r.Load.PowerFraction), string(r.Verdict))
	}
	if err := tb.write(b); err != nil {
		return err
	}
	if len(models) > 0 {
		b.WriteByte('\n')
		for _, m := range models {
			b.WriteString(m)
		}
	}
	return nil
}

// writeHeatingTable writes each sensor's self-heating per condition, when
// a sensor has a dissipation constant.
func writeHeatingTable(b *strings.Builder, rep *variation.Report) error {
	if len(rep.Heating) == 0 {
		return nil
	}
	b.WriteString("\n  self-heating at nominal values: rise = P/δ at the condition's temperature; reading error = how far the sensor\n")
	b.WriteString("  settles above it (fixed point of T = T0 + P(T)/δ), which is what a reading from it is off by\n\n")
	tb := table{indent: "  ", cols: []column{{gap: 3}, {gap: 3}, {right: true, gap: 3}, {right: true, gap: 3}, {right: true, gap: 3}, {right: true}}}
	tb.add("sensor", "condition", "power", "rise", "reading error", "steps")
	for _, h := range rep.Heating {
		read := "does not settle"
		if h.Converged {
			read = celsius(h.ReadingError)
		}
		tb.add(h.Part, h.CondName, units.FormatUnit(h.Watts, units.Watt), celsius(h.Rise), read, strconv.Itoa(h.Steps))
	}
	return tb.write(b)
}

// celsius writes a temperature difference with four significant digits
// and no SI prefix: "0.06787 °C".
func celsius(v float64) string {
	return strconv.FormatFloat(v, 'g', 4, 64) + " °C"
}

// writeNotes writes the warnings, cautions and hard failures.
func writeNotes(b *strings.Builder, rep *variation.Report) {
	b.WriteString("\n  load is worst-case power over rated power; packages carry at most 50% (derating, common practice).\n")
	b.WriteString("  Ratings are typical thick-film figures from memory: check the datasheet of the part you buy.\n")
	for _, f := range rep.Failures {
		fmt.Fprintf(b, "\n%s: %s\n", wordFail, f)
	}
	if len(rep.Warnings) > 0 {
		b.WriteString("\nwarnings:\n")
		for _, w := range rep.Warnings {
			fmt.Fprintf(b, "  - %s\n", w)
		}
	}
	for _, c := range rep.Cautions {
		fmt.Fprintf(b, "\n%s\n", c)
	}
}

// finite returns v, or nil for a NaN or infinity, which JSON cannot hold.
func finite(v float64) any {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return nil
	}
	return v
}

// checkJSON builds the check document: the contract's keys and the rest of
// what the table shows.
func checkJSON(t *constraints.Template, d *variation.Design, rep *variation.Report) object {
	goals := make([]object, len(rep.Goals))
	for i, g := range rep.Goals {
		tg := t.Targets[g.Target]
		sens := object{}
		for _, s := range g.Sens {
			sens = append(sens, member{s.Part, finite(s.Normalised)})
		}
		m := object{{"target", g.Label}, {"kind", targetKind(tg.HasEquals)}, {"condition", g.CondName}, {"nominal", g.Nominal},
			{"worst_min", g.WorstMin}, {"worst_max", g.WorstMax}}
		if tg.HasEquals {
			m = append(m, member{"goal", tg.Equals}, member{"worst_error", finite(g.WorstError)})
		}
		lo, hi := tg.Band()
		m = append(m, member{"min", finite(lo)}, member{"max", finite(hi)}, member{"pass", !g.HasBand || g.InBand})
		if rep.Samples > 0 {
			mc := g.MonteCarlo
			m = append(m, member{"monte_carlo", object{{"mean", finite(mc.Mean)}, {"sigma", finite(mc.Sigma)},
				{"p0_135", finite(mc.Low)}, {"p99_865", finite(mc.High)}, {"yield", mc.Yield}, {"failed", mc.Failed}}})
		}
		m = append(m, member{"sensitivities", sens})
		goals[i] = m
	}
	rated := map[string]variation.Rating{}
	for _, r := range rep.Ratings {
		rated[r.Part] = r
	}
	sensed := map[string]variation.SensorLoad{}
	for _, s := range rep.Sensors {
		sensed[s.Part] = s
	}
	parts, sources := []object{}, []object{}
	for j, v := range rep.Parts {
		if v.Extra() {
			continue // a sensor's B or class terms: on the sensor's object
		}
		base := object{{"name", v.Name}, {"value", v.Nominal}, {"tolerance", v.Tol}, {"tolerance_relative", v.Relative}, {"tolerance_from", v.TolFrom}}
		if sl, ok := sensed[v.Name]; ok {
			var pkg any
			if v.Package != "" {
				pkg = v.Package
			}
			obj := append(base,
				member{"position", v.Position}, member{"type", v.Sensor}, member{"model", d.SensorSpec(j)},
				member{"watts", sl.Watts}, member{"nominal_watts", sl.NominalWatts}, member{"volts", sl.Volts},
				member{"package", pkg})
			ps := t.Parts[v.Part]
			if ps.BetaTolerance > 0 {
				obj = append(obj, member{"beta_tolerance", ps.BetaTolerance})
			}
			if ps.Class != "" {
				obj = append(obj, member{"class", ps.Class})
			}
			parts = append(parts, obj)
			continue
		}
		r, ok := rated[v.Name]
		if !ok {
			sources = append(sources, base)
			continue
		}
		parts = append(parts, append(base,
			member{"position", v.Position}, member{"type", variation.TypeResistor}, member{"series", v.Series}, member{"tcr", v.TCR},
			member{"watts", r.Watts}, member{"nominal_watts", r.NominalWatts}, member{"volts", r.Volts},
			member{"package", r.Package}, member{"package_chosen", r.Chosen},
			member{"rated_watts", r.Rated}, member{"rated_volts", r.MaxVolts},
			member{"power_fraction", r.Load.PowerFraction}, member{"voltage_fraction", r.Load.VoltageFraction},
			member{"verdict", r.Verdict}))
	}
	var amb any
	if a := rep.Ambient; a.Set {
		amb = object{{"min", a.Min}, {"max", a.Max}, {"reference", constraints.ReferenceCelsius}}
	}
	mc := any(nil)
	if rep.Samples > 0 {
		mc = object{{"samples", rep.Samples}, {"seed", rep.Seed}, {"distribution", rep.Distribution.String()}, {"yield", rep.Yield}}
	}
	var heating []object
	for _, h := range rep.Heating {
		heating = append(heating, object{{"sensor", h.Part}, {"condition", h.CondName}, {"watts", h.Watts}, {"rise", h.Rise},
			{"reading_error", finite(h.ReadingError)}, {"steps", h.Steps}, {"converged", h.Converged}})
	}
	doc := object{
		{"name", t.Name},
		{"worst_case", object{{"method", rep.Method}, {"corners", rep.Corners}}},
		{"monte_carlo", mc},
		{"ambient", amb},
		{"goals", goals},
		{"parts", parts},
		{"sources", sources},
		{"span_volts", rep.MaxVolts}, // the largest voltage between two nodes
		{"warnings", nonNilStrings(rep.Warnings)},
		{"cautions", nonNilStrings(rep.Cautions)},
		{"failures", nonNilStrings(rep.Failures)},
	}
	if len(heating) > 0 {
		// Only for a design whose sensors have a dissipation constant,
		// after the other keys.
		doc = append(doc, member{"self_heating", heating})
	}
	return doc
}

func nonNilStrings(s []string) []string {
	if s == nil {
		return []string{}
	}
	return s
}

// hasTemperatures reports whether any condition carries a temperature.
func hasTemperatures(p *constraints.Problem) bool {
	for _, c := range p.Conditions {
		if c.HasTemperature {
			return true
		}
	}
	return false
}

// loadText writes a part's load (a fraction of its rated power) as a
// whole percentage, in powers of ten past a million per cent rather than a
// line of digits.
func loadText(f float64) string {
	if p := 100 * f; p >= 1e6 {
		return strconv.FormatFloat(p, 'e', 1, 64) + "%"
	}
	return strconv.FormatFloat(100*f, 'f', 0, 64) + "%"
}
