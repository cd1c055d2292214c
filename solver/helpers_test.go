package solver

import (
	"math"
	"testing"

	"gonum.org/v1/gonum/mat"
)

// Short constructors keep the test circuits readable.
func res(name, from, to string, ohms float64) Part {
	return Part{Name: name, Kind: Resistor, From: from, To: to, Value: ohms}
}
func vsrc(name, plus, minus string, volts float64) Part {
	return Part{Name: name, Kind: VoltageSource, From: plus, To: minus, Value: volts}
}
func isrc(name, from, to string, amps float64) Part {
	return Part{Name: name, Kind: CurrentSource, From: from, To: to, Value: amps}
}
func opamp(name, plus, minus, out string) Part {
	return Part{Name: name, Kind: OpAmp, Plus: plus, Minus: minus, Out: out}
}

// near reports whether got is within tol of want, relative to max(|want|, 1)
// so that tolerances read the same for volts near zero.
func near(got, want, tol float64) bool {
	return math.Abs(got-want) <= tol*math.Max(math.Abs(want), 1)
}

func mustAnalyze(t testing.TB, c Circuit) *Solution {
	t.Helper()
	sol, err := Analyze(c)
	if err != nil {
		t.Fatalf("Analyze: %v", err)
	}
	return sol
}

func mustSolver(t testing.TB, c Circuit) *Solver {
	t.Helper()
	net, err := Compile(c)
	if err != nil {
		t.Fatalf("Compile: %v", err)
	}
	s := net.NewSolver()
	if err := s.Solve(); err != nil {
		t.Fatalf("Solve: %v", err)
	}
	return s
}

func nodeV(t testing.TB, sol *Solution, name string) float64 {
	t.Helper()
	for _, nv := range sol.Nodes {
		if nv.Name == name {
			return nv.Volts
		}
	}
	t.Fatalf("no node %q", name)
	return 0
}

func partR(t testing.TB, sol *Solution, name string) PartResult {
	t.Helper()
	for _, p := range sol.Parts {
		if p.Name == name {
			return p
		}
	}
	t.Fatalf("no part %q", name)
	return PartResult{}
}

// plainMNA assembles the MNA equations of c straight from their textbook
// block form, independently of Network's numbering and stamp offsets:
//
//	[ A_R·diag(1/R)·A_Rᵀ  A_V  A_O ] [v]   [ -A_I·i_s ]
//	[ A_Vᵀ                 0    0  ] [j] = [  v_s     ]
//	[ N                    0    0  ] [k]   [  0       ]
//
// with reduced incidence matrices A_* per kind (op-amp output: an edge from
// ground to Out) and N the nullor rows e_plusᵀ - e_minusᵀ. It returns the
// matrix, the right-hand side and the node names in column order (ground
// excluded). Nodes are numbered by first appearance, the same rule Network
// documents, but counted here on their own.
func plainMNA(c Circuit) (*mat.Dense, *mat.VecDense, []string) {
	ground := c.Ground
	if ground == "" {
		ground = "gnd"
	}
	idx := map[string]int{ground: -1}
	var names []string
	id := func(s string) int {
		if k, ok := idx[s]; ok {
			return k
		}
		idx[s] = len(names)
		names = append(names, s)
		return idx[s]
	}
	type edge struct{ from, to int }
	var rE, vE, iE, oE []edge
	var rG, vVal, iVal []float64
	var oPlus, oMinus []int
	for _, p := range c.Parts {
		switch p.Kind {
		case Resistor:
			rE = append(rE, edge{id(p.From), id(p.To)})
			rG = append(rG, 1/p.Value)
		case VoltageSource:
			vE = append(vE, edge{id(p.From), id(p.To)})
			vVal = append(vVal, p.Value)
		case CurrentSource:
			iE = append(iE, edge{id(p.From), id(p.To)})
			iVal = append(iVal, p.Value)
		case OpAmp:
			oPlus = append(oPlus, id(p.Plus))
			oMinus = append(oMinus, id(p.Minus))
			oE = append(oE, edge{-1, id(p.Out)})
		}
	}
	nn := len(names)
	inc := func(es []edge) *mat.Dense {
		if len(es) == 0 {
			return nil
		}
		a := mat.NewDense(nn, len(es), nil)
		for j, e := range es {
			if e.from >= 0 {
				a.Set(e.from, j, 1)
			}
			if e.to >= 0 {
				a.Set(e.to, j, -1)
			}
		}
		return a
	}
	ar, av, ai, ao := inc(rE), inc(vE), inc(iE), inc(oE)
	nv, no := len(vE), len(oE)
	n := nn + nv + no
	m := mat.NewDense(n, n, nil)
	b := mat.NewVecDense(n, nil)
	if ar != nil {
		var g, arg mat.Dense
		arg.Mul(ar, mat.NewDiagDense(len(rG), rG))
		g.Mul(&arg, ar.T())
		m.Slice(0, nn, 0, nn).(*mat.Dense).Copy(&g)
	}
	if av != nil {
		m.Slice(0, nn, nn, nn+nv).(*mat.Dense).Copy(av)
		m.Slice(nn, nn+nv, 0, nn).(*mat.Dense).Copy(av.T())
		for j, v := range vVal {
			b.SetVec(nn+j, v)
		}
	}
	if ao != nil {
		m.Slice(0, nn, nn+nv, n).(*mat.Dense).Copy(ao)
		for j := range oE {
			if oPlus[j] >= 0 {
				m.Set(nn+nv+j, oPlus[j], 1)
			}
			if oMinus[j] >= 0 {
				m.Set(nn+nv+j, oMinus[j], -1)
			}
		}
	}
	if ai != nil {
		var inj mat.VecDense
		inj.MulVec(ai, mat.NewVecDense(len(iVal), iVal))
		for k := 0; k < nn; k++ {
			b.SetVec(k, -inj.AtVec(k))
		}
	}
	return m, b, names
}

// qrSolve solves m x = b with gonum's QR, a different factorisation from
// the solver's LU.
func qrSolve(t testing.TB, m *mat.Dense, b *mat.VecDense) []float64 {
	t.Helper()
	var qr mat.QR
	qr.Factorize(m)
	var x mat.Dense
	if err := qr.SolveTo(&x, false, b); err != nil {
		t.Fatalf("QR SolveTo: %v", err)
	}
	return mat.Col(nil, 0, &x)
}
