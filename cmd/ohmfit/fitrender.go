package main

import (
	"encoding/csv"
	"fmt"
	"io"
	"math"
	"strconv"
	"strings"
	"time"

	"github.com/ohmfit/ohmfit/constraints"
	"github.com/ohmfit/ohmfit/eseries/units"
	"github.com/ohmfit/ohmfit/synth"
	"github.com/ohmfit/ohmfit/synth/variation"
)

// renderFit writes the result in the chosen format.
func renderFit(o *searchOptions, p *synth.Problem, res *synth.Result) error {
	switch o.Format {
	case "json":
		return writeJSON(o.Out, fitJSON(p, res))
	case "csv":
		return writeFitCSV(o.Out, p, res, nil)
	}
	return writeFitTable(o.Out, p, res)
}

// positionText shows a position's realisation: "4.7k", "10k + 2.2k" or
// "10k ∥ 47k".
func positionText(opt synth.Option) string {
	switch opt.Combine {
	case constraints.Series:
		return units.Format(opt.Parts[0]) + " + " + units.Format(opt.Parts[1])
	case constraints.Parallel:
		return units.Format(opt.Parts[0]) + " ∥ " + units.Format(opt.Parts[1])
	}
	return units.Format(opt.Value)
}

// goalColumn is one goal in one condition, shown as a column of the table.
type goalColumn struct {
	target, cond int
	label        string
}

// maxGoalColumns is how many goal columns the table shows; beyond that it
// shows none and says where to see them (JSON and CSV carry them all).
const maxGoalColumns = 5

// goalColumns lists the goals shown beside each answer: every goal in
// every condition it applies to (and every sweep-wide figure).
func goalColumns(p *synth.Problem) []goalColumn {
	var cols []goalColumn
	multi := len(p.Spec.Conditions) > 1
	for ti, tg := range p.Spec.Template.Targets {
		if p.Spec.Derived[ti] != nil {
			// A sweep-wide figure is one number: show it, goal or limit.
			cols = append(cols, goalColumn{ti, 0, tg.Label()})
			continue
		}
		if !tg.HasEquals {
			continue
		}
		for ci, c := range p.Spec.Conditions {
			if !p.Spec.Applies[ti][ci] { // false in the conditions added for a derivative
				continue
			}
			label := tg.Label()
			if multi {
				label += " @" + c.Name
			}
			cols = append(cols, goalColumn{ti, ci, label})
		}
	}
	return cols
}

// summaryLine describes the search in one line.
func summaryLine(p *synth.Problem, res *synth.Result) string {
	st := res.Stats
	// The verdict leads with the status token JSON "status" carries.
	verdict := "best over the whole space"
	switch res.Status {
	case synth.NoFeasible:
		verdict = "proven that nothing meets the hard limits"
	case synth.Heuristic, synth.TimeLimit, synth.Interrupted:
		verdict = "not proven"
		if res.Left > 0 {
			// What a longer run or more shards would still have to search.
			verdict += fmt.Sprintf("; %s candidates (%.2g of the space) in boxes not yet searched or ruled out", count(res.Left), res.Left/st.Space)
		}
	case synth.Partial:
		verdict = "not proven (ranked among part of the space)"
	}
	if res.Shards > 1 {
		// A shard proves its own part only; the whole needs ohmfit merge.
		switch res.Status {
		case synth.Proven:
			verdict = fmt.Sprintf("best within shard %d/%d only; merge the shards for the whole space", res.Shard, res.Shards)
		case synth.NoFeasible:
			verdict = fmt.Sprintf("proven that nothing in shard %d/%d meets the hard limits", res.Shard, res.Shards)
		}
	}
	// The same words as the JSON keys: space, method, evaluated, solves, status.
	return fmt.Sprintf("space %s (%s); method %s: evaluated %s, solves %s, in %s; %s: %s",
		count(st.Space), p.DescribeSpace(), st.Method, count(float64(st.Evaluated)), count(float64(st.Solves)),
		roundDuration(st.Elapsed), res.Status, verdict)
}

// boundLine says how far from proven a result is that is not proven, when
// the search proved something about the rest of the space: "best 0.12 %;
// nothing better than 0.10 % can exist". Empty for a proven result, for a
// search that proved nothing (bound 0), and when the ranking does not put
// error first (the best error is then not what the list leads with).
func boundLine(p *synth.Problem, res *synth.Result) string {
	if res.Status.Exhaustive() || len(res.Solutions) == 0 || !(res.Bound > 0) || math.IsInf(res.Bound, 1) {
		return ""
	}
	if r := p.Spec.Template.Rank; len(r) > 0 && r[0] != constraints.ByError {
		return ""
	}
	return fmt.Sprintf("best %s; nothing better than %s can exist", errorText(res.Solutions[0].Score.Error), errorText(res.Bound))
}

// count writes a count with thousands separators, or in exponent form when
// it is very large.
func count(n float64) string {
	if n >= 1e12 {
		return strconv.FormatFloat(n, 'g', 3, 64)
	}
	s := strconv.FormatInt(int64(n), 10)
	for i := len(s) - 3; i > 0; i -= 3 {
		s = s[:i] + "," + s[i:]
	}
	return s
}

// roundDuration keeps three significant digits of a duration.
func roundDuration(d time.Duration) time.Duration {
	for r := time.Nanosecond; r < time.Hour; r *= 10 {
		if d < 1000*r {
			return d.Round(r)
		}
	}
	return d.Round(time.Second)
}

// writeFitTable renders the ranked answers for people.
func writeFitTable(w io.Writer, p *synth.Problem, res *synth.Result) error {
	var b strings.Builder
	if p.Spec.Template.Name != "" {
		fmt.Fprintf(&b, "%s\n", p.Spec.Template.Name)
	}
	fmt.Fprintf(&b, "%s\n", summaryLine(p, res))
	if line := boundLine(p, res); line != "" {
		fmt.Fprintf(&b, "%s\n", line)
	}
	b.WriteString("\n")
	if len(res.Solutions) == 0 {
		_, err := io.WriteString(w, b.String())
		return err
	}
	goals := goalColumns(p)
	hidden := 0
	if len(goals) > maxGoalColumns {
		hidden, goals = len(goals), nil
	}
	if err := solutionTable(&b, p, res.Solutions, goals, true); err != nil {
		return err
	}
	if hidden > 0 {
		fmt.Fprintf(&b, "\n  %d goal values (goals × conditions) are too many for the table; --format csv or --format json lists them all.\n", hidden)
	}
	pareto := false
	for _, s := range res.Solutions {
		pareto = pareto || s.Pareto
	}
	if pareto {
		b.WriteString("\n  * Pareto-optimal in this list: nothing here beats it on error, power and count at once.\n")
	}
	if res.Front != nil {
		scope := "proven over the whole space"
		if !res.Status.Exhaustive() {
			scope = "among the candidates scored; not proven"
		}
		fmt.Fprintf(&b, "\n%s: every answer with goal error up to %s that nothing beats on error, power and count at once (%s)\n\n",
			capitalise(wordFront), errorText(res.FrontCap), scope)
		if err := solutionTable(&b, p, res.Front, goals, false); err != nil {
			return err
		}
	}
	_, err := io.WriteString(w, b.String())
	return err
}

// solutionTable writes one row per answer: rank (with * when marked is set
// and the answer is Pareto-optimal), each position, error, power, parts and
// the goal values reached.
func solutionTable(b *strings.Builder, p *synth.Problem, sols []synth.Solution, goals []goalColumn, marked bool) error {
	tb := table{indent: "  ", cols: []column{{right: true, gap: 2}}}
	head := []string{"rank"}
	if !marked {
		head[0] = "#"
	}
	for _, d := range p.Domains {
		head = append(head, d.Name)
		tb.cols = append(tb.cols, column{gap: 3})
	}
	head = append(head, "error", "power", wordCount)
	tb.cols = append(tb.cols, column{right: true, gap: 3}, column{right: true, gap: 3}, column{right: true, gap: 3})
	for _, g := range goals {
		head = append(head, g.label)
		tb.cols = append(tb.cols, column{right: true, gap: 3})
	}
	tb.cols[len(tb.cols)-1].gap = 0
	tb.add(head...)
	for _, s := range sols {
		rank := strconv.Itoa(s.Rank)
		if marked {
			if s.Pareto {
				rank += "*"
			} else {
				rank += " "
			}
		}
		row := []string{rank}
		for _, o := range s.Options {
			row = append(row, positionText(o))
		}
		row = append(row, errorText(s.Score.Error), units.FormatUnit(s.Score.Power, units.Watt), strconv.Itoa(s.Parts))
		for _, g := range goals {
			v := s.Score.Value(g.target, g.cond)
			if math.Abs(v) < constraints.TieAbsolute {
				v = 0 // rounding residue of an exact hit, e.g. a balanced bridge
			}
			row = append(row, p.Spec.Template.Targets[g.target].Kind.Format(v))
		}
		tb.add(row...)
	}
	return tb.write(b)
}

// errorText shows a goal error in the one format every error column uses:
// a percentage with three significant digits and no exponent ("1.31%",
// "0.00399%"), and an exact hit (within the contract's 1e-12 tie
// tolerance) as "0%".
func errorText(e float64) string {
	if e <= constraints.TieRelative {
		return "0%"
	}
	return strings.TrimPrefix(percent(e), "+")
}

// fitJSON builds the contract's JSON document for a search.
func fitJSON(p *synth.Problem, res *synth.Result) object {
	doc := object{
		{"name", p.Spec.Template.Name},
		// A shard proves its own part only: the whole is exhaustive once
		// ohmfit merge has every shard. Its status says how the shard ended.
		{"exhaustive", res.Status.Exhaustive() && res.Shards <= 1},
		{"status", res.Status.String()},
		{"method", res.Stats.Method},
		{"space", res.Stats.Space},
		{"evaluated", res.Stats.Evaluated},
		{"solves", res.Stats.Solves},
	}
	if !math.IsInf(res.Bound, 1) {
		doc = append(doc, member{"bound", res.Bound})
	}
	if res.Shards > 0 {
		// What merge needs to rank the shards' answers as one run would.
		var keys []string
		for _, k := range p.Spec.Template.Rank {
			keys = append(keys, k.String())
		}
		doc = append(doc, member{"shard", fmt.Sprintf("%d/%d", res.Shard, res.Shards)}, member{"rank", keys}, member{"top", res.Top})
	}
	doc = append(doc, member{"solutions", solutionsJSON(p, res.Solutions)})
	if res.Front != nil {
		doc = append(doc, member{"tradeoffs", object{{"error_max", res.FrontCap}, {"solutions", solutionsJSON(p, res.Front)}}})
	}
	return doc
}

// solutionsJSON writes answers with the contract's keys.
func solutionsJSON(p *synth.Problem, list []synth.Solution) []object {
	sols := make([]object, len(list))
	for i, s := range list {
		values, parts, comb := make(object, 0), make(object, 0), make(object, 0)
		for k, d := range p.Domains {
			o := s.Options[k]
			values = append(values, member{d.Name, o.Value})
			parts = append(parts, member{d.Name, o.PartValues()})
			comb = append(comb, member{d.Name, o.Combine.String()})
		}
		targets := []object{}
		for ti, tg := range p.Spec.Template.Targets {
			for ci, c := range p.Spec.Conditions {
				derived := p.Spec.Derived[ti] != nil
				if derived && ci > 0 {
					break
				}
				if (!derived && !p.Spec.Applies[ti][ci]) || !p.Spec.Visible(ci) {
					continue
				}
				name := c.Name
				if derived {
					name = "sweep" // one figure over the temperature conditions
				}
				v := s.Score.Value(ti, ci)
				m := object{{"target", tg.Label()}, {"kind", targetKind(tg.HasEquals)}, {"condition", name}, {"value", v}}
				if tg.HasEquals {
					m = append(m, member{"goal", tg.Equals}, member{"error", tg.GoalError(v)})
				}
				lo, hi := tg.Band()
				if !math.IsInf(lo, -1) {
					m = append(m, member{"min", lo})
				}
				if !math.IsInf(hi, 1) {
					m = append(m, member{"max", hi})
				}
				targets = append(targets, m)
			}
		}
		sols[i] = object{
			{"rank", s.Rank}, {"values", values}, {"parts", parts}, {"combine", comb},
			{"error", s.Score.Error}, {"power", s.Score.Power}, {"part_count", s.Parts},
			{"pareto", s.Pareto}, {"targets", targets},
		}
	}
	return sols
}

// writeFitCSV writes one row per answer: rank, each position's effective
// value, realisation and parts, then error, power, part count, the Pareto
// mark and every goal value the table would show (all of them, however
// many). With --robust (robust not nil) the worst-case error and pass/fail
// follow; with --tradeoffs the front's answers follow the ranked ones, told
// apart by the last column, list ("top" or "front"). Numbers are plain, in
// SI base units (ohms, volts, amps, watts; errors as fractions), with the
// same keys as the JSON output where there is one.
func writeFitCSV(w io.Writer, p *synth.Problem, res *synth.Result, robust []variation.Robust) error {
	cw := csv.NewWriter(w)
	goals := goalColumns(p)
	head := []string{"rank"}
	for _, d := range p.Domains {
		head = append(head, d.Name, d.Name+"_combine", d.Name+"_parts")
	}
	head = append(head, "error", "power", "part_count", "pareto")
	for _, g := range goals {
		head = append(head, csvName(g.label))
	}
	if robust != nil {
		head = append(head, "worst_error", "pass")
	}
	if res.Front != nil {
		head = append(head, "list")
	}
	if err := cw.Write(head); err != nil {
		return err
	}
	write := func(sols []synth.Solution, list string, robust []variation.Robust, blank bool) error {
		for i, s := range sols {
			row := []string{strconv.Itoa(s.Rank)}
			for _, o := range s.Options {
				var ps []string
				for _, v := range o.PartValues() {
					ps = append(ps, csvNumber(v))
				}
				row = append(row, csvNumber(o.Value), o.Combine.String(), strings.Join(ps, " "))
			}
			row = append(row, csvNumber(s.Score.Error), csvNumber(s.Score.Power), strconv.Itoa(s.Parts), strconv.FormatBool(s.Pareto))
			for _, g := range goals {
				row = append(row, csvNumber(s.Score.Value(g.target, g.cond)))
			}
			switch {
			case robust != nil:
				row = append(row, csvNumber(robust[i].WorstError), strconv.FormatBool(robust[i].InBand))
			case blank:
				row = append(row, "", "") // the front's worst cases are not computed
			}
			if list != "" {
				row = append(row, list)
			}
			if err := cw.Write(row); err != nil {
				return err
			}
		}
		return nil
	}
	list := ""
	if res.Front != nil {
		list = "top"
	}
	if err := write(res.Solutions, list, robust, false); err != nil {
		return err
	}
	if res.Front != nil {
		if err := write(res.Front, "front", nil, robust != nil); err != nil {
			return err
		}
	}
	cw.Flush()
	return cw.Error()
}

// csvNumber writes a number for a script: the shortest form that reads back
// exactly, in SI base units.
func csvNumber(v float64) string { return strconv.FormatFloat(v, 'g', -1, 64) }

// csvName turns a table heading into a CSV header without spaces:
// "voltage fb @cold" becomes "voltage_fb@cold".
func csvName(label string) string {
	return strings.ReplaceAll(strings.ReplaceAll(label, " @", "@"), " ", "_")
}

// capitalise upper-cases the first letter of a heading word.
func capitalise(s string) string {
	if s == "" {
		return s
	}
	return strings.ToUpper(s[:1]) + s[1:]
}
