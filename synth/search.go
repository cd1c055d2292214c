package synth

import (
	"context"
	"errors"
	"fmt"
	"math"
	"runtime"
	"slices"
	"sort"
	"strings"
	"sync/atomic"
	"time"

	"github.com/ohmfit/ohmfit/constraints"
	"github.com/ohmfit/ohmfit/solver"
)

// Problem is a compiled template plus the options of each free position.
// The compiled template is a field, not embedded, so that synth's API is its
// own: the evaluation layout stays behind constraints.Problem's methods.
type Problem struct {
	Spec    *constraints.Problem // the compiled template: network, targets, conditions
	Domains []Domain             // one per free position, in template order
}

// NewProblem builds the options of every free position from the template's
// choose section. A non-empty series overrides the series of every position
// (the `--series` flag), keeping each position's min, max and combine.
func NewProblem(cp *constraints.Problem, series string) (*Problem, error) {
	p := &Problem{Spec: cp}
	t := cp.Template
	// Size the space from the base lists before building any pairs, so that
	// an absurd request is refused at once rather than after minutes of
	// sorting. Merging equal pair values shrinks a space only a little, so
	// the refusal keeps a wide margin.
	bound := 1.0
	var desc []string
	for _, i := range cp.Free {
		name := t.Parts[i].Name
		ch := t.Choose.For(name)
		if series != "" {
			ch.Series, ch.Stock = series, nil
		}
		base, err := BaseValues(ch)
		if err != nil {
			return nil, err
		}
		n := OptionCount(len(base), ch.Combine)
		bound *= n
		desc = append(desc, fmt.Sprintf("%s %.3g", name, n))
	}
	if bound > 10*MaxSpace {
		return nil, errorf(ErrSpaceTooLarge, "search space too large: about %.3g candidates (%s); narrow the positions' min/max, use a coarser series or fewer pairs", bound, strings.Join(desc, " × "))
	}
	for _, i := range cp.Free {
		name := t.Parts[i].Name
		ch := t.Choose.For(name)
		if series != "" {
			ch.Series, ch.Stock = series, nil
		}
		d, err := BuildDomain(i, name, ch)
		if err != nil {
			return nil, err
		}
		p.Domains = append(p.Domains, d)
	}
	return p, nil
}

// Space returns the number of candidates: the product of the positions'
// option counts (1 when there is no free position).
func (p *Problem) Space() float64 {
	n := 1.0
	for _, d := range p.Domains {
		n *= float64(len(d.Options))
	}
	return n
}

// Settings tune a search. The zero value (or nil) means the defaults.
type Settings struct {
	// Top is how many ranked answers to keep. Zero means 10.
	Top int
	// Workers is the number of goroutines. Zero means runtime.GOMAXPROCS(0).
	// The result does not depend on it.
	Workers int
	// TimeLimit stops the search after this long, keeping the best found so
	// far (Status TimeLimit). Zero means no limit.
	TimeLimit time.Duration
	// MaxRows bounds the rows (combinations of all positions but one) the
	// exhaustive method will take on. Zero means DefaultMaxRows.
	MaxRows float64
	// Progress, if not nil, is updated as the search runs, for a progress
	// display in another goroutine.
	Progress *Progress
	// FrontErrorCap, when positive, also keeps the trade-off front: every
	// feasible answer with goal error at most this (a fraction: 0.01 is 1 %)
	// that no other such answer beats on error, power and part count at
	// once. Zero means no front. Keeping it makes the exhaustive method score
	// every option within the cap, which costs time on large spaces.
	FrontErrorCap float64
	// Shard and Shards, when Shards > 1, search only the Shard-th (1-based)
	// of Shards disjoint parts of the space, the same parts for the same
	// problem on any machine; the shards' results together give the result
	// of the whole search (see RankMerged). Methods that cannot split the
	// space refuse it.
	Shard, Shards int
	// ErrorMax, when positive, is a hard limit on the goal error (a
	// fraction): a candidate above it is neither ranked nor kept, and the
	// exhaustive method skips the options of a row that cannot meet it, as
	// it does for any other hard limit. With a large Top this lists every
	// design within the cap. Zero means no cap.
	ErrorMax float64
	// OpenBytes is about the most memory, in bytes, that branch and bound's
	// open boxes (the boxes not yet split, ruled out or finished, with their
	// corner records) may hold. Past it each worker searches depth first
	// from its box, holding boxes in proportion to the depth of the split
	// tree instead of its width, until the open set has shrunk below it.
	// It changes the order of the search, never its result. Zero means
	// DefaultOpenBytes.
	OpenBytes int64
}

// DefaultOpenBytes is the default Settings.OpenBytes: 512 MiB. The process
// takes up to about 2.5 times that (the Go runtime collects garbage when its
// heap has doubled; measured 1.2 GB resident on an eight-position E96
// search, DEVELOPERS.md), which fits beside other work on a 4 GiB machine.
const DefaultOpenBytes = 512 << 20

// DefaultMaxRows is the default exhaustive budget: about ten seconds of
// search on one core of a 2020s machine for a small network.
const DefaultMaxRows = 2e7

// MaxSpace is the largest candidate space any method accepts: 1e21, past
// eight positions of E96 over three decades (289^8 = 4.9e19) and short of
// the spaces no search could cover (five positions of E192 pairs, 1.9e28,
// are refused). Spaces past 2^53 are counted in float64 (Problem.Space,
// Progress, the tallies of rejected candidates), to 1e-16 relative; what
// is printed of them is rounded to three digits.
const MaxSpace = 1e21

// Progress reports how far a running search is. Its methods are safe to call
// from any goroutine.
type Progress struct {
	done, total atomicFloat
	unit        atomic.Pointer[string]
}

// Counts returns the work done and the work in all, in Unit;
// done/total is the fraction done. Counts of candidates may pass int64's
// range, so they are float64 (see MaxSpace).
func (p *Progress) Counts() (done, total float64) {
	return p.done.Load(), p.total.Load()
}

// atomicFloat is a float64 that goroutines add to safely.
type atomicFloat struct{ bits atomic.Uint64 }

func (f *atomicFloat) Load() float64 { return math.Float64frombits(f.bits.Load()) }

func (f *atomicFloat) Store(v float64) { f.bits.Store(math.Float64bits(v)) }

// Add adds d, retrying while another goroutine adds at the same time.
func (f *atomicFloat) Add(d float64) {
	for {
		old := f.bits.Load()
		if f.bits.CompareAndSwap(old, math.Float64bits(math.Float64frombits(old)+d)) {
			return
		}
	}
}

// Unit names what Counts counts: "rows" (the exhaustive method),
// "candidates" (branch and bound) or "starts" (the heuristic); "" before
// the search has begun.
func (p *Progress) Unit() string {
	if u := p.unit.Load(); u != nil {
		return *u
	}
	return ""
}

// start sets the total and its unit, before any work is counted.
func (p *Progress) start(total float64, unit string) {
	p.unit.Store(&unit)
	p.total.Store(total)
}

// Status says how a search ended. It is not an error: stopping at a limit is
// a result too.
type Status int

// Search outcomes.
const (
	Proven      Status = iota // every candidate was accounted for: the list is the best
	TimeLimit                 // stopped at Settings.TimeLimit; best found so far
	Interrupted               // the context was cancelled; best found so far
	Heuristic                 // a method that does not cover the whole space ran
	NoFeasible                // the whole space was covered and nothing met the hard limits
	// Partial marks a list re-ranked among part of the space by a caller
	// (fit --robust re-ranks a pool of the best answers by worst case)
	// whose ranking could not be proven over the rest. No search method
	// returns it.
	Partial
)

// String returns the status as one lower-case token (no spaces), the word
// the summary line, JSON "status" and the template reference use.
func (s Status) String() string {
	switch s {
	case Proven:
		return "proven"
	case TimeLimit:
		return "time-limit"
	case Interrupted:
		return "interrupted"
	case Heuristic:
		return "heuristic"
	case NoFeasible:
		return "infeasible"
	case Partial:
		return "partial"
	}
	return "unknown"
}

// Exhaustive reports whether the status means the result is proven over the
// whole space (for NoFeasible: proven that nothing is feasible).
func (s Status) Exhaustive() bool { return s == Proven || s == NoFeasible }

// Stats describe the work a search did.
type Stats struct {
	Method    string        // name of the method that ran
	Space     float64       // candidates in the whole space
	Rows      int64         // rows visited (combinations of all positions but one)
	Evaluated int64         // candidates scored from a nodal solution
	Solves    int64         // nodal solves and back-substitutions
	Workers   int           // goroutines used
	Elapsed   time.Duration // wall time of the search
}

// Solution is one ranked answer, re-checked with full nodal solves.
type Solution struct {
	Rank    int
	Options []Option // per position, template order
	Score   *constraints.Score
	Parts   int
	// Pareto is true when no other answer in the list is at least as good in
	// error, power and part count and better in one of them.
	Pareto bool
}

// Values returns each position's effective value, in template order.
func (s *Solution) Values() []float64 {
	out := make([]float64, len(s.Options))
	for i, o := range s.Options {
		out[i] = o.Value
	}
	return out
}

// Violation says which hard limit blocked the most candidates, and in
// which condition, for the message when nothing is feasible.
type Violation struct {
	constraints.Violation
	Count float64 // candidates it rejected there (a float64 count, see MaxSpace)
}

// Result is the outcome of a search.
type Result struct {
	Solutions []Solution
	Status    Status
	Stats     Stats
	// Blocking is the hard limit that rejected the most candidates; set
	// when there are no solutions.
	Blocking *Violation
	// Front is the trade-off front (see Settings.FrontErrorCap), by
	// increasing error; nil when none was asked for. With Status Proven it is
	// exact over the whole space.
	Front []Solution
	// FrontCap is the goal-error bound the front was kept under.
	FrontCap float64
	// Bound is a proven lower bound on the goal error of every candidate the
	// search did not rule out: the kept answers and whatever a stopped or
	// heuristic search left unexamined. It equals the best error of the list
	// when the search is exhaustive and ranks by error first, and it is 0
	// when nothing was proven about the rest of the space. +Inf when there
	// is no answer and nothing is left open.
	Bound float64
	// Left is how many candidates lie in parts of the space the search
	// neither ruled out nor finished: 0 when it covered its whole space,
	// the candidates of branch and bound's open boxes (whose corners may
	// have been scored) when it stopped early, NaN when the method does
	// not count them (the rows method or the heuristic, stopped early).
	// Bound covers them.
	Left float64
	// Shard and Shards repeat Settings.Shard and Settings.Shards (both 0
	// for a whole run); Top repeats Settings.Top.
	Shard, Shards, Top int
}

// Method is a search strategy.
type Method interface {
	// Name is the method's name as shown to people.
	Name() string
	run(ctx context.Context, p *Problem, s *Settings, st *runState) error
}

// ErrSpaceTooLarge is wrapped by the error for a space no method will take.
var ErrSpaceTooLarge = errors.New("synth: search space too large")

// Search finds the best assignments of standard values to the free
// positions. A nil Settings means defaults; a nil Method means Rows.
func Search(ctx context.Context, p *Problem, s *Settings, m Method) (*Result, error) {
	var set Settings
	if s != nil {
		set = *s
	}
	if set.Top <= 0 {
		set.Top = 10
	}
	if set.Workers <= 0 {
		set.Workers = runtime.GOMAXPROCS(0)
	}
	if set.OpenBytes <= 0 {
		set.OpenBytes = DefaultOpenBytes
	}
	if set.MaxRows <= 0 {
		set.MaxRows = DefaultMaxRows
	}
	if m == nil {
		m = Rows{}
	}
	if set.Shards > 1 && (set.Shard < 1 || set.Shard > set.Shards) {
		return nil, errorf(nil, "shard %d of %d does not exist", set.Shard, set.Shards)
	}
	space := p.Space()
	if space > MaxSpace {
		return nil, errorf(ErrSpaceTooLarge, "search space too large: %.3g candidates (%s); narrow the positions' min/max, use a coarser series or fewer pairs", space, p.DescribeSpace())
	}
	if set.TimeLimit > 0 {
		var cancel context.CancelFunc
		ctx, cancel = context.WithTimeout(ctx, set.TimeLimit)
		defer cancel()
	}
	start := time.Now()
	st := newRunState(p, &set)
	if err := m.run(ctx, p, &set, st); err != nil {
		return nil, err
	}
	res := &Result{Stats: st.stats}
	res.Stats.Method = m.Name()
	res.Stats.Space = space
	res.Stats.Elapsed = time.Since(start)
	res.Status = st.status
	if err := st.finish(p, res); err != nil {
		return nil, err
	}
	res.Bound = st.open
	res.Left = st.left
	if math.IsInf(st.open, 1) {
		res.Left = 0 // everything examined or ruled out
	}
	res.Shard, res.Shards, res.Top = set.Shard, set.Shards, set.Top
	for _, s := range res.Solutions {
		res.Bound = math.Min(res.Bound, s.Score.Error)
	}
	if len(res.Solutions) == 0 {
		if res.Status == Proven {
			res.Status = NoFeasible
		}
		res.Blocking = st.blocking()
	}
	return res, nil
}

// DescribeSpace says how the space is made up, e.g. "R1 1345 × R2 1345",
// or "nothing to choose" when there is no free position.
func (p *Problem) DescribeSpace() string {
	parts := make([]string, len(p.Domains))
	for i, d := range p.Domains {
		parts[i] = fmt.Sprintf("%s %d", d.Name, len(d.Options))
	}
	if len(parts) == 0 {
		return "nothing to choose"
	}
	return strings.Join(parts, " × ")
}

// runState is what methods share with Search: the merged top list, the
// violation counts and the statistics.
type runState struct {
	r        *ranker
	want     int        // answers asked for (Settings.Top)
	top      *topList   // keeps want + topMargin
	front    *frontList // nil unless Settings.FrontErrorCap > 0
	frontCap float64
	errCap   float64 // Settings.ErrorMax; 0: none
	viol     violations
	status   Status
	stats    Stats
	// open is a lower bound on the goal error of every candidate the method
	// left unexamined: +Inf when it examined or ruled out everything, 0
	// (the default) when it cannot say.
	open float64
	// left counts the candidates in parts the method neither ruled out nor
	// finished, NaN when it does not count them (see Result.Left).
	left float64
}

func newRunState(p *Problem, s *Settings) *runState {
	r := &ranker{keys: p.Spec.Template.Rank, domains: p.Domains}
	var front *frontList
	if s.FrontErrorCap > 0 {
		front = &frontList{r: r}
	}
	return &runState{
		left:     math.NaN(),
		r:        r,
		want:     s.Top,
		front:    front,
		frontCap: s.FrontErrorCap,
		errCap:   s.ErrorMax,
		top:      newTopList(r, s.Top+topMargin, len(p.Domains)),
		viol:     newViolations(p),
	}
}

// merge folds a worker's results into the shared state. Called once per
// worker after it stops, so no locking is needed beyond the caller's.
func (st *runState) merge(w *topList, front *frontList, viol violations, stats Stats) {
	for _, c := range w.items {
		st.top.offer(c)
	}
	if front != nil && st.front != nil {
		for _, c := range front.items {
			st.front.offer(c)
		}
	}
	st.viol.merge(viol)
	st.stats.Rows += stats.Rows
	st.stats.Evaluated += stats.Evaluated
	st.stats.Solves += stats.Solves
}

func (st *runState) blocking() *Violation { return st.viol.most() }

// violations counts, per hard limit and condition, the candidates each
// limit rejected: slot t·nc+c for target t, then nc slots for
// supply_power_max. The search counts by index in its inner loops; the
// layout stays here.
type violations struct {
	nc int
	n  []float64
}

func newViolations(p *Problem) violations {
	nc := len(p.Spec.Conditions)
	return violations{nc: nc, n: make([]float64, (len(p.Spec.Probes)+1)*nc)}
}

// target counts n candidates that break target ti's limits in condition c.
func (v violations) target(ti, c int, n float64) { v.n[ti*v.nc+c] += n }

// supply counts n candidates that break supply_power_max in condition c.
func (v violations) supply(c int, n float64) { v.n[len(v.n)-v.nc+c] += n }

// add counts n candidates that break the limit x names.
func (v violations) add(x constraints.Violation, n float64) {
	if x.Kind == constraints.SupplyPowerLimit {
		v.supply(x.Condition, n)
		return
	}
	v.target(x.Target, x.Condition, n)
}

func (v violations) merge(o violations) {
	for i, k := range o.n {
		v.n[i] += k
	}
}

// most returns the limit that rejected the most candidates (the first such
// in slot order), or nil when none rejected any.
func (v violations) most() *Violation {
	best := -1
	for i, k := range v.n {
		if k > 0 && (best < 0 || k > v.n[best]) {
			best = i
		}
	}
	if best < 0 {
		return nil
	}
	x := constraints.Violation{Kind: constraints.TargetLimit, Target: best / v.nc, Condition: best % v.nc}
	if best >= len(v.n)-v.nc {
		x.Kind, x.Target = constraints.SupplyPowerLimit, -1
	}
	return &Violation{Violation: x, Count: v.n[best]}
}

// finish re-scores the kept candidates with full nodal solves (the numbers
// people see come from the solver itself, not from the rank-one updates the
// search used), ranks them again on those numbers, and marks the
// Pareto-optimal ones.
func (st *runState) finish(p *Problem, res *Result) error {
	// Refined solves, so that designs equal in exact arithmetic (a
	// decade-scaled copy) tie as the contract's tolerances intend; the
	// same solves the workers compared kept candidates by.
	s := refinedSolver(p.Spec.Network)
	res.Solutions = st.rescore(p, s, st.top.items)
	if len(res.Solutions) > st.want {
		res.Solutions = res.Solutions[:st.want]
	}
	keys := make([]ScoreKey, len(res.Solutions))
	for i, s := range res.Solutions {
		keys[i] = ScoreKey{Error: s.Score.Error, Power: s.Score.Power, Parts: s.Parts}
	}
	for i, pareto := range paretoMarks(keys) {
		res.Solutions[i].Rank, res.Solutions[i].Pareto = i+1, pareto
	}
	if st.front != nil {
		front := st.rescore(p, s, st.front.items)
		// The front reads best by increasing error (then power).
		sort.SliceStable(front, func(i, j int) bool {
			a, b := front[i].Score, front[j].Score
			if !constraints.Same(a.Error, b.Error) {
				return a.Error < b.Error
			}
			return constraints.PowerTie.Less(a.Power, b.Power)
		})
		for i := range front {
			front[i].Rank = i + 1
			front[i].Pareto = true
		}
		res.Front = front
		res.FrontCap = st.frontCap
	}
	return nil
}

// rescore evaluates candidates with full solves and returns them as
// solutions in rank order. A candidate that fails its hard limits on the full
// solve (only possible for one sitting on a limit within rounding) is left out.
func (st *runState) rescore(p *Problem, s *solver.Solver, cands []*candidate) []Solution {
	free := make([]float64, len(p.Domains))
	type scored struct {
		c  *candidate
		sc *constraints.Score
	}
	var kept []scored
	for _, c := range cands {
		for i, d := range p.Domains {
			free[i] = d.Options[c.Opt[i]].Value
		}
		sc := p.Spec.NewScore()
		if err := p.Spec.Evaluate(s, free, sc); err != nil || !sc.Feasible || !withinCap(sc.Error, st.errCap) {
			continue
		}
		kept = append(kept, scored{&candidate{Opt: c.Opt, Error: sc.Error, Power: sc.Power, Parts: c.Parts}, sc})
	}
	// Rank again on the solver's own numbers; they agree with the search's
	// within rounding, so this only settles near-ties the same way a plain
	// enumeration would. The tie tolerances make "equal" intransitive where
	// computed errors spread past them (exact ties in a stage with
	// cancellation), and then a stable sort's result hangs on the order it
	// is given: the kept set goes in by its values first, so the same set
	// gives the same list however many workers found it.
	sort.Slice(kept, func(i, j int) bool { return slices.Compare(kept[i].c.Opt, kept[j].c.Opt) < 0 })
	sort.SliceStable(kept, func(i, j int) bool { return st.r.less(kept[i].c, kept[j].c) })
	out := make([]Solution, len(kept))
	for k, sc := range kept {
		out[k] = Solution{Options: make([]Option, len(p.Domains)), Parts: sc.c.Parts, Score: sc.sc}
		for i, d := range p.Domains {
			out[k].Options[i] = d.Options[sc.c.Opt[i]]
		}
	}
	return out
}

// withinCap reports whether goal error e meets the cap (0: no cap), within
// the contract's tie tolerances.
func withinCap(e, limit float64) bool {
	return limit <= 0 || e <= limit || constraints.Same(e, limit)
}

// ErrTooManyRows is wrapped by the error of an exhaustive search whose rows
// exceed Settings.MaxRows.
var ErrTooManyRows = errors.New("synth: too many rows for an exhaustive search")

func tooManyRows(p *Problem, rows, limit float64) error {
	return errorf(ErrTooManyRows, "too many rows for an exhaustive search: %.3g rows (%s, %.3g candidates) is over the budget of %.3g; narrow the positions' min/max, use a coarser series, fix a part's value, or let the heuristic run", rows, p.DescribeSpace(), p.Space(), limit)
}

// RowCount returns how many rows the exhaustive method would visit: the
// product of the option counts of every position but the largest.
func RowCount(p *Problem) float64 {
	if len(p.Domains) == 0 {
		return 1
	}
	j := rowPosition(p)
	n := 1.0
	for i, d := range p.Domains {
		if i != j {
			n *= float64(len(d.Options))
		}
	}
	return n
}

// topMargin is how many candidates the search keeps beyond those asked for.
// The search ranks by its fast rank-one updates and the final list by full,
// refined solves; the two agree to rounding, and the margin makes sure a
// candidate that ties with the last one asked for (a mirror image in a
// symmetric network, say) is still there when the full solves settle the
// order.
const topMargin = 8
