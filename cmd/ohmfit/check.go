package main

import (
	"errors"
	"io"
	"strings"

	"github.com/ohmfit/ohmfit/constraints"
	"github.com/ohmfit/ohmfit/constraints/ratings"
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
	countVar(f, &r.Samples, "samples", variation.DefaultSamples, 0, maxSamples, "Monte Carlo samples (`N`: 0 for none, or 2 to 10,000,000)")
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
	if r.Samples == 1 {
		return nil, amb, badInputf("--samples 1: a spread (σ) needs at least 2 samples; 0 turns Monte Carlo off")
	}
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
               against the target's limits, over --samples random builds
               (at least 2). Below 741 samples no sample lies beyond those
               points, so the lowest and highest sample are shown instead,
               under those names (JSON "lowest", "highest").
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
		err = writeJSON(o.Out, checkJSON(member{"name", t.Name}, t, d, rep))
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
		if n > 1 {
			msg += " (and " + counted(n-1, "more hard limit", "more hard limits") + " broken; see the report)"
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
	if err := nothingSeen(res, 0); err != nil {
		return nil, err
	}
	if len(res.Solutions) < o.Rank {
		if len(res.Solutions) == 0 {
			return nil, &exitError{code: ExitNoSolution, err: errors.New(noSolutionMessage(p, res, reach))}
		}
		return nil, rankBeyond(o.Rank, len(res.Solutions))
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
