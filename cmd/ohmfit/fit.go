package main

import (
	"errors"
	"fmt"
	"io"
	"slices"
	"strconv"
	"strings"
	"time"

	"github.com/ohmfit/ohmfit/constraints"
	"github.com/ohmfit/ohmfit/eseries/units"
	"github.com/ohmfit/ohmfit/synth"
	"github.com/ohmfit/ohmfit/synth/variation"
	"github.com/spf13/cobra"
)

// searchOptions are the flags every synthesis command shares.
type searchOptions struct {
	Top       int
	Format    string // table, json or csv
	Series    string // overrides every position's series when set
	TimeLimit time.Duration
	Workers   int
	Memory    int64  // bytes branch and bound's open boxes may hold (synth.Settings.OpenBytes)
	Method    string // auto, exhaustive, bound or heuristic
	Shard     string // "K/N": search the K-th of N parts of the space; "" for all
	Quiet     bool
	Tradeoffs string // goal-error bound of the trade-off front; "" for none
	Output    string // write the result here instead of stdout; "" for stdout

	Out, ErrOut io.Writer
	ErrIsTTY    bool     // stderr is a terminal: show a progress bar
	real        *fitReal // fit's real-parts flags; nil for divider and feedback
	outs        *outputs // where the run's output files are staged
}

// bindSearchFlags adds the shared search flags to a command.
func bindSearchFlags(cmd *cobra.Command, o *searchOptions) {
	f := cmd.Flags()
	countVar(f, &o.Top, "top", 10, 1, maxListed, "how many ranked answers to show (`N`, at most 10,000)")
	f.StringVar(&o.Format, "format", "table", "`FORMAT` of the output: table, json or csv")
	f.StringVar(&o.Series, "series", "", "use this `SERIES` (E3 … E192) for every position, overriding the template")
	timeLimitVar(f, &o.TimeLimit)
	countVar(f, &o.Workers, "workers", 0, 0, maxWorkers, "goroutines to search with (`N`; 0: one per core); the answer does not depend on it")
	sizeVar(f, &o.Memory, "memory", synth.DefaultOpenBytes, "about the most memory branch and bound keeps for the boxes it has yet to search (`SIZE`, e.g. 4GiB); past it the search goes depth first, which finds the same answer but may take longer to a bound (the whole process takes up to about 2.5 times this)")
	f.StringVar(&o.Method, "method", "auto", "`METHOD`: bound (branch and bound over value boxes, proven best), exhaustive (every row, proven best), heuristic (a relaxation, then the standard values around it; not proven), or auto (branch and bound where its bounds apply, else exhaustive when the space allows)")
	f.BoolVarP(&o.Quiet, "quiet", "q", false, "no progress bar")
	f.StringVarP(&o.Output, "output", "o", "", "write the result to `FILE` instead of standard output (atomically, through a symbolic link to its target; never over an input file)")
	f.StringVar(&o.Tradeoffs, "tradeoffs", "", "also list the "+wordFront+": every answer with goal error up to `ERROR` (1% or 0.01) that nothing beats on error, power and count at once")
}

// checkSearchFlags validates the shared flags.
func checkSearchFlags(cmd *cobra.Command, o *searchOptions) error {
	if err := checkFormat(cmd, o.Format, "table", "json", "csv"); err != nil {
		return err
	}
	if !slices.Contains(synth.MethodNames, o.Method) {
		return usagef(cmd.CommandPath(), "--method must be auto, bound, exhaustive or heuristic, not %q", o.Method)
	}
	if o.Shard != "" {
		if _, _, err := parseShard(o.Shard); err != nil {
			return usagef(cmd.CommandPath(), "--shard: %v", err)
		}
		if o.Method == "heuristic" {
			return usagef(cmd.CommandPath(), "--shard needs a method that covers the space (bound or exhaustive), not heuristic")
		}
		if o.Tradeoffs != "" {
			return usagef(cmd.CommandPath(), "--shard and --tradeoffs cannot be used together")
		}
	}
	if o.Series != "" {
		s, err := lookupSeries(o.Series)
		if err != nil {
			return err
		}
		o.Series = s.Name
	}
	return nil
}

// fitOptions are the inputs of `ohmfit fit`.
type fitOptions struct {
	File string
	searchOptions
	fitReal
}

// newFitCmd builds `ohmfit fit`.
func newFitCmd(out, errOut io.Writer, errIsTTY bool) *cobra.Command {
	o := &fitOptions{searchOptions: searchOptions{Out: out, ErrOut: errOut, ErrIsTTY: errIsTTY}}
	o.real = &o.fitReal
	cmd := &cobra.Command{
		Use:   "fit FILE [options]",
		Short: "Choose standard values for a template's free resistors",
		Long: `Choose standard values for every resistor of the template that has no value,
so that the goals are met as closely as possible and every hard limit holds.

Each candidate is checked with a nodal analysis of the whole network in every
condition. Answers are ranked by the template's rank keys (default: largest
goal error, then power, then part count), then by the values in part order,
so the same input always gives the same list. An answer marked * is
Pareto-optimal in the list: no other answer is as good in error, power and
part count and better in one.

Two methods prove their list best over the whole space. Method bound
(branch and bound) bounds boxes of values from their corners and rules out
every box that cannot hold a better answer; method exhaustive scores every
row, a combination of all positions but one, and every value of the last
along it. Method auto uses bound where its bounds cover every goal (every
goal but a sweep-wide one) and the space is larger than one of its boxes,
exhaustive otherwise, and heuristic (a continuous relaxation, then a search
of the standard values around it) where neither can prove the result. The
summary line uses the JSON's words: space, method, evaluated, solves and the
status (proven, infeasible, heuristic, time-limit, interrupted or partial). A result stopped by
--time-limit or Ctrl-C says how far from proven it is: "nothing better than
X can exist" (JSON "bound"), and, from branch and bound, how many
candidates lie in boxes it has not yet searched or ruled out. Ctrl-C stops a search and prints the best found
so far; once the search is over (--check, --robust) it ends the run at once.

--shard K/N searches only the K-th of N disjoint parts of the space; the
JSON results of all N parts, combined by "ohmfit merge", are the result of
one whole run.

FILE is a template file, example:NAME for a built-in example, or - to read
the template from standard input.

Exit status: 0 with answers, 1 when nothing meets the hard limits (the message
names the limit that rejected the most candidates), 2 for bad input.

JSON output (--format json):
  {"name": "...", "exhaustive": true, "status": "proven", "method": "exhaustive",
   "space": 83521, "evaluated": 1234, "solves": 2468, "bound": 0.00041,
   "solutions": [
     {"rank": 1, "values": {"R1": 30100, "R2": 9530},
      "parts": {"R1": [30100], "R2": [9530]},
      "combine": {"R1": "single", "R2": "single"},
      "error": 0.00041, "power": 0.00108, "part_count": 2, "pareto": true,
      "targets": [{"target": "voltage fb", "condition": "nominal",
                   "value": 0.80033, "goal": 0.8, "error": 0.00041}]}]}`,
		Example: `  # the built-in regulator feedback example
  ohmfit fit example:feedback

  # the same with E24 parts only, top 5, as CSV for a spreadsheet
  ohmfit fit example:feedback --series E24 --top 5 --format csv`,
		Args: argsExactly(1, "one argument, the template file"),
		RunE: func(cmd *cobra.Command, args []string) error {
			o.File = args[0]
			if err := checkSearchFlags(cmd, &o.searchOptions); err != nil {
				return err
			}
			if err := o.fitReal.validate(cmd); err != nil {
				return err
			}
			t, err := loadTemplate(o.File, cmd.InOrStdin())
			if err != nil {
				return err
			}
			outs, err := newOutputs(inputFiles(t), &o.Out, o.Output, o.fitReal.BOM, o.fitReal.Plot)
			if err != nil {
				return err
			}
			o.outs = outs
			return outs.finish(runSearch(&o.searchOptions, t))
		},
	}
	bindSearchFlags(cmd, &o.searchOptions)
	bindFitRealFlags(cmd, &o.fitReal)
	cmd.Flags().StringVar(&o.Shard, "shard", "", "search only the `K/N`-th of N disjoint parts of the space (for a job array; combine the JSON results with ohmfit merge)")
	return cmd
}

// runSearch compiles a template, searches it and renders the result. It is
// shared by fit, divider and feedback.
func runSearch(o *searchOptions, t *constraints.Template) error {
	cp, err := constraints.Compile(t)
	if err != nil {
		return templateError(t, err)
	}
	p, err := synth.NewProblem(cp, o.Series)
	if err != nil {
		return templateError(t, err)
	}
	set := &synth.Settings{Top: o.Top, Workers: o.Workers, OpenBytes: o.Memory, TimeLimit: o.TimeLimit, Progress: &synth.Progress{}}
	o.real.adjust(set)
	if o.Tradeoffs != "" {
		v, err := parseErrorCap(o.Tradeoffs)
		if err != nil {
			return err
		}
		set.FrontErrorCap = v
	}
	if o.Shard != "" {
		set.Shard, set.Shards, _ = parseShard(o.Shard)
	}
	method, reach, err := prepareSearch(o.ErrOut, o.Method, p, set)
	if err != nil {
		return err // the flag was checked against synth.MethodNames
	}
	ctx, searched, release := searchInterrupt()
	defer release()
	done := make(chan struct{})
	if o.ErrIsTTY && !o.Quiet {
		go showProgress(o.ErrOut, set.Progress, done)
	} else {
		close(done)
	}
	watchSearch(ctx, set.Progress)
	res, err := synth.Search(ctx, p, set, method)
	searched()
	if o.ErrIsTTY && !o.Quiet {
		done <- struct{}{}
		<-done
	}
	if err != nil {
		if errors.Is(err, synth.ErrSpaceTooLarge) || errors.Is(err, synth.ErrTooManyRows) {
			return templateError(t, err)
		}
		return err
	}
	if err := nothingSeen(res, o.TimeLimit); err != nil {
		return err
	}
	switch res.Status {
	case synth.Interrupted:
		notef(o.ErrOut, "interrupted; showing the best found so far (not proven)")
	case synth.TimeLimit:
		notef(o.ErrOut, "time limit of %v reached; showing the best found so far (not proven)", o.TimeLimit)
	}
	if len(res.Solutions) > 0 {
		writeCautions(o.ErrOut, variation.WatchAnswer(p.Spec, res.Solutions[0].Options))
	}
	// --robust may need the search again with a larger list to prove its
	// ranking.
	again := func(top int) (*synth.Result, error) {
		s := *set
		s.Top, s.Progress = top, &synth.Progress{}
		return synth.Search(ctx, p, &s, method)
	}
	if err := o.real.render(o, p, res, set.Top, again); err != nil {
		return err
	}
	if len(res.Solutions) == 0 {
		return &exitError{code: ExitNoSolution, err: errors.New(noSolutionMessage(p, res, reach))}
	}
	return nil
}

// showProgress draws a one-line bar on stderr until told to stop, then
// clears it and answers on the same channel.
func showProgress(w io.Writer, pr *synth.Progress, done chan struct{}) {
	tick := time.NewTicker(150 * time.Millisecond)
	defer tick.Stop()
	start := time.Now()
	shown := false
	for {
		select {
		case <-done:
			if shown {
				fmt.Fprint(w, "\r\033[K")
			}
			done <- struct{}{}
			return
		case <-tick.C:
			d, n := pr.Counts()
			if n == 0 {
				continue
			}
			const width = 30
			f := float64(d) / float64(n)
			bar := strings.Repeat("=", int(f*width)) + strings.Repeat(".", width-int(f*width))
			eta := "?"
			if d > 0 {
				eta = roundDuration(time.Duration(float64(time.Since(start)) * float64(n-d) / float64(d))).String()
			}
			fmt.Fprintf(w, "\r\033[K  searching [%s] %3.0f%%  %s of %s %s, about %s left", bar, 100*f, count(float64(d)), count(float64(n)), pr.Unit(), eta)
			shown = true
		}
	}
}

// prepareSearch is what every command does before a search: choose the
// method (synth.Choose, with its note when it chose for the user) and warn
// of the limits that cannot bind (warnLimitReach, whose findings it
// returns for the not-met message).
func prepareSearch(errOut io.Writer, name string, p *synth.Problem, set *synth.Settings) (synth.Method, []synth.LimitReach, error) {
	m, note, err := synth.Choose(name, p, set)
	if err != nil {
		return nil, nil, err
	}
	if note != "" {
		notef(errOut, "%s", note)
	}
	return m, warnLimitReach(errOut, p), nil
}

// warnLimitReach proves, before a search, which hard limits no candidate
// can break (a limit that cannot shape the answer is most often a typo or a
// unit slip) and warns of each; it returns every finding, for
// noSolutionMessage to name a limit that every candidate breaks.
func warnLimitReach(w io.Writer, p *synth.Problem) []synth.LimitReach {
	reach := synth.ReachLimits(p)
	for _, r := range reach {
		if !r.Never {
			continue
		}
		if r.Kind == constraints.SupplyPowerLimit {
			warnf(w, "supply_power_max %s can never be broken: no candidate in the space draws more than %s, so the limit does not shape the answer",
				units.FormatUnit(p.Spec.Template.Limits.SupplyPowerMax, units.Watt), units.FormatUnit(r.Hi, units.Watt))
			continue
		}
		tg := p.Spec.Template.Targets[r.Target]
		u := tg.Kind.Unit()
		warnf(w, "%s %s (line %d) can never be broken: every candidate in the space reads between %s and %s in every condition, so the limit does not shape the answer; check its value and unit",
			tg.Label(), describeLimit(tg), tg.Pos.Line, units.FormatUnit(r.Lo, u), units.FormatUnit(r.Hi, u))
	}
	return reach
}

// noSolutionMessage says which hard limit nothing could meet: one that
// reach proves every candidate breaks, or else the one that rejected the
// most candidates.
func noSolutionMessage(p *synth.Problem, res *synth.Result, reach []synth.LimitReach) string {
	t := p.Spec.Template
	for _, r := range reach {
		if !r.Always {
			continue
		}
		cond := p.Spec.Conditions[r.Condition].Name
		if r.Kind == constraints.SupplyPowerLimit {
			return fmt.Sprintf("no candidate can meet the hard limits: every candidate in the space draws more than supply_power_max %s in condition %q; raise that limit or the values' minimum",
				units.FormatUnit(t.Limits.SupplyPowerMax, units.Watt), cond)
		}
		tg := t.Targets[r.Target]
		u := tg.Kind.Unit()
		return fmt.Sprintf("no candidate can meet the hard limits: every candidate in the space breaks %s %s (line %d) in condition %q, where it reads between %s and %s; widen that limit, the value ranges or the series",
			tg.Label(), describeLimit(tg), tg.Pos.Line, cond, units.FormatUnit(r.Lo, u), units.FormatUnit(r.Hi, u))
	}
	scope := "no candidate meets the hard limits"
	if res.Shards > 1 {
		scope = fmt.Sprintf("no candidate in shard %d/%d meets the hard limits (the other shards may hold some; merge them)", res.Shard, res.Shards)
	}
	if !res.Status.Exhaustive() {
		scope = "no candidate found meets the hard limits (the search was not exhaustive)"
	}
	b := res.Blocking
	if b == nil {
		return scope
	}
	cond := p.Spec.Conditions[b.Condition].Name
	if b.Kind == constraints.SupplyPowerLimit {
		return fmt.Sprintf("%s; most were rejected by supply_power_max %s in condition %q", scope,
			units.FormatUnit(t.Limits.SupplyPowerMax, units.Watt), cond)
	}
	tg := t.Targets[b.Target]
	where := fmt.Sprintf("in condition %q", cond)
	if tg.Kind.Derived() {
		where = "over the temperature sweep"
	}
	lim := describeLimit(tg)
	if lim == "" {
		// A target without limits rejects only a figure that cannot be
		// computed (a ratio over a node at 0 V in that candidate).
		return fmt.Sprintf("%s; most were rejected because %s is undefined for them %s (line %d); aim the target at a quantity those candidates set, or narrow the value ranges",
			scope, tg.Label(), where, tg.Pos.Line)
	}
	return fmt.Sprintf("%s; most were rejected by %s %s %s (line %d); widen that limit, the value ranges or the series",
		scope, tg.Label(), lim, where, tg.Pos.Line)
}

// describeLimit writes a target's hard limits, e.g. "max 100 µA".
func describeLimit(tg constraints.Target) string {
	u := tg.Kind.Unit()
	var parts []string
	if tg.HasEquals && tg.Tolerance > 0 {
		if tg.TolRelative {
			parts = append(parts, fmt.Sprintf("within %s of %s", units.FormatUnit(tg.Tolerance, units.Percent), units.FormatUnit(tg.Equals, u)))
		} else {
			parts = append(parts, fmt.Sprintf("within ±%s of %s", units.FormatUnit(tg.Tolerance, u), units.FormatUnit(tg.Equals, u)))
		}
	}
	if tg.HasMin {
		parts = append(parts, "min "+units.FormatUnit(tg.Min, u))
	}
	if tg.HasMax {
		parts = append(parts, "max "+units.FormatUnit(tg.Max, u))
	}
	return strings.Join(parts, ", ")
}

// parseShard reads "K/N" with 1 <= K <= N.
func parseShard(s string) (k, n int, err error) {
	a, b, ok := strings.Cut(s, "/")
	k, err1 := strconv.Atoi(a)
	n, err2 := strconv.Atoi(b)
	if !ok || err1 != nil || err2 != nil || n < 1 || k < 1 || k > n || n > maxListed {
		return 0, 0, fmt.Errorf("want K/N with 1 <= K <= N <= 10,000 (e.g. 2/8), not %q", s)
	}
	return k, n, nil
}

// parseErrorCap reads a goal-error bound: a percentage (5%) or a fraction
// (0.05). A bare number above 1 is refused: "5" would mean 500 %, and is
// far more likely a percentage without its sign.
func parseErrorCap(s string) (float64, error) {
	q, err := units.Parse(s)
	if err != nil || !(q.Value > 0) || (q.Unit != units.Percent && q.Unit != units.NoUnit) {
		return 0, badInputf("--tradeoffs: want a goal error like 1%% or 0.01, not %q", s)
	}
	if q.Unit == units.NoUnit && q.Value > 1 {
		return 0, badInputf("--tradeoffs %s would mean %s; write %s%% for a percentage, or a fraction up to 1", s, units.FormatUnit(q.Value, units.Percent), s)
	}
	return q.Value, nil
}

// nothingSeen refuses a search that was stopped before it evaluated any
// candidate: "no candidate meets the hard limits" would then be a claim
// about candidates never seen. It returns nil for any other result.
func nothingSeen(res *synth.Result, limit time.Duration) error {
	if len(res.Solutions) > 0 || res.Stats.Evaluated > 0 {
		return nil
	}
	switch res.Status {
	case synth.TimeLimit:
		return badInputf("the time limit of %v ran out before any candidate was evaluated, so there is nothing to show; "+
			"allow more time (--time-limit 10s, say) or leave the limit out", limit)
	case synth.Interrupted:
		return badInputf("interrupted before any candidate was evaluated, so there is nothing to show")
	}
	return nil
}
