package variation

import (
	"fmt"
	"math"
	"strings"
	"testing"

	"github.com/ohmfit/ohmfit/constraints"
	"github.com/ohmfit/ohmfit/synth"
)

// TestPartLoad checks each part's share of a two-part position against
// Ohm's law: in series both carry the position's current (V = I·R, P =
// I²·R), in parallel both see its voltage (P = V²/R); and the parts'
// powers add up to the position's V·I (the pair's combined value from the
// series and parallel laws).
func TestPartLoad(t *testing.T) {
	for _, tc := range []struct {
		c      constraints.Combine
		r1, r2 float64
	}{
		{constraints.Series, 10e3, 2.2e3},
		{constraints.Parallel, 10e3, 47e3},
	} {
		t.Run(tc.c.String(), func(t *testing.T) {
			volts := 5.0
			r := tc.r1 + tc.r2
			if tc.c == constraints.Parallel {
				r = tc.r1 * tc.r2 / (tc.r1 + tc.r2)
			}
			amps := volts / r
			sumV, sumW := 0.0, 0.0
			for _, rp := range []float64{tc.r1, tc.r2} {
				v, w := PartLoad(tc.c, rp, volts, amps)
				if math.Abs(w-v*v/rp) > 1e-12*w {
					t.Errorf("%g Ω: %g V and %g W break P = V²/R", rp, v, w)
				}
				sumV += v
				sumW += w
			}
			if tc.c == constraints.Series && math.Abs(sumV-volts) > 1e-12 {
				t.Errorf("series parts' voltages add to %g V, want %g V (KVL)", sumV, volts)
			}
			if math.Abs(sumW-volts*amps) > 1e-12*sumW {
				t.Errorf("parts dissipate %g W, the position V·I = %g W", sumW, volts*amps)
			}
		})
	}
}

// TestWatchAnswerHazard checks WatchAnswer's caution at the ES1 limit of
// IEC 62368-1 (60 V DC; 60.00 V is within ES1): none at 60 V, one at
// 60.01 V.
func TestWatchAnswerHazard(t *testing.T) {
	for _, tc := range []struct {
		volts float64
		want  int
	}{{60, 0}, {60.01, 1}} {
		t.Run(fmt.Sprint(tc.volts), func(t *testing.T) {
			tpl, err := constraints.Parse("hv.yaml", []byte(fmt.Sprintf(`ohmfit: 1
parts:
  - {name: V, type: voltage-source, plus: hv, minus: gnd, volts: %g}
  - {name: R1, type: resistor, from: hv, to: mid}
  - {name: R2, type: resistor, from: mid, to: gnd, value: 1M}
targets:
  - {voltage: mid, equals: 10}
choose: {min: 100k, max: 10M, combine: series}
`, tc.volts)))
			if err != nil {
				t.Fatal(err)
			}
			cp, err := constraints.Compile(tpl)
			if err != nil {
				t.Fatal(err)
			}
			opt := synth.Option{Value: 5e6, Parts: [2]float64{4.7e6, 300e3}, Count: 2, Combine: constraints.Series}
			n := 0
			for _, c := range WatchAnswer(cp, []synth.Option{opt}).Cautions() {
				if strings.Contains(c, "hazardous voltage") {
					n++
				}
			}
			if n != tc.want {
				t.Errorf("%d hazard cautions, want %d", n, tc.want)
			}
		})
	}
}
