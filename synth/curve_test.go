package synth

import (
	"context"
	"math"
	"testing"
)

// curveDivider is an NTC divider with extra parts and its targets.
func curveDivider(parts, targets string) string {
	return `ohmfit: 1
parts:
  - {name: V, type: voltage-source, plus: vcc, minus: gnd, volts: 3.3}
  - {name: Rtop, type: resistor, from: vcc, to: probe}
  - {name: RT1, type: ntc, from: probe, to: gnd, r25: 10k, beta: 3500}
` + parts + `sweep: {temperature: [0, 25, 50]}
targets:
` + targets + `choose: {series: E24, min: 1k, max: 100k}
`
}

// TestCurveClosedForm checks the transfer curve of an NTC divider against
// the divider law V = 3.3·R(T)/(R(T) + Rtop), with the thermistor's Beta
// equation R(T) = R25·exp(B·(1/T − 1/298.15 K)) (T in kelvin), at every
// half degree from 0 to 50 °C; and its goal points.
func TestCurveClosedForm(t *testing.T) {
	for _, tc := range []struct {
		name   string
		parts  string
		target string
		codes  bool
		scale  float64 // codes per volt
		goal   float64
	}{
		{"volts", "", "  - {voltage: probe, equals: 1.65, when: [25C]}\n", false, 1, 1.65},
		// An ideal ADC (no input resistance or leakage), 12 bits over a
		// 3.3 V reference: 4096/3.3 codes per volt (a step of ref/2^bits).
		{"codes", "  - {name: ADC1, type: adc, in: probe, ref: 3.3, bits: 12}\n", "  - {code: ADC1, equals: 2048, when: [25C]}\n", true, 4096 / 3.3, 2048},
	} {
		t.Run(tc.name, func(t *testing.T) {
			src := curveDivider(tc.parts, tc.target)
			p := parsedProblem(t, "curve.yaml", []byte(src))
			res, err := Search(context.Background(), p, &Settings{Top: 1, Workers: 1}, Rows{})
			if err != nil || len(res.Solutions) == 0 {
				t.Fatalf("search: %v, %d answers", err, len(res.Solutions))
			}
			opts := res.Solutions[0].Options
			c, ok := Curve(p, opts)
			if !ok {
				t.Fatal("no curve")
			}
			if c.Node != "probe" || c.Codes != tc.codes {
				t.Errorf("node %q codes %v, want probe and %v", c.Node, c.Codes, tc.codes)
			}
			if len(c.Points) != 101 {
				t.Fatalf("%d points, want 101 (0 … 50 °C by 0.5)", len(c.Points))
			}
			rtop := opts[0].Value
			for i, pt := range c.Points {
				celsius := 0.5 * float64(i)
				r := 10e3 * math.Exp(3500*(1/(celsius+273.15)-1/298.15))
				want := 3.3 * r / (r + rtop) * tc.scale
				if math.Abs(pt.Celsius-celsius) > 1e-9 || math.Abs(pt.Value-want) > 1e-9*math.Abs(want) {
					t.Errorf("point %d: (%g °C, %g), divider law gives (%g °C, %g)", i, pt.Celsius, pt.Value, celsius, want)
				}
			}
			if len(c.Goals) != 1 || c.Goals[0] != (CurvePoint{25, tc.goal}) {
				t.Errorf("goals %v, want one at 25 °C, %g", c.Goals, tc.goal)
			}
		})
	}
}
