package synth

import (
	"math"
	"slices"
	"sort"

	"github.com/ohmfit/ohmfit/constraints"
)

// CurvePoint is one point of a transfer curve: a temperature and what the
// curve's node reads there.
type CurvePoint struct {
	Celsius, Value float64
}

// TransferCurve is an answer's transfer curve over the template's
// temperature range: the voltage (or ADC code) of the node its goals read,
// solved at each step with every sensor at that temperature.
type TransferCurve struct {
	Node string
	// Codes reports that Value is in ADC codes (the node is read through
	// a code target); otherwise it is in volts.
	Codes bool
	// Points run from the coldest visible temperature condition to the
	// warmest; a temperature whose solve fails is left out.
	Points []CurvePoint
	// Goals are the goals on the node in temperature conditions (a
	// voltage goal, or a code goal on a curve in codes), coldest first.
	Goals []CurvePoint
}

// CurveStep is the temperature step of a transfer curve, in °C.
const CurveStep = 0.5

// Curve computes the transfer curve of the answer with options (in
// Spec.Free order). Between conditions the network takes the values of the
// visible temperature condition nearest in temperature
// (Template.ValuesAt), with the sensors at the curve's temperature. ok is
// false when the template has no node-voltage or code target, fewer than
// two temperature conditions, or fewer than two points that solve.
func Curve(p *Problem, options []Option) (c *TransferCurve, ok bool) {
	t := p.Spec.Template
	node, scale, ok := curveNode(t)
	if !ok {
		return nil, false
	}
	var temps []float64
	var condAt []int
	for ci, c := range t.Conditions {
		if c.HasTemperature {
			temps = append(temps, c.Temperature)
			condAt = append(condAt, ci)
		}
	}
	if len(temps) < 2 {
		return nil, false
	}
	c = &TransferCurve{Node: node, Codes: scale != 1}
	ni, _ := p.Spec.Network.NodeIndex(node)
	s := p.Spec.Network.NewSolver()
	read := func(celsius float64) (float64, bool) {
		best := 0
		for k, tc := range temps {
			if math.Abs(tc-celsius) < math.Abs(temps[best]-celsius) {
				best = k
			}
		}
		vals, err := t.ValuesAt(condAt[best], celsius)
		if err != nil {
			return 0, false
		}
		for i, v := range vals {
			s.SetValue(i, v)
		}
		for k, i := range p.Spec.Free {
			s.SetValue(i, options[k].Value)
		}
		if s.Solve() != nil {
			return 0, false
		}
		return s.Voltage(ni) * scale, true
	}
	lo, hi := slices.Min(temps), slices.Max(temps)
	for x := lo; x <= hi+1e-9; x += CurveStep {
		if v, ok := read(x); ok {
			c.Points = append(c.Points, CurvePoint{x, v})
		}
	}
	if len(c.Points) < 2 {
		return nil, false
	}
	c.Goals = curveGoals(t, node, scale)
	return c, true
}

// curveNode picks the node a transfer curve shows: that of the first code,
// voltage, linearity or sensitivity target on a single node. A code target
// makes the curve read in ADC codes (scale: codes per volt).
func curveNode(t *constraints.Template) (node string, scale float64, ok bool) {
	for _, tg := range t.Targets {
		if len(tg.Nodes) != 1 {
			continue
		}
		switch tg.Kind {
		case constraints.Code:
			if a, ok := t.ADC(tg.ADC); ok {
				return a.Node, 1 / a.Step(), true
			}
		case constraints.Voltage, constraints.Linearity, constraints.Sensitivity:
			return tg.Nodes[0], 1, true
		}
	}
	return "", 0, false
}

// curveGoals lists the goals a curve on node in the given scale shows.
func curveGoals(t *constraints.Template, node string, scale float64) []CurvePoint {
	var goals []CurvePoint
	for _, tg := range t.Targets {
		if !tg.HasEquals || len(tg.Nodes) != 1 || tg.Nodes[0] != node || (tg.Kind != constraints.Voltage && tg.Kind != constraints.Code) {
			continue
		}
		for _, w := range tg.When {
			if ci, ok := t.ConditionIndex(w); ok && t.Conditions[ci].HasTemperature {
				g := tg.Equals
				if tg.Kind == constraints.Voltage {
					g *= scale
				} else if scale == 1 {
					continue
				}
				goals = append(goals, CurvePoint{t.Conditions[ci].Temperature, g})
			}
		}
	}
	sort.Slice(goals, func(i, j int) bool { return goals[i].Celsius < goals[j].Celsius })
	return goals
}
