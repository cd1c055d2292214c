package synth

import (
	"context"
	"math"
	"math/rand/v2"
	"sort"

	"gonum.org/v1/gonum/optimize"

	"github.com/ohmfit/ohmfit/constraints"
	"github.com/ohmfit/ohmfit/solver"
)

// Relax is the heuristic method for spaces too large to prove. It first
// treats every free position as a continuous resistance (over log R, within
// the position's range) and minimises the first rank key with the hard limits
// as penalties, using gonum's Nelder–Mead from several starting points. It
// then snaps each continuous optimum to the nearest standard options and
// walks the discrete neighbourhood (every combination within Radius options
// of the centre, then every option of one position at a time) until no
// neighbour ranks better; the remaining position is always searched whole,
// exactly, by the row machinery of Rows. The result is usually the
// best or close to it, but nothing proves it: the status is Heuristic.
type Relax struct {
	// Starts is the number of starting points for the relaxation: the centre
	// of the box and Starts-1 seeded random points. Zero means 64.
	Starts int
	// Radius is how many options either side of the centre the discrete
	// neighbourhood spans per position. Zero means 2.
	Radius int
}

// Name returns "heuristic", the --method word for this method.
func (Relax) Name() string { return "heuristic" }

var _ Method = Relax{}

func (m Relax) run(ctx context.Context, p *Problem, set *Settings, st *runState) error {
	if set.Shards > 1 {
		return errorf(nil, "the heuristic does not cover the space, so it cannot search a shard of it")
	}
	if len(p.Domains) == 0 {
		return runNoFree(p, st)
	}
	if m.Starts <= 0 {
		m.Starts = 64
	}
	if m.Radius <= 0 {
		m.Radius = 2
	}
	st.stats.Workers = 1
	j := rowPosition(p)
	var outer []int
	for i := range p.Domains {
		if i != j {
			outer = append(outer, i)
		}
	}
	rx := &relaxer{p: p, st: st, s: p.Spec.Network.NewSolver(), sc: p.Spec.NewScore(),
		free: make([]float64, len(p.Domains))}
	k := len(p.Domains)
	lo, hi := make([]float64, k), make([]float64, k)
	for i, d := range p.Domains {
		lo[i] = math.Log(d.Options[0].Value)
		hi[i] = math.Log(d.Options[len(d.Options)-1].Value)
	}
	rng := rand.New(rand.NewPCG(1, 2)) // fixed seed: the same input gives the same list
	if set.Progress != nil {
		set.Progress.start(float64(m.Starts), "starts")
	}
	for start := 0; start < m.Starts; start++ {
		if ctx.Err() != nil {
			break
		}
		x0 := make([]float64, k)
		for i := range x0 {
			f := 0.5
			if start > 0 {
				f = rng.Float64()
			}
			x0[i] = lo[i] + f*(hi[i]-lo[i])
		}
		prob := optimize.Problem{Func: func(x []float64) float64 { return rx.relaxed(x, lo, hi) }}
		res, err := optimize.Minimize(prob, x0, &optimize.Settings{FuncEvaluations: 300 * k}, &optimize.NelderMead{})
		x := x0
		if res != nil && len(res.X) == k {
			x = res.X
		}
		_ = err // a relaxation that stops early still gives a usable point
		// Each start walks with a row worker of its own, so that its centre
		// follows its own best answer, not one another start found.
		rx.w = newRowWorker(p, st.r, set, j, outer)
		rx.descend(ctx, x, lo, hi, m.Radius)
		st.merge(rx.w.top, rx.w.front, rx.w.viol, rx.w.stats)
		if set.Progress != nil {
			set.Progress.done.Add(1)
		}
	}
	st.status = Heuristic
	if ctx.Err() != nil {
		st.status = Interrupted
		if ctx.Err() == context.DeadlineExceeded {
			st.status = TimeLimit
		}
	}
	return nil
}

type relaxer struct {
	p    *Problem
	st   *runState
	s    *solver.Solver
	sc   *constraints.Score
	free []float64
	w    *rowWorker // searches the rows of the discrete neighbourhood
}

// relaxed is the continuous objective: the first rank key plus a penalty for
// every hard limit missed, proportional to how far it is missed.
func (rx *relaxer) relaxed(x, lo, hi []float64) float64 {
	p := rx.p
	for i := range x {
		rx.free[i] = math.Exp(math.Min(math.Max(x[i], lo[i]), hi[i]))
	}
	rx.st.stats.Solves += int64(len(p.Spec.Conditions))
	if err := p.Spec.Evaluate(rx.s, rx.free, rx.sc); err != nil {
		return math.MaxFloat64
	}
	pen := 0.0
	nc := len(p.Spec.Conditions)
	for ti, tg := range p.Spec.Template.Targets {
		blo, bhi := tg.Band()
		for c := 0; c < nc; c++ {
			v := rx.sc.Value(ti, c)
			if math.IsNaN(v) {
				if p.Spec.Applies[ti][c] {
					pen += 1
				}
				continue
			}
			pen += outside(v, blo, bhi)
		}
	}
	if lim := p.Spec.Template.Limits.SupplyPowerMax; lim > 0 && rx.sc.Power > lim {
		pen += (rx.sc.Power - lim) / lim
	}
	// Leaving the box is penalised too, so the optimum stays inside it.
	for i := range x {
		pen += math.Max(0, lo[i]-x[i]) + math.Max(0, x[i]-hi[i])
	}
	primary := rx.sc.Error
	if len(p.Spec.Template.Rank) > 0 && p.Spec.Template.Rank[0] == constraints.ByPower {
		primary = rx.sc.Power
	}
	return primary + 1e3*pen
}

// outside is the relative distance of v outside [lo, hi].
func outside(v, lo, hi float64) float64 {
	switch {
	case v < lo:
		return (lo - v) / math.Max(math.Abs(lo), 1e-12)
	case v > hi:
		return (v - hi) / math.Max(math.Abs(hi), 1e-12)
	}
	return 0
}

// descend snaps x to the nearest options and walks the discrete
// neighbourhood: every combination of the outer positions within radius
// options of the centre, each with its whole row searched exactly (see
// Rows). The centre moves to the best answer found until it stops moving.
func (rx *relaxer) descend(ctx context.Context, x, lo, hi []float64, radius int) {
	p := rx.p
	centre := make([]int32, len(p.Domains))
	for i, d := range p.Domains {
		v := math.Exp(math.Min(math.Max(x[i], lo[i]), hi[i]))
		j := sort.Search(len(d.Options), func(n int) bool { return d.Options[n].Value >= v })
		if j == len(d.Options) || (j > 0 && v/d.Options[j-1].Value < d.Options[j].Value/v) {
			j--
		}
		centre[i] = int32(j)
	}
	w := rx.w
	for step := 0; step < 50 && ctx.Err() == nil; step++ {
		var walk func(k int)
		walk = func(k int) {
			if k == len(w.outer) {
				w.searchRow()
				w.stats.Rows++
				return
			}
			i := w.outer[k]
			n := int32(len(p.Domains[i].Options))
			for d := -int32(radius); d <= int32(radius); d++ {
				if j := centre[i] + d; j >= 0 && j < n {
					w.cur[i] = j
					walk(k + 1)
				}
			}
		}
		walk(0)
		if len(w.top.items) == 0 {
			break
		}
		best := w.top.items[0].Opt
		moved := false
		for _, i := range w.outer {
			if best[i] != centre[i] {
				moved = true
			}
		}
		if !moved {
			// The neighbourhood is settled: try every option of one outer
			// position at a time, the others held at the centre (with the
			// row position searched exactly, each is a two-position
			// subproblem solved whole), and go on if that moved the best.
			moved = rx.sweep(ctx, centre)
			if !moved {
				break
			}
			best = w.top.items[0].Opt
		}
		copy(centre, best)
	}
}

// sweep searches, for each outer position in turn, all of its options with
// the other outer positions at centre. It reports whether the best answer
// moved away from centre.
func (rx *relaxer) sweep(ctx context.Context, centre []int32) bool {
	w := rx.w
	for _, i := range w.outer {
		if ctx.Err() != nil {
			return false
		}
		copy(w.cur, centre)
		for o := range rx.p.Domains[i].Options {
			w.cur[i] = int32(o)
			w.searchRow()
			w.stats.Rows++
		}
	}
	best := w.top.items[0].Opt
	for _, i := range w.outer {
		if best[i] != centre[i] {
			return true
		}
	}
	return false
}
