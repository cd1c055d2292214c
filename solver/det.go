package solver

// DetSign returns the sign (+1 or -1) of the determinant of the MNA matrix
// of the last successful Solve, read off its LU factors: the product of U's
// diagonal and the parity of the row swaps. It returns 0 when there are no
// valid factors, except after a SolveBetween, where it is the sign the
// update carried over (see there). The matrix's determinant is multi-affine in the
// resistors' conductances (each conductance stamps a rank-one term), so a
// search can settle its sign over a box of values from the box's corners;
// that is what makes corner bounds on node voltages and currents valid.
func (s *Solver) DetSign() int {
	if !s.ok {
		return int(s.lineSign)
	}
	neg := false
	for k, p := range s.piv {
		if p != k {
			neg = !neg
		}
		if s.dinv[k] < 0 {
			neg = !neg
		}
	}
	if neg {
		return -1
	}
	return 1
}
