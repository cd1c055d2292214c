package solver

// This file holds what a search needs to update a solution for a new value of
// one resistor without a new factorisation (the rank-one / bilinear-theorem
// update): the raw MNA solution and the response to a unit current injected
// at a port, both from the factors of the last Solve.

// X returns the MNA solution of the last successful Solve, in unknown order
// (node k's voltage at k-1, then voltage-source currents, then op-amp output
// currents; see Network). The slice is the solver's own: read it before the
// next Solve and do not modify it.
func (s *Solver) X() []float64 { return s.rhs[:s.n] }

// PortResponse writes into dst (length Unknowns) the MNA solution for a unit
// current injected into node a and taken out at node b, with every
// independent source zeroed: the column Y⁻¹(e_a - e_b) of the inverse nodal
// matrix. It reuses the factors of the last Solve and does not allocate.
// It returns ErrNotSolved when there are no valid factors, and panics if a
// node index is out of range or dst is too short.
func (s *Solver) PortResponse(a, b int, dst []float64) error {
	nn := len(s.v)
	if a < 0 || a >= nn || b < 0 || b >= nn || len(dst) < s.n {
		panic("solver: PortResponse: index out of range")
	}
	if !s.ok {
		return ErrNotSolved
	}
	copy(dst, s.port(a, b)[:s.n])
	return nil
}

// BranchUnknown returns the index of the MNA unknown that holds a part's
// current (a voltage source's or an op-amp output's), or -1 for parts whose
// current is not an unknown. It panics if part is out of range.
func (net *Network) BranchUnknown(part int) int {
	return net.pRow[part]
}
