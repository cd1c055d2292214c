package synth_test

import (
	"fmt"
	"testing"
)

// Exact ties: a divider ratio that a pair of standard values hits exactly is
// hit by every decade-scaled copy of the pair too (R1 = R2 by every equal
// pair), all with goal error 0, so power decides (the contract's ranking:
// error, then power, with its tie tolerances). Both exhaustive methods
// against the plain enumeration with an independent gonum MNA solve
// (brute_test.go), for 1, 2 and 8 workers. The rows method used to rank
// such ties by the rounding of its update formula, which differs from one
// decade to the next by more than the tie tolerance.
func TestDecadeTiesRankedByPower(t *testing.T) {
	for _, c := range []struct {
		r1, r2 float64
		series string
		vin    float64
		three  bool
	}{
		{4990, 10000, "E96", 5, false}, {1370, 2490, "E96", 3.3, false}, {3300, 6800, "E24", 12, true}, {1000, 1000, "E192", 5, false}, {1020, 9530, "E96", 1.8, false}, {2200, 4700, "E24", 5, true}, {1500, 3300, "E12", 3.3, true}, {2200, 4700, "E24", 5, false},
	} {
		if testing.Short() && (c.series != "E24" || c.three) {
			continue
		}
		for k, m := range []string{"rows", "bb"} {
			t.Run(fmt.Sprint(c.series, " ", c.r1, ":", c.r2, " ", m), func(t *testing.T) {
				extra, goal := "", ""
				if c.three {
					extra = "  - {name: R3, type: resistor, from: out, to: gnd}\n"
					goal = "  - {ratio: [out, in], max: 0.9}\n"
				}
				text := fmt.Sprintf(`ohmfit: 1
name: tie
parts:
  - {name: V1, type: voltage-source, plus: in, minus: gnd, volts: %g}
  - {name: R1, type: resistor, from: in, to: out}
  - {name: R2, type: resistor, from: out, to: gnd}
%stargets:
  - {ratio: [out, in], equals: %.17g}
%schoose: {series: %s, min: 1k, max: 1M}
`, c.vin, extra, c.r2/(c.r1+c.r2), goal, c.series)
				p := problemFromYAML(t, text, "")
				workers := []int{1, 2, 8}[k%3]
				if m == "rows" {
					compareWithBrute(t, p, 8, workers)
				} else {
					compareMethodWithBrute(t, p, 8, workers+1, bb)
				}
			})
		}
	}
}
