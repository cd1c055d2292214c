package constraints

import (
	"math"
	"strings"
	"testing"
)

// adcDivider is a 3.3 V divider, R1 = 10k over R2 = 10k, read by an ADC
// with input INPUT and leakage LEAK (lines removed when not used).
const adcDivider = `ohmfit: 1
parts:
  - {name: V1, type: voltage-source, plus: vcc, minus: gnd, volts: 3.3}
  - {name: R1, type: resistor, from: vcc, to: s, value: 10k}
  - {name: R2, type: resistor, from: s, to: gnd, value: 10k}
  - {name: ADC1, type: adc, in: s, ref: 3.3, bits: 12, EXTRA}
targets:
  - {voltage: s, min: 0}
  - {resistance: [s, gnd], max: 1M}
  - {current: V1, max: 1}
`

// An ADC's input resistance and leakage load its node in every solve.
// Closed forms: the divider seen from s is its Thevenin equivalent,
// Vth = 3.3·R2/(R1+R2) = 1.65 V behind Rth = R1∥R2 = 5 kΩ. An input Rin
// divides it again, V = Vth·Rin/(Rth + Rin) (divider law); a leakage I out
// of the node adds, by superposition, −I·(Rth∥Rin) to what the sources
// alone give. The resistance seen from s is Rth∥Rin (the leakage, a current
// source, is open when zeroed). The supply delivers the divider's current
// plus what the input draws.
func TestADCInputLoadsTheNode(t *testing.T) {
	const vth, rth = 1.65, 5e3
	par := func(a, b float64) float64 { return a * b / (a + b) }
	cases := []struct {
		name, extra string
		rin, leak   float64 // rin 0: none
	}{
		{"ideal", "max_source: 10k", 0, 0},
		{"input", "input: 100k", 100e3, 0},
		{"leakage", "leakage: 1u", 0, 1e-6},
		{"sourcing leakage", "leakage: -2u", 0, -2e-6},
		{"both", "input: 47k, leakage: 500n", 47e3, 500e-9},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			tp, _, sc := evaluateText(t, strings.Replace(adcDivider, "EXTRA", c.extra, 1))
			v, r := vth, rth
			if c.rin > 0 {
				v, r = vth*c.rin/(rth+c.rin), par(rth, c.rin)
			}
			v -= c.leak * r // superposition
			supply := (3.3 - v) / 10e3
			want := map[string]float64{"voltage s": v, "resistance s-gnd": r, "current V1": supply}
			for ti, tg := range tp.Targets {
				w, got := want[tg.Label()], sc.Value(ti, 0)
				if math.Abs(got-w) > 1e-12*math.Abs(w) {
					t.Errorf("%s: %.15g, closed form %.15g", tg.Label(), got, w)
				}
			}
			for _, ps := range tp.Parts {
				if ps.ADC != "" && ps.Pos != tp.ADCs[0].Pos {
					t.Errorf("%s at %v, not at the ADC (%v)", ps.Name, ps.Pos, tp.ADCs[0].Pos)
				}
			}
		})
	}
}
