package board

import (
	"cmp"
	"context"
	"errors"
	"fmt"
	"math/bits"
	"math/rand/v2"
	"os"
	"path/filepath"
	"slices"
	"strconv"
	"strings"
	"testing"
	"time"

	"github.com/ohmfit/ohmfit/constraints"
	"github.com/ohmfit/ohmfit/solver"
	"github.com/ohmfit/ohmfit/synth"
)

// bruteObjective is a selection's score computed from scratch: the number
// of distinct values in the union of the chosen items, the largest
// relative error and the total power.
func bruteObjective(nets [][]item, choice []int) objective {
	seen := map[int32]bool{}
	o := objective{}
	for r, c := range choice {
		it := nets[r][c]
		for _, v := range it.vals {
			seen[v] = true
		}
		o.rel = max(o.rel, it.rel)
		o.pow += it.pow
	}
	o.distinct = len(seen)
	return o
}

// bruteBest enumerates every combination of one item per network (brute
// force) and returns the best objective by the board's order: fewest
// distinct values, then smallest largest relative error, then least power.
func bruteBest(nets [][]item) objective {
	choice := make([]int, len(nets))
	var best objective
	found := false
	var walk func(r int)
	walk = func(r int) {
		if r == len(nets) {
			if o := bruteObjective(nets, choice); !found || o.better(best) {
				best, found = o, true
			}
			return
		}
		for i := range nets[r] {
			choice[r] = i
			walk(r + 1)
		}
	}
	walk(0)
	return best
}

// randomNets makes a small random selection problem: a few networks, each
// with a few designs over a handful of values. Errors and powers take few
// levels, so that ties on every key are common.
func randomNets(rng *rand.Rand) ([][]item, int) {
	nvals := 3 + rng.IntN(7)
	nets := make([][]item, 2+rng.IntN(4))
	for r := range nets {
		for i := range 1 + rng.IntN(6) {
			var vals []int32
			for range 1 + rng.IntN(3) {
				vals = append(vals, int32(rng.IntN(nvals)))
			}
			slices.Sort(vals)
			nets[r] = append(nets[r], item{vals: slices.Compact(vals),
				rel: float64(rng.IntN(4)) / 4, pow: float64(1 + rng.IntN(3)), idx: i})
		}
	}
	return nets, nvals
}

// TestChooseMatchesBruteForce compares the exact selection with the
// enumeration of every combination of designs (brute force) on random
// small boards: the same fewest values, the same tie keys, a choice that
// scores what it says, and proven.
func TestChooseMatchesBruteForce(t *testing.T) {
	n := 3000
	if testing.Short() {
		n = 300
	}
	rng := rand.New(rand.NewPCG(14, 1))
	for k := range n {
		nets, nvals := randomNets(rng)
		want := bruteBest(nets)
		sel := choose(context.Background(), prune(nets), nvals, DefaultMaxNodes, nil)
		pr := prune(nets)
		got := bruteObjective(pr, sel.choice)
		if got.distinct != want.distinct || !constraints.Same(got.rel, want.rel) || !constraints.SamePower(got.pow, want.pow) {
			t.Fatalf("case %d %v: chosen %+v, enumeration %+v", k, nets, got, want)
		}
		if sel.obj != got {
			t.Fatalf("case %d: selection says %+v, its choice scores %+v", k, sel.obj, got)
		}
		if !sel.proven || !sel.tiesProven || sel.bound != want.distinct {
			t.Fatalf("case %d: proven %v, ties %v, bound %d (minimum %d)", k, sel.proven, sel.tiesProven, sel.bound, want.distinct)
		}
	}
}

// TestChooseNeverWorseThanKnown stops the search after one node with a
// known selection (one design per network, its values): what it shows never
// needs more values than that selection, so the board's "saving" against
// the networks alone is never negative, whatever stops the search.
func TestChooseNeverWorseThanKnown(t *testing.T) {
	rng := rand.New(rand.NewPCG(31, 5))
	for k := range 5000 {
		nets, nvals := randomNets(rng)
		var known []int32
		for r := range nets {
			known = append(known, nets[r][rng.IntN(len(nets[r]))].vals...)
		}
		slices.Sort(known)
		known = slices.Compact(known)
		sel := choose(context.Background(), prune(nets), nvals, 1, known)
		if sel.obj.distinct > len(known) {
			t.Fatalf("case %d %v: %d values shown, the known selection %v needs %d", k, nets, sel.obj.distinct, known, len(known))
		}
	}
}

// TestChooseCut stops the exact search after one node: the result is then
// marked not proven, its bound is at most the true minimum (enumeration)
// and its count at least that. When the greedy choice already meets the
// trivial bound nothing needs searching, and it is proven correctly.
func TestChooseCut(t *testing.T) {
	rng := rand.New(rand.NewPCG(14, 2))
	cut := 0
	for k := range 2000 {
		nets, nvals := randomNets(rng)
		want := bruteBest(nets)
		sel := choose(context.Background(), prune(nets), nvals, 1, nil)
		switch {
		case sel.proven && sel.obj.distinct != want.distinct:
			t.Fatalf("case %d: proven with %d values, enumeration finds %d", k, sel.obj.distinct, want.distinct)
		case !sel.proven:
			cut++
			if sel.bound > want.distinct || sel.obj.distinct < want.distinct || !sel.out {
				t.Fatalf("case %d: bound %d, count %d, out %v; enumeration minimum %d", k, sel.bound, sel.obj.distinct, sel.out, want.distinct)
			}
		}
	}
	if cut == 0 {
		t.Fatal("no case needed the search, so the cut was never tested")
	}
}

// TestChooseTies checks the tie keys on hand-made boards where two value
// sets of the same size serve every network.
func TestChooseTies(t *testing.T) {
	it := func(rel, pow float64, vals ...int32) item { return item{vals: vals, rel: rel, pow: pow} }
	tests := []struct {
		name string
		nets [][]item
		want objective
	}{
		{"smaller largest error wins", [][]item{
			{it(0.9, 1, 0, 1), it(0.2, 1, 2, 3)},
			{it(0.1, 1, 0, 1), it(0.3, 1, 2, 3)},
		}, objective{2, 0.3, 2}},
		{"then less power", [][]item{
			{it(0.5, 3, 0, 1), it(0.5, 1, 2, 3)},
			{it(0.1, 1, 0, 1), it(0.1, 2, 2, 3)},
		}, objective{2, 0.5, 3}},
		{"power of designs within the largest error", [][]item{
			{it(0.8, 1, 0), it(0.1, 5, 0)},
			{it(0.8, 1, 0)},
		}, objective{1, 0.8, 2}},
		{"fewer values beat a smaller error", [][]item{
			{it(0.9, 9, 0), it(0, 1, 1, 2)},
			{it(0.9, 9, 0), it(0, 1, 3)},
		}, objective{1, 0.9, 18}},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			for r := range tc.nets {
				for i := range tc.nets[r] {
					tc.nets[r][i].idx = i
				}
			}
			if b := bruteBest(tc.nets); b != tc.want {
				t.Fatalf("enumeration %+v, test expects %+v", b, tc.want)
			}
			sel := choose(context.Background(), prune(tc.nets), 4, DefaultMaxNodes, nil)
			if sel.obj != tc.want {
				t.Errorf("chosen %+v, want %+v", sel.obj, tc.want)
			}
		})
	}
}

// writeBoard writes templates and a board file naming them into a temporary
// directory and loads the board.
func writeBoard(t *testing.T, board string, templates map[string]string) *Board {
	t.Helper()
	dir := t.TempDir()
	for name, text := range templates {
		if err := os.WriteFile(filepath.Join(dir, name), []byte(text), 0o644); err != nil {
			t.Fatal(err)
		}
	}
	f := filepath.Join(dir, "board.yaml")
	if err := os.WriteFile(f, []byte(board), 0o644); err != nil {
		t.Fatal(err)
	}
	b, err := Load(f)
	if err != nil {
		t.Fatal(err)
	}
	return b
}

// dividerTemplate is a two-resistor divider from vin to a goal of vout,
// with values from a small stock list.
func dividerTemplate(vin, vout float64, stock string) string {
	return fmt.Sprintf(`ohmfit: 1
name: divider %g to %g
parts:
  - {name: V, type: voltage-source, plus: in, minus: gnd, volts: %g}
  - {name: R1, type: resistor, from: in, to: out}
  - {name: R2, type: resistor, from: out, to: gnd}
targets:
  - {voltage: out, equals: %g}
choose:
  series: [%s]
`, vin, vout, vin, vout, stock)
}

// loadedDividerTemplate is dividerTemplate with a fixed load resistor on
// its output: a value on the board whatever the divider takes.
func loadedDividerTemplate(vin, vout float64, load, stock string) string {
	rl := fmt.Sprintf("  - {name: RL, type: resistor, from: out, to: gnd, value: %s}\ntargets:", load)
	return strings.Replace(dividerTemplate(vin, vout, stock), "targets:", rl, 1)
}

// smallBoards are real boards small enough to enumerate every combination
// of their networks' designs.
func smallBoards(t *testing.T) map[string]*Board {
	stockA := "1k, 1.5k, 2.2k, 3.3k, 4.7k, 6.8k, 10k"
	stockB := "1k, 1.2k, 2k, 2.7k, 3.9k, 5.6k, 8.2k, 10k, 15k"
	return map[string]*Board{
		"three dividers": writeBoard(t, `ohmfit: 1
board: three
networks:
  - {template: a.yaml, prefix: U1, error_max: 10%}
  - {template: b.yaml, prefix: U2, error_max: 8%}
  - {template: c.yaml, prefix: U3, error_max: 12%}
`, map[string]string{"a.yaml": dividerTemplate(5, 3.3, stockA), "b.yaml": dividerTemplate(12, 5, stockA), "c.yaml": dividerTemplate(3.3, 1.2, stockA)}),
		"four dividers, two stocks": writeBoard(t, `ohmfit: 1
board: four
networks:
  - {template: a.yaml, prefix: A, error_max: 6%}
  - {template: b.yaml, prefix: B, error_max: 12%}
  - {template: c.yaml, prefix: C, error_max: 10%}
  - {template: d.yaml, prefix: D, error_max: 10%}
`, map[string]string{"a.yaml": dividerTemplate(5, 2.5, stockB), "b.yaml": dividerTemplate(24, 3.3, stockB),
			"c.yaml": dividerTemplate(9, 4, stockA), "d.yaml": dividerTemplate(3.3, 0.8, stockB)}),
		// Fixed loads whose values are in the stock: a design that reuses
		// one adds no value to the board.
		"three loaded dividers": writeBoard(t, `ohmfit: 1
board: loaded
networks:
  - {template: a.yaml, prefix: A, error_max: 10%}
  - {template: b.yaml, prefix: B, error_max: 10%}
  - {template: c.yaml, prefix: C, error_max: 12%}
`, map[string]string{"a.yaml": loadedDividerTemplate(5, 2.5, "10k", stockB), "b.yaml": loadedDividerTemplate(12, 3.3, "2.7k", stockB),
			"c.yaml": dividerTemplate(3.3, 1.8, stockB)}),
	}
}

// formatAll writes values as the tests key them.
func formatAll(vs []float64) []string {
	out := make([]string, len(vs))
	for i, v := range vs {
		out[i] = strconv.FormatFloat(v, 'g', 9, 64)
	}
	return out
}

// TestSolveMatchesBruteForce solves small real boards and compares with
// every combination of the networks' designs (brute force): the same
// fewest distinct values, then the same largest relative error and total
// power; the result is proven, and its count and values are those of the
// chosen designs.
func TestSolveMatchesBruteForce(t *testing.T) {
	for name, b := range smallBoards(t) {
		t.Run(name, func(t *testing.T) {
			res, err := Solve(context.Background(), b, &Settings{Workers: 1})
			if err != nil {
				t.Fatal(err)
			}
			ids := map[string]int32{}
			nets := make([][]item, len(res.Networks))
			combos := 1
			for r, nr := range res.Networks {
				if nr.Cut {
					t.Fatalf("%s: list cut", nr.Network.Name())
				}
				combos *= len(nr.Designs)
				for i, d := range nr.Designs {
					it := item{rel: d.Rel, pow: d.Score.Power, idx: i}
					// Every design of the network carries its fixed resistors.
					for _, k := range append(templateFixed(nr.Network), formatAll(d.PartValues())...) {
						if _, ok := ids[k]; !ok {
							ids[k] = int32(len(ids))
						}
						it.vals = append(it.vals, ids[k])
					}
					slices.Sort(it.vals)
					it.vals = slices.Compact(it.vals)
					nets[r] = append(nets[r], it)
				}
			}
			if combos < 50 {
				t.Fatalf("only %d combinations: the board is too small to test anything", combos)
			}
			want := bruteBest(nets)
			if res.Distinct != want.distinct || !constraints.Same(res.RelMax, want.rel) || !constraints.SamePower(res.Power, want.pow) {
				t.Fatalf("solve: %d values, largest relative error %g, power %g; enumeration of %d combinations: %+v",
					res.Distinct, res.RelMax, res.Power, combos, want)
			}
			if !res.Proven || res.Bound != res.Distinct {
				t.Errorf("proven %v, bound %d", res.Proven, res.Bound)
			}
			var chosen []int
			used := map[string]bool{}
			for _, nr := range res.Networks {
				chosen = append(chosen, nr.Chosen)
				c := nr.Choice()
				if c.Score.Error > nr.Network.Cap && !constraints.Same(c.Score.Error, nr.Network.Cap) {
					t.Errorf("%s: error %g above its cap %g", nr.Network.Name(), c.Score.Error, nr.Network.Cap)
				}
				for _, k := range append(templateFixed(nr.Network), formatAll(c.PartValues())...) {
					used[k] = true
				}
			}
			if got := bruteObjective(nets, chosen); got.distinct != res.Distinct || len(used) != len(res.Values) {
				t.Errorf("the chosen designs use %d values (%d), the result says %d (%v)", got.distinct, len(used), res.Distinct, res.Values)
			}
		})
	}
}

// TestConsolidationSaves runs the built-in controller board: taken alone,
// its networks' own best answers (rank 1 of each network's search within
// its cap, looked up again here) need more values than the board's choice.
// templateFixed lists, from a network's template itself, the values of its
// fixed resistors: resistor parts with a value, neither a sensor, an ADC's
// modelled input nor a part the conditions set (a stand-in). They are
// resistor values on the board whatever the free positions take.
func templateFixed(n *Network) []string {
	setByCondition := map[string]bool{}
	for _, c := range n.Template.Conditions {
		for _, st := range c.Set {
			setByCondition[st.Part] = true
		}
	}
	var out []string
	for _, ps := range n.Template.Parts {
		if ps.Kind == solver.Resistor && !ps.Free && ps.Sensor == nil && ps.ADC == "" && !setByCondition[ps.Name] {
			out = append(out, strconv.FormatFloat(ps.Value, 'g', 9, 64))
		}
	}
	return out
}

func TestConsolidationSaves(t *testing.T) {
	b, err := Load(ExamplePrefix + "controller")
	if err != nil {
		t.Fatal(err)
	}
	res, err := Solve(context.Background(), b, nil)
	if err != nil {
		t.Fatal(err)
	}
	alone := map[string]bool{}
	for _, nr := range res.Networks {
		n := nr.Network
		own, err := synth.Search(context.Background(), n.Problem, &synth.Settings{Top: 1, ErrorMax: n.Cap}, nil)
		if err != nil || len(own.Solutions) == 0 {
			t.Fatalf("%s: %v", n.Name(), err)
		}
		if !sameDesign(own.Solutions[0], nr.Alone) {
			t.Errorf("%s: alone %v, its own search ranks %v first", n.Name(), nr.Alone.Values(), own.Solutions[0].Values())
		}
		for _, o := range own.Solutions[0].Options {
			for _, v := range o.PartValues() {
				alone[strconv.FormatFloat(v, 'g', 9, 64)] = true
			}
		}
		for _, v := range templateFixed(n) {
			alone[v] = true
		}
	}
	if res.Alone != len(alone) {
		t.Errorf("alone %d, the own answers and the fixed resistors use %d values", res.Alone, len(alone))
	}
	if !(res.Distinct < res.Alone) || !res.Proven {
		t.Errorf("distinct %d, alone %d, proven %v: consolidation should save values", res.Distinct, res.Alone, res.Proven)
	}
}

// TestCutListNotProven lists at most a few designs per network: the lists
// are cut, so the result is not proven, whatever the selection found.
func TestCutListNotProven(t *testing.T) {
	b := smallBoards(t)["three dividers"]
	res, err := Solve(context.Background(), b, &Settings{MaxDesigns: 2})
	if err != nil {
		t.Fatal(err)
	}
	cut := false
	for _, nr := range res.Networks {
		cut = cut || nr.Cut
	}
	if !cut || res.Proven || res.TiesProven || res.Bound > res.Distinct {
		t.Errorf("cut %v, proven %v, ties proven %v, bound %d of %d", cut, res.Proven, res.TiesProven, res.Bound, res.Distinct)
	}
	if res.Distinct > res.Alone {
		t.Errorf("distinct %d above alone %d: the own answers are always among the designs", res.Distinct, res.Alone)
	}
}

// TestBOMTotals checks the board's bill of materials: every resistor of
// every network appears under exactly one line, prefixed; the quantities
// add up to the parts; each chosen part's line carries its value, and the
// chosen values are exactly the result's distinct values.
func TestBOMTotals(t *testing.T) {
	b, err := Load(ExamplePrefix + "controller")
	if err != nil {
		t.Fatal(err)
	}
	res, err := Solve(context.Background(), b, nil)
	if err != nil {
		t.Fatal(err)
	}
	c, err := res.Check()
	if err != nil {
		t.Fatal(err)
	}
	// Expected designators: each template's resistors, a position of two
	// parts as its two parts (suffix a, b), as check names them.
	want := map[string]float64{}
	for _, nr := range res.Networks {
		n := nr.Network
		free := map[int]synth.Option{}
		for k, i := range n.Problem.Spec.Free {
			free[i] = nr.Choice().Options[k]
		}
		for i, ps := range n.Template.Parts {
			if ps.Kind != solver.Resistor || ps.Sensor != nil || ps.ADC != "" {
				continue
			}
			o, ok := free[i]
			switch {
			case !ok:
				want[Designator(n.Spec.Prefix, ps.Name)] = ps.Value
			case o.Count == 1:
				want[Designator(n.Spec.Prefix, ps.Name)] = o.Parts[0]
			default:
				want[Designator(n.Spec.Prefix, ps.Name+"a")] = o.Parts[0]
				want[Designator(n.Spec.Prefix, ps.Name+"b")] = o.Parts[1]
			}
		}
	}
	seen := map[string]int{}
	total := 0
	for _, l := range c.BOM {
		total += l.Quantity()
		for _, d := range l.Designators {
			seen[d]++
			if v, ok := want[d]; ok && strconv.FormatFloat(v, 'g', 9, 64) != strconv.FormatFloat(l.Value, 'g', 9, 64) {
				t.Errorf("%s on the line of %g, its value is %g", d, l.Value, v)
			}
		}
	}
	for d := range want {
		if seen[d] != 1 {
			t.Errorf("%s appears %d times", d, seen[d])
		}
	}
	for d := range seen {
		if _, ok := want[d]; !ok {
			t.Errorf("%s is on the BOM but not a resistor of the board", d)
		}
	}
	if total != len(want) {
		t.Errorf("quantities add up to %d, the board has %d resistors", total, len(want))
	}
	var all []float64
	for _, nr := range res.Networks {
		all = append(all, nr.Choice().PartValues()...)
	}
	slices.Sort(all)
	var chosen, vals []string
	for _, v := range all {
		chosen = append(chosen, strconv.FormatFloat(v, 'g', 9, 64))
	}
	// The fixed resistors' values are on the board too, and counted.
	fixed := 0
	for _, nr := range res.Networks {
		f := templateFixed(nr.Network)
		fixed += len(f)
		chosen = append(chosen, f...)
	}
	if fixed == 0 {
		t.Fatal("the controller board has no fixed resistor: the count of fixed values goes untested")
	}
	slices.SortFunc(chosen, func(a, b string) int {
		x, _ := strconv.ParseFloat(a, 64)
		y, _ := strconv.ParseFloat(b, 64)
		return cmp.Compare(x, y)
	})
	chosen = slices.Compact(chosen)
	for _, v := range res.Values {
		vals = append(vals, strconv.FormatFloat(v, 'g', 9, 64))
	}
	if strings.Join(chosen, " ") != strings.Join(vals, " ") || res.Distinct != len(vals) {
		t.Errorf("chosen values %v, result %v (%d)", chosen, vals, res.Distinct)
	}
}

// fewestBySubsets is the fewest distinct values of any selection, by brute
// force over value sets: every subset of the values, smallest first, until
// one contains a design of every network. It shares no code with the
// search, so it checks the search's bounds and memo on boards deeper than
// the enumeration of combinations can reach.
func fewestBySubsets(nets [][]item, nvals int) int {
	for size := 0; size <= nvals; size++ {
		for mask := 0; mask < 1<<nvals; mask++ {
			if bits.OnesCount(uint(mask)) != size {
				continue
			}
			all := true
			for _, its := range nets {
				ok := false
				for _, it := range its {
					inside := true
					for _, v := range it.vals {
						inside = inside && mask&(1<<v) != 0
					}
					ok = ok || inside
				}
				all = all && ok
			}
			if all {
				return size
			}
		}
	}
	return -1
}

// randomDeep makes a random selection problem of up to sixteen networks
// over up to thirteen values. Half of them are two groups of networks (like
// E96 dividers beside E24 ladders) whose values overlap in a few only, the
// case groupBound is for.
func randomDeep(rng *rand.Rand) ([][]item, int) {
	nvals := 6 + rng.IntN(8)
	nets := make([][]item, 4+rng.IntN(13))
	split := rng.IntN(2) == 0
	for r := range nets {
		lo, n := 0, nvals
		if split {
			// The first group takes the lower 60 % of the values, the
			// second the upper 60 %.
			n = (nvals*3 + 4) / 5
			if r%2 == 1 {
				lo = nvals - n
			}
		}
		for i := range 2 + rng.IntN(10) {
			var vals []int32
			for range 1 + rng.IntN(3) {
				vals = append(vals, int32(lo+rng.IntN(n)))
			}
			slices.Sort(vals)
			nets[r] = append(nets[r], item{vals: slices.Compact(vals), rel: float64(rng.IntN(4)) / 4, pow: 1, idx: i})
		}
	}
	return nets, nvals
}

// TestChooseDeepBoards compares the exact selection's count and its proof
// with the brute force over value sets, on random boards of up to sixteen
// networks over up to thirteen values (randomDeep): deep enough that the search stacks
// several levels of lists, bounds and remembered subproblems.
func TestChooseDeepBoards(t *testing.T) {
	n := 1500
	if testing.Short() {
		n = 200
	}
	rng := rand.New(rand.NewPCG(14, 3))
	for k := range n {
		nets, nvals := randomDeep(rng)
		want := fewestBySubsets(nets, nvals)
		sel := choose(context.Background(), prune(nets), nvals, DefaultMaxNodes, nil)
		if got := bruteObjective(prune(nets), sel.choice).distinct; got != want || sel.obj.distinct != want {
			t.Fatalf("case %d %v: chosen %d (says %d), brute force over value sets %d", k, nets, got, sel.obj.distinct, want)
		}
		if !sel.proven || sel.bound != want {
			t.Fatalf("case %d: proven %v, bound %d (minimum %d)", k, sel.proven, sel.bound, want)
		}
	}
}

// TestStagesMatchSubsets runs the search's stages one by one on random
// boards, k rising from the trivial bound and, on a second selector,
// falling from every value, and rising on a third with the profile bound
// (profiles): each stage must find a set exactly when the brute force over
// value sets says one of k values exists. The subproblems
// the stages prove are kept from one stage to the next, so a fact recorded
// under the wrong key shows here as a set missed.
func TestStagesMatchSubsets(t *testing.T) {
	n := 1500
	if testing.Short() {
		n = 200
	}
	rng := rand.New(rand.NewPCG(14, 4))
	for c := range n {
		nets, nvals := randomDeep(rng)
		nets = prune(nets)
		want := fewestBySubsets(nets, nvals)
		up, down := newSelector(context.Background(), nets, nvals), newSelector(context.Background(), nets, nvals)
		// A third with the profile bound (boards of two groups).
		prof := newSelector(context.Background(), nets, nvals)
		prof.profiles(nvals, DefaultMaxNodes, DefaultMaxNodes)
		check := func(s *selector, k int) {
			found, finished := s.exists(k, DefaultMaxNodes)
			if !finished || found != (k >= want) {
				t.Fatalf("case %d %v: k %d: found %v, finished %v; brute force over value sets: fewest %d", c, nets, k, found, finished, want)
			}
			if found && (len(s.bestSet) > k || !feasible(nets, nvals, s.bestSet)) {
				t.Fatalf("case %d: k %d: the set found %v does not serve every network", c, k, s.bestSet)
			}
		}
		for k := up.lb; k <= want; k++ {
			check(up, k)
			check(prof, k)
		}
		for k := nvals; k >= max(want-1, 0); k-- {
			check(down, k)
		}
	}
}

// TestBrokenBoundIsCaught lifts the packing bound by one value, a bound
// that claims more than is proven, and checks that the comparison with the
// brute force over value sets then fails on some board: the tests above
// can catch a wrong bound.
func TestBrokenBoundIsCaught(t *testing.T) {
	rng := rand.New(rand.NewPCG(14, 5))
	for range 200 {
		nets, nvals := randomDeep(rng)
		nets = prune(nets)
		want := fewestBySubsets(nets, nvals)
		s := newSelector(context.Background(), nets, nvals)
		s.lift = 1
		if found, _ := s.exists(want, DefaultMaxNodes); !found {
			return // caught: a set of the fewest values was missed
		}
	}
	t.Fatal("a packing bound lifted by one never missed a set: the comparisons could not catch a wrong bound")
}

// TestChooseExpiredContext runs the selection with a context whose time
// has run out: every stage stops at once, so the greedy choice is kept;
// it is proven only when it meets the trivial bound, and the bound stated
// is never above the minimum (brute force over value sets) nor the count
// below it.
func TestChooseExpiredContext(t *testing.T) {
	ctx, cancel := context.WithTimeout(context.Background(), -time.Second)
	defer cancel()
	rng := rand.New(rand.NewPCG(14, 6))
	stopped := 0
	for c := range 300 {
		nets, nvals := randomDeep(rng)
		nets = prune(nets)
		want := fewestBySubsets(nets, nvals)
		sel := choose(ctx, nets, nvals, DefaultMaxNodes, nil)
		if sel.proven && sel.obj.distinct != want {
			t.Fatalf("case %d: proven with %d values, brute force %d", c, sel.obj.distinct, want)
		}
		if sel.tiesProven || !sel.out || sel.bound > want || sel.obj.distinct < want {
			t.Fatalf("case %d: ties proven %v, out %v, bound %d, count %d; minimum %d", c, sel.tiesProven, sel.out, sel.bound, sel.obj.distinct, want)
		}
		if !sel.proven {
			stopped++
		}
	}
	if stopped == 0 {
		t.Fatal("the greedy choice met the trivial bound on every board: the stop was never tested")
	}
}

// TestResultStatus maps the board's proof and stop reason to the statuses
// every search uses (constraints/README.md, Statuses).
func TestResultStatus(t *testing.T) {
	tests := []struct {
		res  Result
		want synth.Status
	}{
		{Result{Proven: true}, synth.Proven},
		{Result{Proven: true, Stop: StopTime}, synth.Proven}, // only the tie-break was cut short
		{Result{Stop: StopTime}, synth.TimeLimit},
		{Result{Stop: StopInterrupted}, synth.Interrupted},
		{Result{Stop: StopNodes}, synth.Heuristic},
		{Result{}, synth.Heuristic}, // finished, but a network's list was cut
	}
	for _, tc := range tests {
		t.Run(tc.want.String(), func(t *testing.T) {
			if got := tc.res.Status(); got != tc.want {
				t.Errorf("%+v: %v, want %v", tc.res, got, tc.want)
			}
		})
	}
}

// TestSolveTimeLimitWhileListing: a time limit that ends before the first
// network is listed leaves nothing to choose from: ErrTimeLimit, not an
// interruption and not a selection.
func TestSolveTimeLimitWhileListing(t *testing.T) {
	b := smallBoards(t)["three dividers"]
	res, err := Solve(context.Background(), b, &Settings{TimeLimit: time.Nanosecond})
	if !errors.Is(err, ErrTimeLimit) || errors.Is(err, ErrInterrupted) || res != nil {
		t.Fatalf("result %v, error %v; want ErrTimeLimit", res, err)
	}
}

// needBySubsets is the fewest values, outside the set given, that serve
// the networks listed, by brute force over value sets (-1 when none do).
func needBySubsets(nets [][]item, nvals int, given []bool, which []int) int {
	best := -1
	for mask := 0; mask < 1<<nvals; mask++ {
		n := bits.OnesCount(uint(mask))
		if best >= 0 && n >= best {
			continue
		}
		all := true
		for _, r := range which {
			ok := false
			for _, it := range nets[r] {
				inside := true
				for _, v := range it.vals {
					inside = inside && (given[v] || mask&(1<<v) != 0)
				}
				ok = ok || inside
			}
			all = all && ok
		}
		if all {
			best = n
		}
	}
	return best
}

// TestGroupBoundHolds checks groupBound against brute force: on random
// boards of two groups with a random set already chosen, each group's
// waiting networks are given their true need (brute force over value
// sets) as the remembered fact, the strongest there can be; the bound must
// still be no more than the true need of all waiting networks together.
func TestGroupBoundHolds(t *testing.T) {
	rng := rand.New(rand.NewPCG(14, 8))
	tight := 0
	for c := 0; c < 400; {
		nets, nvals := randomDeep(rng)
		nets = prune(nets)
		s := newSelector(context.Background(), nets, nvals)
		if len(s.groups) < 2 {
			continue
		}
		c++
		s.k = nvals
		for range rng.IntN(3) {
			if v := int32(rng.IntN(nvals)); !s.in[v] {
				s.in[v] = true
				s.used = append(s.used, v)
			}
		}
		nd, ok := s.narrow(s.all, 0, s.k-len(s.used))
		if !ok || len(nd.needs) < 2 {
			continue
		}
		var waiting []int
		for _, n := range nd.needs {
			waiting = append(waiting, n.r)
		}
		for g := range s.groups {
			var part []need
			var which []int
			for _, n := range nd.needs {
				if s.group[n.r] == g {
					part, which = append(part, n), append(which, n.r)
				}
			}
			if len(part) > 0 {
				s.needs[s.subproblem(part)] = needBySubsets(nets, nvals, s.in, which)
			}
		}
		want := needBySubsets(nets, nvals, s.in, waiting)
		got := s.groupBound(nd)
		if got > want {
			t.Fatalf("case %d %v, set %v: group bound %d, the waiting networks need %d (brute force)", c, nets, s.used, got, want)
		}
		if got == want && got > s.packing(nd) {
			tight++
		}
	}
	if tight == 0 {
		t.Fatal("the group bound never beat the packing bound: the test did not exercise it")
	}
}

// TestLastTwoMatchesSubsets checks the exact decision of nodes with one or
// two values to spare (lastTwo) against the brute force over value sets:
// on random boards with a random set already chosen, it must find new
// values exactly when the waiting networks need no more than the spare
// ones, and the values it returns, added to the set, must serve every
// network.
func TestLastTwoMatchesSubsets(t *testing.T) {
	rng := rand.New(rand.NewPCG(14, 9))
	decided := [3]int{}
	for c := 0; c < 3000; c++ {
		nets, nvals := randomDeep(rng)
		nets = prune(nets)
		s := newSelector(context.Background(), nets, nvals)
		for range rng.IntN(5) {
			if v := int32(rng.IntN(nvals)); !s.in[v] {
				s.in[v] = true
				s.used = append(s.used, v)
			}
		}
		slack := 1 + rng.IntN(2)
		s.k = len(s.used) + slack
		nd, ok := s.narrow(s.all, 0, slack)
		if !ok || nd.branch < 0 {
			continue
		}
		var waiting []int
		for _, n := range nd.needs {
			waiting = append(waiting, n.r)
		}
		want := needBySubsets(nets, nvals, s.in, waiting)
		add, found := s.lastTwo(nd, slack)
		if found != (want >= 0 && want <= slack) {
			t.Fatalf("case %d %v, set %v, spare %d: found %v (%v); the waiting networks need %d (brute force)", c, nets, s.used, slack, found, add, want)
		}
		if found {
			set := append(slices.Clone(s.used), add...)
			if len(add) > slack || !feasible(nets, nvals, set) {
				t.Fatalf("case %d %v, set %v, spare %d: the values %v do not serve every network", c, nets, s.used, slack, add)
			}
			decided[slack]++
		} else {
			decided[0]++
		}
	}
	if decided[0] == 0 || decided[1] == 0 || decided[2] == 0 {
		t.Fatalf("decided %v (none, one, two values): the test did not exercise every case", decided)
	}
}

// profileBySubsets is a group's profile entry by brute force over value
// sets: the fewest values not marked shared of any set with at most t
// shared values that serves the networks listed (-1 when none does).
func profileBySubsets(nets [][]item, nvals int, shared []bool, which []int, t int) int {
	sharedMask := 0
	for v, sh := range shared {
		if sh {
			sharedMask |= 1 << v
		}
	}
	best := -1
	for mask := 0; mask < 1<<nvals; mask++ {
		if bits.OnesCount(uint(mask&sharedMask)) > t {
			continue
		}
		own := bits.OnesCount(uint(mask &^ sharedMask))
		if best >= 0 && own >= best {
			continue
		}
		all := true
		for _, r := range which {
			ok := false
			for _, it := range nets[r] {
				inside := true
				for _, v := range it.vals {
					inside = inside && mask&(1<<v) != 0
				}
				ok = ok || inside
			}
			all = all && ok
		}
		if all {
			best = own
		}
	}
	return best
}

// TestProfilesMatchSubsets checks every group's profile (profiles) against
// the brute force over value sets on random boards of two groups that
// share a few values (randomDeep): with a budget large enough, each entry
// is the fewest own values for that many shared ones; with a small one, or
// computed only up to fewer shared values, each entry is still no more
// than that (a lower bound).
func TestProfilesMatchSubsets(t *testing.T) {
	rng := rand.New(rand.NewPCG(14, 10))
	exact, cut := 0, 0
	for c := 0; c < 300; {
		nets, nvals := randomDeep(rng)
		nets = prune(nets)
		s := newSelector(context.Background(), nets, nvals)
		allowance, kmax := int64(DefaultMaxNodes), nvals
		if c%2 == 1 {
			allowance, kmax = int64(1+rng.IntN(20)), rng.IntN(nvals)
		}
		s.profiles(kmax, allowance, DefaultMaxNodes)
		if s.profile == nil {
			continue
		}
		c++
		for g, rs := range s.groups {
			p := s.profile[g]
			for tt := range nvals + 1 {
				want := profileBySubsets(nets, nvals, s.shared, rs, tt)
				if want < 0 {
					// None serves the group: any bound holds, and the
					// search stops past the most values it asks about.
					want = nvals + 1
				}
				got := profileAt(p, tt)
				if got > want || (allowance == DefaultMaxNodes && got != want) {
					t.Fatalf("case %d %v, shared %v: group %v, %d shared values: profile %d (%v), brute force %d",
						c, nets, s.shared, rs, tt, got, p, want)
				}
				if got == want {
					exact++
				} else {
					cut++
				}
			}
		}
	}
	if cut == 0 || exact == 0 {
		t.Fatalf("entries exact %d, below the brute force %d: the small budget was not exercised", exact, cut)
	}
}

// TestProfileBoundHolds checks the profile bound against the brute force:
// on random boards of two groups with a random set already chosen, the
// bound must be no more than the size of the smallest set that contains
// the one chosen and serves every network, and it must sometimes exceed
// the packing bound (the test exercises it).
func TestProfileBoundHolds(t *testing.T) {
	rng := rand.New(rand.NewPCG(14, 11))
	tight := 0
	for c := 0; c < 400; {
		nets, nvals := randomDeep(rng)
		nets = prune(nets)
		s := newSelector(context.Background(), nets, nvals)
		s.profiles(nvals, DefaultMaxNodes, DefaultMaxNodes)
		if s.profile == nil {
			continue
		}
		c++
		s.k = nvals
		for range rng.IntN(4) {
			if v := int32(rng.IntN(nvals)); !s.in[v] {
				s.in[v] = true
				s.used = append(s.used, v)
			}
		}
		all := make([]int, len(nets))
		for r := range all {
			all[r] = r
		}
		nd, ok := s.narrow(s.all, 0, s.k-len(s.used))
		if !ok {
			continue
		}
		want := len(s.used) + needBySubsets(nets, nvals, s.in, all)
		got := s.profileBound(nd)
		if got > want {
			t.Fatalf("case %d %v, set %v, profiles %v: bound %d, the smallest set has %d (brute force)", c, nets, s.used, s.profile, got, want)
		}
		if got == want && got > len(s.used)+s.packing(nd) {
			tight++
		}
	}
	if tight == 0 {
		t.Fatal("the profile bound never beat the packing bound: the test did not exercise it")
	}
}
