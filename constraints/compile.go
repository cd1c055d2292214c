package constraints

import (
	"errors"
	"fmt"
	"iter"
	"math"

	"github.com/ohmfit/ohmfit/solver"
)

// CondValues is one condition as compiled: its temperature and a full
// vector of part values.
type CondValues struct {
	Name string // the condition's name
	// Temperature is the condition's temperature in °C (ReferenceCelsius
	// when it gives none); HasTemperature says it gave one.
	Temperature    float64
	HasTemperature bool
	Values         []float64 // per part, template order; free parts hold 0
	hidden         bool      // added for a derivative (see Problem.Visible)
}

// Problem is a template compiled against its network: everything needed to
// score a set of free values quickly and repeatedly.
type Problem struct {
	Template *Template       // the template it was compiled from
	Network  *solver.Network // its network (free parts at 1 Ω: the values are set per solve)
	Free     []int           // part indices of the free positions, template order
	// Conditions holds the template's conditions, in its order (so an
	// index below len(Template.Conditions) names the same condition in
	// both), then those Compile adds for the derivatives of sensitivity and
	// resolution targets (see Visible).
	Conditions []CondValues
	Probes     []Probe  // one per target
	Applies    [][]bool // [target][condition]; false everywhere for sweep-wide targets
	// Derived holds, per target, the probe of a sweep-wide target
	// (linearity, sensitivity, resolution), or nil. Its value goes in the
	// Score at condition 0.
	Derived []*DerivedProbe
	// npoints is the scratch length the derived probes need; slots lists,
	// per condition, which scratch points they read in it (see Points).
	npoints int
	slots   [][]pointSlot
	// OnFraction scales every power figure (see Template.OnFraction).
	OnFraction float64
}

// Compile checks the template's network and prepares it for scoring. A
// network the solver refuses gives an *Error from Template.NetworkError.
func Compile(t *Template) (*Problem, error) {
	c := t.Circuit()
	// Free parts need some positive value for the graph checks to see a resistor.
	for _, i := range t.FreeParts() {
		c.Parts[i].Value = 1
	}
	net, err := solver.Compile(c)
	if err != nil {
		return nil, t.NetworkError(err)
	}
	p := &Problem{Template: t, Network: net, Free: t.FreeParts()}
	for ci, cond := range t.Conditions {
		vals, err := t.ConditionValues(ci)
		if err != nil {
			return nil, err
		}
		p.Conditions = append(p.Conditions, CondValues{Name: cond.Name, Temperature: cond.Temperature, HasTemperature: cond.HasTemperature, Values: vals})
	}
	if err := p.addDerivativeConditions(); err != nil {
		return nil, err
	}
	p.OnFraction = t.OnFraction
	if p.OnFraction == 0 {
		p.OnFraction = 1
	}
	for _, tg := range t.Targets {
		if err := p.addTarget(tg); err != nil {
			return nil, err
		}
	}
	if err := p.trial(); err != nil {
		return nil, err
	}
	if err := p.degenerate(); err != nil {
		return nil, err
	}
	return p, nil
}

// addTarget adds a target's probe, the conditions it applies in and, for a
// sweep-wide target, its derived probe and the points it reads.
func (p *Problem) addTarget(tg Target) error {
	t := p.Template
	pr, err := probeFor(p.Network, tg)
	if err != nil {
		return err
	}
	if tg.Kind == SelfHeating {
		pr.Scale = 1 / t.Parts[pr.Part].Dissipation
	}
	if a, ok := t.ADC(tg.ADC); ok && tg.Kind == Code {
		pr.Scale = 1 / a.Step()
	}
	p.Probes = append(p.Probes, pr)
	app := make([]bool, len(p.Conditions))
	var dp *DerivedProbe
	if tg.Kind.Derived() {
		if dp, err = p.derivedFor(tg, pr.A); err != nil {
			return err
		}
		p.addPoints(dp)
	} else {
		for ci, cv := range p.VisibleConditions() {
			// The added conditions exist only for sweep-wide targets' derivatives.
			app[ci] = tg.Applies(cv.Name)
		}
	}
	p.Applies = append(p.Applies, app)
	p.Derived = append(p.Derived, dp)
	return nil
}

// Visible reports whether condition ci is one the template states (written,
// or expanded from a sweep) rather than one Compile added half a degree
// either side of a sensitivity's or resolution's temperature to take its
// derivative. Only a visible condition has a power figure, limits and
// goals of its own (Applies is false in the others), and only visible
// conditions appear in output; a hidden one is solved only for the node
// voltages a derivative reads. It is the one rule for skipping them.
func (p *Problem) Visible(ci int) bool { return !p.Conditions[ci].hidden }

// VisibleConditions yields, in order, the index and values of each visible
// condition (see Visible).
func (p *Problem) VisibleConditions() iter.Seq2[int, CondValues] {
	return func(yield func(int, CondValues) bool) {
		for ci, cv := range p.Conditions {
			if p.Visible(ci) && !yield(ci, cv) {
				return
			}
		}
	}
}

// ConditionError is Template.ConditionError for condition ci of the
// problem, which names a condition added for a derivative always (the
// template has no entry for it).
func (p *Problem) ConditionError(ci int, err error) *Error {
	if ci < len(p.Template.Conditions) || ci >= len(p.Conditions) {
		return p.Template.ConditionError(ci, err)
	}
	e := p.Template.NetworkError(err)
	if e != nil {
		e.Msg = fmt.Sprintf("condition %q: %s", p.Conditions[ci].Name, e.Msg)
	}
	return e
}

// trial solves every condition once with each free position at the
// geometric middle of its range: values off by many decades (a source of
// 1e300 V) overflow there too, and are better refused now, with the
// solver's own explanation at the part at fault, than turned into infinite
// powers later. A network without free parts has only this one answer, so
// any failure to solve it is refused here.
func (p *Problem) trial() error {
	t := p.Template
	for ci, cv := range p.Conditions {
		c := t.Circuit()
		for i := range c.Parts {
			c.Parts[i].Value = cv.Values[i]
		}
		for _, i := range p.Free {
			ch := t.Choose.For(t.Parts[i].Name)
			c.Parts[i].Value = math.Sqrt(ch.Min * ch.Max)
		}
		if _, err := solver.Analyze(c); err != nil {
			// An overflow at the middle of the ranges is one everywhere; any
			// failure of a network without free parts is its only answer.
			var oe *solver.OverflowError
			if errors.As(err, &oe) || len(p.Free) == 0 {
				return p.ConditionError(ci, err)
			}
		}
	}
	return nil
}

func probeFor(net *solver.Network, t Target) (Probe, error) {
	pr := Probe{Kind: t.Kind}
	node := func(name string) (int, error) {
		i, ok := net.NodeIndex(name)
		if !ok {
			return 0, fmt.Errorf("constraints: target %s names node %q, which no part connects", t.Label(), name)
		}
		return i, nil
	}
	var err error
	switch t.Kind {
	case Current, Power, SelfHeating:
		i, ok := net.PartIndex(t.Part)
		if !ok {
			return pr, fmt.Errorf("constraints: target %s names unknown part %q", t.Label(), t.Part)
		}
		pr.Part = i
		for _, e := range net.Edges() {
			if e.Part == i {
				pr.Sign = CurrentSign(e.Kind)
			}
		}
	default:
		if len(t.Nodes) == 0 {
			return pr, fmt.Errorf("constraints: target %s names no node", t.Label())
		}
		if pr.A, err = node(t.Nodes[0]); err != nil {
			return pr, err
		}
		pr.B = 0 // ground is node 0
		if len(t.Nodes) > 1 {
			if pr.B, err = node(t.Nodes[1]); err != nil {
				return pr, err
			}
		}
	}
	return pr, nil
}
