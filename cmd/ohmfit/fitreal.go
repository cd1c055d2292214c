package main

import (
	"fmt"
	"io"
	"strconv"
	"strings"

	"github.com/ohmfit/ohmfit/constraints"
	"github.com/ohmfit/ohmfit/synth"
	"github.com/ohmfit/ohmfit/synth/variation"
	"github.com/spf13/cobra"
)

// fitReal holds fit's real-parts flags: --check, --robust, --bom, --rank
// and --plot. A nil *fitReal (divider, feedback) does nothing.
type fitReal struct {
	Check   bool
	Robust  bool
	BOM     string
	BOMRank int
	Plot    string
}

// checkedAnswers is how many of fit's top answers --check analyses.
const checkedAnswers = 3

// bindFitRealFlags adds the real-parts flags to fit.
func bindFitRealFlags(cmd *cobra.Command, r *fitReal) {
	f := cmd.Flags()
	f.BoolVar(&r.Check, "check", false, fmt.Sprintf("also check the top %d answers with real parts (worst case, Monte Carlo, ratings; see ohmfit help check)", checkedAnswers))
	f.BoolVar(&r.Robust, "robust", false, fmt.Sprintf("rank by worst-case error with real tolerances: re-ranks the %d best answers by nominal error, widening the list up to %d until no answer left out could enter those shown; the summary says when that proof does not close", variation.RerankPool, variation.RerankPoolMax))
	f.StringVar(&r.BOM, "bom", "", "write the bill of materials of one answer (see --rank) to `FILE.csv`")
	countVar(f, &r.BOMRank, "rank", 1, 1, maxListed, "which answer (`N`): the one whose bill of materials --bom writes and --plot highlights")
	// --bom-rank was the flag's first name; scripts that use it still work.
	countVar(f, &r.BOMRank, "bom-rank", 1, 1, maxListed, "old name of --rank")
	_ = f.MarkHidden("bom-rank")
	f.StringVar(&r.Plot, "plot", "", "draw error against power for the answers to `FILE.svg` or FILE.png")
}

// validate checks the flags.
func (r *fitReal) validate(cmd *cobra.Command) error {
	if r.Check && changed(cmd.Flags(), "format") && cmd.Flags().Lookup("format").Value.String() == "csv" {
		// A check report is a set of tables of different shapes; one CSV
		// cannot hold them.
		return usagef(cmd.CommandPath(), "--check has no CSV form: use --format json (or table), or ohmfit check --rank N --format json on the fitted template")
	}
	if changed(cmd.Flags(), "bom-rank") {
		if changed(cmd.Flags(), "rank") {
			return usagef(cmd.CommandPath(), "--bom-rank is the old name of --rank: give one of them")
		}
		notef(cmd.ErrOrStderr(), "--bom-rank is the old name of --rank and may be removed in a later release: use --rank")
	}
	return checkOutputFlags(cmd, r.BOM, r.Plot)
}

// adjust widens the search's list where the flags need more answers.
func (r *fitReal) adjust(set *synth.Settings) {
	if r == nil {
		return
	}
	if r.Robust {
		set.Top = max(set.Top, variation.RerankPool)
	}
	set.Top = max(set.Top, r.BOMRank)
}

// render renders the search result, first re-ranked when --robust, and then
// does what the other flags ask. Without flags it is renderFit.
func (r *fitReal) render(o *searchOptions, p *synth.Problem, res *synth.Result, searched int, again func(top int) (*synth.Result, error)) error {
	if r == nil || (!r.Check && !r.Robust && r.BOM == "" && r.Plot == "") {
		return renderFit(o, p, res)
	}
	t := p.Spec.Template
	all := res.Solutions
	shown := *res
	shown.Solutions = all[:min(len(all), o.Top)]
	var robust []variation.Robust
	if r.Robust && len(all) > 0 {
		proof, widened, err := variation.RankRobust(p, res, searched, o.Top, o.Series, constraints.Ambient{}, again)
		if err != nil {
			return err
		}
		noteRobust(o.ErrOut, proof)
		res, all, robust = widened, proof.Solutions, proof.Robust
		// The summary and JSON speak of the ranking shown, not of the
		// nominal search under it.
		shown = proof.Shown(res, o.Top)
	}
	var checks []object
	var reports []*variation.Report
	if r.Check && len(shown.Solutions) > 0 {
		sols := shown.Solutions[:min(len(shown.Solutions), checkedAnswers)]
		phase("checking")
		designs, reps, err := variation.CheckAnswers(p.Spec, sols, o.Series, constraints.Ambient{}, &variation.Settings{Seed: 1})
		if err != nil {
			return templateError(t, err)
		}
		reports = reps
		for i, rep := range reps {
			checks = append(checks, checkJSON(member{"rank", sols[i].Rank}, t, designs[i], rep))
		}
	}
	if err := writeFitReal(o, p, &shown, robust, checks, reports); err != nil {
		return err
	}
	if len(all) == 0 {
		return nil
	}
	return r.writeFiles(o, p, all, res.Front)
}

// noteRobust says on stderr what --robust re-ranked and what that proves.
func noteRobust(w io.Writer, proof *variation.RobustRanking) {
	verdict := "not proven over the whole space"
	if proof.Proven {
		verdict = "proven"
	}
	what := fmt.Sprintf("the %d best answers by nominal rank", proof.Pool)
	if proof.Pool == 1 {
		what = "the one answer"
	}
	notef(w, "--robust: %s re-ranked by worst-case error (tolerances and TCR together); %s: %s", what, verdict, proof.Reason)
}

// writeFitReal writes fit's result with the robust figures (robust, nil
// without --robust) and the checks (JSON objects and reports, nil without
// --check) in the chosen format.
func writeFitReal(o *searchOptions, p *synth.Problem, shown *synth.Result, robust []variation.Robust, checks []object, reports []*variation.Report) error {
	switch o.Format {
	case "json":
		doc := fitJSON(p, shown)
		if robust != nil {
			rb := make([]object, len(shown.Solutions))
			for i, s := range shown.Solutions {
				rb[i] = object{{"rank", s.Rank}, {"worst_error", finite(robust[i].WorstError)}, {"pass", robust[i].InBand}, {"worst_case", object{{"method", robust[i].Method}}}}
			}
			doc = append(doc, member{"robust", rb})
		}
		if checks != nil {
			doc = append(doc, member{"checks", checks})
		}
		return writeJSON(o.Out, doc)
	case "csv":
		return writeFitCSV(o.Out, p, shown, robust)
	}
	if err := renderFit(o, p, shown); err != nil {
		return err
	}
	if o.Format == "table" {
		return writeRealTables(o.Out, p, shown.Solutions, robust, reports)
	}
	return nil
}

// writeFiles writes --bom and --plot for the answers all (in the order
// shown) and the trade-off front.
func (r *fitReal) writeFiles(o *searchOptions, p *synth.Problem, all, front []synth.Solution) error {
	if r.BOM != "" || r.Plot != "" {
		if r.BOMRank > len(all) {
			return rankBeyond(r.BOMRank, len(all))
		}
	}
	if r.BOM != "" {
		lines, err := variation.AnswerBOM(p.Spec, all[r.BOMRank-1].Options, o.Series, constraints.Ambient{})
		if err != nil {
			return templateError(p.Spec.Template, err)
		}
		if err := o.outs.stage(r.BOM, func(w io.Writer) error { return writeBOMLines(w, lines) }); err != nil {
			return err
		}
	}
	if r.Plot != "" {
		// The trade-off front, when asked for, shows the shape of the
		// trade better than the ranked list alone: plot both.
		pts := append([]synth.Solution(nil), all...)
		for _, f := range front {
			f.Rank = 0 // not a ranked answer: never the one ringed
			pts = append(pts, f)
		}
		if err := o.outs.stage(r.Plot, func(w io.Writer) error { return plotPareto(w, r.Plot, p, pts, r.BOMRank) }); err != nil {
			return err
		}
	}
	return nil
}

// writeRealTables writes the robust ranking's worst-case errors and the
// checks of the top answers under fit's table.
func writeRealTables(w io.Writer, p *synth.Problem, sols []synth.Solution, robust []variation.Robust, reports []*variation.Report) error {
	var b strings.Builder
	if robust != nil {
		b.WriteString("\n  ranked by worst-case error (tolerance and TCR corners):\n\n")
		tb := table{indent: "  ", cols: []column{{right: true, gap: 3}, {right: true, gap: 3}, {right: true, gap: 3}, {}}}
		tb.add("rank", "worst error", "nominal error", "limits at every corner")
		for i, s := range sols {
			tb.add(strconv.Itoa(s.Rank), errorText(robust[i].WorstError), errorText(s.Score.Error), verdictWord(robust[i].InBand))
		}
		if err := tb.write(&b); err != nil {
			return err
		}
	}
	if reports != nil {
		b.WriteString("\n  with real parts (`ohmfit help check`):\n\n")
		tb := table{indent: "  ", cols: []column{{right: true, gap: 3}, {right: true, gap: 3}, {gap: 3}, {right: true, gap: 3}, {gap: 3}, {}}}
		tb.add("rank", "worst error", "limits", "MC yield", "packages", "notes")
		for i, rep := range reports {
			lim := verdictWord(rep.LimitsMet())
			var pk []string
			for _, rg := range rep.Ratings {
				pk = append(pk, rg.Part+" "+rg.Package)
			}
			notes := counted(len(rep.Warnings), "warning", "warnings")
			if len(rep.Cautions) > 0 {
				notes += ", " + counted(len(rep.Cautions), "caution", "cautions")
			}
			tb.add(strconv.Itoa(sols[i].Rank), errorText(rep.WorstErrorDesign), lim, yieldText(rep.Yield), strings.Join(pk, ", "), notes)
		}
		if err := tb.write(&b); err != nil {
			return err
		}
		for i, rep := range reports {
			for _, c := range rep.Cautions {
				fmt.Fprintf(&b, "\nrank %d: %s\n", sols[i].Rank, c)
			}
		}
	}
	_, err := io.WriteString(w, b.String())
	return err
}

// paretoPoint is one answer on the error-power plane.
type paretoPoint struct {
	err, power float64
	parts      int
	rank       int
}

func paretoPoints(sols []synth.Solution) []paretoPoint {
	pts := make([]paretoPoint, len(sols))
	for i, s := range sols {
		pts[i] = paretoPoint{s.Score.Error, s.Score.Power, s.Parts, s.Rank}
	}
	return pts
}

// axisLabel names a plot axis of a target's values. The ticks carry SI
// units with their prefixes ("691 mV"), so the label names no unit of its
// own, which would contradict them ("(V)" over mV ticks); a unit eseries
// has no symbol for (°C, V/°C) follows the name.
func axisLabel(name string, k constraints.TargetKind) string {
	if u := k.UnitText(); u != "" {
		return name + ", " + u
	}
	return name
}
