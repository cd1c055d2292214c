package board

import (
	"context"
	"errors"
	"fmt"
	"slices"
	"strconv"
	"strings"
	"time"

	"github.com/ohmfit/ohmfit/constraints"
	"github.com/ohmfit/ohmfit/synth"
	"github.com/ohmfit/ohmfit/synth/variation"
)

// Settings tune Solve. The zero value (or nil) means the defaults.
type Settings struct {
	// Workers is the number of goroutines of each network's search. Zero
	// means one per core. The result does not depend on it.
	Workers int
	// MaxDesigns bounds the designs listed per network. A network with more
	// within its cap keeps its MaxDesigns best by error (then power) and is
	// marked Cut; the selection is then not proven. Zero means
	// DefaultMaxDesigns.
	MaxDesigns int
	// MaxNodes bounds the nodes of the exact selection search (all stages).
	// Beyond it the best selection found so far is kept, with the proven
	// lower bound. Zero means DefaultMaxNodes.
	MaxNodes int64
	// TimeLimit, counted from the start of Solve, stops the selection
	// search as MaxNodes does. Zero means no limit.
	TimeLimit time.Duration
}

// Defaults of Settings.
const (
	DefaultMaxDesigns = 2000
	DefaultMaxNodes   = 200_000
)

// Design is one design of a network within its cap.
type Design struct {
	synth.Solution
	// Rel is the goal error relative to the network's cap (1 is on the cap).
	Rel float64
}

// PartValues returns the physical values a design uses, one per physical
// part, in position order (a position of two parts gives two).
func (d *Design) PartValues() []float64 {
	var out []float64
	for _, o := range d.Options {
		out = append(out, o.PartValues()...)
	}
	return out
}

// NetworkResult is one network's part of a board's answer.
type NetworkResult struct {
	Network *Network
	// Designs lists every design within the cap that meets the hard limits,
	// by error, then power (when Cut, the first MaxDesigns, and the
	// network's own best answer after them when it is not among them).
	Designs []Design
	Cut     bool
	// Kept is how many designs the selection considered after dropping
	// those another design beats (fewer or the same values, no worse on
	// error and power).
	Kept int
	// Chosen is the index into Designs of the design the board uses.
	Chosen int
	// Alone is the network's own best answer within its cap: rank 1 by its
	// template's rank keys among the designs within the cap. It is always
	// among Designs, so the board never needs more values than the
	// networks alone.
	Alone synth.Solution
	// Fixed are the values of the template's fixed resistors, ascending:
	// on the board whatever is chosen, so they count, and a design that
	// reuses one adds nothing.
	Fixed []float64
}

// Choice returns the chosen design.
func (n *NetworkResult) Choice() *Design { return &n.Designs[n.Chosen] }

// Result is a board's answer.
type Result struct {
	Board    *Board
	Networks []NetworkResult
	// Values are the distinct resistor values on the board, ascending:
	// those the chosen designs use and those of the templates' fixed
	// resistors (Fixed, ascending); Distinct is their number. Sensors and
	// stand-ins are not resistor values and are not counted.
	Values   []float64
	Fixed    []float64
	Distinct int
	// Alone is the number of distinct values when every network takes its
	// own best answer (fixed resistors counted too).
	Alone int
	// Proven is true only when no selection with fewer distinct values
	// exists: the search finished and no network's list was cut.
	Proven bool
	// Bound is a proven lower bound on the distinct values of any
	// selection; Distinct when Proven. With a cut list only the bound that
	// holds without the lists is given (the most positions of any network
	// need at least one value each: 1 when any position is free).
	Bound int
	// TiesProven is true when, among the selections with Distinct values
	// over the lists, none has a smaller largest relative error, or the same
	// and less total power.
	TiesProven bool
	// RelMax is the largest error relative to its cap; Power the total
	// power of the chosen designs.
	RelMax, Power float64
	// Stop says why the exact selection search did not finish (StopNone
	// when it did, or when the greedy choice was already at the bound).
	Stop    Stop
	Nodes   int64
	Elapsed time.Duration
}

// Stop is why the exact selection search stopped early.
type Stop int

// Reasons for Result.Stop.
const (
	StopNone        Stop = iota // the search finished
	StopNodes                   // Settings.MaxNodes ran out
	StopTime                    // Settings.TimeLimit ran out
	StopInterrupted             // the context was cancelled
)

// Unmet is a network with no design within its cap.
type Unmet struct {
	Network *Network
	// Best is the smallest goal error of any design meeting the hard
	// limits; HasBest is false when none meets them at all.
	Best    float64
	HasBest bool
}

// InfeasibleError says which networks have no design within their caps.
type InfeasibleError struct{ Networks []Unmet }

func (e *InfeasibleError) Error() string { return "board: " + e.Message() }

// Message returns the text for a person, without the package's name.
func (e *InfeasibleError) Message() string {
	var parts []string
	for _, u := range e.Networks {
		n := u.Network
		if u.HasBest {
			parts = append(parts, fmt.Sprintf("%s has no design within its cap of %s; the best it can reach is %s",
				n.Name(), capText(n.Cap), capText(u.Best)))
		} else {
			parts = append(parts, fmt.Sprintf("%s has no design that meets its template's hard limits", n.Name()))
		}
	}
	return strings.Join(parts, "; ")
}

// ErrBudget is wrapped by the error for a network whose space is too large
// to list exhaustively.
var ErrBudget = errors.New("board: a network's space is too large to list every design")

// Solve lists every network's designs and chooses one per network with the
// fewest distinct values. A network that cannot be met gives an
// *InfeasibleError naming every such network. Settings.TimeLimit counts
// from the start: when it ends during the selection the best selection so
// far is returned, not proven, with its bound; when it ends while the
// designs are still being listed there is no selection yet, and the error
// wraps ErrTimeLimit.
func Solve(ctx context.Context, b *Board, s *Settings) (*Result, error) {
	set := withDefaults(s)
	start := time.Now()
	tctx := ctx
	if set.TimeLimit > 0 {
		var cancel context.CancelFunc
		tctx, cancel = context.WithTimeout(ctx, set.TimeLimit)
		defer cancel()
	}
	res := &Result{Board: b}
	var err error
	if res.Networks, err = listAll(ctx, tctx, b, &set); err != nil {
		return nil, err
	}
	nets, table, fixed, alone := selectionItems(res.Networks)
	nets = prune(nets)
	for r := range nets {
		res.Networks[r].Kept = len(nets[r])
	}
	// The selection counts the values beyond the fixed ones (ids from 0).
	sel := choose(tctx, nets, len(table)-fixed, set.MaxNodes, alone)
	switch {
	case !sel.out:
	case ctx.Err() != nil:
		res.Stop = StopInterrupted
	case tctx.Err() != nil:
		res.Stop = StopTime
	default:
		res.Stop = StopNodes
	}
	res.record(sel, nets, table, fixed)
	res.Elapsed = time.Since(start)
	return res, nil
}

// withDefaults returns the settings with every zero replaced by its default.
func withDefaults(s *Settings) Settings {
	var set Settings
	if s != nil {
		set = *s
	}
	if set.MaxDesigns <= 0 {
		set.MaxDesigns = DefaultMaxDesigns
	}
	if set.MaxNodes <= 0 {
		set.MaxNodes = DefaultMaxNodes
	}
	return set
}

// listAll lists every network's designs under tctx (the time limit's
// context, below ctx). Networks that cannot be met are all named in one
// *InfeasibleError.
func listAll(ctx, tctx context.Context, b *Board, set *Settings) ([]NetworkResult, error) {
	out := make([]NetworkResult, len(b.Networks))
	var unmet []Unmet
	for i, n := range b.Networks {
		nr, u, err := enumerate(tctx, n, set)
		if errors.Is(err, ErrInterrupted) && ctx.Err() == nil {
			return nil, errorf(ErrTimeLimit, "the time limit ran out while listing the networks' designs (at %s)", n.Name())
		}
		if err != nil {
			return nil, err
		}
		if u != nil {
			unmet = append(unmet, *u)
			continue
		}
		out[i] = *nr
	}
	if unmet != nil {
		return nil, &InfeasibleError{Networks: unmet}
	}
	return out, nil
}

// selectionItems gives each network's designs as the selection sees them,
// over the board's value table: every physical value any design uses. The
// fixed resistors' values are on the board anyway, so they are left out
// of every design's set (a design that reuses one adds nothing); they
// take the first ids of the table, and fixed says how many. alone is the
// value set of the networks' own answers, in the same ids: a selection
// that always exists.
func selectionItems(nrs []NetworkResult) (nets [][]item, table []float64, fixed int, alone []int32) {
	index := map[string]int32{}
	id := func(v float64) int32 {
		k := ValueKey(v)
		if i, ok := index[k]; ok {
			return i
		}
		index[k] = int32(len(table))
		table = append(table, v)
		return int32(len(table) - 1)
	}
	for r := range nrs {
		for _, v := range nrs[r].Fixed {
			id(v)
		}
	}
	fixed = len(table)
	// selIDs gives the selection's ids of values, sorted, once each: the
	// fixed ones left out.
	selIDs := func(vs []float64) []int32 {
		var out []int32
		for _, v := range vs {
			if k := id(v); int(k) >= fixed {
				out = append(out, k-int32(fixed))
			}
		}
		slices.Sort(out)
		return slices.Compact(out)
	}
	nets = make([][]item, len(nrs))
	for r := range nrs {
		for i := range nrs[r].Designs {
			d := &nrs[r].Designs[i]
			nets[r] = append(nets[r], item{vals: selIDs(d.PartValues()), rel: d.Rel, pow: d.Score.Power, idx: i})
		}
		for _, o := range nrs[r].Alone.Options {
			alone = append(alone, selIDs(o.PartValues())...)
		}
	}
	slices.Sort(alone)
	return nets, table, fixed, slices.Compact(alone)
}

// record writes the selection into the result: each network's choice, the
// values, the proof and the bound, and the count of the networks alone.
func (res *Result) record(sel selection, nets [][]item, table []float64, fixed int) {
	cut := false
	for r, c := range sel.choice {
		res.Networks[r].Chosen = nets[r][c].idx
		cut = cut || res.Networks[r].Cut
	}
	res.Fixed = slices.Sorted(slices.Values(table[:fixed]))
	res.Values = append(res.Values, table[:fixed]...)
	for _, v := range union(nets, sel.choice) {
		res.Values = append(res.Values, table[fixed+int(v)])
	}
	slices.Sort(res.Values)
	res.Distinct = len(res.Values)
	res.Proven = sel.proven && !cut
	res.Bound = fixed + sel.bound
	res.TiesProven = sel.tiesProven && !cut
	if cut {
		// Without the full lists only this holds: the fixed values, and one
		// more where a free position exists and none is fixed.
		res.Bound = fixed
		for _, n := range res.Board.Networks {
			if len(n.Problem.Domains) > 0 {
				res.Bound = max(res.Bound, 1)
			}
		}
	}
	res.RelMax, res.Power = sel.obj.rel, sel.obj.pow
	res.Nodes = sel.nodes
	alone := map[string]bool{}
	for _, v := range res.Fixed {
		alone[ValueKey(v)] = true
	}
	for _, nr := range res.Networks {
		for _, o := range nr.Alone.Options {
			for _, v := range o.PartValues() {
				alone[ValueKey(v)] = true
			}
		}
	}
	res.Alone = len(alone)
}

// Status is the board's status in the words of every search (the glossary
// of constraints/README.md): proven when no selection with fewer distinct
// values exists; time-limit or interrupted when the limit or Ctrl-C
// stopped the selection; heuristic when the node budget ran out or a
// network's list was cut.
func (res *Result) Status() synth.Status {
	switch {
	case res.Proven:
		return synth.Proven
	case res.Stop == StopTime:
		return synth.TimeLimit
	case res.Stop == StopInterrupted:
		return synth.Interrupted
	}
	return synth.Heuristic
}

// ErrTimeLimit is wrapped by the error of a Solve whose time limit ended
// while it listed a network's designs: there is no selection to show yet.
var ErrTimeLimit = errors.New("board: the time limit ran out while listing the networks' designs")

// ErrInterrupted is wrapped by the error of a Solve whose context ended
// while it listed a network's designs: there is no selection to show yet.
var ErrInterrupted = errors.New("board: interrupted while listing the networks' designs")

// exhaustive checks that a network's search covered its whole space.
func exhaustive(ctx context.Context, n *Network, res *synth.Result) error {
	if res.Status.Exhaustive() {
		return nil
	}
	if ctx.Err() != nil {
		return errorf(ErrInterrupted, "interrupted while listing the networks' designs (at %s)", n.Name())
	}
	return errorf(nil, "%s: the search did not cover the whole space (%s)", n.Name(), res.Status)
}

// sameDesign reports whether two solutions realise every position alike.
func sameDesign(a, b synth.Solution) bool {
	return slices.EqualFunc(a.Options, b.Options, func(x, y synth.Option) bool {
		return x.Combine == y.Combine && slices.Equal(x.PartValues(), y.PartValues())
	})
}

// ValueKey identifies a physical value, as the board counts values: nine
// significant digits, so that the same standard value reached by two
// series' tables is one value.
func ValueKey(v float64) string { return strconv.FormatFloat(v, 'g', 9, 64) }

// errorFirst returns p ranked by error, then power, then parts, whatever
// its template says: the board lists designs by error, so that a cut list
// keeps the closest ones.
func errorFirst(p *synth.Problem) *synth.Problem {
	cp := *p.Spec
	t := *cp.Template
	t.Rank = []constraints.RankKey{constraints.ByError, constraints.ByPower, constraints.ByParts}
	cp.Template = &t
	return &synth.Problem{Spec: &cp, Domains: p.Domains}
}

// enumerate lists one network's designs within its cap, and its own best
// answer. It returns an Unmet when nothing is within the cap.
func enumerate(ctx context.Context, n *Network, set *Settings) (*NetworkResult, *Unmet, error) {
	fail := func(err error) error {
		if errors.Is(err, synth.ErrTooManyRows) || errors.Is(err, synth.ErrSpaceTooLarge) {
			return errorf(ErrBudget, "%s: %s", n.Name(), constraints.Message(err))
		}
		return err
	}
	ef := errorFirst(n.Problem)
	res, err := synth.Search(ctx, ef, &synth.Settings{Top: set.MaxDesigns + 1, Workers: set.Workers, ErrorMax: n.Cap}, synth.Rows{})
	if err != nil {
		return nil, nil, fail(err)
	}
	if err := exhaustive(ctx, n, res); err != nil {
		return nil, nil, err
	}
	if len(res.Solutions) == 0 {
		// Nothing within the cap: what could the network reach at all?
		u := &Unmet{Network: n}
		best, err := synth.Search(ctx, ef, &synth.Settings{Top: 1, Workers: set.Workers}, synth.Rows{})
		if err != nil {
			return nil, nil, fail(err)
		}
		if err := exhaustive(ctx, n, best); err != nil {
			return nil, nil, err
		}
		if len(best.Solutions) > 0 {
			u.Best, u.HasBest = best.Solutions[0].Score.Error, true
		}
		return nil, u, nil
	}
	// The network's own best answer within its cap, by its own rank keys.
	own, err := synth.Search(ctx, n.Problem, &synth.Settings{Top: 1, Workers: set.Workers, ErrorMax: n.Cap}, synth.Rows{})
	if err != nil {
		return nil, nil, fail(err)
	}
	if err := exhaustive(ctx, n, own); err != nil {
		return nil, nil, err
	}
	nr := &NetworkResult{Network: n, Alone: own.Solutions[0]}
	// The fixed resistors, by the BOM's rule of what is a resistor to
	// order; any design shows them (here the network's own best).
	d, err := variation.NewDesign(n.Problem.Spec, nr.Alone.Options, "", constraints.Ambient{})
	if err != nil {
		return nil, nil, errorf(err, "%s: %s", n.Name(), constraints.Message(err))
	}
	nr.Fixed = d.FixedResistorValues()
	sols := res.Solutions
	if len(sols) > set.MaxDesigns {
		sols, nr.Cut = sols[:set.MaxDesigns], true
		if !slices.ContainsFunc(sols, func(s synth.Solution) bool { return sameDesign(s, nr.Alone) }) {
			sols = append(sols, nr.Alone)
		}
	}
	for _, s := range sols {
		nr.Designs = append(nr.Designs, Design{Solution: s, Rel: s.Score.Error / n.Cap})
	}
	return nr, nil, nil
}
