package main

import (
	"encoding/csv"
	"errors"
	"fmt"
	"io"
	"slices"
	"strconv"
	"strings"
	"time"

	"github.com/ohmfit/ohmfit/constraints"
	"github.com/ohmfit/ohmfit/eseries/units"
	"github.com/ohmfit/ohmfit/synth/board"
	"github.com/ohmfit/ohmfit/synth/variation"
	"github.com/spf13/cobra"
)

// boardOptions are the inputs of `ohmfit board`.
type boardOptions struct {
	File   string
	Format string // table, json or csv
	BOM    string // --bom FILE.csv; "" for none
	// TimeLimit stops the run after this long (0: none), as fit's does.
	TimeLimit time.Duration

	Out, ErrOut io.Writer
}

// newBoardCmd builds `ohmfit board`.
func newBoardCmd(out, errOut io.Writer) *cobra.Command {
	o := &boardOptions{Out: out, ErrOut: errOut}
	cmd := &cobra.Command{
		Use:   "board FILE [options]",
		Short: "Choose every network of a board at once, with the fewest distinct values",
		Long: `Choose the values of every network on a board together: each network meets
its own template's hard limits and keeps its goal error within its cap, and
the board as a whole uses as few distinct resistor values as possible. Ties
go to the smallest largest error relative to its cap, then to the lowest
total power.

FILE is a board file, or example:NAME for a built-in board:
  ohmfit: 1
  board: Irrigation controller
  networks:
    - {template: rail-3v3.yaml, prefix: U3, error_max: 0.5%}
    - {template: example:divider, prefix: U9, error_max: 1%}
A template path is relative to the board file; example:NAME is a built-in
example. A network without error_max takes the largest tolerance among its
template's goals as its cap.

Every design of each network within its cap is listed by the exhaustive
search (up to 2,000 per network, the closest first; a network with more is
named, and the result is then not proven). The selection is then searched
exactly: "proven" means no selection with fewer distinct values exists.

"distinct" counts the distinct resistor values on the board: those of the
chosen parts (each physical part of a position made of two) and those of
the templates' fixed resistors, which are on the board whatever is chosen
(so a design that reuses one adds nothing). Sensors and stand-ins are not
resistor values and are not counted; a value ordered as two different
items (another tolerance, series, TCR, package or rating) is one value (and
two BOM lines). "alone" counts them when every
network takes its own best answer within its cap (rank 1 by its
template's rank keys). The BOM lists every resistor of every network,
the templates' fixed ones too, designators prefixed (U3-R1), one line per
item to order, with the columns of check --bom.

--time-limit stops the run after that long, as for fit: the best
selection found so far is shown, marked not proven, with the count of
values proven needed (JSON "status": "time-limit" and "bound"). A limit
that ends while the designs are still being listed leaves nothing to show
(exit 2).

Exit status: 0 chosen; 1 a network has no design within its cap (the
message names it and the error it can reach); 2 bad usage or bad input.

JSON output (--format json):
  {"board": "...", "status": "proven", "proven": true, "ties_proven": true,
   "distinct": 7, "alone": 11, "bound": 7, "values": [...], "fixed": [47000],
   "selection_nodes": 6309,
   "networks": [{"template": "rail-3v3.yaml", "prefix": "U3",
     "values": {"R1": 30100, "R2": 9530}, "error": 0.0012,
     "designs": 148, "kept": 148, ...}],
   "bom": [{"value": 30100, "designators": ["U3-R1"], "quantity": 1, ...}]}

A network's "kept" is how many of its designs the selection weighed: each
other one is beaten by a design of the same network whose values are
among its own and that is no worse on error and power. "selection_nodes"
counts the nodes the exact selection search visited. Like fit's, the
document holds no timings, so the same board gives the same document
unless --time-limit stops the selection (where it stops then varies).`,
		Example: `  # the built-in motor-controller board
  ohmfit board example:controller

  # the same as JSON, and its bill of materials as CSV
  ohmfit board example:controller --format json --bom controller-bom.csv`,
		Args: argsExactly(1, "one argument, the board file"),
		RunE: func(cmd *cobra.Command, args []string) error {
			o.File = args[0]
			if err := checkFormat(cmd, o.Format, "table", "json", "csv"); err != nil {
				return err
			}
			if err := checkOutputFlags(cmd, o.BOM, ""); err != nil {
				return err
			}
			return runBoard(o)
		},
	}
	f := cmd.Flags()
	f.StringVar(&o.Format, "format", "table", "`FORMAT` of the output: table, json or csv")
	f.StringVar(&o.BOM, "bom", "", "also write the board's bill of materials to `FILE.csv`")
	timeLimitVar(f, &o.TimeLimit)
	return cmd
}

// runBoard loads the board, solves it and renders the answer.
func runBoard(o *boardOptions) error {
	if o.File == "-" {
		// Its templates are named relative to the board file's folder.
		return badInputf("a board file cannot come from standard input: the templates it names are found beside it; give its path")
	}
	b, err := board.Load(o.File)
	if err != nil {
		return err
	}
	outs, err := newOutputs(boardInputs(b), &o.Out, "", o.BOM)
	if err != nil {
		return err
	}
	return outs.finish(solveBoard(o, outs, b))
}

// boardInputs lists the files a board run reads: the board file and every
// template and stock file it names.
func boardInputs(b *board.Board) []string {
	files := []string{}
	if !strings.HasPrefix(b.Spec.File, examplePrefix) {
		files = append(files, b.Spec.File)
	}
	for _, n := range b.Networks {
		files = append(files, inputFiles(n.Template)...)
	}
	return files
}

// solveBoard solves a loaded board, renders it and stages the BOM.
func solveBoard(o *boardOptions, outs *outputs, b *board.Board) error {
	ctx, searched, release := searchInterrupt()
	defer release()
	res, err := board.Solve(ctx, b, &board.Settings{TimeLimit: o.TimeLimit})
	searched()
	var inf *board.InfeasibleError
	switch {
	case errors.As(err, &inf):
		return &exitError{code: ExitNoSolution, err: errors.New(inf.Message())}
	case errors.Is(err, board.ErrInterrupted):
		return badInputf("interrupted while listing the networks' designs, so there is nothing to show")
	case errors.Is(err, board.ErrTimeLimit):
		return badInputf("the time limit of %v ran out while listing the networks' designs, so there is nothing to show; "+
			"allow more time (--time-limit 10s, say) or leave the limit out", o.TimeLimit)
	case err != nil:
		return badInputf("%s", constraints.Message(err))
	}
	if note := stopNote(res, o.TimeLimit); note != "" {
		notef(o.ErrOut, "%s", note)
	}
	for _, nr := range res.Networks {
		if nr.Cut {
			warnf(o.ErrOut, "%s has more than %d designs within its cap; the %d closest were kept, and its own best answer, so the board's minimum is not proven",
				nr.Network.Name(), board.DefaultMaxDesigns, board.DefaultMaxDesigns)
		}
	}
	chk, err := res.Check()
	if err != nil {
		return badInputf("%s", constraints.Message(err))
	}
	for i, rep := range chk.Reports {
		for _, c := range rep.Cautions {
			cautionLine(o.ErrOut, "network "+res.Networks[i].Network.Spec.Prefix+": "+strings.TrimPrefix(c, "CAUTION: "))
		}
	}
	switch o.Format {
	case "json":
		err = writeJSON(o.Out, boardJSON(res, chk))
	case "csv":
		err = writeBoardCSV(o.Out, res)
	default:
		err = writeBoardTable(o.Out, res, chk)
	}
	if err != nil {
		return err
	}
	if o.BOM != "" {
		return outs.stage(o.BOM, func(w io.Writer) error { return writeBOMLines(w, chk.BOM) })
	}
	return nil
}

// stopNote says what an early stop of the selection leaves unproven: the
// count, or only the tie-break when the count was proven first.
func stopNote(res *board.Result, limit time.Duration) string {
	var why string
	switch res.Stop {
	case board.StopInterrupted:
		why = "interrupted"
	case board.StopTime:
		why = fmt.Sprintf("time limit of %v reached", limit)
	default:
		return ""
	}
	if res.Proven {
		return why + " in the tie-break; the count is proven, the tie-break among selections of that size is not"
	}
	return why + "; showing the best selection found so far (not proven)"
}

// boardVerdict says in words how far the board's count is proven.
func boardVerdict(res *board.Result) string {
	if res.Proven {
		s := "proven: no selection uses fewer values"
		if !res.TiesProven {
			s += " (the tie-break among selections of that size is not proven)"
		}
		return s
	}
	why := "node budget"
	switch res.Stop {
	case board.StopInterrupted:
		why = "interrupted"
	case board.StopTime:
		why = "time limit"
	}
	for _, nr := range res.Networks {
		if nr.Cut {
			why = "a network's list of designs was cut"
			break
		}
	}
	return fmt.Sprintf("not proven (%s): at least %s needed", why, counted(res.Bound, "value is", "values are"))
}

// choiceText shows a network's chosen design: "R1 78.7k, R2 15k".
func choiceText(nr *board.NetworkResult) string {
	var f []string
	for k, d := range nr.Network.Problem.Domains {
		f = append(f, d.Name+" "+positionText(nr.Choice().Options[k]))
	}
	return strings.Join(f, ", ")
}

// writeBoardTable writes the board's answer for a reader.
func writeBoardTable(w io.Writer, res *board.Result, chk *board.Checked) error {
	var b strings.Builder
	name := res.Board.Spec.Name
	if name == "" {
		name = res.Board.Spec.File
	}
	fmt.Fprintf(&b, "%s\n", name)
	fixedNote := ""
	if len(res.Fixed) > 0 {
		fixedNote = ", " + counted(len(res.Fixed), "of them in a fixed part", "of them in fixed parts")
	}
	fmt.Fprintf(&b, "%s; %s on the board%s (alone %d, saving %d); %s\n\n",
		counted(len(res.Networks), "network", "networks"), counted(res.Distinct, "distinct resistor value", "distinct resistor values"),
		fixedNote, res.Alone, res.Alone-res.Distinct, boardVerdict(res))
	tb := table{indent: "  ", cols: []column{{gap: 2}, {gap: 3}, {gap: 3}, {right: true, gap: 3}, {right: true, gap: 3}, {right: true}}}
	tb.add("network", "template", "choice", "error", "cap", "designs")
	for i := range res.Networks {
		nr := &res.Networks[i]
		n := nr.Network
		capText := errorText(n.Cap)
		if n.CapFromTolerance {
			capText += " (tol)"
		}
		tb.add(n.Spec.Prefix, n.Spec.Template, choiceText(nr), errorText(nr.Choice().Score.Error), capText, strconv.Itoa(len(nr.Designs)))
	}
	if err := tb.write(&b); err != nil {
		return err
	}
	vals := make([]string, len(res.Values))
	for i, v := range res.Values {
		vals[i] = units.Format(v)
		if slices.Contains(res.Fixed, v) {
			vals[i] += " (fixed)"
		}
	}
	fmt.Fprintf(&b, "\n  values: %s\n", strings.Join(vals, ", "))
	fmt.Fprintf(&b, "  largest error relative to its cap %.0f%%; total power %s\n\n", 100*res.RelMax, units.FormatUnit(res.Power, units.Watt))
	bt := table{indent: "  ", cols: []column{{gap: 3}, {right: true, gap: 3}, {right: true, gap: 3}, {gap: 3}, {right: true}}}
	bt.add("designators", "value", "tolerance", "package", "quantity")
	for _, l := range chk.BOM {
		value := units.FormatUnit(l.Value, units.Ohm)
		if l.Type != variation.TypeResistor {
			value = l.Type + " " + value
		}
		bt.add(strings.Join(l.Designators, ", "), value, bomTolerance(l), l.Package, strconv.Itoa(l.Quantity()))
	}
	if err := bt.write(&b); err != nil {
		return err
	}
	if note := bomNote(res, chk); note != "" {
		fmt.Fprintf(&b, "\n  %s\n", note)
	}
	_, err := io.WriteString(w, b.String())
	return err
}

// counted writes n with its noun, singular for one (variation.Plural
// chooses): "1 network", "2 networks".
func counted(n int, one, many string) string {
	return strconv.Itoa(n) + " " + variation.Plural(n, one, many)
}

// rankBeyond is the one message for a --rank past the fit's answers
// (check --rank, fit --bom/--plot --rank).
func rankBeyond(rank, answers int) error {
	return badInputf("--rank %d: the fit has only %s", rank, counted(answers, "answer", "answers"))
}

// bomNote explains why the BOM has more lines than the board has distinct
// resistor values, when it does: sensors and stand-ins are on it but are
// not resistor values, and a value ordered as two different items
// (tolerance, series, TCR, package, rating) is two lines.
func bomNote(res *board.Result, chk *board.Checked) string {
	if len(chk.BOM) == res.Distinct {
		return ""
	}
	sensors, standIns, lines := 0, 0, map[string]int{}
	for _, l := range chk.BOM {
		if l.Type == variation.TypeStandIn {
			standIns++
			continue
		}
		if l.Type != variation.TypeResistor {
			sensors++
			continue
		}
		lines[board.ValueKey(l.Value)]++
	}
	var why []string
	var others []string
	if sensors > 0 {
		others = append(others, variation.Plural(sensors, "sensor", "sensors"))
	}
	if standIns > 0 {
		others = append(others, variation.Plural(standIns, "stand-in", "stand-ins"))
	}
	if len(others) > 0 {
		verb := variation.Plural(sensors+standIns, "is", "are")
		why = append(why, fmt.Sprintf("the templates' %s %s on it too, not counted", strings.Join(others, " and "), verb))
	}
	for _, n := range lines {
		if n > 1 {
			why = append(why, "a value ordered as two different items (tolerance, series, TCR, package or rating) is one value and two lines")
			break
		}
	}
	if len(why) == 0 {
		return ""
	}
	return fmt.Sprintf("%s for %s: %s.", counted(len(chk.BOM), "BOM line", "BOM lines"),
		counted(res.Distinct, "distinct resistor value", "distinct resistor values"), strings.Join(why, "; "))
}

// boardJSON builds the board's JSON document (keys as the contract fixes
// them, with a few more).
func boardJSON(res *board.Result, chk *board.Checked) object {
	nets := make([]object, len(res.Networks))
	for i := range res.Networks {
		nr := &res.Networks[i]
		n := nr.Network
		c := nr.Choice()
		values, parts, combine := object{}, object{}, object{}
		for k, d := range n.Problem.Domains {
			values = append(values, member{d.Name, c.Options[k].Value})
			parts = append(parts, member{d.Name, c.Options[k].PartValues()})
			combine = append(combine, member{d.Name, c.Options[k].Combine.String()})
		}
		nets[i] = object{{"template", n.Spec.Template}, {"prefix", n.Spec.Prefix}, {"values", values},
			{"parts", parts}, {"combine", combine}, {"error", c.Score.Error}, {"error_max", n.Cap},
			{"power", c.Score.Power}, {"designs", len(nr.Designs)}, {"kept", nr.Kept}, {"cut", nr.Cut}}
	}
	bom := make([]object, len(chk.BOM))
	for i, l := range chk.BOM {
		bom[i] = object{{"value", l.Value}, {"designators", l.Designators}, {"quantity", l.Quantity()},
			{"type", l.Type}, {"tolerance", l.Tolerance}, {"package", l.Package}}
	}
	return object{{"board", res.Board.Spec.Name}, {"status", res.Status().String()}, {"proven", res.Proven},
		{"ties_proven", res.TiesProven}, {"distinct", res.Distinct}, {"alone", res.Alone}, {"bound", res.Bound},
		{"values", res.Values}, {"fixed", nonNil(res.Fixed)}, {"selection_nodes", res.Nodes},
		{"networks", nets}, {"bom", bom}}
}

// writeBoardCSV writes one row per chosen position of every network.
func writeBoardCSV(w io.Writer, res *board.Result) error {
	cw := csv.NewWriter(w)
	if err := cw.Write([]string{"prefix", "template", "position", "value", "combine", "parts", "error", "error_max"}); err != nil {
		return err
	}
	for i := range res.Networks {
		nr := &res.Networks[i]
		n := nr.Network
		for k, d := range n.Problem.Domains {
			o := nr.Choice().Options[k]
			var ps []string
			for _, v := range o.PartValues() {
				ps = append(ps, units.Format(v))
			}
			row := []string{n.Spec.Prefix, n.Spec.Template, d.Name, strconv.FormatFloat(o.Value, 'g', -1, 64), o.Combine.String(),
				strings.Join(ps, " "), strconv.FormatFloat(nr.Choice().Score.Error, 'g', -1, 64), strconv.FormatFloat(n.Cap, 'g', -1, 64)}
			if err := cw.Write(row); err != nil {
				return err
			}
		}
	}
	cw.Flush()
	return cw.Error()
}
