package solver

import (
	"math"
	"testing"
)

// PortResponse gives the column Y⁻¹(e_a - e_b); its a-b entry is the
// resistance seen between a and b (Thevenin, sources zeroed), and the
// Sherman–Morrison formula predicts the solution after one resistor changes:
// x(G) = x0 - w·(G-G0)·V0/(1 + (G-G0)·z), with w the port response of that
// resistor's nodes and z = w(a) - w(b). Both are checked against fresh solves.
func TestPortResponseShermanMorrison(t *testing.T) {
	c := Circuit{Parts: []Part{
		{Name: "V1", Kind: VoltageSource, From: "in", To: "gnd", Value: 5},
		{Name: "R1", Kind: Resistor, From: "in", To: "a", Value: 1e3},
		{Name: "R2", Kind: Resistor, From: "a", To: "gnd", Value: 2.2e3},
		{Name: "R3", Kind: Resistor, From: "a", To: "b", Value: 4.7e3},
		{Name: "U1", Kind: OpAmp, Plus: "b", Minus: "fb", Out: "out"},
		{Name: "Rf", Kind: Resistor, From: "out", To: "fb", Value: 10e3},
		{Name: "Rg", Kind: Resistor, From: "fb", To: "gnd", Value: 3.3e3},
		{Name: "Rb", Kind: Resistor, From: "b", To: "gnd", Value: 6.8e3},
		{Name: "I1", Kind: CurrentSource, From: "a", To: "gnd", Value: 1e-4},
	}}
	s := mustSolver(t, c)
	net := s.Network()
	n := net.Unknowns()
	ext := func(v []float64) []float64 { return append([]float64{0}, v...) } // ground first
	x0 := ext(append([]float64(nil), s.X()...))
	for _, name := range []string{"R3", "Rf", "Rb"} {
		p, _ := net.PartIndex(name)
		e := net.Edges()[0]
		for _, ed := range net.Edges() {
			if ed.Part == p {
				e = ed
			}
		}
		w := make([]float64, n)
		if err := s.PortResponse(e.From, e.To, w); err != nil {
			t.Fatal(err)
		}
		w = ext(w)
		z := w[e.From] - w[e.To]
		r, _ := s.Resistance(e.From, e.To)
		if math.Abs(z-r) > 1e-12*r {
			t.Errorf("%s: port response gives %g Ω, Resistance %g Ω", name, z, r)
		}
		g0 := 1 / s.Value(p)
		v0 := x0[e.From] - x0[e.To]
		for _, scale := range []float64{0.1, 0.5, 2, 10} {
			g := g0 / scale
			sm := (g - g0) * v0 / (1 + (g-g0)*z)
			fresh := net.NewSolver()
			fresh.SetValue(p, s.Value(p)*scale)
			if err := fresh.Solve(); err != nil {
				t.Fatal(err)
			}
			want := ext(fresh.X())
			for i := range want {
				got := x0[i] - w[i]*sm
				if math.Abs(got-want[i]) > 1e-9*(1+math.Abs(want[i])) {
					t.Errorf("%s ×%g: unknown %d: update %g, fresh solve %g", name, scale, i, got, want[i])
				}
			}
		}
	}
	// BranchUnknown names the unknowns that hold currents.
	for i, p := range net.Parts() {
		u := net.BranchUnknown(i)
		switch p.Kind {
		case VoltageSource, OpAmp:
			if u < 0 || s.X()[u] != s.Amps(i) {
				t.Errorf("%s: branch unknown %d does not hold its current", p.Name, u)
			}
		default:
			if u != -1 {
				t.Errorf("%s: branch unknown %d, want -1", p.Name, u)
			}
		}
	}
	dst := make([]float64, n)
	if a := testing.AllocsPerRun(100, func() { _ = s.PortResponse(1, 0, dst) }); a != 0 {
		t.Errorf("PortResponse allocates %v times", a)
	}
}
