package synth_test

import (
	"context"
	"errors"
	"fmt"
	"math"
	"math/rand/v2"
	"strings"
	"testing"
	"time"

	"github.com/ohmfit/ohmfit/constraints"
	"github.com/ohmfit/ohmfit/constraints/examples"
	"github.com/ohmfit/ohmfit/eseries"
	"github.com/ohmfit/ohmfit/eseries/units"
	"github.com/ohmfit/ohmfit/synth"
)

func problemFromYAML(t testing.TB, text, series string) *synth.Problem {
	t.Helper()
	tp, err := constraints.Parse("test.yaml", []byte(text))
	if err != nil {
		t.Fatal(err)
	}
	cp, err := constraints.Compile(tp)
	if errors.Is(err, constraints.ErrDegenerate) {
		// A random network whose goal no free part can move: refused up
		// front (constraints.TestDegenerate), so there is no search to check.
		t.Skip(err)
	}
	if err != nil {
		t.Fatal(err)
	}
	p, err := synth.NewProblem(cp, series)
	if err != nil {
		t.Fatal(err)
	}
	return p
}

// Every built-in example: the search's top list equals a plain enumeration
// with an independent gonum MNA solve. Examples whose space is too large for
// the enumeration to finish quickly are searched with E12 values instead.
func TestExamplesMatchBruteForce(t *testing.T) {
	for _, name := range examples.Names() {
		t.Run(name, func(t *testing.T) {
			text, _ := examples.Get(name)
			p := problemFromYAML(t, string(text), "")
			for _, coarser := range []string{"E12", "E6", "E3"} {
				if p.Space() <= 150_000 {
					break
				}
				p = problemFromYAML(t, string(text), coarser)
			}
			if p.Space() > 150_000 || (testing.Short() && p.Space() > 10_000) {
				t.Skipf("space %g too large for the plain enumeration here", p.Space())
			}
			compareWithBrute(t, p, 10, 2)
		})
	}
}

// Random small networks: a source, a few nodes, free and fixed resistors,
// goals taken from a random valued instance (so a near-exact answer exists)
// plus a random current or power limit.
func TestRandomNetworksMatchBruteForce(t *testing.T) {
	rng := rand.New(rand.NewPCG(7, 11))
	series := []string{"E6", "E12"}
	trials := 80
	if testing.Short() {
		trials = 16
	}
	for trial := range trials {
		text := randomTemplate(rng, series[trial%2])
		t.Run(fmt.Sprint(trial), func(t *testing.T) {
			p := problemFromYAML(t, text, "")
			if p.Space() > 60_000 || (testing.Short() && p.Space() > 10_000) {
				t.Skipf("space %g", p.Space())
			}
			compareWithBrute(t, p, 8, 1+trial%3)
			if t.Failed() {
				t.Log(text)
			}
		})
	}
}

// randomTemplate writes a connected ladder-like network with three or four
// nodes, two or three free resistors and goals on node voltages.
func randomTemplate(rng *rand.Rand, series string) string {
	nodes := []string{"gnd", "in", "n1", "n2", "n3"}[:3+rng.IntN(3)]
	var b strings.Builder
	fmt.Fprintf(&b, "ohmfit: 1\nname: random\nparts:\n")
	fmt.Fprintf(&b, "  - {name: V1, type: voltage-source, plus: in, minus: gnd, volts: %.3g}\n", 1+9*rng.Float64())
	// A chain in -> n1 -> n2 ... -> gnd guarantees a DC path from every node.
	free := 0
	res := 0
	addR := func(a, c string) {
		res++
		if free < 3 && rng.IntN(3) > 0 {
			free++
			fmt.Fprintf(&b, "  - {name: R%d, type: resistor, from: %s, to: %s}\n", res, a, c)
			return
		}
		fmt.Fprintf(&b, "  - {name: R%d, type: resistor, from: %s, to: %s, value: %s}\n", res, a, c, units.Format(1e3*(1+rng.Float64()*20)))
	}
	for i := 1; i < len(nodes)-1; i++ {
		addR(nodes[i], nodes[i+1])
	}
	addR(nodes[len(nodes)-1], "gnd")
	// A few cross links.
	for range rng.IntN(3) {
		a, c := nodes[1+rng.IntN(len(nodes)-1)], nodes[rng.IntN(len(nodes))]
		if a != c {
			addR(a, c)
		}
	}
	if free == 0 {
		addR("in", "gnd")
	}
	if rng.IntN(3) == 0 {
		fmt.Fprintf(&b, "  - {name: I1, type: current-source, from: %s, to: gnd, amps: %.3gu}\n", nodes[len(nodes)-1], 1+rng.Float64()*50)
	}
	fmt.Fprintf(&b, "targets:\n")
	goal := nodes[2+rng.IntN(len(nodes)-2)]
	fmt.Fprintf(&b, "  - {voltage: %s, equals: %.4g}\n", goal, 0.2+rng.Float64())
	// Limits of every kind the search reads from its rank-one update, so the
	// fast path is compared with the plain enumeration for each of them.
	switch rng.IntN(7) {
	case 0:
		fmt.Fprintf(&b, "  - {current: R1, max: %.3gm}\n", 0.1+rng.Float64())
	case 1:
		fmt.Fprintf(&b, "  - {power: R1, max: %.3gm}\n", 0.2+rng.Float64())
	case 2:
		fmt.Fprintf(&b, "  - {ratio: [%s, in], min: %.3g}\n", goal, 0.05+0.2*rng.Float64())
	case 3:
		fmt.Fprintf(&b, "  - {resistance: [%s, gnd], max: %.3gk}\n", goal, 1+5*rng.Float64())
	case 4:
		fmt.Fprintf(&b, "  - {current: V1, min: -%.3gm}\n", 0.5+2*rng.Float64())
	case 5:
		fmt.Fprintf(&b, "  - {voltage: [in, %s], equals: %.3g, tolerance: 20%%}\n", goal, 1+3*rng.Float64())
	}
	if rng.IntN(3) == 0 {
		fmt.Fprintf(&b, "limits:\n  supply_power_max: %.3gm\n", 1+rng.Float64()*5)
	}
	switch rng.IntN(4) {
	case 0:
		fmt.Fprintf(&b, "choose:\n  series: E3\n  min: 1k\n  max: 100k\n  combine: %s\n", []string{"series", "parallel", "any"}[rng.IntN(3)])
	case 1:
		fmt.Fprintf(&b, "choose:\n  series: [1k, 2.2k, 3.3k, 4k7, 6.8k, 10k, 15k, 22k, 47k]\n")
	default:
		fmt.Fprintf(&b, "choose:\n  series: %s\n  min: 1k\n  max: 100k\n", series)
	}
	if rng.IntN(2) == 0 {
		fmt.Fprintf(&b, "rank: [power, error]\n")
	}
	return b.String()
}

const dividerYAML = `ohmfit: 1
name: test divider
parts:
  - {name: V1, type: voltage-source, plus: in, minus: gnd, volts: 5}
  - {name: R1, type: resistor, from: in, to: out}
  - {name: R2, type: resistor, from: out, to: gnd}
targets:
  - {voltage: out, equals: 1.234}
choose: {series: E24, min: 100, max: 1M}
`

// The divider's best answer against the closed form Vout = Vin·R2/(R1+R2)
// (voltage divider formula) enumerated directly over the same values.
func TestDividerClosedForm(t *testing.T) {
	p := problemFromYAML(t, dividerYAML, "")
	res, err := synth.Search(context.Background(), p, nil, nil)
	if err != nil {
		t.Fatal(err)
	}
	s, _ := eseries.Lookup("E24")
	vals := s.Values(100, 1e6)
	best := 1.0
	for _, r1 := range vals {
		for _, r2 := range vals {
			e := abs(5*r2/(r1+r2)-1.234) / 1.234 // voltage divider formula
			if e < best {
				best = e
			}
		}
	}
	got := res.Solutions[0].Score.Error
	if !close(got, best, 1e-9, 1e-15) {
		t.Fatalf("best error %g, closed form %g", got, best)
	}
	if res.Status != synth.Proven {
		t.Errorf("status %v", res.Status)
	}
}

func abs(x float64) float64 {
	if x < 0 {
		return -x
	}
	return x
}

// The same input gives the same list for 1, 2 and 8 workers.
func TestWorkersDeterministic(t *testing.T) {
	sameForWorkers(t, problemFromYAML(t, loadedDividerYAML("E24"), ""), nil)
}

// sameForWorkers checks that a method gives the same top 20, to the last
// digit, for 1, 2 and 8 workers, and that the list is proven.
func sameForWorkers(t *testing.T, p *synth.Problem, m synth.Method) {
	t.Helper()
	var first string
	for _, w := range []int{1, 2, 8} {
		res, err := synth.Search(context.Background(), p, &synth.Settings{Top: 20, Workers: w}, m)
		if err != nil {
			t.Fatal(err)
		}
		if res.Status != synth.Proven {
			t.Fatalf("workers=%d: status %v", w, res.Status)
		}
		var b strings.Builder
		for _, s := range res.Solutions {
			fmt.Fprintf(&b, "%v %v %.17g %.17g\n", s.Values(), s.Options, s.Score.Error, s.Score.Power)
		}
		if first == "" {
			first = b.String()
		} else if b.String() != first {
			t.Fatalf("workers=%d gave a different list:\n%s\nvs\n%s", w, b.String(), first)
		}
	}
}

// A time limit stops the search with the best found so far, not proven.
func TestTimeLimit(t *testing.T) {
	p := problemFromYAML(t, loadedDividerYAML("E192"), "")
	res, err := synth.Search(context.Background(), p, &synth.Settings{TimeLimit: time.Millisecond, Workers: 1, MaxRows: 1e9}, nil)
	if err != nil {
		t.Fatal(err)
	}
	if res.Status != synth.TimeLimit {
		t.Skipf("search finished within 1 ms (status %v)", res.Status)
	}
	if res.Status.Exhaustive() {
		t.Error("a stopped search must not claim to be exhaustive")
	}
	// The rows method does not count what it left; it must not claim 0.
	if !math.IsNaN(res.Left) {
		t.Errorf("rows stopped early: Left %g, want NaN (not counted)", res.Left)
	}
}

// A cancelled context stops the search as Interrupted.
func TestInterrupted(t *testing.T) {
	p := problemFromYAML(t, loadedDividerYAML("E96"), "")
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	res, err := synth.Search(ctx, p, nil, nil)
	if err != nil {
		t.Fatal(err)
	}
	if res.Status != synth.Interrupted || res.Status.Exhaustive() {
		t.Fatalf("status %v", res.Status)
	}
}

// Nothing feasible: the status says so and the blocking limit is named,
// a target's or supply_power_max (a 5 V divider of at most 2 MΩ draws at
// least 25 V² / 2 MΩ = 12.5 µW, by Ohm's law, so a 1 nW limit is broken by
// every candidate).
func TestNoFeasible(t *testing.T) {
	for _, c := range []struct {
		name, extra string
		kind        constraints.LimitKind
		label       string
	}{
		{"target", "targets:\n  - {current: R1, max: 1n}\n", constraints.TargetLimit, "current R1"},
		{"supply", "limits: {supply_power_max: 1n}\ntargets:\n", constraints.SupplyPowerLimit, ""},
	} {
		t.Run(c.name, func(t *testing.T) {
			p := problemFromYAML(t, strings.Replace(dividerYAML, "targets:\n", c.extra, 1), "")
			res, err := synth.Search(context.Background(), p, nil, nil)
			if err != nil {
				t.Fatal(err)
			}
			if res.Status != synth.NoFeasible || len(res.Solutions) != 0 {
				t.Fatalf("status %v, %d solutions", res.Status, len(res.Solutions))
			}
			b := res.Blocking
			if b == nil || b.Kind != c.kind || b.Count <= 0 {
				t.Fatalf("blocking %+v", b)
			}
			if c.kind == constraints.TargetLimit && p.Spec.Template.Targets[b.Target].Label() != c.label {
				t.Fatalf("blocking %+v, want %s", b, c.label)
			}
			if c.kind == constraints.SupplyPowerLimit {
				if b.Target != -1 {
					t.Errorf("supply limit with target %d", b.Target)
				}
				reach := synth.ReachLimits(p)
				if len(reach) != 1 || reach[0].Kind != constraints.SupplyPowerLimit || !reach[0].Always {
					t.Errorf("reach %+v, want supply_power_max always broken", reach)
				}
			}
		})
	}
}

// loadedDividerYAML: R1 top, R2 bottom, R3 in series into a fixed 10k load;
// 2.5 V on the load from 5 V; the source must see at least 10k.
func loadedDividerYAML(series string) string {
	return `ohmfit: 1
name: loaded divider
parts:
  - {name: V1, type: voltage-source, plus: in, minus: gnd, volts: 5}
  - {name: R1, type: resistor, from: in, to: mid}
  - {name: R2, type: resistor, from: mid, to: gnd}
  - {name: R3, type: resistor, from: mid, to: load}
  - {name: RL, type: resistor, from: load, to: gnd, value: 10k}
targets:
  - {voltage: load, equals: 2.5}
limits:
  supply_power_max: 2.5m
choose: {series: ` + series + `, min: 100, max: 1M}
`
}

// The heuristic finds the proven best on a space the exhaustive method can
// check, and never claims to be exhaustive.
func TestRelaxFindsProvenBest(t *testing.T) {
	for _, text := range []string{dividerYAML, loadedDividerYAML("E24")} {
		p := problemFromYAML(t, text, "")
		exact, err := synth.Search(context.Background(), p, nil, nil)
		if err != nil {
			t.Fatal(err)
		}
		heur, err := synth.Search(context.Background(), p, nil, synth.Relax{})
		if err != nil {
			t.Fatal(err)
		}
		if heur.Status != synth.Heuristic || heur.Status.Exhaustive() {
			t.Errorf("status %v", heur.Status)
		}
		if len(heur.Solutions) == 0 {
			t.Fatal("heuristic found nothing")
		}
		// Same best error (the heuristic may find a different tie).
		if !close(heur.Solutions[0].Score.Error, exact.Solutions[0].Score.Error, 1e-9, 1e-12) {
			t.Errorf("heuristic best %g, proven best %g", heur.Solutions[0].Score.Error, exact.Solutions[0].Score.Error)
		}
	}
}

// The trade-off front equals the plain enumeration's, on the examples and on
// random networks, for caps from tight to loose.
func TestFrontMatchesBruteForce(t *testing.T) {
	for _, name := range []string{"divider", "feedback", "sensor-bias"} {
		text, _ := examples.Get(name)
		p := problemFromYAML(t, string(text), "E12")
		for _, cap := range []float64{0.005, 0.05, 0.5} {
			t.Run(fmt.Sprintf("%s/%g", name, cap), func(t *testing.T) { compareFrontWithBrute(t, p, cap, 2) })
		}
	}
	rng := rand.New(rand.NewPCG(3, 5))
	for trial := range 30 {
		text := randomTemplate(rng, "E6")
		p := problemFromYAML(t, text, "")
		if p.Space() > 30_000 || (testing.Short() && trial%3 != 0) {
			continue
		}
		t.Run(fmt.Sprint("random", trial), func(t *testing.T) {
			compareFrontWithBrute(t, p, 0.02+rng.Float64()*0.3, 1+trial%2)
			if t.Failed() {
				t.Log(text)
			}
		})
	}
}

// sensorSweep is a sensor network over a temperature sweep, shared by the
// comparisons of every method with the plain enumeration.
const sensorSweep = `ohmfit: 1
name: sweep
parts:
  - {name: V1, type: voltage-source, plus: vcc, minus: gnd, volts: 3.3}
  - {name: R1, type: resistor, from: vcc, to: s}
  - {name: RT1, type: ntc, from: s, to: gnd, r25: 10k, beta: 3950}
  - {name: R2, type: resistor, from: s, to: gnd}
  - {name: PT, type: rtd, from: vcc, to: x, r0: 1000}
  - {name: R3, type: resistor, from: x, to: gnd}
  - {name: ADC1, type: adc, in: s, ref: 3.3, bits: 10}
sweep: {temperature: [-10, 10, 25, 40, 60]}
targets:
  - {code: ADC1, curve: {-10: 800, 25: 512, 60: 200}, tolerance: 30%}
  - {linearity: s, max: 3.7}
  - {sensitivity: s, at: 40, min: 28m}
  - {resolution: ADC1, at: 60, max: 0.18}
  - {voltage: x, min: 0.2}
limits: {supply_power_max: 46u}
on_fraction: 5%
choose: {series: E6, min: 1k, max: 1M}
`

// A sensor network over a temperature sweep: goals in ADC codes at three
// temperatures, linearity, sensitivity and resolution limits, a duty-cycled
// supply, and both the error-first and the power-lean ranking — against the
// plain enumeration.
func TestSensorSweepMatchesBruteForce(t *testing.T) {
	if testing.Short() {
		t.Skip("enumerates a sensor sweep")
	}
	base := sensorSweep
	for _, rank := range []string{"", "rank: [power, error]\n"} {
		p := problemFromYAML(t, base+rank, "")
		compareWithBrute(t, p, 6, 2)
		if rank != "" {
			res, err := synth.Search(context.Background(), p, nil, nil)
			if err != nil {
				t.Fatal(err)
			}
			// Power-lean: no feasible candidate draws less than the first.
			all := bruteForce(t, p)
			for _, c := range all {
				if c.power < res.Solutions[0].Score.Power*(1-1e-12) {
					t.Fatalf("%v draws %g W, less than the first answer's %g W", c.vals, c.power, res.Solutions[0].Score.Power)
				}
			}
		}
	}
}

// Memory stays flat however large the space: a search keeps only its top
// list (and the front when asked for), so its allocations do not grow with
// the number of candidates. The E96 loaded divider has 62 times the
// candidates of the E24 one; the search's allocations must not follow.
func TestSearchMemoryFlat(t *testing.T) {
	allocs := func(series string) float64 {
		p := problemFromYAML(t, loadedDividerYAML(series), "")
		set := &synth.Settings{Workers: 1}
		return testing.AllocsPerRun(2, func() {
			if _, err := synth.Search(context.Background(), p, set, nil); err != nil {
				t.Fatal(err)
			}
		})
	}
	small, large := allocs("E24"), allocs("E96")
	if large > 2*small+50 {
		t.Errorf("search allocations grow with the space: %v for E24, %v for E96", small, large)
	}
}

// With an error cap and a list long enough, the search lists exactly the
// plain enumeration's designs within the cap, in rank order: the cap is a
// hard limit, so nothing within it may be cut and nothing above it kept.
func TestErrorMaxMatchesBruteForce(t *testing.T) {
	for _, name := range []string{"divider", "feedback", "sensor-bias", "gain-stage"} {
		text, _ := examples.Get(name)
		p := problemFromYAML(t, string(text), "E12")
		all := bruteForce(t, p)
		for _, cap := range []float64{0.002, 0.02, 0.2} {
			t.Run(fmt.Sprintf("%s/%g", name, cap), func(t *testing.T) {
				var want []bruteCand
				for _, c := range all {
					if c.err <= cap || constraints.Same(c.err, cap) {
						want = append(want, c)
					}
				}
				res, err := synth.Search(context.Background(), p, &synth.Settings{Top: len(all) + 1, Workers: 2, ErrorMax: cap}, nil)
				if err != nil {
					t.Fatal(err)
				}
				if len(res.Solutions) != len(want) {
					t.Fatalf("search kept %d designs within %g, enumeration %d", len(res.Solutions), cap, len(want))
				}
				for i, w := range want {
					if fmt.Sprint(res.Solutions[i].Values()) != fmt.Sprint(w.vals) {
						t.Errorf("%d: search %v, enumeration %v", i, res.Solutions[i].Values(), w.vals)
					}
				}
				if len(want) == 0 && res.Status != synth.NoFeasible {
					t.Errorf("status %v with nothing within the cap, want NoFeasible", res.Status)
				}
			})
		}
	}
}

// An error cap is a hard limit for branch and bound too: a box's corners
// over the cap must not enter the bar a box is ruled out by. On a
// two-goal divider ranked by power first (where the low-power corners are
// far from the goals), branch and bound lists what the rows method lists.
func TestErrorMaxBranchBoundMatchesRows(t *testing.T) {
	const text = `ohmfit: 1
name: two taps ranked by power
parts:
  - {name: V1, type: voltage-source, plus: in, minus: gnd, volts: 5}
  - {name: R1, type: resistor, from: in, to: a}
  - {name: R2, type: resistor, from: a, to: b}
  - {name: R3, type: resistor, from: b, to: gnd}
targets:
  - {voltage: a, equals: 2.2}
  - {voltage: b, equals: 1.1}
rank: [power, error]
choose: {series: E24, min: 1k, max: 100k}
`
	p := problemFromYAML(t, text, "")
	for _, cap := range []float64{0.01, 0.002} {
		t.Run(fmt.Sprint(cap), func(t *testing.T) {
			var lists [2]string
			for i, m := range []synth.Method{synth.Rows{}, synth.BranchBound{}} {
				res, err := synth.Search(context.Background(), p, &synth.Settings{Top: 5, Workers: 1, ErrorMax: cap}, m)
				if err != nil {
					t.Fatal(err)
				}
				for _, s := range res.Solutions {
					lists[i] += fmt.Sprint(s.Values())
				}
			}
			if lists[0] == "" || lists[0] != lists[1] {
				t.Errorf("within %g: rows %s, branch and bound %s", cap, lists[0], lists[1])
			}
		})
	}
}
