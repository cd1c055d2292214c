package synth_test

import (
	"context"
	"fmt"
	"math"
	"math/rand/v2"
	"strings"
	"testing"

	"github.com/ohmfit/ohmfit/constraints"
	"github.com/ohmfit/ohmfit/constraints/examples"
	"github.com/ohmfit/ohmfit/eseries/units"
	"github.com/ohmfit/ohmfit/synth"
)

var bb = synth.BranchBound{}

// Every built-in example: branch and bound gives the plain enumeration's
// list (independent gonum MNA, synth/brute_test.go), as the rows method does.
func TestBranchBoundExamplesMatchBruteForce(t *testing.T) {
	for _, name := range examples.Names() {
		t.Run(name, func(t *testing.T) {
			text, _ := examples.Get(name)
			p := problemFromYAML(t, string(text), "")
			for _, coarser := range []string{"E12", "E6", "E3"} {
				if p.Space() <= 60_000 {
					break
				}
				p = problemFromYAML(t, string(text), coarser)
			}
			if p.Space() > 60_000 || (testing.Short() && p.Space() > 5_000) {
				t.Skipf("space %g too large for the plain enumeration here", p.Space())
			}
			compareMethodWithBrute(t, p, 10, 2, bb)
		})
	}
}

// Random networks with every target kind as a goal or a limit, an op-amp
// stage, pairs (combine: any), several conditions, stock lists and the
// power-first ranking: branch and bound against the plain enumeration, and
// its bound equal to the best error when it proves the list. Also with an
// open-set budget of one byte, so that every worker searches depth first
// from its first box (Settings.OpenBytes): the order changes, the list
// must not, for 1, 2 and 8 workers.
func TestBranchBoundRandomMatchesBruteForce(t *testing.T) {
	rng := rand.New(rand.NewPCG(13, 17))
	trials := 60
	if testing.Short() {
		trials = 12
	}
	for trial := range trials {
		text := randomBoundTemplate(rng)
		t.Run(fmt.Sprint(trial), func(t *testing.T) {
			p := problemFromYAML(t, text, "")
			if p.Space() > 30_000 || (testing.Short() && p.Space() > 12_000) {
				t.Skipf("space %g", p.Space())
			}
			want := bruteForce(t, p)
			compareWantWithMethod(t, p, want, 6, 1+trial%3, bb)
			compareWantWithMethod(t, p, want, 6, 2, synth.BranchBound{LeafRows: 1})
			for _, w := range []int{1, 2, 8} {
				compareWantWithSettings(t, p, want, &synth.Settings{Top: 6, Workers: w, OpenBytes: 1}, bb)
			}
			res, err := synth.Search(context.Background(), p, &synth.Settings{Top: 6, Workers: 2}, bb)
			if err != nil {
				t.Fatal(err)
			}
			if len(res.Solutions) > 0 && p.Spec.Template.Rank[0] == constraints.ByError && res.Bound != res.Solutions[0].Score.Error {
				t.Errorf("proven bound %g, best error %g", res.Bound, res.Solutions[0].Score.Error)
			}
			if t.Failed() {
				t.Log(text)
			}
		})
	}
}

// randomBoundTemplate writes a ladder from a source (E6 or a stock list,
// sometimes pairs), sometimes followed by a non-inverting op-amp stage, with
// one or two conditions, a goal of a random kind and a random limit.
func randomBoundTemplate(rng *rand.Rand) string {
	var b strings.Builder
	fmt.Fprintf(&b, "ohmfit: 1\nname: random\nparts:\n")
	fmt.Fprintf(&b, "  - {name: V1, type: voltage-source, plus: in, minus: gnd, volts: %.3g}\n", 1+9*rng.Float64())
	free := 0
	res := 0
	addR := func(a, c string, mayFree bool) string {
		res++
		name := fmt.Sprintf("R%d", res)
		if mayFree && free < 3 && rng.IntN(4) > 0 {
			free++
			fmt.Fprintf(&b, "  - {name: %s, type: resistor, from: %s, to: %s}\n", name, a, c)
			return name
		}
		fmt.Fprintf(&b, "  - {name: %s, type: resistor, from: %s, to: %s, value: %s}\n", name, a, c, units.Format(1e3*(1+rng.Float64()*20)))
		return name
	}
	nodes := []string{"in", "n1", "n2", "n3"}[:2+rng.IntN(3)]
	for i := 0; i < len(nodes)-1; i++ {
		addR(nodes[i], nodes[i+1], true)
	}
	addR(nodes[len(nodes)-1], "gnd", true)
	if rng.IntN(2) == 0 {
		addR(nodes[1], "gnd", true)
	}
	if free == 0 {
		addR("in", "gnd", true)
	}
	tap := nodes[1+rng.IntN(len(nodes)-1)]
	opamp := rng.IntN(3) == 0
	if opamp {
		// Non-inverting stage: gain 1 + RF/RG into a fixed load.
		fmt.Fprintf(&b, "  - {name: U1, type: opamp, plus: %s, minus: fb, out: o}\n", tap)
		fmt.Fprintf(&b, "  - {name: RF, type: resistor, from: o, to: fb}\n")
		fmt.Fprintf(&b, "  - {name: RG, type: resistor, from: fb, to: gnd, value: %s}\n", units.Format(1e3*(1+rng.Float64()*9)))
		fmt.Fprintf(&b, "  - {name: RL, type: resistor, from: o, to: gnd, value: 10k}\n")
	}
	if rng.IntN(3) == 0 {
		fmt.Fprintf(&b, "  - {name: I1, type: current-source, from: %s, to: gnd, amps: %.3gu}\n", nodes[len(nodes)-1], 1+rng.Float64()*50)
	}
	adc := rng.IntN(4) == 0
	if adc {
		fmt.Fprintf(&b, "  - {name: ADC1, type: adc, in: %s, ref: 3.3, bits: 10}\n", tap)
	}
	fmt.Fprintf(&b, "targets:\n")
	switch rng.IntN(7) {
	case 0:
		fmt.Fprintf(&b, "  - {ratio: [%s, in], equals: %.3g}\n", tap, 0.1+0.6*rng.Float64())
	case 1:
		fmt.Fprintf(&b, "  - {current: R1, equals: %.3gu}\n", 50+500*rng.Float64())
	case 2:
		fmt.Fprintf(&b, "  - {resistance: [%s, gnd], equals: %.3gk}\n", tap, 1+5*rng.Float64())
	case 3:
		fmt.Fprintf(&b, "  - {power: R1, equals: %.3gu}\n", 50+500*rng.Float64())
	case 4:
		fmt.Fprintf(&b, "  - {voltage: [in, %s], equals: %.3g}\n", tap, 0.5+2*rng.Float64())
	default:
		fmt.Fprintf(&b, "  - {voltage: %s, equals: %.4g}\n", tap, 0.2+rng.Float64())
	}
	if opamp {
		fmt.Fprintf(&b, "  - {voltage: o, equals: %.3g}\n", 1+3*rng.Float64())
	}
	if adc {
		fmt.Fprintf(&b, "  - {code: ADC1, min: %d}\n", 50+rng.IntN(100))
	}
	switch rng.IntN(6) {
	case 0:
		fmt.Fprintf(&b, "  - {current: R1, max: %.3gm}\n", 0.1+rng.Float64())
	case 1:
		fmt.Fprintf(&b, "  - {power: R1, max: %.3gm}\n", 0.2+rng.Float64())
	case 2:
		fmt.Fprintf(&b, "  - {ratio: [%s, in], min: %.3g}\n", tap, 0.05+0.2*rng.Float64())
	case 3:
		fmt.Fprintf(&b, "  - {resistance: [%s, gnd], max: %.3gk}\n", tap, 1+5*rng.Float64())
	case 4:
		fmt.Fprintf(&b, "  - {current: V1, min: -%.3gm}\n", 0.5+2*rng.Float64())
	}
	if rng.IntN(3) == 0 {
		fmt.Fprintf(&b, "limits:\n  supply_power_max: %.3gm\n", 1+rng.Float64()*5)
	}
	if rng.IntN(2) == 0 {
		v := 1 + 9*rng.Float64()
		fmt.Fprintf(&b, "conditions:\n  - {name: low, set: {V1: %.3g}}\n  - {name: high, set: {V1: %.3g}}\n", v, v*1.3)
	}
	switch rng.IntN(4) {
	case 0:
		fmt.Fprintf(&b, "choose:\n  series: E3\n  min: 1k\n  max: 47k\n  combine: %s\n", []string{"series", "parallel", "any"}[rng.IntN(3)])
	case 1:
		fmt.Fprintf(&b, "choose:\n  series: [1k, 2.2k, 3.3k, 4k7, 6.8k, 10k, 15k, 22k, 47k]\n")
	default:
		fmt.Fprintf(&b, "choose:\n  series: E6\n  min: 1k\n  max: 100k\n")
	}
	if rng.IntN(2) == 0 {
		fmt.Fprintf(&b, "rank: [power, error]\n")
	}
	return b.String()
}

// The sensor sweep (sweep-wide targets, ADC codes, a duty-cycled supply,
// both rankings) with branch and bound: the sweep-wide targets are not
// bounded, only checked per candidate, and the list is still the plain
// enumeration's.
func TestBranchBoundSweepMatchesBruteForce(t *testing.T) {
	if testing.Short() {
		t.Skip("long comparison")
	}
	base := sensorSweep
	for _, rank := range []string{"", "rank: [power, error]\n"} {
		p := problemFromYAML(t, base+rank, "")
		compareMethodWithBrute(t, p, 6, 2, bb)
	}
}

// A box that holds a pole: a negative-impedance converter (the op-amp's
// output feeds its plus input through R1 and its minus input through R2),
// where the MNA determinant changes sign inside the space of R1 and R2.
// Candidates on either side must still be found exactly as the plain
// enumeration finds them; corner bounds taken across the pole would be
// wrong (the node voltage there is not bounded by the corners at all).
func TestBranchBoundPole(t *testing.T) {
	text := `ohmfit: 1
name: converter with a pole
parts:
  - {name: V1, type: voltage-source, plus: in, minus: gnd, volts: 1}
  - {name: R4, type: resistor, from: in, to: p, value: 10k}
  - {name: R1, type: resistor, from: o, to: p}
  - {name: R2, type: resistor, from: o, to: m}
  - {name: R3, type: resistor, from: m, to: gnd, value: 10k}
  - {name: R5, type: resistor, from: p, to: gnd, value: 10k}
  - {name: U1, type: opamp, plus: p, minus: m, out: o}
targets:
  - {voltage: o, equals: 7}
choose: {series: E12, min: 1k, max: 1M}
`
	p := problemFromYAML(t, text, "")
	want := bruteForce(t, p)
	// The determinant's sign must really change over the space: some
	// candidates drive the output positive, some negative.
	pos, neg := false, false
	pn := newPlainNet(p.Spec.Template)
	for _, r1 := range []float64{1e3, 1e6} {
		for _, r2 := range []float64{1e3, 1e6} {
			vals := append([]float64(nil), p.Spec.Conditions[0].Values...)
			vals[p.Domains[0].Part], vals[p.Domains[1].Part] = r1, r2
			ps, err := pn.solve(vals)
			if err != nil {
				continue
			}
			if ps.v("o") > 0 {
				pos = true
			} else {
				neg = true
			}
		}
	}
	if !pos || !neg {
		t.Fatalf("the space holds no pole (output sign at corners: + %v, - %v)", pos, neg)
	}
	for _, w := range []int{1, 2} {
		compareWantWithMethod(t, p, want, 8, w, bb)
		compareWantWithMethod(t, p, want, 8, w, synth.BranchBound{LeafRows: 1})
	}
}

// Exact ties: a 2:1 divider and copies of it scaled by decades have the same
// error; the contract ranks them by power, so the largest values come first.
func TestBranchBoundDecadeTies(t *testing.T) {
	text := `ohmfit: 1
name: decade ties
parts:
  - {name: V1, type: voltage-source, plus: in, minus: gnd, volts: 3}
  - {name: R1, type: resistor, from: in, to: a}
  - {name: R2, type: resistor, from: a, to: b}
  - {name: R3, type: resistor, from: b, to: gnd}
targets:
  - {voltage: a, equals: 2}
  - {voltage: b, equals: 1}
choose: {series: E12, min: 100, max: 1M}
`
	if testing.Short() {
		text = strings.Replace(text, "min: 100,", "min: 10k,", 1)
	}
	p := problemFromYAML(t, text, "")
	want := bruteForce(t, p)
	workers := []int{1, 2, 8}
	if testing.Short() {
		workers = workers[1:2]
	}
	for _, w := range workers {
		compareWantWithMethod(t, p, want, 10, w, bb)
	}
	res, err := synth.Search(context.Background(), p, &synth.Settings{Top: 4}, bb)
	if err != nil {
		t.Fatal(err)
	}
	// Equal values in all three positions give exactly 2 V and 1 V
	// (divider formula); the highest decade draws the least power.
	if v := res.Solutions[0].Values(); v[0] != 1e6 || v[1] != 1e6 || v[2] != 1e6 {
		t.Errorf("first answer %v, want 1M, 1M, 1M", v)
	}
}

// The same list, to the last digit, for 1, 2 and 8 workers, on a space big
// enough that the workers' bars differ as they go.
func TestBranchBoundWorkersDeterministic(t *testing.T) {
	sameForWorkers(t, problemFromYAML(t, loadedDividerYAML("E96"), ""), bb)
}

// Against the rows method on spaces too large for the plain enumeration:
// the same list.
func TestBranchBoundMatchesRows(t *testing.T) {
	cases := []string{loadedDividerYAML("E48"), ladderYAML("E24", 4)}
	if testing.Short() {
		cases = cases[:1]
	}
	for i, text := range cases {
		t.Run(fmt.Sprint(i), func(t *testing.T) {
			p := problemFromYAML(t, text, "")
			want, err := synth.Search(context.Background(), p, &synth.Settings{Top: 10, MaxRows: 1e9}, synth.Rows{})
			if err != nil {
				t.Fatal(err)
			}
			got, err := synth.Search(context.Background(), p, &synth.Settings{Top: 10}, bb)
			if err != nil {
				t.Fatal(err)
			}
			if got.Status != synth.Proven || len(got.Solutions) != len(want.Solutions) {
				t.Fatalf("status %v, %d answers; rows %d", got.Status, len(got.Solutions), len(want.Solutions))
			}
			for r := range want.Solutions {
				if fmt.Sprint(got.Solutions[r].Values()) != fmt.Sprint(want.Solutions[r].Values()) {
					t.Errorf("rank %d: %v, rows %v", r+1, got.Solutions[r].Values(), want.Solutions[r].Values())
				}
			}
			if got.Stats.Evaluated >= want.Stats.Evaluated {
				t.Logf("branch and bound scored %d, rows %d", got.Stats.Evaluated, want.Stats.Evaluated)
			}
		})
	}
}

// A time limit: not proven, and the bound is a lower bound on the error of
// the true best (checked against the proven run).
func TestBranchBoundTimeLimitBound(t *testing.T) {
	p := problemFromYAML(t, ladderYAML("E96", 4), "")
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	res, err := synth.Search(ctx, p, nil, bb)
	if err != nil {
		t.Fatal(err)
	}
	if res.Status != synth.Interrupted || res.Status.Exhaustive() {
		t.Fatalf("status %v", res.Status)
	}
	if math.IsNaN(res.Bound) || res.Bound < 0 {
		t.Fatalf("bound %g", res.Bound)
	}
	if testing.Short() {
		return
	}
	full, err := synth.Search(context.Background(), p, nil, bb)
	if err != nil {
		t.Fatal(err)
	}
	if res.Bound > full.Solutions[0].Score.Error {
		t.Errorf("bound %g above the proven best %g", res.Bound, full.Solutions[0].Score.Error)
	}
}

// ladderYAML is a threshold ladder: a 3.3 V reference down a chain of n
// resistors, with taps at chosen fractions (comparator thresholds).
func ladderYAML(series string, n int) string {
	var b strings.Builder
	fmt.Fprintf(&b, "ohmfit: 1\nname: threshold ladder\nparts:\n")
	fmt.Fprintf(&b, "  - {name: VREF, type: voltage-source, plus: t0, minus: gnd, volts: 3.3}\n")
	for i := 1; i <= n; i++ {
		to := fmt.Sprintf("t%d", i)
		if i == n {
			to = "gnd"
		}
		fmt.Fprintf(&b, "  - {name: R%d, type: resistor, from: t%d, to: %s}\n", i, i-1, to)
	}
	fmt.Fprintf(&b, "targets:\n")
	taps := []float64{2.5, 1.7, 0.9, 0.6, 0.3}
	for i := 1; i < n; i++ {
		fmt.Fprintf(&b, "  - {voltage: t%d, equals: %g}\n", i, taps[i-1])
	}
	fmt.Fprintf(&b, "  - {current: VREF, max: 1m}\n")
	fmt.Fprintf(&b, "choose: {series: %s, min: 1k, max: 1M}\n", series)
	return b.String()
}
