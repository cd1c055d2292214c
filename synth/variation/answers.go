package variation

import (
	"github.com/ohmfit/ohmfit/constraints"
	"github.com/ohmfit/ohmfit/synth"
)

// Pass reports whether the goal keeps its hard limits over its whole
// worst-case range; a goal without limits passes.
func (g Goal) Pass() bool { return !g.HasBand || g.InBand }

// LimitsMet reports whether every target keeps its hard limits over its
// whole worst-case range, in every condition.
func (r *Report) LimitsMet() bool {
	for _, g := range r.Goals {
		if !g.Pass() {
			return false
		}
	}
	return true
}

// CheckAnswer checks one answer of a search with real parts: its design
// (NewDesign with the answer's options; series and ambient as there) and
// Check's report with set.
func CheckAnswer(p *constraints.Problem, options []synth.Option, series string, ambient constraints.Ambient, set *Settings) (*Design, *Report, error) {
	d, err := NewDesign(p, options, series, ambient)
	if err != nil {
		return nil, nil, err
	}
	rep, err := Check(d, set)
	if err != nil {
		return nil, nil, err
	}
	return d, rep, nil
}

// CheckAnswers checks each answer given, in order, as CheckAnswer does:
// the checks `fit --check` shows under its list.
func CheckAnswers(p *constraints.Problem, sols []synth.Solution, series string, ambient constraints.Ambient, set *Settings) ([]*Design, []*Report, error) {
	designs := make([]*Design, len(sols))
	reports := make([]*Report, len(sols))
	for i, s := range sols {
		d, rep, err := CheckAnswer(p, s.Options, series, ambient, set)
		if err != nil {
			return nil, nil, err
		}
		designs[i], reports[i] = d, rep
	}
	return designs, reports, nil
}

// AnswerBOM is the bill of materials of one answer (BOM), from its check
// without Monte Carlo, which the BOM does not read.
func AnswerBOM(p *constraints.Problem, options []synth.Option, series string, ambient constraints.Ambient) ([]BOMLine, error) {
	d, rep, err := CheckAnswer(p, options, series, ambient, &Settings{Samples: -1})
	if err != nil {
		return nil, err
	}
	return BOM(d, rep), nil
}

// Shown is the search result as a robust ranking shows it: the first top
// answers in robust order, proven when the ranking is (Partial otherwise),
// and no nominal error bound, which speaks of the nominal search under it.
func (r *RobustRanking) Shown(res *synth.Result, top int) synth.Result {
	shown := *res
	shown.Bound = 0
	if r.Proven {
		shown.Status = synth.Proven
	} else {
		shown.Status = synth.Partial
	}
	shown.Solutions = r.Solutions[:min(len(r.Solutions), top)]
	return shown
}
