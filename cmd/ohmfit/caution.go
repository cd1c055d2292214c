package main

import (
	"io"

	"github.com/ohmfit/ohmfit/constraints"
	"github.com/ohmfit/ohmfit/constraints/ratings"
	"github.com/ohmfit/ohmfit/solver"
	"github.com/ohmfit/ohmfit/synth"
)

// watchSolution shows one condition's solution to w: its node potentials
// and each resistor's load, a position realised by two parts as those two
// parts (named name+"a"/"b", as check names them), each against the package
// the template gives it. opts are the free positions' realisations in
// p.Free order, nil for a fully valued template.
func watchSolution(w *ratings.Watch, t *constraints.Template, free []int, opts []synth.Option, cond string, sol *solver.Solution) {
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
			// Series parts share the current, parallel parts the voltage.
			v := pr.Volts
			if o.Combine == constraints.Series {
				v = pr.Amps * r
			}
			w.Resistor(where, pr.Name+string(rune('a'+j)), pkg, v*v/r, v)
		}
	}
}

// writeCautions prints the watch's cautions to w (stderr: they must not mix
// with a machine-readable result).
func writeCautions(out io.Writer, w *ratings.Watch) {
	for _, c := range w.Cautions() {
		cautionLine(out, c)
	}
}

// solutionWatch solves an answer in every visible condition and watches
// each solution.
func solutionWatch(p *synth.Problem, sol synth.Solution) *ratings.Watch {
	w := &ratings.Watch{}
	t := p.Spec.Template
	for ci, c := range t.Conditions {
		circ, err := t.ConditionCircuit(ci)
		if err != nil {
			continue
		}
		for k, i := range p.Spec.Free {
			circ.Parts[i].Value = sol.Options[k].Value
		}
		if s, err := solver.Analyze(circ); err == nil {
			watchSolution(w, t, p.Spec.Free, sol.Options, c.Name, s)
		}
	}
	return w
}
