package solver

import "math"

// Solver solves one Network again and again for new part values without
// allocating. It owns its matrices, so use one Solver per goroutine.
//
// A Solver starts with the Value fields of the circuit's parts. Results
// (X, Voltage, Volts, Amps, Watts, ResistorPower) describe the last successful
// Solve or SolveBetween, with the values it used, even if values have been set since; after
// a failed Solve they are meaningless.
type Solver struct {
	net  *Network
	n    int
	vals []float64 // current values, per part
	used []float64 // values of the last successful Solve
	a    []float64 // MNA matrix, row-major n*n, then one scratch slot; LU factors after Solve
	rhs  []float64 // right-hand side then solution, n + scratch
	work []float64 // right-hand side for Resistance, n + scratch
	v    []float64 // node voltages, ground (0) first
	piv  []int
	dinv []float64 // 1 / U[k][k]
	ok   bool      // a and piv hold valid factors
	// lineSign is the determinant's sign after a SolveBetween, which
	// leaves no factors to read it from; 0 otherwise.
	lineSign int8

	// Iterative refinement (SetRefinement): the stamped matrix and
	// right-hand side before factoring, and a residual buffer.
	refine        bool
	orig, origRHS []float64
	resid         []float64
	// lo holds, per matrix entry, what rounding left out of it: the
	// remainders of each 1/R and of each sum of conductances. The
	// residual adds it back, so that refinement converges to the solution
	// for the resistances as given, not for their rounded conductances.
	lo []float64
}

// NewSolver returns a Solver for the network, loaded with the parts' Value
// fields.
func (net *Network) NewSolver() *Solver {
	n := net.n
	s := &Solver{
		net:  net,
		n:    n,
		vals: make([]float64, len(net.parts)),
		used: make([]float64, len(net.parts)),
		a:    make([]float64, n*n+1),
		rhs:  make([]float64, n+1),
		work: make([]float64, n+1),
		v:    make([]float64, len(net.nodes)),
		piv:  make([]int, n),
		dinv: make([]float64, n),
	}
	for i, p := range net.parts {
		s.vals[i] = p.Value
	}
	return s
}

// Network returns the network the solver works on.
func (s *Solver) Network() *Network { return s.net }

// SetValue sets the value of a part (ohms, volts or amps; ignored for an
// op-amp) by its index in the caller's part order. It does no checks, for
// speed: call Check before trusting a Solve with values from outside. It
// panics if part is out of range.
func (s *Solver) SetValue(part int, v float64) {
	s.vals[part] = v
	s.ok = false
	s.lineSign = 0
}

// Value returns the current value of a part.
func (s *Solver) Value(part int) float64 { return s.vals[part] }

// Check returns a *ValueError for the first part (in part order) whose
// current value the solver cannot use: a resistance that is zero, negative,
// NaN or infinite, or a source value that is NaN or infinite.
func (s *Solver) Check() error {
	for i, p := range s.net.parts {
		if err := checkValue(p.Name, p.Kind, s.vals[i]); err != nil {
			return err
		}
	}
	return nil
}

func checkValue(name string, k Kind, v float64) error {
	bad := false
	switch k {
	case Resistor:
		bad = !(v > 0) || math.IsInf(v, 1) // !(v > 0) also catches NaN
	case VoltageSource, CurrentSource:
		bad = math.IsNaN(v) || math.IsInf(v, 0)
	}
	if bad {
		return &ValueError{Part: name, Kind: k, Value: v}
	}
	return nil
}

// Solve stamps the current values, factors the MNA matrix (LU with partial
// pivoting) and solves for all node voltages and branch currents. It does
// not allocate on success and does not check values (see Check): a zero
// resistance, for instance, gives a *SingularError or non-finite results.
// A pivot below n·ε·max|A| returns a *SingularError naming the unknown
// (max|A| is read off the diagonal, which bounds the rest when resistances
// are positive). It does not estimate the condition number; Analyze does.
func (s *Solver) Solve() error {
	s.lineSign = 0
	s.stamp()
	if s.refine {
		copy(s.orig, s.a[:s.n*s.n])
		copy(s.origRHS, s.rhs[:s.n])
	}
	if err := s.factor(); err != nil {
		return err
	}
	s.finish()
	return nil
}

// SetRefinement turns iterative refinement on or off for every later Solve:
// twice, the residual b − A·x, computed in twice the working precision
// (exact products by fused multiply-add, compensated sums, and the
// rounding of each conductance 1/R and of each sum of conductances added
// back), is solved for with the same factors and added back. It costs
// about two thirds of a solve more and brings the answer to full float64
// accuracy for the resistances as given, on the wide-ranging values of
// real networks (a 120 Ω and a 910 kΩ in one ladder), so that two designs
// equal in exact arithmetic — one a decade-scaled copy of the other — also
// come out equal within the ranking's tie tolerance, even in a stage whose
// output is a difference of larger terms (a gain-10 difference stage
// spread its exact ties over 1e-16 … 1.1e-15 without the conductances'
// rounding added back). The search's hot path leaves it off; every figure
// a kept candidate carries, and the results people see, turn it on. It
// allocates its buffers once, here.
func (s *Solver) SetRefinement(on bool) {
	s.refine = on
	if on && s.orig == nil {
		s.orig = make([]float64, s.n*s.n)
		s.origRHS = make([]float64, s.n)
		s.resid = make([]float64, s.n+1)
		s.lo = make([]float64, s.n*s.n+1) // with the scratch slot, as s.a has
	}
}

// finish solves with fresh factors and publishes the results.
func (s *Solver) finish() {
	s.substitute(s.rhs)
	if s.refine {
		n, x, r := s.n, s.rhs, s.resid
		for range 2 {
			for i := 0; i < n; i++ {
				r[i] = residual(s.origRHS[i], s.orig[i*n:i*n+n], x) - dot(s.lo[i*n:i*n+n], x)
			}
			r[n] = 0
			s.substitute(r)
			for i := 0; i < n; i++ {
				x[i] += r[i]
			}
		}
	}
	s.v[0] = 0
	copy(s.v[1:], s.rhs[:s.net.nodeUnknownOff])
	copy(s.used, s.vals)
}

// stamp writes the matrix and right-hand side for the current values.
func (s *Solver) stamp() {
	a, rhs, vals := s.a, s.rhs, s.vals
	copy(a, s.net.base)
	if s.refine {
		s.stampExact()
	} else {
		for _, r := range s.net.resStamps {
			g := 1 / vals[r.part]
			a[r.aa] += g
			a[r.bb] += g
			a[r.ab] -= g
			a[r.ba] -= g
		}
	}
	clear(rhs)
	for _, v := range s.net.vStamps {
		rhs[v.row] = vals[v.part]
	}
	// KCL rows read "current leaving the node = current injected", so a
	// current source takes its value from its From row and adds it to To.
	for _, c := range s.net.iStamps {
		i := vals[c.part]
		rhs[c.from] -= i
		rhs[c.to] += i
	}
}

// stampExact stamps the conductances as stamp does and records in s.lo
// what each entry lost to rounding: g = 1/R leaves 1 − g·R (exact by a
// fused multiply-add) over R, and each sum its TwoSum remainder (Knuth,
// The Art of Computer Programming vol. 2, 4.2.2; from memory).
func (s *Solver) stampExact() {
	a, lo := s.a, s.lo
	clear(lo)
	add := func(k int32, g, glo float64) {
		sum, e := twoSum(a[k], g)
		lo[k] += e + glo
		a[k] = sum
	}
	for _, r := range s.net.resStamps {
		R := s.vals[r.part]
		g := 1 / R
		glo := math.FMA(-g, R, 1) / R
		add(r.aa, g, glo)
		add(r.bb, g, glo)
		add(r.ab, -g, -glo)
		add(r.ba, -g, -glo)
	}
}

// dot returns Σ a[j]·x[j] in working precision: for the small remainders
// of s.lo, whose own rounding is far below a unit in the last place.
func dot(a, x []float64) float64 {
	sum := 0.0
	for j, v := range a {
		if v != 0 {
			sum += v * x[j]
		}
	}
	return sum
}

// factor overwrites s.a with its LU factors (unit lower L below the
// diagonal, U on and above) and records the row swaps in s.piv and the
// reciprocals of U's diagonal in s.dinv.
func (s *Solver) factor() error {
	s.ok = false
	n, a := s.n, s.a[:s.n*s.n]
	// max|A| without scanning the whole matrix: an off-diagonal conductance
	// entry never exceeds the diagonal sums it is part of, and every source
	// and nullor entry is ±1.
	amax := s.net.unitMax
	for k := range s.net.nodeUnknownOff {
		if d := math.Abs(a[k*n+k]); d > amax {
			amax = d
		}
	}
	tol := float64(n) * 0x1p-52 * amax
	for k := 0; k < n; k++ {
		p, pmax := k, math.Abs(a[k*n+k])
		for i := k + 1; i < n; i++ {
			if m := math.Abs(a[i*n+k]); m > pmax {
				p, pmax = i, m
			}
		}
		if !(pmax > tol) { // also true for NaN
			node, part := s.net.unknownOwner(k)
			return &SingularError{Unknown: s.net.UnknownName(k), Node: node, Part: part}
		}
		s.piv[k] = p
		rk := a[k*n : k*n+n]
		if p != k {
			rp := a[p*n : p*n+n]
			for j := range rk {
				rk[j], rp[j] = rp[j], rk[j]
			}
		}
		inv := 1 / rk[k]
		s.dinv[k] = inv
		uk := rk[k+1:]
		for i := k + 1; i < n; i++ {
			ri := a[i*n+k : i*n+n] // row i from column k
			l := ri[0]
			if l == 0 { // MNA matrices are sparse; most multipliers vanish
				continue
			}
			l *= inv
			ri[0] = l
			ri = ri[1:]
			ri = ri[:len(uk)] // lets the compiler drop bounds checks
			for j, u := range uk {
				ri[j] -= l * u
			}
		}
	}
	s.ok = true
	return nil
}

// substitute solves A x = b in place with the factors in s.a, s.piv and
// s.dinv.
func (s *Solver) substitute(b []float64) {
	n, a, dinv := s.n, s.a, s.dinv
	b = b[:n]
	dinv = dinv[:n]
	for k, p := range s.piv {
		if p != k {
			b[k], b[p] = b[p], b[k]
		}
	}
	for i := 1; i < n; i++ {
		li := a[i*n : i*n+i]
		bj := b[:len(li)]
		sum := b[i]
		for j, l := range li {
			sum -= l * bj[j]
		}
		b[i] = sum
	}
	for i := n - 1; i >= 0; i-- {
		ui := a[i*n+i+1 : i*n+n]
		bj := b[i+1:]
		bj = bj[:len(ui)]
		sum := b[i]
		for j, u := range ui {
			sum -= u * bj[j]
		}
		b[i] = sum * dinv[i]
	}
}

// Voltage returns the voltage of node (an index into Nodes) against ground.
func (s *Solver) Voltage(node int) float64 { return s.v[node] }

// Volts returns V(From) - V(To) of a part; V(Plus) - V(Minus) for a voltage
// source; V(Out) for an op-amp.
func (s *Solver) Volts(part int) float64 {
	net := s.net
	if net.pKind[part] == OpAmp {
		return s.v[net.pTo[part]]
	}
	return s.v[net.pFrom[part]] - s.v[net.pTo[part]]
}

// Amps returns the current through a part along its edge: From -> To for a
// resistor, + -> - through a voltage source (negative when it delivers),
// the source's own current for a current source, and the current an op-amp
// output drives into Out.
func (s *Solver) Amps(part int) float64 {
	net := s.net
	switch net.pKind[part] {
	case Resistor:
		return (s.v[net.pFrom[part]] - s.v[net.pTo[part]]) / s.used[part]
	case CurrentSource:
		return s.used[part]
	default:
		return s.rhs[net.pRow[part]]
	}
}

// Watts returns the power a part absorbs: edge voltage times edge current,
// which is -V(Out)·I for an op-amp output. It is negative where the part
// delivers power.
func (s *Solver) Watts(part int) float64 {
	net := s.net
	return (s.v[net.pFrom[part]] - s.v[net.pTo[part]]) * s.Amps(part)
}

// ResistorPower returns the power dissipated in all resistors together,
// which by Tellegen's theorem is the power the sources and op-amp outputs
// deliver.
func (s *Solver) ResistorPower() float64 {
	net := s.net
	sum := 0.0
	for _, p := range net.resistors {
		d := s.v[net.pFrom[p]] - s.v[net.pTo[p]]
		sum += d * d / s.used[p]
	}
	return sum
}

// Resistance returns the resistance seen between nodes a and b (indices into
// Nodes) with every independent source zeroed (voltage sources shorted,
// current sources open) and op-amps left working: it injects 1 A into a,
// takes it out at b and returns V(a) - V(b). It reuses the factors of the
// last Solve, costs one forward and back substitution and does not
// allocate. It returns ErrNotSolved if there are no valid factors (no
// successful Solve since the solver was made or a value was set). It panics
// if a or b is out of range.
func (s *Solver) Resistance(a, b int) (float64, error) {
	nn := len(s.v)
	if a < 0 || a >= nn || b < 0 || b >= nn {
		panic("solver: Resistance: node index out of range")
	}
	if !s.ok {
		return 0, ErrNotSolved
	}
	if a == b {
		return 0, nil
	}
	w := s.port(a, b)
	return w[s.rhsRow(a)] - w[s.rhsRow(b)], nil
}

// port solves, with the last factors, for a unit current injected at node a
// and taken out at node b with every source zeroed, and returns the solution
// in s.work, whose scratch slot past the unknowns reads as ground (0).
func (s *Solver) port(a, b int) []float64 {
	w := s.work
	clear(w)
	// Node k's KCL row is k-1; ground's injection goes to the scratch slot.
	w[s.rhsRow(a)] += 1
	w[s.rhsRow(b)] -= 1
	s.substitute(w)
	w[s.n] = 0
	return w
}

func (s *Solver) rhsRow(node int) int {
	if node == 0 {
		return s.n
	}
	return node - 1
}

// Solution returns the last solution as plain data (allocates).
func (s *Solver) Solution() *Solution {
	net := s.net
	sol := &Solution{
		Nodes:         make([]NodeVoltage, len(net.nodes)),
		Parts:         make([]PartResult, len(net.parts)),
		ResistorPower: s.ResistorPower(),
	}
	for k, name := range net.nodes {
		sol.Nodes[k] = NodeVoltage{Name: name, Volts: s.v[k]}
	}
	for i, p := range net.parts {
		sol.Parts[i] = PartResult{Name: p.Name, Kind: p.Kind, Volts: s.Volts(i), Amps: s.Amps(i), Watts: s.Watts(i)}
	}
	return sol
}

// residual returns b − Σ a[j]·x[j] computed as if in twice the working
// precision: each product's rounding error comes exactly from a fused
// multiply-add, and each sum's from the TwoSum transformation (the
// compensated dot product of Ogita, Rump and Oishi, 2005; from memory). A
// residual computed in working precision would be mostly rounding noise and
// refinement could not improve on the first solution.
func residual(b float64, a, x []float64) float64 {
	sum, comp := b, 0.0
	for j, aij := range a {
		p := aij * x[j]
		pe := math.FMA(aij, x[j], -p) // aij·x[j] = p + pe exactly
		t, e := twoSum(sum, -p)
		sum = t
		comp += e - pe
	}
	return sum + comp
}

// twoSum returns a + b rounded and its rounding error: a + b = s + e
// exactly (the TwoSum transformation; Knuth, The Art of Computer
// Programming vol. 2, 4.2.2; from memory).
func twoSum(a, b float64) (s, e float64) {
	s = a + b
	z := s - a
	return s, (a - (s - z)) + (b - z)
}
