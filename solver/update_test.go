package solver

import (
	"errors"
	"math"
	"math/rand/v2"
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

// SolveBetween, checked two ways. A divider against its closed form,
// V·R2/(R1+R2) (the voltage-divider law), with R1 between two solved values;
// and random networks with op-amps against a fresh Solve at the new value
// (the bilinear theorem: the solution is on the line through the two).
func TestSolveBetween(t *testing.T) {
	div := mustSolver(t, Circuit{Parts: []Part{
		vsrc("V1", "in", "gnd", 3.3),
		res("R1", "in", "out", 1e3),
		res("R2", "out", "gnd", 2.2e3),
	}})
	net := div.Network()
	r1, _ := net.PartIndex("R1")
	out, _ := net.NodeIndex("out")
	a := Endpoint{X: append([]float64(nil), div.X()...), R: 1e3, Sign: div.DetSign()}
	div.SetValue(r1, 47e3)
	if err := div.Solve(); err != nil {
		t.Fatal(err)
	}
	b := Endpoint{X: append([]float64(nil), div.X()...), R: 47e3, Sign: div.DetSign()}
	for _, r := range []float64{1e3, 1.5e3, 4.7e3, 22e3, 47e3} {
		div.SetValue(r1, r)
		if err := div.SolveBetween(r1, a, b); err != nil {
			t.Fatalf("R1 = %g: %v", r, err)
		}
		want := 3.3 * 2.2e3 / (r + 2.2e3) // divider law
		if got := div.Voltage(out); !near(got, want, 1e-14*want) {
			t.Errorf("R1 = %g: V(out) %.17g, divider law %.17g", r, got, want)
		}
		if div.DetSign() != a.Sign {
			t.Errorf("R1 = %g: DetSign %d, want %d", r, div.DetSign(), a.Sign)
		}
		if _, err := div.Resistance(out, 0); !errors.Is(err, ErrNotSolved) {
			t.Errorf("Resistance after SolveBetween: %v, want ErrNotSolved", err)
		}
	}
	for _, r := range []float64{990, 48e3} {
		div.SetValue(r1, r)
		if err := div.SolveBetween(r1, a, b); !errors.Is(err, ErrOffLine) {
			t.Errorf("R1 = %g outside [1k, 47k]: %v, want ErrOffLine", r, err)
		}
	}

	rng := rand.New(rand.NewPCG(7, 8))
	checked := 0
	for trial := range 200 {
		c := randomNetwork(rng, 2+rng.IntN(8), trial%2 == 1)
		s := mustSolver(t, c)
		net := s.Network()
		var rs []int
		for i, p := range net.Parts() {
			if p.Kind == Resistor {
				rs = append(rs, i)
			}
		}
		part := rs[rng.IntN(len(rs))]
		ra := s.Value(part)
		rb := ra * math.Pow(10, 2*rng.Float64()-1)
		a := Endpoint{X: append([]float64(nil), s.X()...), R: ra, Sign: s.DetSign()}
		s.SetValue(part, rb)
		if err := s.Solve(); err != nil {
			continue // a value that makes the network singular
		}
		b := Endpoint{X: append([]float64(nil), s.X()...), R: rb, Sign: s.DetSign()}
		r := ra + rng.Float64()*(rb-ra)
		s.SetValue(part, r)
		err := s.SolveBetween(part, a, b)
		fresh := net.NewSolver()
		for i := range net.Parts() {
			fresh.SetValue(i, s.Value(i))
		}
		if ferr := fresh.Solve(); ferr != nil {
			continue
		}
		if err != nil {
			// Only where the determinant changes sign between the two
			// (the update then has a pole), or where the part carries
			// no current but rounding.
			e := net.Edges()[0]
			for _, ed := range net.Edges() {
				if ed.Part == part {
					e = ed
				}
			}
			tiny := 1e-12 * (maxAbs(a.X) + maxAbs(b.X))
			idle := math.Abs(volt(a.X, e.From, e.To)) <= tiny || math.Abs(volt(b.X, e.From, e.To)) <= tiny
			if !errors.Is(err, ErrOffLine) || (a.Sign == b.Sign && !idle) {
				t.Errorf("trial %d: %v with signs %d, %d", trial, err, a.Sign, b.Sign)
			}
			continue
		}
		checked++
		if s.DetSign() != fresh.DetSign() {
			t.Errorf("trial %d: DetSign %d, fresh solve %d", trial, s.DetSign(), fresh.DetSign())
		}
		want := fresh.X()
		scale := maxAbs(want) + maxAbs(a.X) + maxAbs(b.X)
		for i, v := range s.X() {
			if math.Abs(v-want[i]) > 1e-9*scale {
				t.Errorf("trial %d: unknown %d: %.17g, fresh solve %.17g", trial, i, v, want[i])
			}
		}
		for _, p := range rs {
			if math.Abs(s.Amps(p)-fresh.Amps(p)) > 1e-9*scale/s.Value(p)+1e-300 {
				t.Errorf("trial %d: current of part %d: %g, fresh solve %g", trial, p, s.Amps(p), fresh.Amps(p))
			}
		}
	}
	if checked < 150 {
		t.Errorf("only %d of 200 random networks were checked", checked)
	}
}
