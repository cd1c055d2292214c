package solver

import (
	"math"
	"testing"
)

// lawTol is the relative tolerance for closed forms on small, well
// conditioned networks: a few hundred ulps (common practice, no source).
const lawTol = 1e-12

func par(rs ...float64) float64 { // parallel law: 1/R = Σ 1/Rk
	g := 0.0
	for _, r := range rs {
		g += 1 / r
	}
	return 1 / g
}

// resistanceBetween is Solver.Resistance by node names.
func resistanceBetween(t *testing.T, s *Solver, a, b string) float64 {
	t.Helper()
	ia, ok1 := s.Network().NodeIndex(a)
	ib, ok2 := s.Network().NodeIndex(b)
	if !ok1 || !ok2 {
		t.Fatalf("nodes %q, %q not found", a, b)
	}
	r, err := s.Resistance(ia, ib)
	if err != nil {
		t.Fatalf("Resistance: %v", err)
	}
	return r
}

func TestClosedForms(t *testing.T) {
	type check func(t *testing.T, sol *Solution, s *Solver)
	expect := func(t *testing.T, what string, got, want float64) {
		t.Helper()
		if !near(got, want, lawTol) {
			t.Errorf("%s = %.15g, want %.15g", what, got, want)
		}
	}
	const vs = 3.3
	cases := []struct {
		name  string
		parts []Part
		check check
	}{
		{"divider", []Part{vsrc("V1", "in", "gnd", vs), res("R1", "in", "out", 10e3), res("R2", "out", "gnd", 4.7e3)},
			func(t *testing.T, sol *Solution, s *Solver) {
				expect(t, "V(out)", nodeV(t, sol, "out"), vs*4.7e3/(10e3+4.7e3)) // voltage divider formula
				i := vs / (10e3 + 4.7e3)                                         // Ohm's law on the series pair
				expect(t, "I(R1)", partR(t, sol, "R1").Amps, i)
				// The source delivers: its + -> - edge current is -i, watts -vs·i
				// (passive sign convention, as the package documents).
				expect(t, "I(V1)", partR(t, sol, "V1").Amps, -i)
				expect(t, "P(V1)", partR(t, sol, "V1").Watts, -vs*i)
			}},
		{"loaded divider", []Part{vsrc("V1", "in", "gnd", 12), res("R1", "in", "out", 22e3), res("R2", "out", "gnd", 10e3), res("RL", "out", "gnd", 47e3)},
			func(t *testing.T, sol *Solution, s *Solver) {
				rb := par(10e3, 47e3)                                      // parallel law
				expect(t, "V(out)", nodeV(t, sol, "out"), 12*rb/(22e3+rb)) // voltage divider formula
			}},
		{"series chain", []Part{vsrc("V1", "a", "gnd", 1), res("R1", "a", "n1", 100), res("R2", "n1", "n2", 220), res("R3", "n2", "n3", 330), res("R4", "n3", "gnd", 470)},
			func(t *testing.T, sol *Solution, s *Solver) {
				expect(t, "I(R3)", partR(t, sol, "R3").Amps, 1/(100.0+220+330+470)) // series law + Ohm's law
				// With V1 shorted, a is on ground: R(n1, gnd) = R1 ∥ (R2+R3+R4).
				expect(t, "R(n1,gnd)", resistanceBetween(t, s, "n1", "gnd"), par(100, 220+330+470)) // series and parallel laws
				expect(t, "R(n1,n3)", resistanceBetween(t, s, "n1", "n3"), par(220+330, 100+470))
			}},
		{"series resistance", []Part{isrc("I1", "gnd", "a", 1e-3), res("R1", "a", "n1", 1e3), res("R2", "n1", "n2", 2.2e3), res("R3", "n2", "gnd", 3.3e3)},
			func(t *testing.T, sol *Solution, s *Solver) {
				expect(t, "R(a,gnd)", resistanceBetween(t, s, "a", "gnd"), 1e3+2.2e3+3.3e3) // series law
				expect(t, "R(a,n2)", resistanceBetween(t, s, "a", "n2"), 1e3+2.2e3)         // series law (R3 is outside the a-n2 loop)
				expect(t, "V(a)", nodeV(t, sol, "a"), 1e-3*(1e3+2.2e3+3.3e3))               // Ohm's law
				// The current source delivers: edge voltage V(gnd)-V(a) < 0 times +1 mA.
				expect(t, "P(I1)", partR(t, sol, "I1").Watts, -1e-3*nodeV(t, sol, "a"))
			}},
		{"parallel", []Part{isrc("I1", "gnd", "a", 2e-3), res("R1", "a", "gnd", 1e3), res("R2", "a", "gnd", 2.2e3), res("R3", "a", "gnd", 4.7e3), res("R4", "a", "gnd", 10e3)},
			func(t *testing.T, sol *Solution, s *Solver) {
				rp := par(1e3, 2.2e3, 4.7e3, 10e3)                                                     // parallel law
				expect(t, "R(a,gnd)", resistanceBetween(t, s, "a", "gnd"), rp)                         // parallel law
				expect(t, "V(a)", nodeV(t, sol, "a"), 2e-3*rp)                                         // Ohm's law
				expect(t, "I(R2)/I(R1)", partR(t, sol, "R2").Amps/partR(t, sol, "R1").Amps, 1e3/2.2e3) // current divider rule
			}},
		{"wheatstone balanced", []Part{vsrc("VS", "in", "gnd", 5), res("R1", "in", "a", 1e3), res("R2", "a", "gnd", 2e3), res("R3", "in", "b", 4.7e3), res("R4", "b", "gnd", 9.4e3), res("RG", "a", "b", 100)},
			func(t *testing.T, sol *Solution, s *Solver) {
				// Wheatstone balance: R1/R2 = R3/R4 gives no bridge voltage or current.
				if d := nodeV(t, sol, "a") - nodeV(t, sol, "b"); math.Abs(d) > 5*lawTol {
					t.Errorf("bridge voltage %g, want 0", d)
				}
				if i := partR(t, sol, "RG").Amps; math.Abs(i) > 5*lawTol/100 {
					t.Errorf("bridge current %g, want 0", i)
				}
			}},
		{"wheatstone unbalanced", []Part{vsrc("VS", "in", "gnd", 5), res("R1", "in", "a", 1e3), res("R2", "a", "gnd", 2.2e3), res("R3", "in", "b", 4.7e3), res("R4", "b", "gnd", 3.3e3)},
			func(t *testing.T, sol *Solution, s *Solver) {
				// Unbalanced bridge: Vab = Vs·(R2/(R1+R2) - R4/(R3+R4)).
				expect(t, "V(a)-V(b)", nodeV(t, sol, "a")-nodeV(t, sol, "b"), 5*(2.2e3/3.2e3-3.3e3/8e3))
				// Its Thevenin resistance with VS shorted: R1∥R2 + R3∥R4.
				expect(t, "R(a,b)", resistanceBetween(t, s, "a", "b"), par(1e3, 2.2e3)+par(4.7e3, 3.3e3))
			}},
		{"millman", []Part{vsrc("V1", "n1", "gnd", 5), vsrc("V2", "n2", "gnd", -2), vsrc("V3", "n3", "gnd", 12),
			res("R1", "n1", "x", 1e3), res("R2", "n2", "x", 2.2e3), res("R3", "n3", "x", 6.8e3)},
			func(t *testing.T, sol *Solution, s *Solver) {
				// Millman's theorem: Vx = Σ(Vk/Rk) / Σ(1/Rk).
				num := 5/1e3 - 2/2.2e3 + 12/6.8e3
				expect(t, "V(x)", nodeV(t, sol, "x"), num*par(1e3, 2.2e3, 6.8e3))
				expect(t, "R(x,gnd)", resistanceBetween(t, s, "x", "gnd"), par(1e3, 2.2e3, 6.8e3)) // parallel law
			}},
		{"non-inverting", []Part{vsrc("VIN", "p", "gnd", 0.4), res("RG", "m", "gnd", 10e3), res("RF", "o", "m", 27e3), opamp("U1", "p", "m", "o")},
			func(t *testing.T, sol *Solution, s *Solver) {
				expect(t, "V(o)", nodeV(t, sol, "o"), 0.4*(1+27e3/10e3)) // non-inverting gain 1 + Rf/Rg
				expect(t, "Volts(U1)", partR(t, sol, "U1").Volts, nodeV(t, sol, "o"))
				// Ideal input draws nothing: the source's current is zero (KCL at p).
				if i := partR(t, sol, "VIN").Amps; i != 0 {
					t.Errorf("input current %g, want 0", i)
				}
			}},
		{"inverting with load", []Part{vsrc("VIN", "in", "gnd", 0.5), res("RIN", "in", "m", 4.7e3), res("RF", "m", "o", 47e3), res("RL", "o", "gnd", 2e3), opamp("U1", "gnd", "m", "o")},
			func(t *testing.T, sol *Solution, s *Solver) {
				vo := -47e3 / 4.7e3 * 0.5 // inverting gain -Rf/Rin
				expect(t, "V(o)", nodeV(t, sol, "o"), vo)
				// KCL at o: the output drives what leaves through RL and RF.
				io := vo/2e3 + (vo-0)/47e3
				u := partR(t, sol, "U1")
				expect(t, "I(U1)", u.Amps, io)
				// An output edge runs ground -> Out: absorbed watts -V(out)·I.
				// Here Vout < 0 and it sinks current, so it delivers (P < 0).
				expect(t, "P(U1)", u.Watts, -vo*io)
				if u.Watts >= 0 {
					t.Errorf("op-amp output absorbs %g W, want it to deliver", u.Watts)
				}
				// The inverting input sits at virtual ground (nullor).
				if v := nodeV(t, sol, "m"); math.Abs(v) > lawTol {
					t.Errorf("V(m) = %g, want 0", v)
				}
				// Output resistance of an ideal feedback amplifier is zero.
				if r := resistanceBetween(t, s, "o", "gnd"); math.Abs(r) > 1e-9 {
					t.Errorf("R(o,gnd) = %g, want 0", r)
				}
			}},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			c := Circuit{Parts: tc.parts}
			sol := mustAnalyze(t, c)
			s := mustSolver(t, c)
			tc.check(t, sol, s)
			// Tellegen's theorem on every case: Σ absorbed watts = 0, so the
			// resistors dissipate what the sources and op-amps deliver.
			sum, abs, delivered := 0.0, 0.0, 0.0
			for _, p := range sol.Parts {
				sum += p.Watts
				abs += math.Abs(p.Watts)
				if p.Kind != Resistor {
					delivered -= p.Watts
				}
			}
			if math.Abs(sum) > lawTol*abs {
				t.Errorf("Σ watts = %g of %g total", sum, abs)
			}
			if !near(sol.ResistorPower, delivered, lawTol) {
				t.Errorf("ResistorPower %g, delivered %g", sol.ResistorPower, delivered)
			}
		})
	}
}

// TestTheveninNorton replaces a source network by its Thevenin and Norton
// equivalents, built from the solver's own open-circuit voltage and
// Resistance, and checks the load sees the same voltage from all three.
func TestTheveninNorton(t *testing.T) {
	const vs, r1, r2, r3 = 9.0, 3.3e3, 6.8e3, 1.5e3
	src := []Part{vsrc("VS", "in", "gnd", vs), res("R1", "in", "m", r1), res("R2", "m", "gnd", r2), res("R3", "m", "x", r3), isrc("IS", "gnd", "m", 0.5e-3)}
	open := mustSolver(t, Circuit{Parts: src})
	x, _ := open.Network().NodeIndex("x")
	vth := open.Voltage(x)
	rth := resistanceBetween(t, open, "x", "gnd")
	// Closed forms: Thevenin resistance R3 + R1∥R2 (sources zeroed), and by
	// superposition Vth = Vs·R2/(R1+R2) + Is·(R1∥R2).
	if want := r3 + par(r1, r2); !near(rth, want, lawTol) {
		t.Errorf("Rth = %.15g, want %.15g", rth, want)
	}
	if want := vs*r2/(r1+r2) + 0.5e-3*par(r1, r2); !near(vth, want, lawTol) {
		t.Errorf("Vth = %.15g, want %.15g", vth, want)
	}
	for _, rl := range []float64{100, 1e3, 47e3} {
		full := mustAnalyze(t, Circuit{Parts: append(append([]Part(nil), src...), res("RL", "x", "gnd", rl))})
		thev := mustAnalyze(t, Circuit{Parts: []Part{vsrc("VT", "t", "gnd", vth), res("RT", "t", "x", rth), res("RL", "x", "gnd", rl)}})
		// Norton equivalent: In = Vth/Rth in parallel with Rth.
		nort := mustAnalyze(t, Circuit{Parts: []Part{isrc("IN", "gnd", "x", vth/rth), res("RN", "x", "gnd", rth), res("RL", "x", "gnd", rl)}})
		want := vth * rl / (rth + rl) // voltage divider formula
		for name, sol := range map[string]*Solution{"full": full, "thevenin": thev, "norton": nort} {
			if got := nodeV(t, sol, "x"); !near(got, want, lawTol) {
				t.Errorf("RL=%g %s: V(x) = %.15g, want %.15g", rl, name, got, want)
			}
		}
	}
}
