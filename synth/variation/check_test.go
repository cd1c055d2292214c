package variation

import (
	"fmt"
	"math"
	"strings"
	"testing"

	"github.com/ohmfit/ohmfit/constraints"
	"github.com/ohmfit/ohmfit/synth"
)

// design parses a valued template and prepares it.
func design(t *testing.T, yaml string) *Design { return designAt(t, yaml, nil) }

// designAt parses a template and prepares it with its free positions at
// opts (nil for a valued template).
func designAt(t *testing.T, yaml string, opts []synth.Option) *Design {
	t.Helper()
	tpl, err := constraints.Parse("", []byte(yaml))
	if err != nil {
		t.Fatal(err)
	}
	cp, err := constraints.Compile(tpl)
	if err != nil {
		t.Fatal(err)
	}
	d, err := NewDesign(cp, opts, "", constraints.Ambient{})
	if err != nil {
		t.Fatal(err)
	}
	return d
}

// single is one part of value v as a position's option.
func single(v float64) synth.Option { return synth.Option{Value: v, Parts: [2]float64{v}, Count: 1} }

func divider(vin, r1, r2 float64, tolR, tolV string, extra string) string {
	return fmt.Sprintf(`ohmfit: 1
parts:
  - {name: V, type: voltage-source, plus: in, minus: gnd, volts: %g, tolerance: %s}
  - {name: R1, type: resistor, from: in, to: mid, value: %g, tolerance: %s}
  - {name: R2, type: resistor, from: mid, to: gnd, value: %g, tolerance: %s}
targets:
  - {voltage: mid, equals: %g, tolerance: 2%%}
%s`, vin, tolV, r1, tolR, r2, tolR, vin*r2/(r1+r2), extra)
}

// TestWorstCaseDivider compares the worst case with the closed-form
// extremes of a divider. Source: voltage divider formula V = Vin·R2/(R1+R2),
// which rises with Vin and R2 and falls with R1, so its maximum is at
// Vin(1+tv), R1(1-t), R2(1+t) and its minimum at the opposite corner.
func TestWorstCaseDivider(t *testing.T) {
	cases := []struct {
		vin, r1, r2, tol, tv float64
	}{
		{3.3, 31.6e3, 10e3, 0.01, 0.01},
		{12, 47e3, 4.7e3, 0.05, 0.02},
		{5, 1e3, 1e3, 0.001, 0.005},
	}
	for _, c := range cases {
		t.Run(fmt.Sprint(c.vin, " ", c.r1, " ", c.r2), func(t *testing.T) {
			d := design(t, divider(c.vin, c.r1, c.r2, pct(c.tol), pct(c.tv), ""))
			r, err := Check(d, &Settings{Samples: -1})
			if err != nil {
				t.Fatal(err)
			}
			if r.Method != MethodCorners || r.Corners != 8 {
				t.Errorf("method %s with %d corners, want corners with 8", r.Method, r.Corners)
			}
			vmax := c.vin * (1 + c.tv) * c.r2 * (1 + c.tol) / (c.r1*(1-c.tol) + c.r2*(1+c.tol))
			vmin := c.vin * (1 - c.tv) * c.r2 * (1 - c.tol) / (c.r1*(1+c.tol) + c.r2*(1-c.tol))
			g := r.Goals[0]
			if math.Abs(g.WorstMax-vmax) > 1e-12*vmax || math.Abs(g.WorstMin-vmin) > 1e-12*vmax {
				t.Errorf("%+v: worst case %.9g … %.9g, closed form %.9g … %.9g", c, g.WorstMin, g.WorstMax, vmin, vmax)
			}
			// The linearised method picks the same corners for a monotone
			// divider, so it must agree exactly.
			r2, err := Check(d, &Settings{Samples: -1, MaxCornerParts: 1})
			if err != nil {
				t.Fatal(err)
			}
			if r2.Method != MethodLinearised || r2.Goals[0].WorstMax != g.WorstMax || r2.Goals[0].WorstMin != g.WorstMin {
				t.Errorf("%+v: linearised %s gives %g … %g, corners %g … %g", c, r2.Method, r2.Goals[0].WorstMin, r2.Goals[0].WorstMax, g.WorstMin, g.WorstMax)
			}
		})
	}
}

func pct(f float64) string { return fmt.Sprintf("%g%%", 100*f) }

// TestMonteCarloPropagation compares the Monte Carlo mean and σ with the
// first-order error propagation formula σ_V² = Σ (∂V/∂x_i)² σ_i² (Gauss's
// law of error propagation), with the divider's derivatives from the
// voltage divider formula: ∂V/∂R1 = -Vin·R2/(R1+R2)², ∂V/∂R2 =
// Vin·R1/(R1+R2)², ∂V/∂Vin = R2/(R1+R2). A uniform deviation over ±t·x has
// σ = t·x/√3; the normal one here has σ = t·x/3. With N = 20000 samples the
// mean's standard error is σ/√N and σ's relative standard error about
// 1/√(2N) = 0.5 %; the checks allow 5 standard errors plus the
// second-order terms the formula leaves out (below 1e-3 relative here).
func TestMonteCarloPropagation(t *testing.T) {
	const vin, r1, r2, tol, tv = 5.0, 22e3, 10e3, 0.05, 0.02
	const n = 20000
	for _, dist := range []Distribution{Uniform, Normal} {
		t.Run(dist.String(), func(t *testing.T) {
			d := design(t, divider(vin, r1, r2, pct(tol), pct(tv), ""))
			r, err := Check(d, &Settings{Samples: n, Seed: 7, Distribution: dist})
			if err != nil {
				t.Fatal(err)
			}
			k := math.Sqrt(3)
			if dist == Normal {
				k = 3
			}
			sum := r1 + r2
			dv := []float64{r2 / sum, -vin * r2 / (sum * sum), vin * r1 / (sum * sum)}
			sig := []float64{tv * vin / k, tol * r1 / k, tol * r2 / k}
			var s2 float64
			for i := range dv {
				s2 += dv[i] * dv[i] * sig[i] * sig[i]
			}
			want := math.Sqrt(s2)
			v0 := vin * r2 / sum
			mc := r.Goals[0].MonteCarlo
			if math.Abs(mc.Mean-v0) > 5*want/math.Sqrt(n)+1e-3*want {
				t.Errorf("%s: mean %.6g, want %.6g ± %.2g", dist, mc.Mean, v0, 5*want/math.Sqrt(n))
			}
			if rel := math.Abs(mc.Sigma-want) / want; rel > 5/math.Sqrt(2*n)+1e-3 {
				t.Errorf("%s: σ %.6g, first-order propagation %.6g (%.2f%% off)", dist, mc.Sigma, want, 100*rel)
			}
			if !(mc.Low < v0 && v0 < mc.High) || mc.Yield <= 0 || mc.Yield > 1 {
				t.Errorf("%s: points %g … %g around %g, yield %g", dist, mc.Low, mc.High, v0, mc.Yield)
			}
			// The same seed gives the same numbers.
			again, _ := Check(d, &Settings{Samples: n, Seed: 7, Distribution: dist})
			if again.Goals[0].MonteCarlo != mc {
				t.Errorf("%s: same seed, different result", dist)
			}
		})
	}
}

// TestSensitivityDivider checks the normalised sensitivities against the
// divider's analytic ones. Source: voltage divider formula, differentiated:
// (∂V/∂R2)(R2/V) = R1/(R1+R2), (∂V/∂R1)(R1/V) = -R1/(R1+R2),
// (∂V/∂Vin)(Vin/V) = 1.
func TestSensitivityDivider(t *testing.T) {
	for _, c := range []struct{ r1, r2 float64 }{{31.6e3, 10e3}, {1e3, 99e3}, {4.7e3, 4.7e3}} {
		t.Run(fmt.Sprint(c.r1, " ", c.r2), func(t *testing.T) {
			d := design(t, divider(3.3, c.r1, c.r2, "1%", "1%", ""))
			r, err := Check(d, &Settings{Samples: -1})
			if err != nil {
				t.Fatal(err)
			}
			s := r.Goals[0].Sens
			want := []float64{1, -c.r1 / (c.r1 + c.r2), c.r1 / (c.r1 + c.r2)}
			for i, w := range want {
				if math.Abs(s[i].Normalised-w) > 1e-12 {
					t.Errorf("%+v: S(%s) = %.15g, want %.15g", c, s[i].Part, s[i].Normalised, w)
				}
			}
		})
	}
}

// TestSensitivityFiniteDifferences checks the adjoint sensitivities of every
// kind of target, including a non-inverting op-amp stage (whose MNA matrix
// is not symmetric) and a position made of two parts in parallel, against
// central finite differences of full solves.
func TestSensitivityFiniteDifferences(t *testing.T) {
	tpl, err := constraints.Parse("", []byte(`ohmfit: 1
parts:
  - {name: Vin, type: voltage-source, plus: in, minus: gnd, volts: 300m, tolerance: 1%}
  - {name: U1, type: opamp, plus: in, minus: fb, out: out}
  - {name: Rf, type: resistor, from: out, to: fb}
  - {name: Rg, type: resistor, from: fb, to: gnd, value: 2k}
  - {name: RL, type: resistor, from: out, to: gnd, value: 10k}
  - {name: Ib, type: current-source, from: fb, to: gnd, amps: 1u, tolerance: 10%}
targets:
  - {ratio: [out, in], equals: 6.8}
  - {voltage: out, equals: 2}
  - {current: U1, max: 1m}
  - {power: Rf, max: 1}
  - {power: U1, max: 1}
  - {resistance: [out, gnd], max: 1M}
choose: {combine: any}
`))
	if err != nil {
		t.Fatal(err)
	}
	cp, err := constraints.Compile(tpl)
	if err != nil {
		t.Fatal(err)
	}
	opt := synth.Option{Value: 10e3 * 15e3 / 25e3, Parts: [2]float64{10e3, 15e3}, Count: 2, Combine: constraints.Parallel}
	d, err := NewDesign(cp, []synth.Option{opt}, "", constraints.Ambient{})
	if err != nil {
		t.Fatal(err)
	}
	r, err := Check(d, &Settings{Samples: -1})
	if err != nil {
		t.Fatal(err)
	}
	s := cp.Network.NewSolver()
	read := func(ti int, dev []float64) float64 {
		d.setValues(s, 0, dev)
		if err := s.Solve(); err != nil {
			t.Fatal(err)
		}
		x, err := cp.Probes[ti].Read(s)
		if err != nil {
			t.Fatal(err)
		}
		return x
	}
	for _, g := range r.Goals {
		for j, v := range d.Parts {
			const h = 1e-6
			dev := make([]float64, len(d.Parts))
			if !v.Relative {
				// absolute deviation: step h·|value|
				dev[j] = h * math.Abs(v.Nominal)
			} else {
				dev[j] = h
			}
			up := read(g.Target, dev)
			dev[j] = -dev[j]
			down := read(g.Target, dev)
			x := read(g.Target, make([]float64, len(d.Parts)))
			fd := (up - down) / (2 * h) / x // (dX/X)/(dx/x)
			if math.Abs(fd-g.Sens[j].Normalised) > 1e-6*math.Max(1, math.Abs(fd)) {
				t.Errorf("%s: S(%s) adjoint %.9g, finite difference %.9g", g.Label, v.Name, g.Sens[j].Normalised, fd)
			}
		}
	}
	// Non-inverting gain formula with the bias current Ib drawn from fb:
	// V(out) = Vin·(1 + Rf/Rg) + Ib·Rf, so out/in = 1 + Rf/Rg + Ib·Rf/Vin and,
	// differentiated, S_Rg = -(Rf/Rg) / (out/in).
	rf, rg, ib, vin := opt.Value, 2e3, 1e-6, 0.3
	want := -(rf / rg) / (1 + rf/rg + ib*rf/vin)
	for j, v := range d.Parts {
		if v.Name == "Rg" && math.Abs(r.Goals[0].Sens[j].Normalised-want) > 1e-12 {
			t.Errorf("S(Rg) = %.15g, want %.15g (non-inverting gain formula, differentiated)", r.Goals[0].Sens[j].Normalised, want)
		}
	}
}

// TestHazardThreshold checks the caution at the ES1 limit of IEC 62368-1
// (60 V DC, "not exceeding": 60.00 V is within ES1): none at 59.99 V or
// 60 V, one at 60.01 V of either sign.
func TestHazardThreshold(t *testing.T) {
	for _, c := range []struct {
		volts float64
		want  bool
	}{{59.99, false}, {60, false}, {60.01, true}, {-60, false}, {-60.01, true}} {
		t.Run(fmt.Sprint(c.volts), func(t *testing.T) {
			d := design(t, fmt.Sprintf(`ohmfit: 1
parts:
  - {name: V, type: voltage-source, plus: hv, minus: gnd, volts: %g}
  - {name: R1, type: resistor, from: hv, to: gnd, value: 1M, tolerance: 0.1%%}
targets:
  - {current: R1, max: 1m}
`, c.volts))
			r, err := Check(d, &Settings{Samples: -1})
			if err != nil {
				t.Fatal(err)
			}
			got := len(r.Cautions) > 0 && strings.Contains(r.Cautions[0], "IEC 62368-1")
			if got != c.want {
				t.Errorf("%g V: caution %v, want %v (%q)", c.volts, got, c.want, r.Cautions)
			}
		})
	}
}

// TestDerating checks the package choice and the hard limit: 12 V across
// 2.7 kΩ is 53.3 mW (P = V²/R), over half of an 0603's 100 mW and under
// half of an 0805's 125 mW, so the smallest package at half its rating is
// an 0805; limited to 0603 that is a failure.
func TestDerating(t *testing.T) {
	text := `ohmfit: 1
parts:
  - {name: V, type: voltage-source, plus: a, minus: gnd, volts: 12}
  - {name: R1, type: resistor, from: a, to: gnd, value: 2.7k, tolerance: 0.0001%}
targets:
  - {current: R1, max: 1}
`
	r, err := Check(design(t, text), &Settings{Samples: -1})
	if err != nil {
		t.Fatal(err)
	}
	rg := r.Ratings[0]
	if rg.Package != "0805" || math.Abs(rg.NominalWatts-144/2.7e3) > 1e-12 || len(r.Failures) != 0 {
		t.Errorf("got %+v, failures %q; want 0805 for %g W", rg, r.Failures, 144/2.7e3)
	}
	r, err = Check(design(t, text), &Settings{Samples: -1, MaxPackage: "0603"})
	if err != nil {
		t.Fatal(err)
	}
	if len(r.Failures) != 1 {
		t.Errorf("limited to 0603: failures %q, want one", r.Failures)
	}
}
