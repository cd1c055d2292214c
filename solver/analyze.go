package solver

import (
	"math"

	"gonum.org/v1/gonum/mat"
)

// CondLimit is the condition number above which Analyze reports an
// IllConditionedError: beyond it fewer than about two significant digits of
// a float64 solution can be trusted.
const CondLimit = 1e14

// Solution is the DC operating point of a circuit as plain data.
type Solution struct {
	Nodes         []NodeVoltage // ground first, then in Network.Nodes order
	Parts         []PartResult  // in the caller's part order
	ResistorPower float64       // total watts dissipated in all resistors
}

// NodeVoltage is one node's voltage against ground.
type NodeVoltage struct {
	Name  string
	Volts float64
}

// PartResult is what one part does, with the conventions of Solver.Volts,
// Solver.Amps and Solver.Watts.
type PartResult struct {
	Name  string
	Kind  Kind
	Volts float64
	Amps  float64
	Watts float64
}

// Analyze compiles the circuit, checks its values (*ValueError), solves it
// with the parts' Value fields and checks the conditioning of the MNA matrix
// with an independent LU (gonum): a condition number above CondLimit gives an
// *IllConditionedError. A solution with a quantity beyond float64's range
// gives an *OverflowError. It is the one-shot entry point; for many solves of
// one topology use Compile and a Solver.
func Analyze(c Circuit) (*Solution, error) {
	net, err := Compile(c)
	if err != nil {
		return nil, err
	}
	s := net.NewSolver()
	if err := s.Check(); err != nil {
		return nil, err
	}
	s.SetRefinement(true)
	s.stamp()
	copy(s.orig, s.a[:net.n*net.n])
	copy(s.origRHS, s.rhs[:net.n])
	n := net.n
	a := mat.NewDense(n, n, append([]float64(nil), s.a[:n*n]...))
	if err := s.factor(); err != nil {
		return nil, err
	}
	var lu mat.LU
	lu.Factorize(a)
	if c := lu.Cond(); c > CondLimit {
		return nil, &IllConditionedError{Cond: c}
	}
	s.finish()
	sol := s.Solution()
	if err := sol.checkFinite(); err != nil {
		return nil, err
	}
	return sol, nil
}

// checkFinite returns an *OverflowError for the first quantity of the
// solution (node voltages, then each part's volts, amps and watts, then the
// total resistor power) that is not a finite number.
func (sol *Solution) checkFinite() error {
	bad := func(x float64) bool { return math.IsNaN(x) || math.IsInf(x, 0) }
	for _, n := range sol.Nodes {
		if bad(n.Volts) {
			return &OverflowError{Quantity: "voltage of node " + n.Name, Node: n.Name}
		}
	}
	for _, p := range sol.Parts {
		for _, q := range [...]struct {
			what string
			x    float64
		}{{"voltage", p.Volts}, {"current", p.Amps}, {"power", p.Watts}} {
			if bad(q.x) {
				return &OverflowError{Quantity: q.what + " of " + p.Kind.String() + " " + p.Name, Part: p.Name}
			}
		}
	}
	if bad(sol.ResistorPower) {
		return &OverflowError{Quantity: "total resistor power"}
	}
	return nil
}
