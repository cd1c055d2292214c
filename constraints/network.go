package constraints

import (
	"errors"
	"fmt"
	"math"
	"slices"
	"strings"

	"github.com/ohmfit/ohmfit/eseries/units"
	"github.com/ohmfit/ohmfit/solver"
)

// NetworkError explains an error the solver returned for t's network in the
// template's terms: an *Error at the part at fault (the first one in file
// order when several are), saying what is wrong and what would fix it. The
// solver's error is kept in Err, so errors.Is(err, solver.ErrSingular) and
// errors.As with the solver's types still work. An error the solver did not
// tie to any part (a singular or ill-conditioned matrix) keeps its message
// and gets no position. NetworkError returns nil for a nil err.
func (t *Template) NetworkError(err error) *Error {
	if err == nil {
		return nil
	}
	e := &Error{File: t.File, Msg: Message(err), Err: err}
	if !t.explainGraph(e, err) {
		t.explainValues(e, err)
	}
	return e
}

// placeAt puts e at the first part, in file order, that names holds.
func (t *Template) placeAt(e *Error, names ...string) {
	for _, p := range t.Parts {
		if slices.Contains(names, p.Name) {
			e.Line, e.Col = p.Pos.Line, p.Pos.Col
			return
		}
	}
}

// explainGraph places and explains a fault of the network's graph (a
// floating group, a loop of sources, a cutset of current sources, an op-amp
// without negative feedback, a shorted part, a name used twice). It
// reports whether err was one.
func (t *Template) explainGraph(e *Error, err error) bool {
	var (
		fl *solver.FloatingError
		sl *solver.SourceLoopError
		il *solver.InputLoopError
		cc *solver.CurrentCutsetError
		fb *solver.OpAmpFeedbackError
		sh *solver.ShortedError
		du *solver.DuplicatePartError
	)
	switch {
	case errors.As(err, &fl):
		parts := t.partsOn(fl.Nodes)
		t.placeAt(e, parts...)
		them := "it"
		if len(fl.Nodes) > 1 {
			them = "them"
		}
		e.Msg += fmt.Sprintf("; connect %s to the rest of the circuit or to %s (through a resistor, say), or remove %s",
			them, t.Ground, strings.Join(parts, ", "))
	case errors.As(err, &sl):
		t.placeAt(e, sl.Sources...)
		if len(sl.Sources) == 1 {
			e.Msg += fmt.Sprintf("; connect its out to a node of its own, not to %s", t.Ground)
		} else {
			e.Msg += "; remove one of them or put a resistor in series with one"
		}
	case errors.As(err, &il):
		t.placeAt(e, il.Parts...)
		e.Msg += "; drive one of the op-amp inputs through a resistor, or remove one of the sources"
	case errors.As(err, &cc):
		t.placeAt(e, cc.Sources...)
		e.Msg += fmt.Sprintf("; add a resistor from %s to %s or to the rest of the circuit",
			strings.Join(cc.Nodes, " or "), t.Ground)
	case errors.As(err, &fb):
		t.placeAt(e, fb.OpAmp)
		e.Msg += t.feedbackAdvice(fb)
	case errors.As(err, &sh):
		t.placeAt(e, sh.Part)
		if sh.Kind == solver.OpAmp {
			e.Msg += "; connect plus and minus to different nodes"
		} else {
			e.Msg += "; connect its two ends to different nodes, or remove it if it is meant to be a wire"
		}
	case errors.As(err, &du):
		// The second part of that name is the one to rename.
		seen := false
		for _, p := range t.Parts {
			if p.Name == du.Name {
				if seen {
					e.Line, e.Col = p.Pos.Line, p.Pos.Col
					break
				}
				seen = true
			}
		}
		e.Msg += "; give each part its own name"
	default:
		return false
	}
	return true
}

// feedbackAdvice says how to give an op-amp the negative feedback it
// lacks: swap its inputs, give its input node a path of its own, or
// connect out to minus.
func (t *Template) feedbackAdvice(fb *solver.OpAmpFeedbackError) string {
	i, ok := t.Part(fb.OpAmp)
	switch {
	case fb.Positive:
		if ok {
			p := t.Parts[i]
			return fmt.Sprintf("; swap plus (%s) and minus (%s), or connect the feedback from out (%s) to minus", p.Plus, p.Minus, p.Out)
		}
	case fb.Input != "":
		return fmt.Sprintf("; give node %s a path to %s of its own (a resistor, say)", fb.Input, t.Ground)
	case ok:
		p := t.Parts[i]
		return fmt.Sprintf("; for negative feedback connect its out (%s) to its minus input (%s), directly or through a resistor",
			p.Out, p.Minus)
	}
	return ""
}

// explainValues places and explains a fault of the values: a bad value,
// values too many decades apart to solve together, a solution that
// overflows.
func (t *Template) explainValues(e *Error, err error) {
	var (
		pe *solver.PartError
		ve *solver.ValueError
		se *solver.SingularError
		ic *solver.IllConditionedError
		oe *solver.OverflowError
	)
	switch {
	case errors.As(err, &pe):
		if pe.Index >= 0 && pe.Index < len(t.Parts) {
			p := t.Parts[pe.Index].Pos
			e.Line, e.Col = p.Line, p.Col
		}
	case errors.As(err, &ve):
		t.placeAt(e, ve.Part)
	case errors.As(err, &se):
		// A pivot lost where the graph checks saw none: values so far apart
		// that one swamps another in floating point.
		if se.Node != "" {
			parts := t.partsOn([]string{se.Node})
			t.placeAt(e, parts...)
			e.Msg += fmt.Sprintf("; the values of %s (at node %s) are too many decades apart to solve together: check their exponents",
				units.List(parts, ", "), se.Node)
		} else {
			t.placeAt(e, se.Part)
			e.Msg += fmt.Sprintf("; check the values around %s for exponents off by many decades", se.Part)
		}
	case errors.As(err, &ic):
		if p, ok := t.outlier(); ok {
			e.Line, e.Col = p.Pos.Line, p.Pos.Col
			e.Msg += fmt.Sprintf("; %s (%s) is the value farthest from the rest", p.Name, units.FormatUnit(p.Value, units.Ohm))
		}
	case errors.As(err, &oe):
		switch {
		case oe.Part != "":
			t.placeAt(e, oe.Part)
		case oe.Node != "":
			t.placeAt(e, t.partsOn([]string{oe.Node})...)
		default:
			if p, ok := t.largestSource(); ok {
				e.Line, e.Col = p.Pos.Line, p.Pos.Col
				e.Msg += fmt.Sprintf("; %s (%g) is the largest source", p.Name, p.Value)
			}
		}
	}
}

// ConditionError is NetworkError for a failure in condition ci, naming the
// condition when the template has more than one.
func (t *Template) ConditionError(ci int, err error) *Error {
	e := t.NetworkError(err)
	if e == nil {
		return nil
	}
	if ci >= 0 && ci < len(t.Conditions) && len(t.Conditions) > 1 {
		e.Msg = fmt.Sprintf("condition %q: %s", t.Conditions[ci].Name, e.Msg)
	}
	return e
}

// outlier returns the fixed resistor whose value lies farthest, in
// decades, from the geometric mean of the fixed resistors, when that is
// more than three decades: a spread that alone explains a lost pivot.
func (t *Template) outlier() (PartSpec, bool) {
	var sum float64
	var rs []PartSpec
	for _, p := range t.Parts {
		if p.Kind == solver.Resistor && !p.Free && p.Value > 0 {
			sum += math.Log10(p.Value)
			rs = append(rs, p)
		}
	}
	if len(rs) == 0 {
		return PartSpec{}, false
	}
	mean := sum / float64(len(rs))
	best := rs[0]
	for _, p := range rs[1:] {
		if math.Abs(math.Log10(p.Value)-mean) > math.Abs(math.Log10(best.Value)-mean) {
			best = p
		}
	}
	return best, math.Abs(math.Log10(best.Value)-mean) > 3
}

// largestSource returns the independent source of largest magnitude.
func (t *Template) largestSource() (PartSpec, bool) {
	var best PartSpec
	found := false
	for _, p := range t.Parts {
		if (p.Kind == solver.VoltageSource || p.Kind == solver.CurrentSource) && (!found || math.Abs(p.Value) > math.Abs(best.Value)) {
			best, found = p, true
		}
	}
	return best, found
}

// partsOn returns, in part order, the names of the parts with a terminal on
// any of the nodes.
func (t *Template) partsOn(nodes []string) []string {
	var names []string
	for _, p := range t.Parts {
		for _, n := range []string{p.From, p.To, p.Plus, p.Minus, p.Out} {
			if n != "" && slices.Contains(nodes, n) {
				names = append(names, p.Name)
				break
			}
		}
	}
	return names
}
