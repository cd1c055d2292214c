package synth_test

import (
	"fmt"
	"math/rand/v2"
	"strings"
	"testing"

	"github.com/ohmfit/ohmfit/eseries/units"
	"github.com/ohmfit/ohmfit/synth"
)

// randomDeepTemplate writes a ladder of five or six free resistors from one
// source, each from a short stock list of its own, with voltage goals at
// two or three of its taps (the joint two-goal bound's case), sometimes in
// two conditions that differ only in the source's value (one matrix), and
// sometimes a load or a power limit. Deep boxes with few options each: the
// positions the random networks of TestBranchBoundRandomMatchesBruteForce
// (at most three free) never reach.
func randomDeepTemplate(rng *rand.Rand) string {
	var b strings.Builder
	vin := 3 + 9*rng.Float64()
	fmt.Fprintf(&b, "ohmfit: 1\nname: deep\nparts:\n")
	fmt.Fprintf(&b, "  - {name: V1, type: voltage-source, plus: n0, minus: gnd, volts: %.3g}\n", vin)
	stock := func() string {
		var vs []string
		for range 3 + rng.IntN(2) {
			vs = append(vs, units.Format(float64(int(1e3*(1+rng.Float64()*30)))))
		}
		return strings.Join(vs, ", ")
	}
	free := 5 + rng.IntN(2)
	shunts := rng.IntN(3) // free resistors from a tap to ground: a branching ladder
	chain := free - shunts
	var chooses []string
	node := func(i int) string {
		if i == chain {
			return "gnd"
		}
		return fmt.Sprintf("n%d", i)
	}
	add := func(a, c string) {
		name := fmt.Sprintf("R%d", len(chooses)+1)
		fmt.Fprintf(&b, "  - {name: %s, type: resistor, from: %s, to: %s}\n", name, a, c)
		chooses = append(chooses, fmt.Sprintf("    %s: {series: [%s]}", name, stock()))
	}
	for i := 0; i < chain; i++ {
		add(node(i), node(i+1))
	}
	for k := range shunts {
		add(node(1+k%(chain-1)), "gnd")
	}
	if rng.IntN(2) == 0 {
		fmt.Fprintf(&b, "  - {name: RL, type: resistor, from: n2, to: gnd, value: %s}\n", units.Format(1e4*(1+rng.Float64()*9)))
	}
	two := rng.IntN(2) == 0
	if two {
		fmt.Fprintf(&b, "conditions:\n  - {name: low, set: {V1: %.3g}}\n  - {name: high, set: {V1: %.3g}}\n", vin*0.9, vin*1.1)
	}
	fmt.Fprintf(&b, "targets:\n")
	taps := []int{1, 2, 3}[:min(2+rng.IntN(2), chain-1)]
	for k, tp := range taps {
		frac := 0.9 - 0.25*float64(k) - 0.1*rng.Float64()
		when := ""
		if two {
			when = []string{", when: [low]", ", when: [high]", ""}[rng.IntN(3)]
		}
		fmt.Fprintf(&b, "  - {voltage: n%d, equals: %.4g%s}\n", tp, frac*vin, when)
	}
	if rng.IntN(3) == 0 {
		fmt.Fprintf(&b, "  - {power: R1, max: %.3gm}\n", 0.5+5*rng.Float64())
	}
	fmt.Fprintf(&b, "choose:\n  overrides:\n%s\n", strings.Join(chooses, "\n"))
	if rng.IntN(4) == 0 {
		fmt.Fprintf(&b, "rank: [power, error]\n")
	}
	return b.String()
}

// TestBranchBoundDeepMatchesBruteForce: on networks of five and six free
// positions (spaces of a few hundred to a few thousand candidates), branch
// and bound, with leaves of one row and with its default leaves, gives the
// brute force's list (the plain enumeration with an independent gonum MNA
// assembly, brute_test.go), for 1 and 2 workers.
func TestBranchBoundDeepMatchesBruteForce(t *testing.T) {
	rng := rand.New(rand.NewPCG(61, 67))
	trials := 40
	if testing.Short() {
		trials = 8
	}
	for trial := range trials {
		text := randomDeepTemplate(rng)
		t.Run(fmt.Sprint(trial), func(t *testing.T) {
			p := problemFromYAML(t, text, "")
			want := bruteForce(t, p)
			compareWantWithMethod(t, p, want, 6, 1+trial%2, bb)
			compareWantWithMethod(t, p, want, 6, 1, synth.BranchBound{LeafRows: 1})
			if t.Failed() {
				t.Log(text)
			}
		})
	}
}
