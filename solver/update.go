package solver

// This file holds what a search needs to update a solution for a new value of
// one resistor without a new factorisation (the rank-one / bilinear-theorem
// update): the raw MNA solution and the response to a unit current injected
// at a port, both from the factors of the last Solve.

// X returns the MNA solution of the last successful Solve or SolveBetween, in unknown order
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

// Endpoint is one end of the line SolveBetween updates along: a solution as
// X gave it (the caller's copy), the value of the resistor that varies in it,
// and DetSign there.
type Endpoint struct {
	X    []float64
	R    float64
	Sign int
}

// SolveBetween sets the solution for the current values without a
// factorisation, from two earlier solutions a and b of networks that differ
// from the current one only in resistor part's value (a.R and b.R), the
// current value lying between them. The MNA determinant is multi-affine in
// the conductances, so affine in this one: where it has one sign at both
// ends it keeps it between, and DetSign returns that sign. By the bilinear
// theorem (one conductance stamps a rank-one term, so by the
// Sherman–Morrison formula the solution moves along one fixed direction as
// that conductance changes) the solution then lies on the line through a.X
// and b.X:
//
//	x = xa + β·(xb − xa),  β = λ·va / ((1 − λ)·vb + λ·va),
//
// where λ = (G − Ga)/(Gb − Ga) places the part's conductance G between Ga
// and Gb, and va and vb are the part's voltage at the two ends (of one sign
// where the determinant keeps its sign, so β lies in [0, 1]). A part with
// no voltage at either end carries no current and moves nothing: x = xa.
//
// It costs one pass over the unknowns. X, Voltage, Volts, Amps, Watts and
// ResistorPower then describe the new solution as after a Solve;
// Resistance, PortResponse and the adjoint methods, which need factors,
// return ErrNotSolved. It returns ErrOffLine, and leaves the last results
// meaningless, when the current value is not between a.R and b.R, when the
// two signs differ or are 0, when va and vb differ in sign (rounding of a
// part that carries almost no current), or when refinement is on
// (SetRefinement promises a refined answer); Solve then gives the solution.
// It panics if part is not a resistor or a slice is shorter than Unknowns.
func (s *Solver) SolveBetween(part int, a, b Endpoint) error {
	net := s.net
	if net.pKind[part] != Resistor {
		panic("solver: SolveBetween: part is not a resistor")
	}
	if len(a.X) < s.n || len(b.X) < s.n {
		panic("solver: SolveBetween: a solution is shorter than Unknowns")
	}
	xa, xb := a.X[:s.n], b.X[:s.n]
	r := s.vals[part]
	// λ = (1/r − 1/ra)/(1/rb − 1/ra), written without the reciprocals.
	lambda := (a.R - r) * b.R / ((a.R - b.R) * r)
	if s.refine || a.Sign == 0 || a.Sign != b.Sign || !(lambda >= 0 && lambda <= 1) {
		return ErrOffLine
	}
	va := volt(xa, net.pFrom[part], net.pTo[part])
	vb := volt(xb, net.pFrom[part], net.pTo[part])
	beta := 0.0
	switch {
	case va == 0 && vb == 0:
	case (va > 0 && vb > 0) || (va < 0 && vb < 0):
		beta = lambda * va / ((1-lambda)*vb + lambda*va)
	default:
		return ErrOffLine
	}
	x := s.rhs[:s.n]
	for i, v := range xa {
		x[i] = v + beta*(xb[i]-v)
	}
	s.ok = false
	s.lineSign = int8(a.Sign)
	s.v[0] = 0
	copy(s.v[1:], x[:net.nodeUnknownOff])
	copy(s.used, s.vals)
	return nil
}

// volt returns V(from) − V(to) in an MNA solution x (node k at k−1, ground 0).
func volt(x []float64, from, to int) float64 {
	v := 0.0
	if from > 0 {
		v = x[from-1]
	}
	if to > 0 {
		v -= x[to-1]
	}
	return v
}
