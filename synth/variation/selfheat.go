package variation

import (
	"fmt"
	"math"

	"github.com/ohmfit/ohmfit/solver"
)

// Heating is one sensor's self-heating in one condition, at nominal values.
type Heating struct {
	Part      string
	Condition int // index into the problem's conditions
	CondName  string
	Watts     float64 // the sensor's power at the condition's temperature
	Rise      float64 // Watts over the dissipation constant, °C: what a self_heating target reads
	// ReadingError is the temperature the sensor settles at above the
	// condition's, °C: the fixed point of T = T₀ + P(R(T))/δ, where the
	// power follows the sensor's own resistance as it warms. A reading
	// taken from the sensor is off by this much. NaN when the iteration
	// did not settle.
	ReadingError float64
	Steps        int  // iterations the fixed point took
	Converged    bool // false: it did not settle within MaxHeatingSteps
}

// Fixed-point settings: a step is one solve; the iteration stops when the
// rise changes by less than HeatingTolerance °C. The map's contraction
// factor is |dP/dT|/δ, far below 1 for any sensor that does not run away,
// so a few steps suffice; MaxHeatingSteps only stops a runaway.
const (
	HeatingTolerance = 1e-9
	MaxHeatingSteps  = 100
)

// SelfHeating returns, for every condition the user wrote and every sensor
// with a dissipation constant, its power, its rise P/δ and the reading
// error the rise causes, all sensors warming together. It returns nil when
// no sensor has a dissipation constant.
func (d *Design) SelfHeating() ([]Heating, error) {
	p := d.Problem
	t := p.Template
	var heated []int // template part indices
	for i, ps := range t.Parts {
		if ps.Sensor != nil && ps.Dissipation > 0 {
			heated = append(heated, i)
		}
	}
	if len(heated) == 0 {
		return nil, nil
	}
	s := p.Network.NewSolver()
	s.SetRefinement(true)
	zero := make([]float64, len(d.Parts))
	rise := make([]float64, len(heated))
	next := make([]float64, len(heated))
	var out []Heating
	for ci, cv := range p.VisibleConditions() {
		d.setValues(s, ci, zero)
		if err := s.Solve(); err != nil {
			return nil, p.ConditionError(ci, err)
		}
		first := len(out)
		for k, i := range heated {
			w := s.Watts(i)
			rise[k] = w / t.Parts[i].Dissipation
			out = append(out, Heating{Part: t.Parts[i].Name, Condition: ci, CondName: cv.Name, Watts: w, Rise: rise[k], ReadingError: math.NaN()})
		}
		steps, ok := d.settle(s, ci, heated, rise, next)
		for k := range heated {
			h := &out[first+k]
			h.Steps, h.Converged = steps, ok
			if ok {
				h.ReadingError = rise[k]
			}
		}
	}
	return out, nil
}

// settle iterates T = T₀ + P(R(T))/δ for the heated sensors of condition
// ci, starting from rise (the first-order rises) and leaving the settled
// rises there. It reports the steps taken and whether they settled.
func (d *Design) settle(s *solver.Solver, ci int, heated []int, rise, next []float64) (int, bool) {
	t := d.Problem.Template
	t0 := d.Problem.Conditions[ci].Temperature
	for step := 1; step <= MaxHeatingSteps; step++ {
		for k, i := range heated {
			r, err := t.Parts[i].Sensor.Resistance(t0 + rise[k])
			if err != nil {
				return step, false // warmed out of the model's range: a runaway
			}
			s.SetValue(i, r)
		}
		if s.Solve() != nil {
			return step, false
		}
		done := true
		for k, i := range heated {
			next[k] = s.Watts(i) / t.Parts[i].Dissipation
			if math.IsNaN(next[k]) || math.IsInf(next[k], 0) {
				return step, false
			}
			if math.Abs(next[k]-rise[k]) > HeatingTolerance {
				done = false
			}
		}
		copy(rise, next)
		if done {
			return step, true
		}
	}
	return MaxHeatingSteps, false
}

// heatingWarnings says where the fixed point did not settle.
func heatingWarnings(hs []Heating) []string {
	var out []string
	for _, h := range hs {
		if !h.Converged {
			out = append(out, fmt.Sprintf("%s in %q: its self-heating does not settle in %d steps of T = T0 + P/δ, so no reading error is given; it may run away (lower its current)",
				h.Part, h.CondName, h.Steps))
		}
	}
	return out
}
