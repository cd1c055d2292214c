package synth_test

import (
	"context"
	"fmt"
	"strings"
	"testing"

	"github.com/ohmfit/ohmfit/synth"
)

// heatedBias is an NTC biased from 3.3 V through R1, with R2 in parallel to
// flatten it, read at three temperatures: a voltage goal at 25 °C, a
// window at the ends, and a self-heating limit of LIMIT °C on the sensor.
// The goal's band lets the sensor sit between 1.08 and 1.32 V at room,
// 78 … 116 mK of rise (V²/R/δ): the leanest design (R2 left at 1M) sits
// at 93 mK, so limits below that make the search pull the node down with
// R2, at some cost in power.
const heatedBias = `ohmfit: 1
name: heated bias
parts:
  - {name: V1, type: voltage-source, plus: vcc, minus: gnd, volts: 3.3}
  - {name: R1, type: resistor, from: vcc, to: s}
  - {name: RT1, type: ntc, from: s, to: gnd, r25: 10k, beta: 3950, dissipation: 1.5mW/K}
  - {name: R2, type: resistor, from: s, to: gnd}
conditions:
  - {name: cold, temperature: -10}
  - {name: room, temperature: 25}
  - {name: hot, temperature: 50}
targets:
  - {voltage: s, equals: 1.2, tolerance: 10%, when: [room]}
  - {voltage: s, min: 0.3, max: 3}
  - {self_heating: RT1, max: LIMIT}
choose: {series: E12, min: 1k, max: 1M}
`

// A self_heating limit in the search, exact in every condition: for each
// method and both rankings (error first, and power first: the leanest
// design that keeps the sensor cool), the list is the plain enumeration's
// (independent gonum MNA; rise = P/δ), proven over the space. Some limit
// must change the answer, or the test would not be testing it.
func TestSelfHeatingLimitMatchesBruteForce(t *testing.T) {
	methods := []struct {
		name string
		m    synth.Method
	}{{"rows", nil}, {"bound", bb}}
	for _, rank := range []string{"", "rank: [power, error]\n"} {
		firsts := map[string]bool{}
		for _, limit := range []string{"1", "0.09", "0.085", "0.08"} {
			text := strings.Replace(heatedBias, "LIMIT", limit, 1) + rank
			p := problemFromYAML(t, text, "")
			for _, m := range methods {
				t.Run(fmt.Sprintf("%s/%s/%q", m.name, limit, rank), func(t *testing.T) {
					compareMethodWithBrute(t, p, 5, 2, m.m)
				})
			}
			res, err := synth.Search(context.Background(), p, nil, nil)
			if err != nil {
				t.Fatal(err)
			}
			if len(res.Solutions) == 0 {
				continue
			}
			first := res.Solutions[0]
			firsts[fmt.Sprint(first.Values())] = true
			if res.Status != synth.Proven {
				t.Errorf("limit %s: status %v, want proven", limit, res.Status)
			}
			if rank != "" {
				// The leanest design that keeps the sensor cool: no
				// candidate of the enumeration that meets every limit
				// draws less power.
				for _, c := range bruteForce(t, p) {
					if c.power < first.Score.Power*(1-1e-12) {
						t.Errorf("limit %s: %v draws %g W, less than the first answer's %g W", limit, c.vals, c.power, first.Score.Power)
					}
				}
			}
		}
		if len(firsts) < 2 {
			t.Errorf("rank %q: every limit gives the same first answer %v; the limit never binds", rank, firsts)
		}
	}
}

// An ADC's input resistance and leakage load its node in the search as in
// the plain enumeration (which sees them as the resistor and current source
// the loader adds, through its own gonum MNA): a loaded divider with a
// goal on the tap and the settling limit, by each method.
func TestADCLoadMatchesBruteForce(t *testing.T) {
	const text = `ohmfit: 1
parts:
  - {name: V1, type: voltage-source, plus: vcc, minus: gnd, volts: 5}
  - {name: R1, type: resistor, from: vcc, to: s}
  - {name: R2, type: resistor, from: s, to: gnd}
  - {name: ADC1, type: adc, in: s, ref: 3.3, bits: 12, max_source: 50k, input: 200k, leakage: 2u}
targets:
  - {voltage: s, equals: 1.8, tolerance: 2%}
  - {code: ADC1, min: 2000}
choose: {series: E24, min: 1k, max: 1M}
`
	for _, rank := range []string{"", "rank: [power, error]\n"} {
		p := problemFromYAML(t, text+rank, "")
		for _, m := range []synth.Method{nil, bb} {
			compareMethodWithBrute(t, p, 6, 2, m)
		}
	}
}
