package constraints

import (
	"fmt"
	"math"
	"sort"
)

// DerivedProbe computes a sweep-wide target (linearity, sensitivity,
// resolution) from one node's voltage in several conditions.
type DerivedProbe struct {
	Kind  TargetKind
	Node  int       // node index
	Conds []int     // conditions read, in increasing temperature
	Temps []float64 // their temperatures, °C
	Step  float64   // Resolution: the ADC's code step, volts
	// offset is where this probe's points start in a Points gatherer.
	offset int
}

// Value computes the target from the node's voltage in each of Conds
// (v[i] in Conds[i]).
//
// Linearity is the end-point (terminal) linearity in °C of reading: the
// largest distance, converted to °C through the line's slope, between the
// voltage and the straight line through the first and last points. A flat
// response reads as +Inf. Sensitivity is |dV/dT| by a central difference;
// resolution is the code step divided by it.
func (d *DerivedProbe) Value(v []float64) float64 {
	switch d.Kind {
	case Linearity:
		n := len(v)
		slope := (v[n-1] - v[0]) / (d.Temps[n-1] - d.Temps[0])
		if slope == 0 || math.IsNaN(slope) {
			return math.Inf(1)
		}
		worst := 0.0
		for i := 1; i < n-1; i++ {
			dev := math.Abs((v[i] - v[0] - slope*(d.Temps[i]-d.Temps[0])) / slope)
			worst = math.Max(worst, dev)
		}
		return worst
	case Sensitivity, Resolution:
		s := math.Abs(v[1]-v[0]) / (d.Temps[1] - d.Temps[0])
		if d.Kind == Sensitivity {
			return s
		}
		if s == 0 {
			return math.Inf(1)
		}
		return d.Step / s
	}
	return math.NaN()
}

// derivedFor builds the probe of a sweep-wide target.
func (p *Problem) derivedFor(tg Target, node int) (*DerivedProbe, error) {
	t := p.Template
	d := &DerivedProbe{Kind: tg.Kind, Node: node}
	switch tg.Kind {
	case Linearity:
		type pt struct {
			c int
			t float64
		}
		var pts []pt
		for ci, c := range t.Conditions {
			if c.HasTemperature {
				pts = append(pts, pt{ci, c.Temperature})
			}
		}
		sort.SliceStable(pts, func(i, j int) bool { return pts[i].t < pts[j].t })
		if len(pts) < 3 {
			return nil, fmt.Errorf("constraints: %s needs at least three temperatures", tg.Label())
		}
		for _, pt := range pts {
			d.Conds = append(d.Conds, pt.c)
			d.Temps = append(d.Temps, pt.t)
		}
	case Sensitivity, Resolution:
		for _, dt := range []float64{-HalfStep, HalfStep} {
			ci, ok := p.conditionIndex(derivativeName(tg.At + dt))
			if !ok {
				return nil, fmt.Errorf("constraints: %s has no condition at %g °C", tg.Label(), tg.At+dt)
			}
			d.Conds = append(d.Conds, ci)
			d.Temps = append(d.Temps, tg.At+dt)
		}
		if a, ok := t.ADC(tg.ADC); ok && tg.Kind == Resolution {
			d.Step = a.Step()
		}
	}
	return d, nil
}

// addDerivativeConditions adds, for each sensitivity and resolution target,
// the two conditions half a degree either side of its temperature that the
// derivative is taken from (a central difference: its error is second order
// in the step, far below any sensor's tolerance). They are hidden (see
// Visible): the template's own values, every sensor at that temperature.
func (p *Problem) addDerivativeConditions() error {
	t := p.Template
	for _, tg := range t.Targets {
		if tg.Kind != Sensitivity && tg.Kind != Resolution {
			continue
		}
		for _, dt := range []float64{-HalfStep, HalfStep} {
			name := derivativeName(tg.At + dt)
			if _, ok := p.conditionIndex(name); ok {
				continue
			}
			vals, err := t.valuesWith(name, nil, tg.At+dt)
			if err != nil {
				return err
			}
			p.Conditions = append(p.Conditions, CondValues{Name: name, Temperature: tg.At + dt, HasTemperature: true, Values: vals, hidden: true})
		}
	}
	return nil
}

// derivativeName names the condition added at celsius for a derivative:
// "~24.5C". A template condition of that name is read in its place.
func derivativeName(celsius float64) string { return "~" + TemperatureName(celsius) }

// conditionIndex returns the index in Conditions of the named condition.
func (p *Problem) conditionIndex(name string) (int, bool) {
	for i, c := range p.Conditions {
		if c.Name == name {
			return i, true
		}
	}
	return -1, false
}
