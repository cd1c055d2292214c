package variation

import (
	"math"
	"sort"

	"github.com/ohmfit/ohmfit/constraints"
	"github.com/ohmfit/ohmfit/synth"
)

// RerankPool is how many of the best answers by nominal error `fit
// --robust` asks the search for and re-ranks by worst-case error.
const RerankPool = 200

// Robust is one answer's worst-case standing.
type Robust struct {
	// WorstError is the largest goal error over every goal, condition and
	// worst-case corner (tolerance and TCR drift together).
	WorstError float64
	// InBand reports whether every target keeps within its hard limits at
	// every corner.
	InBand bool
	Method string // MethodCorners or MethodLinearised
}

// Rerank orders solutions by worst-case behaviour: those that keep every
// target within its limits at every corner first, then by worst-case error,
// then by their nominal rank. It re-ranks only the solutions given (normally
// the RerankPool best by nominal error); RankRobust says what that proves
// about the answers outside them. Ranks are renumbered from 1 and Pareto flags cleared (they
// described the nominal ranking). It returns each solution's Robust figures
// in the new order.
func Rerank(p *synth.Problem, sols []synth.Solution, series string, ambient constraints.Ambient) ([]synth.Solution, []Robust, error) {
	type item struct {
		s synth.Solution
		r Robust
	}
	items := make([]item, len(sols))
	for i, s := range sols {
		d, err := NewDesign(p.Spec, s.Options, series, ambient)
		if err != nil {
			return nil, nil, err
		}
		rep, err := Check(d, &Settings{Samples: -1})
		if err != nil {
			// A candidate that cannot be solved at nominal sinks to the end.
			items[i] = item{s, Robust{WorstError: math.Inf(1)}}
			continue
		}
		items[i] = item{s, Robust{WorstError: rep.WorstErrorDesign, InBand: rep.LimitsMet(), Method: rep.Method}}
	}
	sort.SliceStable(items, func(a, b int) bool {
		x, y := items[a].r, items[b].r
		if x.InBand != y.InBand {
			return x.InBand
		}
		if !constraints.Same(x.WorstError, y.WorstError) {
			return x.WorstError < y.WorstError
		}
		return items[a].s.Rank < items[b].s.Rank
	})
	out := make([]synth.Solution, len(items))
	rob := make([]Robust, len(items))
	for i, it := range items {
		out[i], rob[i] = it.s, it.r
		out[i].Rank = i + 1
		out[i].Pareto = false
	}
	return out, rob, nil
}

// RerankPoolMax is the largest pool RankRobust widens to before it gives
// up proving the ranking.
const RerankPoolMax = 12800

// RobustRanking is a ranking by worst case with what can be said of it.
type RobustRanking struct {
	Solutions []synth.Solution // the pool in robust order, ranks from 1
	Robust    []Robust         // each solution's worst-case figures, same order
	Pool      int              // how many answers by nominal error were re-ranked
	// Proven reports that no candidate outside the pool could enter the
	// first top answers: see RankRobust.
	Proven bool
	// Reason says why the ranking is proven, or why not, in a phrase a
	// user can read.
	Reason string
	// Bound, when the pool is the lowest-error part of a proven search, is
	// the nominal error of the pool's last answer: every candidate left out
	// has a worst-case error at least this large. 0 when nothing is known.
	Bound float64
}

// RankRobust ranks a search result's answers by worst case (see Rerank)
// and proves the first top of them when it can.
//
// The proof rests on one fact: a design's nominal point lies inside its
// tolerance box, so its worst-case error is never below its nominal error
// (with exact corners, the corners span every quantity's range). Let the
// pool be the best answers by nominal error of a proven search, E the
// nominal error of its last one and W the worst-case error of the top-th
// robust answer. Every candidate outside the pool has nominal error at
// least E, hence worst-case error at least E; if W < E (beyond the tie
// tolerance) and the first top robust answers all keep their limits at
// every corner, none of those candidates can enter them. When the search
// returned fewer answers than asked, the pool is every feasible candidate
// and the ranking is proven outright.
//
// When the proof does not close for want of a large enough pool, RankRobust
// calls widen with a larger pool size (four times larger, up to
// RerankPoolMax) for a new search result, and tries again; widen may be
// nil. requested is the pool size res was searched with.
func RankRobust(p *synth.Problem, res *synth.Result, requested, top int, series string, ambient constraints.Ambient,
	widen func(pool int) (*synth.Result, error)) (*RobustRanking, *synth.Result, error) {
	for {
		sols, rob, err := Rerank(p, res.Solutions, series, ambient)
		if err != nil {
			return nil, res, err
		}
		r := &RobustRanking{Solutions: sols, Robust: rob, Pool: len(res.Solutions)}
		small := robustProof(p, res, requested, top, r)
		if r.Proven || !small || widen == nil || requested >= RerankPoolMax {
			return r, res, nil
		}
		requested = min(requested*4, RerankPoolMax)
		if res, err = widen(requested); err != nil {
			return nil, res, err
		}
	}
}

// robustProof sets r.Proven, r.Reason and r.Bound; it reports whether a
// larger pool could make the proof close.
func robustProof(p *synth.Problem, res *synth.Result, requested, top int, r *RobustRanking) (widenHelps bool) {
	n := min(top, len(r.Solutions))
	if !res.Status.Exhaustive() {
		r.Reason = "the search by nominal error was not proven (" + res.Status.String() + ")"
		return false
	}
	for _, x := range r.Robust[:n] {
		if x.Method != MethodCorners {
			r.Reason = "the worst case was linearised (too many varying parts for every corner), so it is not exact"
			return false
		}
	}
	if len(res.Solutions) < requested {
		r.Proven = true
		r.Reason = "every feasible candidate was re-ranked"
		return false
	}
	rank := p.Spec.Template.Rank
	if len(rank) == 0 || rank[0] != constraints.ByError {
		r.Reason = "the template ranks by power or parts first, so the pool is not the answers of lowest error"
		return false
	}
	last := res.Solutions[len(res.Solutions)-1].Score.Error
	r.Bound = last
	for _, x := range r.Robust[:n] {
		if !x.InBand {
			r.Reason = "an answer shown leaves its limits at a corner, and a candidate outside the pool might keep them"
			return false
		}
	}
	if n == 0 {
		r.Reason = "no answer to rank"
		return false
	}
	w := r.Robust[n-1].WorstError
	if w < last && !constraints.Same(w, last) {
		r.Proven = true
		r.Reason = "every candidate left out has a nominal error, and so a worst-case error, above the answers shown"
		return false
	}
	r.Reason = "a candidate outside the pool could still have a worst-case error as small as the answers shown"
	return true
}
