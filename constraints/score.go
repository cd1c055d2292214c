package constraints

import (
	"fmt"
	"math"

	"github.com/ohmfit/ohmfit/solver"
)

// Tie tolerances of the contract: two errors that agree within TieRelative
// (relative) or TieAbsolute (absolute) are equal, so that an exact hit that
// comes out as 0 or as 2e-16 ranks the same.
const (
	TieRelative = 1e-12
	TieAbsolute = 1e-15
)

// A Tie is a tie tolerance: two figures that differ by at most Abs, or by at
// most Rel times the larger magnitude, are equal.
type Tie struct {
	Abs, Rel float64
}

// ErrorTie is the contract's tie of errors (and of values checked against a
// band or a cap): 1e-12 relative or 1e-15 absolute.
var ErrorTie = Tie{Abs: TieAbsolute, Rel: TieRelative}

// PowerTie is the tie of powers in watts: 1e-12 relative only. The contract's
// absolute allowance is for errors, which sit near zero on an exact hit; in
// watts, 1e-15 absolute would make real differences between microwatt
// designs (1e-10 relative) tie, and such ties chain, so the list would depend
// on the order candidates are met. Powers of equal designs agree to rounding,
// far inside 1e-12 relative.
var PowerTie = Tie{Rel: TieRelative}

// Same reports whether a and b are equal within t.
func (t Tie) Same(a, b float64) bool {
	d := math.Abs(a - b)
	return d <= t.Abs || d <= t.Rel*math.Max(math.Abs(a), math.Abs(b))
}

// Below returns how far below w a figure may lie and still tie with it:
// every v >= w - t.Below(w) is worse than w or ties with it.
func (t Tie) Below(w float64) float64 {
	return math.Max(t.Abs, t.Rel*math.Abs(w))
}

// Above returns a threshold just above w that no figure tying with w
// exceeds: pruning at v > t.Above(w) never drops a tie. (A v above w ties
// while v-w <= Rel·v, so v <= w/(1-Rel); 2·Rel covers that with room.)
func (t Tie) Above(w float64) float64 {
	return w + math.Max(t.Abs, 2*t.Rel*math.Abs(w))
}

// Less reports whether a is below b beyond the tie tolerance.
func (t Tie) Less(a, b float64) bool { return a < b && !t.Same(a, b) }

// AtMost reports whether a is at most b or ties with it.
func (t Tie) AtMost(a, b float64) bool { return a <= b || t.Same(a, b) }

// Same reports whether a and b are equal within the contract's tie
// tolerances of errors (ErrorTie).
func Same(a, b float64) bool { return ErrorTie.Same(a, b) }

// SamePower reports whether two powers in watts tie (PowerTie).
func SamePower(a, b float64) bool { return PowerTie.Same(a, b) }

// OverPowerLimit reports whether power pw breaks supply_power_max lim (0: no
// limit). The limit is inclusive: a power that ties with it (PowerTie) meets it.
func OverPowerLimit(pw, lim float64) bool {
	return lim > 0 && !PowerTie.AtMost(pw, lim)
}

// TieOf returns the tie tolerance of a rank key's figure: PowerTie for
// power, ErrorTie for error (part counts are whole numbers and tie exactly).
func TieOf(k RankKey) Tie {
	if k == ByPower {
		return PowerTie
	}
	return ErrorTie
}

// IsGoal reports whether the target contributes an error (it has `equals`).
func (t Target) IsGoal() bool { return t.HasEquals }

// GoalError is the contract's goal error of value v: |v - equals| / |equals|,
// or |v| when equals is zero. It is zero for a target that is not a goal.
func (t Target) GoalError(v float64) float64 {
	if !t.HasEquals {
		return 0
	}
	d := math.Abs(v - t.Equals)
	if t.Equals == 0 {
		return d
	}
	return d / math.Abs(t.Equals)
}

// Band returns the hard limits on the target's value: the tolerance band
// around Equals intersected with [Min, Max]. Unbounded sides are ±Inf.
func (t Target) Band() (lo, hi float64) {
	lo, hi = math.Inf(-1), math.Inf(1)
	if t.HasEquals && t.Tolerance > 0 {
		w := t.Tolerance
		if t.TolRelative {
			w *= math.Abs(t.Equals)
		}
		lo, hi = t.Equals-w, t.Equals+w
	}
	if t.HasMin && t.Min > lo {
		lo = t.Min
	}
	if t.HasMax && t.Max < hi {
		hi = t.Max
	}
	return lo, hi
}

// Meets reports whether v lies inside the target's hard limits. Bounds are
// inclusive, and a value on a bound within the tie tolerance counts as inside,
// so that a design sitting exactly on a limit is not lost to rounding. A value
// that is not a finite number (NaN or ±Inf: a figure the design does not
// define) meets no target, so no command ranks or shows such a design.
func (t Target) Meets(v float64) bool {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return false
	}
	lo, hi := t.Band()
	return (v >= lo || Same(v, lo)) && (v <= hi || Same(v, hi))
}

// Probe reads one target's quantity from a solved network.
type Probe struct {
	Kind  TargetKind
	A, B  int     // node indices (B is ground for a single-node voltage)
	Part  int     // part index for Current, Power and SelfHeating
	Scale float64 // Code: codes per volt (2^bits / ref); SelfHeating: kelvin per watt (1 / dissipation constant)
	// Sign turns the solver's current of the part (along its edge) into
	// what a current target reads: CurrentSign of the part's kind.
	Sign float64
}

// CurrentSign is the one rule for what a current target reads, as a factor
// on the solver's current along the part's edge. A voltage source's edge
// runs plus → minus inside it, so a source that supplies the circuit reads
// negative there; its target reads the current it delivers out of plus
// (−1), positive when it supplies power, so that a max is a supply-current
// budget. A resistor reads from → to, a current source the current it
// drives (from → to inside it, out of to) and an op-amp the current its
// output drives into out: +1, as the solver has them.
func CurrentSign(k solver.Kind) float64 {
	if k == solver.VoltageSource {
		return -1
	}
	return 1
}

// Read returns the probed quantity from a solver that has just solved.
// A ratio whose denominator node sits at 0 V reads as NaN, which no limit accepts.
func (p Probe) Read(s *solver.Solver) (float64, error) {
	switch p.Kind {
	case Voltage:
		return s.Voltage(p.A) - s.Voltage(p.B), nil
	case Code:
		return (s.Voltage(p.A) - s.Voltage(p.B)) * p.Scale, nil
	case Current:
		return p.Sign * s.Amps(p.Part), nil
	case Power:
		return s.Watts(p.Part), nil
	case SelfHeating:
		// The rise is P/δ with P the power the sensor takes while the
		// network is on (not averaged over on_fraction: a reading is taken
		// while it is powered, and the steady rise under constant power
		// bounds the rise after any on-time).
		return s.Watts(p.Part) * p.Scale, nil
	case Ratio:
		d := s.Voltage(p.B)
		if d == 0 {
			return math.NaN(), nil
		}
		return s.Voltage(p.A) / d, nil
	case Resistance:
		return s.Resistance(p.A, p.B)
	}
	return 0, fmt.Errorf("constraints: unknown target kind %d", p.Kind)
}

// Score is the outcome of one candidate over all conditions.
type Score struct {
	Feasible bool    // every hard limit met, in every condition (see Violated)
	Error    float64 // largest goal error over goals and conditions
	Power    float64 // largest total resistor power over conditions, watts
	// Violated names the first hard limit the candidate fails, when it is
	// not Feasible.
	Violated Violation

	values []float64 // per target and condition, target-major (see Value)
	nc     int       // conditions
	points *Points   // node voltages the derived probes read
}

// Value returns target's value in condition cond (indices into
// Template.Targets and Problem.Conditions): NaN where the target does not
// apply. A sweep-wide target's one value is at condition 0.
func (sc *Score) Value(target, cond int) float64 { return sc.values[target*sc.nc+cond] }

// LimitKind says which sort of hard limit a Violation names.
type LimitKind uint8

// The sorts of hard limit.
const (
	TargetLimit      LimitKind = iota // a target's tolerance band, min or max (Violation.Target)
	SupplyPowerLimit                  // limits.supply_power_max, on the total resistor power
)

// Violation names a hard limit a candidate breaks and a condition it
// breaks it in.
type Violation struct {
	Kind      LimitKind // a target's limit or supply_power_max
	Target    int       // TargetLimit: index into Template.Targets; -1 otherwise
	Condition int       // index into Problem.Conditions
}

// NewScore returns a Score sized for the problem, to be reused across calls.
func (p *Problem) NewScore() *Score {
	nc := len(p.Conditions)
	return &Score{values: make([]float64, len(p.Probes)*nc), nc: nc, points: p.NewPoints()}
}

// Evaluate scores one assignment of the free positions (ohms, in Free
// order) with full nodal solves, one per condition. It reuses s and sc and
// does not allocate. A candidate whose network cannot be solved is infeasible.
func (p *Problem) Evaluate(s *solver.Solver, free []float64, sc *Score) error {
	return p.EvaluateWith(s, free, sc, nil)
}

// EvaluateWith is Evaluate that also calls after(ci), when not nil, once
// condition ci is solved and scored, while s still holds its solution: for a
// caller that needs more of each solution than the score keeps (a search
// bounding a box of values reads the determinant's sign and the sources'
// powers there).
func (p *Problem) EvaluateWith(s *solver.Solver, free []float64, sc *Score, after func(ci int)) error {
	return p.EvaluateBy(s, free, sc, nil, after)
}

// EvaluateBy is EvaluateWith with each condition's solve done by solve(ci),
// when not nil, in place of s.Solve, once the condition's values are set in
// s: for a caller that can give the solution a cheaper way (a search bounding
// a box of values updates a corner from two others it solved,
// solver.Solver.SolveBetween). The scoring is the same.
func (p *Problem) EvaluateBy(s *solver.Solver, free []float64, sc *Score, solve func(ci int) error, after func(ci int)) error {
	nc := len(p.Conditions)
	sc.Feasible, sc.Error, sc.Power = true, 0, 0
	sc.Violated = Violation{Target: -1, Condition: -1}
	for ci, cv := range p.Conditions {
		for i, v := range cv.Values {
			s.SetValue(i, v)
		}
		for k, i := range p.Free {
			s.SetValue(i, free[k])
		}
		var err error
		if solve != nil {
			err = solve(ci)
		} else {
			err = s.Solve()
		}
		if err != nil {
			sc.Feasible = false
			return err
		}
		pw := s.ResistorPower() * p.OnFraction
		if !p.Visible(ci) {
			pw = 0 // a derivative's helper condition has no power figure of its own
		}
		if pw > sc.Power {
			sc.Power = pw
		}
		if OverPowerLimit(pw, p.Template.Limits.SupplyPowerMax) && sc.Feasible {
			sc.Feasible = false
			sc.Violated = Violation{Kind: SupplyPowerLimit, Target: -1, Condition: ci}
		}
		for ti, pr := range p.Probes {
			k := ti*nc + ci
			if !p.Applies[ti][ci] {
				sc.values[k] = math.NaN()
				continue
			}
			v, err := pr.Read(s)
			if err != nil {
				sc.Feasible = false
				return err
			}
			sc.values[k] = v
			tg := &p.Template.Targets[ti]
			if !tg.Meets(v) && sc.Feasible {
				sc.Feasible = false
				sc.Violated = Violation{Kind: TargetLimit, Target: ti, Condition: ci}
			}
			if e := tg.GoalError(v); e > sc.Error || math.IsNaN(e) {
				sc.Error = e
			}
		}
		sc.points.Gather(ci, s)
		if after != nil {
			after(ci)
		}
	}
	p.scoreDerived(sc)
	return nil
}

// scoreDerived computes the sweep-wide targets from the node voltages the
// score's points gathered, records them at condition 0, and folds them into
// the score's feasibility and error.
func (p *Problem) scoreDerived(sc *Score) {
	for ti, dp := range p.Derived {
		if dp == nil {
			continue
		}
		v := sc.points.Derived(ti)
		sc.values[ti*sc.nc] = v
		tg := &p.Template.Targets[ti]
		if !tg.Meets(v) && sc.Feasible {
			sc.Feasible = false
			sc.Violated = Violation{Kind: TargetLimit, Target: ti, Condition: dp.Conds[0]}
		}
		if e := tg.GoalError(v); e > sc.Error || math.IsNaN(e) {
			sc.Error = e
		}
	}
}
