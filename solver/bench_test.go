package solver

import (
	"fmt"
	"testing"

	"gonum.org/v1/gonum/mat"
)

type benchNet struct {
	name string
	c    Circuit
	vary int // index of the resistor each iteration changes
}

// benchNetworks are the three shapes the benchmarks compare: 3, 7 and 11
// MNA unknowns.
func benchNetworks() []benchNet {
	// 3 unknowns: loaded divider (2 nodes + 1 source).
	div := Circuit{Parts: []Part{vsrc("V1", "in", "gnd", 5), res("R1", "in", "out", 10e3), res("R2", "out", "gnd", 4.7e3), res("RL", "out", "gnd", 100e3)}}
	// 7 unknowns: R-2R ladder (6 nodes + 1 source).
	lad := Circuit{Parts: []Part{vsrc("V1", "in", "gnd", 5)}}
	prev := "in"
	for k := 1; k <= 5; k++ {
		n := fmt.Sprintf("n%d", k)
		lad.Parts = append(lad.Parts, res(fmt.Sprintf("RS%d", k), prev, n, 10e3), res(fmt.Sprintf("RP%d", k), n, "gnd", 20e3))
		prev = n
	}
	// 11 unknowns: bridge read by a difference amplifier driving a ladder
	// (9 nodes + 1 source + 1 op-amp).
	br := Circuit{Parts: []Part{
		vsrc("V1", "in", "gnd", 5),
		res("R1", "in", "a", 10e3), res("R2", "a", "gnd", 10e3), res("R3", "in", "b", 10.2e3), res("R4", "b", "gnd", 9.8e3),
		res("RA", "a", "m", 10e3), res("RF", "m", "o", 100e3), res("RB", "b", "p", 10e3), res("RG", "p", "gnd", 100e3),
		opamp("U1", "p", "m", "o"),
		res("L1", "o", "l1", 1e3), res("P1", "l1", "gnd", 2e3), res("L2", "l1", "l2", 1e3), res("P2", "l2", "gnd", 2e3),
		res("L3", "l2", "l3", 1e3), res("P3", "l3", "gnd", 2e3),
	}}
	return []benchNet{{"3", div, 2}, {"7", lad, 2}, {"11", br, 4}}
}

// naiveSolve is the baseline: what a direct program does per evaluation.
// Node numbers come precomputed (from the Network), but the matrix and
// vectors are built afresh with gonum and solved with mat.LU.
func naiveSolve(parts []Part, from, to, plus, minus []int, nn, n int) (*mat.VecDense, error) {
	a := mat.NewDense(n, n, nil)
	b := mat.NewVecDense(n, nil)
	naiveStamp(a, b, parts, from, to, plus, minus, nn)
	var lu mat.LU
	lu.Factorize(a)
	x := mat.NewVecDense(n, nil)
	err := lu.SolveVecTo(x, false, b)
	return x, err
}

// reusedLU is the careful gonum baseline: the matrix, vectors and LU are
// allocated once and refilled for every evaluation.
type reusedLU struct {
	a    *mat.Dense
	b, x *mat.VecDense
	lu   mat.LU
}

func (r *reusedLU) solve(parts []Part, from, to, plus, minus []int, nn int) error {
	r.a.Zero()
	r.b.Zero()
	naiveStamp(r.a, r.b, parts, from, to, plus, minus, nn)
	r.lu.Factorize(r.a)
	return r.lu.SolveVecTo(r.x, false, r.b)
}

// naiveStamp adds every part's MNA stamp into a and b (zeroed by the caller).
func naiveStamp(a *mat.Dense, b *mat.VecDense, parts []Part, from, to, plus, minus []int, nn int) {
	add := func(r, c int, v float64) {
		if r >= 0 && c >= 0 {
			a.Set(r, c, a.At(r, c)+v)
		}
	}
	addB := func(r int, v float64) {
		if r >= 0 {
			b.SetVec(r, b.AtVec(r)+v)
		}
	}
	row := nn
	for i, p := range parts {
		f, t := from[i]-1, to[i]-1
		switch p.Kind {
		case Resistor:
			g := 1 / p.Value
			add(f, f, g)
			add(t, t, g)
			add(f, t, -g)
			add(t, f, -g)
		case VoltageSource:
			add(f, row, 1)
			add(t, row, -1)
			add(row, f, 1)
			add(row, t, -1)
			b.SetVec(row, p.Value)
			row++
		case CurrentSource:
			addB(f, -p.Value)
			addB(t, p.Value)
		case OpAmp:
			add(t, row, -1)
			add(row, plus[i]-1, 1)
			add(row, minus[i]-1, -1)
			row++
		}
	}
}

// benchNodes returns the node numbers the baselines stamp with.
func benchNodes(b *testing.B, c Circuit) (net *Network, parts []Part, from, to, plus, minus []int) {
	net, err := Compile(c)
	if err != nil {
		b.Fatal(err)
	}
	parts = net.Parts()
	np := len(parts)
	from, to, plus, minus = make([]int, np), make([]int, np), make([]int, np), make([]int, np)
	idx := func(s string) int { k, _ := net.NodeIndex(s); return k }
	for i, p := range parts {
		if p.Kind == OpAmp {
			to[i], plus[i], minus[i] = idx(p.Out), idx(p.Plus), idx(p.Minus)
		} else {
			from[i], to[i] = idx(p.From), idx(p.To)
		}
	}
	return net, parts, from, to, plus, minus
}

func BenchmarkResolve(b *testing.B) {
	for _, bn := range benchNetworks() {
		b.Run("n="+bn.name, func(b *testing.B) {
			s := mustSolver(b, bn.c)
			v := s.Value(bn.vary)
			b.ReportAllocs()
			for i := 0; b.Loop(); i++ {
				s.SetValue(bn.vary, v*(1+float64(i&7)*0.01))
				if err := s.Solve(); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}

func BenchmarkResolveNaive(b *testing.B) {
	for _, bn := range benchNetworks() {
		b.Run("n="+bn.name, func(b *testing.B) {
			net, parts, from, to, plus, minus := benchNodes(b, bn.c)
			nn := len(net.Nodes()) - 1
			v := parts[bn.vary].Value
			b.ReportAllocs()
			for i := 0; b.Loop(); i++ {
				parts[bn.vary].Value = v * (1 + float64(i&7)*0.01)
				if _, err := naiveSolve(parts, from, to, plus, minus, nn, net.Unknowns()); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}

// BenchmarkResolveReusedLU is the fair gonum baseline for BenchmarkResolve:
// nothing allocated per evaluation, the LU reused.
func BenchmarkResolveReusedLU(b *testing.B) {
	for _, bn := range benchNetworks() {
		b.Run("n="+bn.name, func(b *testing.B) {
			net, parts, from, to, plus, minus := benchNodes(b, bn.c)
			nn, n := len(net.Nodes())-1, net.Unknowns()
			r := &reusedLU{a: mat.NewDense(n, n, nil), b: mat.NewVecDense(n, nil), x: mat.NewVecDense(n, nil)}
			v := parts[bn.vary].Value
			b.ReportAllocs()
			for i := 0; b.Loop(); i++ {
				parts[bn.vary].Value = v * (1 + float64(i&7)*0.01)
				if err := r.solve(parts, from, to, plus, minus, nn); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}

// TestNaiveBaselineAgrees keeps the baseline honest: it must solve the same
// equations as the Solver.
func TestNaiveBaselineAgrees(t *testing.T) {
	for _, bn := range benchNetworks() {
		s := mustSolver(t, bn.c)
		net := s.Network()
		parts := net.Parts()
		np := len(parts)
		from, to, plus, minus := make([]int, np), make([]int, np), make([]int, np), make([]int, np)
		idx := func(s string) int { k, _ := net.NodeIndex(s); return k }
		for i, p := range parts {
			if p.Kind == OpAmp {
				to[i], plus[i], minus[i] = idx(p.Out), idx(p.Plus), idx(p.Minus)
			} else {
				from[i], to[i] = idx(p.From), idx(p.To)
			}
		}
		x, err := naiveSolve(parts, from, to, plus, minus, len(net.Nodes())-1, net.Unknowns())
		if err != nil {
			t.Fatal(err)
		}
		for k := 1; k < len(net.Nodes()); k++ {
			if !near(s.Voltage(k), x.AtVec(k-1), 1e-12) {
				t.Errorf("%s: node %d: %g vs %g", bn.name, k, s.Voltage(k), x.AtVec(k-1))
			}
		}
		if net.Unknowns() != map[string]int{"3": 3, "7": 7, "11": 11}[bn.name] {
			t.Errorf("%s: %d unknowns", bn.name, net.Unknowns())
		}
	}
}
