package solver

import (
	"errors"
	"fmt"
	"math"
	"math/rand/v2"
	"testing"

	"gonum.org/v1/gonum/mat"
)

// TestSolverMatchesAnalyze re-solves random networks with new values in one
// Solver and compares each result with a fresh Analyze of a circuit holding
// those values, so no state may leak from one solve to the next.
func TestSolverMatchesAnalyze(t *testing.T) {
	rng := rand.New(rand.NewPCG(7, 8))
	for trial := range 50 {
		c := randomNetwork(rng, 2+rng.IntN(10), trial%2 == 0)
		s := mustSolver(t, c)
		s.SetRefinement(true) // as Analyze does
		if err := s.Solve(); err != nil {
			t.Fatal(err)
		}
		for round := range 5 {
			if round > 0 { // new values for every part
				for i, p := range c.Parts {
					switch p.Kind {
					case Resistor:
						c.Parts[i].Value = math.Pow(10, 1+5*rng.Float64())
					case VoltageSource:
						c.Parts[i].Value = 30*rng.Float64() - 15
					case CurrentSource:
						c.Parts[i].Value = 1e-2*rng.Float64() - 5e-3
					}
					s.SetValue(i, c.Parts[i].Value)
				}
				if err := s.Check(); err != nil {
					t.Fatal(err)
				}
				if err := s.Solve(); err != nil {
					t.Fatalf("trial %d round %d: %v", trial, round, err)
				}
			}
			sol := mustAnalyze(t, c)
			// Same arithmetic on the same equations: agreement to a few ulps
			// (common practice, no source).
			const tol = 1e-13
			for k, nv := range sol.Nodes {
				if !near(s.Voltage(k), nv.Volts, tol) {
					t.Errorf("trial %d round %d: V(%s) %g vs %g", trial, round, nv.Name, s.Voltage(k), nv.Volts)
				}
			}
			for i, pr := range sol.Parts {
				if !near(s.Volts(i), pr.Volts, tol) || !near(s.Amps(i), pr.Amps, tol) || !near(s.Watts(i), pr.Watts, tol) {
					t.Errorf("trial %d round %d: part %s: solver (%g V, %g A, %g W), Analyze (%g V, %g A, %g W)",
						trial, round, pr.Name, s.Volts(i), s.Amps(i), s.Watts(i), pr.Volts, pr.Amps, pr.Watts)
				}
			}
			if !near(s.ResistorPower(), sol.ResistorPower, tol) {
				t.Errorf("ResistorPower %g vs %g", s.ResistorPower(), sol.ResistorPower)
			}
		}
	}
}

// TestResistanceAgainstGonum compares Resistance with the same test done on
// the textbook MNA matrix: sources zeroed, +1 A into a and -1 A out of b,
// solved by gonum's QR; V(a) - V(b) is the resistance (definition of driving
// point / transfer resistance). For networks of resistors alone it also
// checks the resistance-distance form (e_a-e_b)ᵀ G⁻¹ (e_a-e_b) with G the
// grounded conductance matrix (Klein & Randić, "Resistance distance", 1993;
// from memory).
func TestResistanceAgainstGonum(t *testing.T) {
	rng := rand.New(rand.NewPCG(9, 10))
	for trial := range 100 {
		c := randomNetwork(rng, 2+rng.IntN(10), trial%3 == 0)
		if trial%3 == 1 { // resistors only
			var rs []Part
			for _, p := range c.Parts {
				if p.Kind == Resistor {
					rs = append(rs, p)
				}
			}
			c.Parts = rs
		}
		s := mustSolver(t, c)
		net := s.Network()
		m, _, names := plainMNA(c)
		nUnk, _ := m.Dims()
		onlyR := trial%3 == 1
		for range 5 {
			a, b := rng.IntN(len(names)+1), rng.IntN(len(names)+1) // 0 = ground
			got, err := s.Resistance(a, b)
			if err != nil {
				t.Fatal(err)
			}
			inj := mat.NewVecDense(nUnk, nil)
			// The node order of plainMNA is its own; map by name.
			col := func(node int) int {
				if node == 0 {
					return -1
				}
				for k, nm := range names {
					if nm == net.Nodes()[node] {
						return k
					}
				}
				t.Fatalf("node %d missing", node)
				return -1
			}
			ca, cb := col(a), col(b)
			if ca >= 0 {
				inj.SetVec(ca, inj.AtVec(ca)+1)
			}
			if cb >= 0 {
				inj.SetVec(cb, inj.AtVec(cb)-1)
			}
			x := qrSolve(t, m, inj)
			at := func(c int) float64 {
				if c < 0 {
					return 0
				}
				return x[c]
			}
			want := at(ca) - at(cb)
			// Forward error bound as in TestRandomNetworks: κ(A) times the
			// backward error, on the scale of the largest unknown; the
			// difference V(a) - V(b) can cancel far below that scale.
			var lu mat.LU
			lu.Factorize(m)
			tol := 64 * float64(nUnk) * eps * lu.Cond() * maxAbs(x)
			if math.Abs(got-want) > tol {
				t.Errorf("trial %d: R(%d,%d) = %.15g, gonum QR %.15g", trial, a, b, got, want)
			}
			if onlyR {
				// Resistance distance is non-negative and zero only for a = b.
				if got < 0 || (a != b) != (got > 0) {
					t.Errorf("trial %d: R(%d,%d) = %g", trial, a, b, got)
				}
				var ginv mat.Dense
				if err := ginv.Inverse(m); err != nil {
					t.Fatal(err)
				}
				d := mat.NewVecDense(nUnk, nil)
				d.CopyVec(inj)
				var gd mat.VecDense
				gd.MulVec(&ginv, d)
				if rd := mat.Dot(d, &gd); math.Abs(got-rd) > tol {
					t.Errorf("trial %d: R(%d,%d) = %.15g, resistance distance %.15g", trial, a, b, got, rd)
				}
			}
		}
	}
}

func TestResistanceNeedsFactors(t *testing.T) {
	net, err := Compile(Circuit{Parts: []Part{vsrc("V1", "a", "gnd", 1), res("R1", "a", "b", 1e3), res("R2", "b", "gnd", 1e3)}})
	if err != nil {
		t.Fatal(err)
	}
	s := net.NewSolver()
	if _, err := s.Resistance(1, 0); !errors.Is(err, ErrNotSolved) {
		t.Errorf("before Solve: %v, want ErrNotSolved", err)
	}
	if err := s.Solve(); err != nil {
		t.Fatal(err)
	}
	if r, err := s.Resistance(2, 0); err != nil || !near(r, 500, lawTol) { // parallel law, V1 shorted
		t.Errorf("R = %g, %v; want 500", r, err)
	}
	s.SetValue(1, 2e3)
	if _, err := s.Resistance(2, 0); !errors.Is(err, ErrNotSolved) {
		t.Errorf("after SetValue: %v, want ErrNotSolved", err)
	}
	// Results still describe the last Solve (R1 = 1 kΩ): Ohm's law.
	if i := s.Amps(1); !near(i, 0.5e-3, lawTol) {
		t.Errorf("I(R1) = %g after SetValue without Solve, want the last solve's 0.5 mA", i)
	}
}

func TestCheckAfterSetValue(t *testing.T) {
	s := mustSolver(t, Circuit{Parts: []Part{vsrc("V1", "a", "gnd", 1), res("R1", "a", "gnd", 1e3)}})
	if err := s.Check(); err != nil {
		t.Fatal(err)
	}
	for _, v := range []float64{0, -5, math.NaN(), math.Inf(1)} {
		s.SetValue(1, v)
		var ve *ValueError
		if err := s.Check(); !errors.As(err, &ve) || ve.Part != "R1" {
			t.Errorf("R1 = %g: Check() = %v", v, err)
		}
	}
	s.SetValue(1, 1e3)
	s.SetValue(0, math.Inf(-1))
	var ve *ValueError
	if err := s.Check(); !errors.As(err, &ve) || ve.Part != "V1" {
		t.Errorf("V1 = -Inf: Check() = %v", err)
	}
}

func TestZeroAllocs(t *testing.T) {
	for _, bn := range benchNetworks() {
		t.Run(bn.name, func(t *testing.T) {
			s := mustSolver(t, bn.c)
			r := bn.vary
			v := s.Value(r)
			if n := testing.AllocsPerRun(100, func() {
				s.SetValue(r, v*1.01)
				if err := s.Solve(); err != nil {
					t.Fatal(err)
				}
			}); n != 0 {
				t.Errorf("Solve: %v allocs/run", n)
			}
			if n := testing.AllocsPerRun(100, func() {
				if _, err := s.Resistance(1, 0); err != nil {
					t.Fatal(err)
				}
			}); n != 0 {
				t.Errorf("Resistance: %v allocs/run", n)
			}
			if n := testing.AllocsPerRun(100, func() {
				_ = s.Voltage(1) + s.Volts(0) + s.Amps(0) + s.Watts(0) + s.ResistorPower()
			}); n != 0 {
				t.Errorf("results: %v allocs/run", n)
			}
		})
	}
}

// TestConcurrentSolvers: one Network, one Solver per goroutine (run with
// -race). Each goroutine's divider must follow its own R1 (divider formula).
func TestConcurrentSolvers(t *testing.T) {
	net, err := Compile(Circuit{Parts: []Part{vsrc("V1", "in", "gnd", 10), res("R1", "in", "out", 1e3), res("R2", "out", "gnd", 1e3)}})
	if err != nil {
		t.Fatal(err)
	}
	out, _ := net.NodeIndex("out")
	errs := make(chan error, 8)
	for g := range 8 {
		go func() {
			s := net.NewSolver()
			r1 := 1e3 * float64(g+1)
			for range 200 {
				s.SetValue(1, r1)
				if err := s.Solve(); err != nil {
					errs <- err
					return
				}
				if want := 10 * 1e3 / (r1 + 1e3); !near(s.Voltage(out), want, lawTol) {
					errs <- fmt.Errorf("goroutine %d: V(out) = %g, want %g", g, s.Voltage(out), want)
					return
				}
			}
			errs <- nil
		}()
	}
	for range 8 {
		if err := <-errs; err != nil {
			t.Error(err)
		}
	}
}
