package solver

import (
	"math"
	"math/big"
	"math/rand/v2"
	"testing"
)

const exactPrec = 256

// exactNetworkSolve solves the network as given, in 256-bit floating
// point: each conductance is 1/R to 256 bits and each matrix entry their
// exact sum, so the reference carries none of float64's rounding of the
// conductances (which refinement corrects for) either.
func exactNetworkSolve(s *Solver) []float64 {
	net, n := s.net, s.n
	m := make([][]*big.Float, n)
	for i := range m {
		m[i] = make([]*big.Float, n+1)
		for j := 0; j < n; j++ {
			m[i][j] = new(big.Float).SetPrec(exactPrec).SetFloat64(net.base[i*n+j])
		}
	}
	for _, r := range net.resStamps {
		g := new(big.Float).SetPrec(exactPrec).Quo(big.NewFloat(1).SetPrec(exactPrec), new(big.Float).SetPrec(exactPrec).SetFloat64(s.vals[r.part]))
		for _, st := range []struct {
			k    int32
			sign int
		}{{r.aa, 1}, {r.bb, 1}, {r.ab, -1}, {r.ba, -1}} {
			if int(st.k) >= n*n {
				continue // the ground scratch slot
			}
			e := m[int(st.k)/n][int(st.k)%n]
			if st.sign > 0 {
				e.Add(e, g)
			} else {
				e.Sub(e, g)
			}
		}
	}
	s.stamp() // the right-hand side: the sources' values, exact in float64
	for i := range m {
		m[i][n] = new(big.Float).SetPrec(exactPrec).SetFloat64(s.rhs[i])
	}
	return eliminate(n, m)
}

// eliminate solves the augmented n×(n+1) system m by Gaussian elimination
// with partial pivoting at m's precision.
func eliminate(n int, m [][]*big.Float) []float64 {
	const prec = exactPrec
	abs := func(x *big.Float) *big.Float { return new(big.Float).Abs(x) }
	for k := 0; k < n; k++ {
		p := k
		for i := k + 1; i < n; i++ {
			if abs(m[i][k]).Cmp(abs(m[p][k])) > 0 {
				p = i
			}
		}
		m[k], m[p] = m[p], m[k]
		for i := k + 1; i < n; i++ {
			f := new(big.Float).SetPrec(prec).Quo(m[i][k], m[k][k])
			for j := k; j <= n; j++ {
				m[i][j].Sub(m[i][j], new(big.Float).SetPrec(prec).Mul(f, m[k][j]))
			}
		}
	}
	x := make([]*big.Float, n)
	for i := n - 1; i >= 0; i-- {
		sum := new(big.Float).SetPrec(prec).Set(m[i][n])
		for j := i + 1; j < n; j++ {
			sum.Sub(sum, new(big.Float).SetPrec(prec).Mul(m[i][j], x[j]))
		}
		x[i] = sum.Quo(sum, m[i][i])
	}
	out := make([]float64, n)
	for i, v := range x {
		out[i], _ = v.Float64()
	}
	return out
}

// Iterative refinement: on random networks with resistances spread over
// eight decades, the refined solution is within a few ulps (scaled by the
// largest unknown) of a 256-bit reference solve of the network as given
// (conductances 1/R to 256 bits), and never further from it than the
// unrefined one beyond rounding. Source for
// the method: iterative refinement of an LU solution with a residual in
// extended precision (Wilkinson; Higham, "Accuracy and Stability of
// Numerical Algorithms", ch. 12; from memory).
func TestRefinementAccuracy(t *testing.T) {
	rng := rand.New(rand.NewPCG(21, 22))
	worstPlain, worstRefined := 0.0, 0.0
	for trial := range 60 {
		c := randomNetwork(rng, 3+rng.IntN(8), trial%3 == 0)
		for i := range c.Parts {
			if c.Parts[i].Kind == Resistor {
				c.Parts[i].Value = math.Pow(10, 8*rng.Float64())
			}
		}
		net, err := Compile(c)
		if err != nil {
			t.Fatal(err)
		}
		plain, refined := net.NewSolver(), net.NewSolver()
		refined.SetRefinement(true)
		if plain.Solve() != nil || refined.Solve() != nil {
			continue // a singular draw; other tests cover those
		}
		want := exactNetworkSolve(net.NewSolver())
		scale := 0.0
		for _, v := range want {
			scale = math.Max(scale, math.Abs(v))
		}
		ep, er := 0.0, 0.0
		for i := range want {
			ep = math.Max(ep, math.Abs(plain.X()[i]-want[i])/scale)
			er = math.Max(er, math.Abs(refined.X()[i]-want[i])/scale)
		}
		worstPlain, worstRefined = math.Max(worstPlain, ep), math.Max(worstRefined, er)
		if er > 8*0x1p-52 {
			t.Errorf("trial %d: refined error %.3g of the largest unknown (plain %.3g)", trial, er, ep)
		}
		if er > ep+8*0x1p-52 {
			t.Errorf("trial %d: refinement made it worse: %.3g vs %.3g", trial, er, ep)
		}
	}
	t.Logf("worst relative error: plain %.3g, refined %.3g", worstPlain, worstRefined)
}

// Refinement keeps Solve free of allocations.
func TestRefinementNoAllocs(t *testing.T) {
	c := Circuit{Parts: []Part{vsrc("V", "a", "gnd", 5), res("R1", "a", "b", 120), res("R2", "b", "gnd", 910e3)}}
	net, err := Compile(c)
	if err != nil {
		t.Fatal(err)
	}
	s := net.NewSolver()
	s.SetRefinement(true)
	if a := testing.AllocsPerRun(100, func() { _ = s.Solve() }); a != 0 {
		t.Errorf("Solve with refinement allocates %v times", a)
	}
}
