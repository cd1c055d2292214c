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
// the RerankPool best by nominal error) and so proves nothing about answers
// outside them. Ranks are renumbered from 1 and Pareto flags cleared (they
// described the nominal ranking). It returns each solution's Robust figures
// in the new order.
func Rerank(p *synth.Problem, sols []synth.Solution, series string, ambient constraints.Ambient) ([]synth.Solution, []Robust, error) {
	type item struct {
		s synth.Solution
		r Robust
	}
	items := make([]item, len(sols))
	for i, s := range sols {
		d, err := NewDesign(p.Problem, s.Options, series, ambient)
		if err != nil {
			return nil, nil, err
		}
		rep, err := Check(d, &Settings{Samples: -1})
		if err != nil {
			// A candidate that cannot be solved at nominal sinks to the end.
			items[i] = item{s, Robust{WorstError: math.Inf(1)}}
			continue
		}
		in := true
		for _, g := range rep.Goals {
			if g.HasBand && !g.InBand {
				in = false
			}
		}
		items[i] = item{s, Robust{WorstError: rep.WorstErrorDesign, InBand: in, Method: rep.Method}}
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
