package variation

import (
	"github.com/ohmfit/ohmfit/constraints"
	"github.com/ohmfit/ohmfit/constraints/ratings"
	"github.com/ohmfit/ohmfit/solver"
	"github.com/ohmfit/ohmfit/synth"
)

// PartLoad is the volts across and the watts in one part, of value r, of a
// position realised by two parts combined by c, from the position's volts
// and amps: a series pair shares its current, a parallel pair its voltage.
func PartLoad(c constraints.Combine, r, volts, amps float64) (partVolts, watts float64) {
	if c == constraints.Parallel {
		return volts, volts * volts / r
	}
	return amps * r, amps * amps * r
}

// WatchSolution shows one condition's solution to w: its node potentials
// and each resistor's load, a position realised by two parts as those two
// parts (named name+"a"/"b", as check names them), each against the package
// the template gives it. opts are the free positions' realisations in
// p.Free order, nil for a fully valued template.
func WatchSolution(w *ratings.Watch, t *constraints.Template, free []int, opts []synth.Option, cond string, sol *solver.Solution) {
	where := ratings.Where(cond, false)
	names := make([]string, len(sol.Nodes))
	volts := make([]float64, len(sol.Nodes))
	for i, n := range sol.Nodes {
		names[i], volts[i] = n.Name, n.Volts
	}
	w.Nodes(where, names, volts, t.Ground)
	option := map[int]synth.Option{}
	for k, i := range free {
		if k < len(opts) {
			option[i] = opts[k]
		}
	}
	for i, pr := range sol.Parts {
		ps := t.Parts[i]
		if pr.Kind != solver.Resistor || ps.Sensor != nil {
			continue // sensors are not in the resistor package table
		}
		o, isFree := option[i]
		if !isFree {
			w.Resistor(where, pr.Name, ps.Package, pr.Watts, pr.Volts)
			continue
		}
		pkg := t.Choose.For(ps.Name).Package
		vals := o.PartValues()
		if len(vals) == 1 {
			w.Resistor(where, pr.Name, pkg, pr.Watts, pr.Volts)
			continue
		}
		for j, r := range vals {
			v, watts := PartLoad(o.Combine, r, pr.Volts, pr.Amps)
			w.Resistor(where, pr.Name+string(rune('a'+j)), pkg, watts, v)
		}
	}
}

// WatchAnswer solves an answer (its options in p.Free order) in every
// visible condition at nominal values and watches each solution
// (WatchSolution): the cautions a search's best answer calls for.
func WatchAnswer(p *constraints.Problem, options []synth.Option) *ratings.Watch {
	w := &ratings.Watch{}
	t := p.Template
	for ci, c := range t.Conditions {
		circ, err := t.ConditionCircuit(ci)
		if err != nil {
			continue
		}
		for k, i := range p.Free {
			circ.Parts[i].Value = options[k].Value
		}
		if s, err := solver.Analyze(circ); err == nil {
			WatchSolution(w, t, p.Free, options, c.Name, s)
		}
	}
	return w
}
