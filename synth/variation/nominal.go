package variation

import (
	"math"

	"github.com/ohmfit/ohmfit/constraints"
	"github.com/ohmfit/ohmfit/solver"
)

// nominal adds one goal to r per target and condition, with its nominal
// value and sensitivities, and one per sweep-wide target.
func (d *Design) nominal(s *solver.Solver, r *Report) error {
	p := d.Problem
	t := p.Template
	zero := make([]float64, len(d.Parts))
	for ci := range p.Conditions {
		d.setValues(s, ci, zero)
		if err := s.Solve(); err != nil {
			// The template's terms: the part at fault and what to change.
			return p.ConditionError(ci, err)
		}
		for ti, pr := range p.Probes {
			if !p.Applies[ti][ci] { // false in the conditions added for a derivative
				continue
			}
			x, err := pr.Read(s)
			if err != nil {
				return err
			}
			sens, err := d.sensitivities(s, ci, pr, x, zero)
			if err != nil {
				return err
			}
			tg := t.Targets[ti]
			lo, hi := tg.Band()
			r.Goals = append(r.Goals, Goal{Target: ti, Condition: ci, Label: tg.Label(), CondName: p.Conditions[ci].Name,
				Nominal: x, WorstMin: x, WorstMax: x, Sens: sens,
				HasBand: !math.IsInf(lo, -1) || !math.IsInf(hi, 1)})
		}
	}

	// Sweep-wide targets (linearity, sensitivity, resolution): one goal
	// each, over the conditions they read, with finite-difference
	// sensitivities (they are not one solve's linear functional).
	for ti, dp := range p.Derived {
		if dp == nil {
			continue
		}
		x, err := d.derivedAt(s, ti, zero)
		if err != nil {
			return err
		}
		tg := t.Targets[ti]
		lo, hi := tg.Band()
		r.Goals = append(r.Goals, Goal{Target: ti, Condition: SweepCondition, Label: tg.Label(), CondName: "sweep",
			Nominal: x, WorstMin: x, WorstMax: x, Sens: d.derivedSensitivities(s, ti, x),
			HasBand: !math.IsInf(lo, -1) || !math.IsInf(hi, 1)})
	}
	return nil
}

// sensitivities returns the target's sensitivity to each varied part at the
// solver's current solution, by the adjoint method.
func (d *Design) sensitivities(s *solver.Solver, ci int, pr constraints.Probe, x float64, dev []float64) ([]Sensitivity, error) {
	net := s.Network()
	nn, np := len(net.Nodes()), len(d.Problem.Template.Parts)
	grad := make([]float64, np)
	var err error
	if pr.Kind == constraints.Resistance {
		err = s.ResistanceAdjoint(pr.A, pr.B, grad)
	} else {
		nodeW := make([]float64, nn)
		partW := make([]float64, np)
		switch pr.Kind {
		case constraints.Voltage:
			nodeW[pr.A] += 1
			nodeW[pr.B] -= 1
		case constraints.Code:
			nodeW[pr.A] += pr.Scale
			nodeW[pr.B] -= pr.Scale
		case constraints.Current:
			partW[pr.Part] = pr.Sign
		case constraints.Power, constraints.SelfHeating:
			// Watts = (V(from) - V(to))·Amps along the part's edge; a
			// rise is watts times 1/δ.
			k := 1.0
			if pr.Kind == constraints.SelfHeating {
				k = pr.Scale
			}
			for _, e := range net.Edges() {
				if e.Part == pr.Part {
					i := s.Amps(pr.Part)
					nodeW[e.From] += k * i
					nodeW[e.To] -= k * i
					partW[pr.Part] = k * (s.Voltage(e.From) - s.Voltage(e.To))
				}
			}
		case constraints.Ratio:
			vb := s.Voltage(pr.B)
			nodeW[pr.A] += 1 / vb
			nodeW[pr.B] -= s.Voltage(pr.A) / (vb * vb)
		}
		err = s.Adjoint(nodeW, partW, grad)
	}
	if err != nil {
		return nil, err
	}
	out := make([]Sensitivity, len(d.Parts))
	for j, v := range d.Parts {
		pos := s.Value(v.Part)
		g := grad[v.Part]
		xj := v.Nominal * (1 + dev[j])
		if v.pair > 0 {
			// Chain rule through the pair: series dR/dRa = 1, parallel
			// dR/dRa = (R/Ra)².
			if v.combine == constraints.Parallel {
				g *= (pos / xj) * (pos / xj)
			}
		} else if v.Extra() {
			// Per unit of the sensor's parameter (its B, its class
			// error's offset or slope), through dR/dx in this condition.
			g *= d.paramSlope(j, ci, pos)
			xj = v.Nominal
		} else {
			xj = pos
			if v.Sensor != "" {
				// Per ohm of R25 (R0), which scales the resistance pos it
				// has in this condition: dR/dR25 = pos/R25.
				g *= pos / v.Nominal
				xj = v.Nominal
			}
		}
		n := math.NaN()
		if x != 0 && xj != 0 {
			n = g * xj / x
		}
		out[j] = Sensitivity{Part: v.Name, Absolute: g, Normalised: n}
	}
	return out, nil
}

// SweepCondition is the Condition of a Goal for a sweep-wide target
// (linearity, sensitivity, resolution), which reads several conditions.
const SweepCondition = -1

// gatherPoints records, after condition ci was solved, the node voltages the
// sweep-wide targets read in it (NaN when the solve failed).
func (d *Design) gatherPoints(s *solver.Solver, ci int, solved bool, points *constraints.Points) {
	if solved {
		points.Gather(ci, s)
		return
	}
	points.Fail(ci)
}

// derivedAt computes sweep-wide target ti with the parts at deviation dev,
// solving each condition it reads.
func (d *Design) derivedAt(s *solver.Solver, ti int, dev []float64) (float64, error) {
	points := d.Problem.NewPoints()
	for _, ci := range d.Problem.Derived[ti].Conds {
		if err := d.pointsAt(s, ci, dev, points); err != nil {
			return math.NaN(), err
		}
	}
	return points.Derived(ti), nil
}

// pointsAt solves condition ci with the parts at deviation dev and gathers
// into points what the sweep-wide targets read in it.
func (d *Design) pointsAt(s *solver.Solver, ci int, dev []float64, points *constraints.Points) error {
	d.setValues(s, ci, dev)
	if err := s.Solve(); err != nil {
		return errorf(ErrUnsolvable, "the network cannot be solved in condition %q: %v", d.Problem.Conditions[ci].Name, err)
	}
	d.gatherPoints(s, ci, true, points)
	return nil
}

// derivedSensitivities differentiates a sweep-wide target numerically: a
// central difference with a relative step of 1e-6 in each part's value
// (for a part with an absolute tolerance, a step of 1e-6 of its value), at
// nominal values. Nominal means no TCR drift either: while it runs every
// part's temperature coefficient is held at zero, so that the step moves
// the value alone and not also the drift a corner would add (factor turns a
// deviation's sign into a TCR corner).
func (d *Design) derivedSensitivities(s *solver.Solver, ti int, x float64) []Sensitivity {
	const h = 1e-6
	dev := make([]float64, len(d.Parts))
	saved := d.tcrDraw
	d.tcrDraw = make([]float64, len(d.Parts))
	defer func() { d.tcrDraw = saved }()
	out := make([]Sensitivity, len(d.Parts))
	for j, v := range d.Parts {
		out[j] = Sensitivity{Part: v.Name, Absolute: math.NaN(), Normalised: math.NaN()}
		step := h // relative
		if !v.Relative {
			step = h * math.Abs(v.Nominal)
			if step == 0 {
				step = h
			}
		}
		clear(dev)
		dev[j] = step
		up, err1 := d.derivedAt(s, ti, dev)
		dev[j] = -step
		down, err2 := d.derivedAt(s, ti, dev)
		if err1 != nil || err2 != nil {
			continue
		}
		slope := (up - down) / (2 * step) // per unit of dev
		if v.Relative {
			out[j].Absolute = slope / v.Nominal // dev is dx/x
		} else {
			out[j].Absolute = slope
		}
		if x != 0 && v.Nominal != 0 {
			out[j].Normalised = out[j].Absolute * v.Nominal / x
		}
	}
	return out
}
