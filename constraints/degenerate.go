package constraints

import (
	"errors"
	"fmt"
	"math"

	"github.com/ohmfit/ohmfit/eseries/units"
	"github.com/ohmfit/ohmfit/solver"
)

// ErrDegenerate is wrapped by the *Error Compile returns for a problem in
// which every candidate would score the same, or none could be scored.
var ErrDegenerate = errors.New("constraints: every candidate scores the same")

// degenerate refuses, before any search, a problem in which every
// candidate would score the same or could not be scored at all:
//
//   - every source is zero in every condition, so every node sits at 0 V;
//   - a target's figure is undefined (a ratio over a node at 0 V, a
//     resolution of an input that does not move with temperature) for
//     every candidate in some condition;
//   - no goal depends on the free values.
//
// The last two are read from full solves at a few designs spread over the
// free positions' ranges. Every figure is a rational function of the free
// conductances, so one that is undefined, or the same, at several generic
// points is so everywhere; an exact structural zero comes out of the
// solver as 0, while a value that only happens to be small does not.
// Only problems with free positions are checked: a valued network has one
// answer, which solve and check report as it is.
func (p *Problem) degenerate() error {
	if len(p.Free) == 0 {
		return nil
	}
	if err := p.unexcited(); err != nil {
		return err
	}
	seen := p.samples()
	if len(seen) < 2 {
		return nil
	}
	if err := p.undefinedEverywhere(seen); err != nil {
		return err
	}
	return p.constantGoals(seen)
}

// samples scores three designs spread over the free ranges and returns,
// per design that could be solved, a copy of its values (laid out as
// Score's).
func (p *Problem) samples() [][]float64 {
	t := p.Template
	const points = 3
	s := p.Network.NewSolver()
	sc := p.NewScore()
	free := make([]float64, len(p.Free))
	var seen [][]float64
	for k := 0; k < points; k++ {
		for j, i := range p.Free {
			ch := t.Choose.For(t.Parts[i].Name)
			// Point 0 is the geometric middle of each range; the others
			// are spread by the fractional parts of multiples of the
			// golden ratio, so no two positions move together.
			f := 0.5
			if k > 0 {
				f = math.Mod(float64(k*(j+1))*0.6180339887498949, 1)
			}
			free[j] = ch.Min * math.Pow(ch.Max/ch.Min, f)
		}
		if err := p.Evaluate(s, free, sc); err != nil {
			continue // a candidate that cannot be solved is judged by the search
		}
		seen = append(seen, append([]float64(nil), sc.values...))
	}
	return seen
}

// valueSlots lists the indices into a sample's values where target ti is
// read: condition 0 for a sweep-wide target, else each condition it
// applies in.
func (p *Problem) valueSlots(ti int) []int {
	nc := len(p.Conditions)
	if p.Derived[ti] != nil {
		return []int{ti * nc}
	}
	var out []int
	for ci := range p.Conditions {
		if p.Applies[ti][ci] {
			out = append(out, ti*nc+ci)
		}
	}
	return out
}

// undefinedEverywhere refuses a target whose figure is undefined in some
// condition at every sample.
func (p *Problem) undefinedEverywhere(seen [][]float64) error {
	nc := len(p.Conditions)
	for ti, tg := range p.Template.Targets {
		for _, k := range p.valueSlots(ti) {
			undefined := true
			for _, v := range seen {
				if !math.IsNaN(v[k]) && !math.IsInf(v[k], 0) {
					undefined = false
				}
			}
			if undefined {
				return p.undefinedError(tg, k%nc)
			}
		}
	}
	return nil
}

// constantGoals refuses a problem whose goals read the same at every
// sample although the free values vary.
func (p *Problem) constantGoals(seen [][]float64) error {
	t := p.Template
	// With every range a single value there is nothing to vary, and one
	// candidate scoring like itself is no fault.
	varies := false
	for _, i := range p.Free {
		if ch := t.Choose.For(t.Parts[i].Name); ch.Max > ch.Min {
			varies = true
		}
	}
	goals, constant := 0, varies
	var first *Target
	for ti := range t.Targets {
		tg := &t.Targets[ti]
		if !tg.IsGoal() {
			continue
		}
		goals++
		if first == nil {
			first = tg
		}
		for _, k := range p.valueSlots(ti) {
			for _, v := range seen[1:] {
				if !Same(v[k], seen[0][k]) {
					constant = false
				}
			}
		}
	}
	if goals == 0 || !constant {
		return nil
	}
	msg := fmt.Sprintf("goal %s does not depend on the values ohmfit chooses, so every candidate scores the same; put a free resistor where it moves the goal, or give the goal to a node the free resistors set", first.Label())
	if goals > 1 {
		msg = fmt.Sprintf("none of the %d goals (the first is %s) depends on the values ohmfit chooses, so every candidate scores the same; put a free resistor where it moves a goal, or give the goals to the nodes the free resistors set", goals, first.Label())
	}
	return &Error{File: t.File, Line: first.Pos.Line, Col: first.Pos.Col, Err: ErrDegenerate, Msg: msg}
}

// unexcited refuses a network whose every source is zero in every
// condition: every node then sits at 0 V whatever the free values are.
func (p *Problem) unexcited() error {
	t := p.Template
	var first *PartSpec
	for i := range t.Parts {
		k := t.Parts[i].Kind
		if k != solver.VoltageSource && k != solver.CurrentSource {
			continue
		}
		if first == nil {
			first = &t.Parts[i]
		}
		for _, c := range p.Conditions {
			if c.Values[i] != 0 {
				return nil
			}
		}
	}
	e := &Error{File: t.File, Err: ErrDegenerate, Msg: "the network has no source, so every node sits at 0 V and every candidate scores the same; add the supply as a voltage-source"}
	if first != nil {
		e.Line, e.Col = first.Pos.Line, first.Pos.Col
		e.Msg = fmt.Sprintf("part %s: every source is zero in every condition, so every node sits at 0 V and every candidate scores the same; give the sources their working values", units.Quote(first.Name))
	}
	return e
}

// undefinedError says which target cannot be computed for any candidate,
// and why where the reason is plain.
func (p *Problem) undefinedError(tg Target, ci int) *Error {
	t := p.Template
	where := ""
	if !tg.Kind.Derived() && len(p.Conditions) > 1 {
		where = fmt.Sprintf(" in condition %q", p.Conditions[ci].Name)
	}
	why := "its figure is undefined"
	fix := "aim the target at a quantity the network sets"
	switch tg.Kind {
	case Ratio:
		why = fmt.Sprintf("node %q sits at 0 V%s whatever the free values are, so the ratio is undefined", tg.Nodes[1], where)
		fix = "divide by a node a source drives"
		where = ""
	case Resolution, Sensitivity:
		why = "its node's voltage does not change with temperature, so the figure is undefined"
		fix = "read a node that a sensor moves"
	}
	return &Error{File: t.File, Line: tg.Pos.Line, Col: tg.Pos.Col, Err: ErrDegenerate,
		Msg: fmt.Sprintf("target %s%s: %s for every candidate; %s", tg.Label(), where, why, fix)}
}
