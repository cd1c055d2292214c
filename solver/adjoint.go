package solver

import "fmt"

// This file adds the transposed solve and the adjoint sensitivities built on
// it. The MNA matrix is not symmetric once voltage sources' rows differ from
// their columns or op-amps (nullors) are present, so the adjoint system is
// solved with Aᵀ, reusing the LU factors of the last Solve: with P·A = L·U,
// Aᵀ = Uᵀ·Lᵀ·P, so Aᵀx = b is a forward solve with Uᵀ, a back solve with Lᵀ
// and the row swaps undone in reverse order.

// SolveTranspose solves Aᵀ·x = b in place, where A is the MNA matrix of the
// last successful Solve (unknowns ordered as Network describes). b must have
// at least Unknowns() elements; only those are used. It allocates nothing and
// returns ErrNotSolved when there are no valid factors.
func (s *Solver) SolveTranspose(b []float64) error {
	if !s.ok {
		return ErrNotSolved
	}
	n := s.n
	if len(b) < n {
		return fmt.Errorf("solver: SolveTranspose: right-hand side has %d elements, want %d", len(b), n)
	}
	a, dinv := s.a, s.dinv
	b = b[:n]
	// Uᵀ·w = b: Uᵀ is lower triangular with U's diagonal.
	for i := 0; i < n; i++ {
		sum := b[i]
		for j := 0; j < i; j++ {
			sum -= a[j*n+i] * b[j]
		}
		b[i] = sum * dinv[i]
	}
	// Lᵀ·z = w: Lᵀ is unit upper triangular.
	for i := n - 1; i >= 0; i-- {
		sum := b[i]
		for j := i + 1; j < n; j++ {
			sum -= a[j*n+i] * b[j]
		}
		b[i] = sum
	}
	// x = Pᵀ·z: undo the swaps last first.
	for k := n - 1; k >= 0; k-- {
		if p := s.piv[k]; p != k {
			b[k], b[p] = b[p], b[k]
		}
	}
	return nil
}

// Adjoint returns in dst (one entry per part, caller's order) the derivative
// of the read-out
//
//	L = Σ_k nodeW[k]·Voltage(k) + Σ_p partW[p]·Amps(p)
//
// with respect to each part's value (ohms, volts or amps; 0 for an op-amp),
// at the last solution. nodeW is indexed like Nodes (its ground entry is
// ignored) and partW like the parts; either may be nil. A nonlinear quantity
// (a ratio, a power) is handled by passing its partial derivatives as the
// weights: the result is then its exact first derivative.
//
// It costs one transposed solve with the factors of the last Solve (the
// adjoint method: solve Aᵀλ = ∂L/∂x, then dL/dp = ∂L/∂p − λᵀ(∂A/∂p·x − ∂b/∂p))
// and returns ErrNotSolved when there are no valid factors.
func (s *Solver) Adjoint(nodeW, partW, dst []float64) error {
	if !s.ok {
		return ErrNotSolved
	}
	net := s.net
	np := len(net.parts)
	if len(dst) < np || (nodeW != nil && len(nodeW) < len(net.nodes)) || (partW != nil && len(partW) < np) {
		return fmt.Errorf("solver: Adjoint: slice lengths do not match the network (%d nodes, %d parts)", len(net.nodes), np)
	}
	lam := make([]float64, s.n+1) // the extra slot stands for ground and stays 0
	clear(dst[:np])
	row := func(node int) int { return s.rhsRow(node) }
	for k := 1; k < len(net.nodes) && nodeW != nil; k++ {
		lam[k-1] += nodeW[k]
	}
	for p := 0; p < np && partW != nil; p++ {
		w := partW[p]
		if w == 0 {
			continue
		}
		switch net.pKind[p] {
		case VoltageSource, OpAmp:
			lam[net.pRow[p]] += w
		case Resistor:
			// Amps = (V(from) - V(to)) / R: weights on the two node
			// voltages, and an explicit ∂/∂R.
			r := s.used[p]
			lam[row(net.pFrom[p])] += w / r
			lam[row(net.pTo[p])] -= w / r
			dst[p] -= w * s.Volts(p) / (r * r)
		case CurrentSource:
			dst[p] += w // Amps is the source's own value
		}
	}
	lam[s.n] = 0
	if err := s.SolveTranspose(lam); err != nil {
		return err
	}
	lam[s.n] = 0
	for p := 0; p < np; p++ {
		switch net.pKind[p] {
		case Resistor:
			// ∂A/∂R = -(1/R²)·stamp, so -λᵀ(∂A/∂R)x = (λa-λb)(va-vb)/R².
			r := s.used[p]
			dl := lam[row(net.pFrom[p])] - lam[row(net.pTo[p])]
			dst[p] += dl * s.Volts(p) / (r * r)
		case VoltageSource:
			dst[p] += lam[net.pRow[p]]
		case CurrentSource:
			// The value leaves the From row and enters the To row.
			dst[p] += lam[row(net.pTo[p])] - lam[row(net.pFrom[p])]
		}
	}
	return nil
}

// ResistanceAdjoint returns in dst the derivative, with respect to each
// part's value, of Resistance(a, b) at the last solution: with A·z = e and
// Aᵀ·y = e (e injects 1 A at a and takes it out at b), dR/dp = −yᵀ(∂A/∂p)z.
// Only resistors have a non-zero entry (sources are zeroed). It costs two
// substitutions with the last factors and returns ErrNotSolved without them.
func (s *Solver) ResistanceAdjoint(a, b int, dst []float64) error {
	if !s.ok {
		return ErrNotSolved
	}
	net := s.net
	nn, np := len(net.nodes), len(net.parts)
	if a < 0 || a >= nn || b < 0 || b >= nn {
		return fmt.Errorf("solver: ResistanceAdjoint: node index out of range")
	}
	if len(dst) < np {
		return fmt.Errorf("solver: ResistanceAdjoint: dst has %d elements, want %d", len(dst), np)
	}
	clear(dst[:np])
	if a == b {
		return nil
	}
	z := make([]float64, s.n+1)
	y := make([]float64, s.n+1)
	z[s.rhsRow(a)] += 1
	z[s.rhsRow(b)] -= 1
	copy(y, z)
	z[s.n], y[s.n] = 0, 0
	s.substitute(z)
	if err := s.SolveTranspose(y); err != nil {
		return err
	}
	z[s.n], y[s.n] = 0, 0
	for p := 0; p < np; p++ {
		if net.pKind[p] != Resistor {
			continue
		}
		r := s.used[p]
		f, t := s.rhsRow(net.pFrom[p]), s.rhsRow(net.pTo[p])
		dst[p] = (y[f] - y[t]) * (z[f] - z[t]) / (r * r)
	}
	return nil
}
