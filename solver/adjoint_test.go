package solver

import (
	"errors"
	"math"
	"math/rand/v2"
	"testing"

	"gonum.org/v1/gonum/mat"
)

// TestSolveTranspose checks Aᵀx = b against an independent solve of the
// transposed matrix with gonum's LU, on random networks with and without
// op-amps (whose MNA matrices are not symmetric).
func TestSolveTranspose(t *testing.T) {
	rng := rand.New(rand.NewPCG(4, 1))
	for trial := range 40 {
		c := randomNetwork(rng, 2+rng.IntN(6), trial%2 == 1)
		net, err := Compile(c)
		if err != nil {
			t.Fatalf("trial %d: %v", trial, err)
		}
		s := net.NewSolver()
		s.stamp()
		n := net.n
		at := mat.NewDense(n, n, nil)
		for i := range n {
			for j := range n {
				at.Set(j, i, s.a[i*n+j])
			}
		}
		if err := s.Solve(); err != nil {
			t.Fatalf("trial %d: %v", trial, err)
		}
		b := make([]float64, n)
		for i := range b {
			b[i] = rng.Float64()*2 - 1
		}
		var want mat.VecDense
		if err := want.SolveVec(at, mat.NewVecDense(n, append([]float64(nil), b...))); err != nil {
			t.Fatalf("trial %d: gonum: %v", trial, err)
		}
		got := append([]float64(nil), b...)
		if err := s.SolveTranspose(got); err != nil {
			t.Fatal(err)
		}
		scale := 0.0
		for i := range n {
			scale = math.Max(scale, math.Abs(want.AtVec(i)))
		}
		for i := range n {
			if math.Abs(got[i]-want.AtVec(i)) > 1e-8*math.Max(scale, 1) {
				t.Errorf("trial %d: x[%d] = %g, gonum says %g", trial, i, got[i], want.AtVec(i))
			}
		}
	}
}

// TestAdjointDivider compares the adjoint with the divider's analytic
// sensitivities. Source: voltage divider formula V = Vin·R2/(R1+R2),
// differentiated: ∂V/∂R2 = Vin·R1/(R1+R2)², ∂V/∂R1 = -Vin·R2/(R1+R2)²,
// ∂V/∂Vin = R2/(R1+R2); normalised, S_R2 = R1/(R1+R2) = -S_R1.
func TestAdjointDivider(t *testing.T) {
	cases := []struct{ vin, r1, r2 float64 }{
		{3.3, 31.6e3, 10e3},
		{12, 1e3, 1e3},
		{5, 470, 2.2e6},
	}
	for _, c := range cases {
		s := mustSolver(t, Circuit{Parts: []Part{
			vsrc("V", "in", "gnd", c.vin), res("R1", "in", "mid", c.r1), res("R2", "mid", "gnd", c.r2),
		}})
		k, _ := s.Network().NodeIndex("mid")
		w := make([]float64, len(s.Network().Nodes()))
		w[k] = 1
		d := make([]float64, 3)
		if err := s.Adjoint(w, nil, d); err != nil {
			t.Fatal(err)
		}
		sum := c.r1 + c.r2
		want := []float64{c.r2 / sum, -c.vin * c.r2 / (sum * sum), c.vin * c.r1 / (sum * sum)}
		for i := range want {
			if !near(d[i], want[i], 1e-12) {
				t.Errorf("%+v: d[%d] = %g, want %g", c, i, d[i], want[i])
			}
		}
		v := s.Voltage(k)
		if sn := d[2] * c.r2 / v; !near(sn, c.r1/sum, 1e-12) {
			t.Errorf("%+v: normalised S_R2 = %g, want R1/(R1+R2) = %g", c, sn, c.r1/sum)
		}
	}
}

// TestAdjointFiniteDifferences checks node, current and power read-outs and
// the resistance sensitivity against central finite differences on random
// networks, with op-amps in half of them.
func TestAdjointFiniteDifferences(t *testing.T) {
	rng := rand.New(rand.NewPCG(9, 2))
	for trial := range 30 {
		c := randomNetwork(rng, 2+rng.IntN(5), trial%2 == 1)
		s := mustSolver(t, c)
		net := s.Network()
		nn, np := len(net.nodes), len(net.parts)
		// Read-out: a random node voltage plus the power of a random part
		// (chain rule weights: P = V·I, so ∂P/∂V = I and ∂P/∂I = V).
		node := 1 + rng.IntN(nn-1)
		part := rng.IntN(np)
		nodeW := make([]float64, nn)
		partW := make([]float64, np)
		nodeW[node] += 1
		e := net.edges[0]
		for _, ed := range net.edges {
			if ed.Part == part {
				e = ed
			}
		}
		nodeW[e.From] += s.Amps(part)
		nodeW[e.To] -= s.Amps(part)
		partW[part] += s.Volts(part)
		if net.pKind[part] == OpAmp {
			partW[part] = -s.Voltage(e.To) // Watts = (0 - V(out))·I
		}
		f := func() float64 { return s.Voltage(node) + s.Watts(part) }
		dst := make([]float64, np)
		if err := s.Adjoint(nodeW, partW, dst); err != nil {
			t.Fatal(err)
		}
		a, b := rng.IntN(nn), rng.IntN(nn)
		rdst := make([]float64, np)
		if err := s.ResistanceAdjoint(a, b, rdst); err != nil {
			t.Fatal(err)
		}
		for p := range np {
			if net.pKind[p] == OpAmp {
				continue
			}
			v0 := s.Value(p)
			h := 1e-5 * math.Max(math.Abs(v0), 1e-3)
			f0 := f()
			r0, _ := s.Resistance(a, b)
			eval := func(v float64) (float64, float64) {
				s.SetValue(p, v)
				if err := s.Solve(); err != nil {
					t.Fatal(err)
				}
				r, err := s.Resistance(a, b)
				if err != nil {
					t.Fatal(err)
				}
				return f(), r
			}
			fp, rp := eval(v0 + h)
			fm, rm := eval(v0 - h)
			s.SetValue(p, v0)
			if err := s.Solve(); err != nil {
				t.Fatal(err)
			}
			fd := (fp - fm) / (2 * h)
			// Central differences: truncation O(h²) plus rounding of about
			// 1e-15·|f|/h (the solves lose a few digits on stiff networks).
			if math.Abs(fd-dst[p]) > 1e-6*math.Abs(fd)+1e-12*math.Max(math.Abs(f0), 1e-3)/h {
				t.Errorf("trial %d part %s: adjoint %g, finite difference %g", trial, c.Parts[p].Name, dst[p], fd)
			}
			rfd := (rp - rm) / (2 * h)
			if math.Abs(rfd-rdst[p]) > 1e-6*math.Abs(rfd)+1e-12*math.Max(math.Abs(r0), 1e4)/h { // a shorted pair reads 0 Ω, with noise on the scale of the network
				t.Errorf("trial %d part %s: resistance adjoint %g, finite difference %g", trial, c.Parts[p].Name, rdst[p], rfd)
			}
		}
	}
}

// TestAdjointNotSolved checks the error before any Solve.
func TestAdjointNotSolved(t *testing.T) {
	net, err := Compile(Circuit{Parts: []Part{vsrc("V", "a", "gnd", 1), res("R", "a", "gnd", 1)}})
	if err != nil {
		t.Fatal(err)
	}
	s := net.NewSolver()
	if err := s.Adjoint(nil, nil, make([]float64, 2)); !errors.Is(err, ErrNotSolved) {
		t.Errorf("Adjoint before Solve: %v, want ErrNotSolved", err)
	}
	if err := s.SolveTranspose(make([]float64, 2)); !errors.Is(err, ErrNotSolved) {
		t.Errorf("SolveTranspose before Solve: %v, want ErrNotSolved", err)
	}
}
