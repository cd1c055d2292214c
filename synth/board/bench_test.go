package board

import (
	"context"
	"fmt"
	"math/rand/v2"
	"os"
	"path/filepath"
	"slices"
	"strings"
	"testing"
)

// twentyBoard writes a board of 20 invented networks into dir: ten
// two-resistor dividers in E96 (caps 0.5 … 1 %) and ten three-resistor
// ladders with two taps in E24 (caps 2 … 3 %), with seeded goals.
func twentyBoard(tb testing.TB, dir string) *Board {
	tb.Helper()
	rng := rand.New(rand.NewPCG(20, 14))
	var board strings.Builder
	board.WriteString("ohmfit: 1\nboard: Twenty networks\nnetworks:\n")
	for i := range 20 {
		var text string
		cap := 0.005 + 0.005*float64(rng.IntN(3))/2
		if i < 10 {
			vin := []float64{3.3, 5, 12, 24}[rng.IntN(4)]
			vout := vin * (0.1 + 0.8*rng.Float64())
			text = fmt.Sprintf(`ohmfit: 1
name: divider %d
parts:
  - {name: V, type: voltage-source, plus: in, minus: gnd, volts: %g}
  - {name: R1, type: resistor, from: in, to: out}
  - {name: R2, type: resistor, from: out, to: gnd}
targets:
  - {voltage: out, equals: %.4g}
  - {current: R1, max: 1m}
choose: {series: E96, min: 1k, max: 1M}
`, i, vin, vout)
		} else {
			cap = 0.02 + 0.01*float64(rng.IntN(2))
			a := 0.3 + 0.6*rng.Float64()
			b := a * (0.2 + 0.6*rng.Float64())
			text = fmt.Sprintf(`ohmfit: 1
name: ladder %d
parts:
  - {name: V, type: voltage-source, plus: in, minus: gnd, volts: 5}
  - {name: R1, type: resistor, from: in, to: t1}
  - {name: R2, type: resistor, from: t1, to: t2}
  - {name: R3, type: resistor, from: t2, to: gnd}
targets:
  - {voltage: t1, equals: %.4g}
  - {voltage: t2, equals: %.4g}
  - {current: R1, max: 500u}
choose: {series: E24, min: 1k, max: 1M}
`, i, 5*a, 5*b)
		}
		name := fmt.Sprintf("n%02d.yaml", i)
		if err := os.WriteFile(filepath.Join(dir, name), []byte(text), 0o644); err != nil {
			tb.Fatal(err)
		}
		fmt.Fprintf(&board, "  - {template: %s, prefix: N%d, error_max: %g}\n", name, i+1, cap)
	}
	f := filepath.Join(dir, "board.yaml")
	if err := os.WriteFile(f, []byte(board.String()), 0o644); err != nil {
		tb.Fatal(err)
	}
	b, err := Load(f)
	if err != nil {
		tb.Fatal(err)
	}
	return b
}

// BenchmarkBoard solves the twenty-network board: the whole run (listing
// every network's designs and the exact selection), and the selection over
// the same lists three ways: exact, the greedy choice with local
// improvement alone (the baseline; it proves nothing), and, on the first
// three networks only, the plain enumeration of every combination of
// designs. Run: go test ./synth/board -run '^$' -bench Board -benchtime 1x
func BenchmarkBoard(b *testing.B) {
	bd := twentyBoard(b, b.TempDir())
	var res *Result
	b.Run("whole", func(b *testing.B) {
		for b.Loop() {
			var err error
			if res, err = Solve(context.Background(), bd, &Settings{Workers: 1}); err != nil {
				b.Fatal(err)
			}
		}
		designs := 0
		for _, nr := range res.Networks {
			designs += len(nr.Designs)
		}
		b.ReportMetric(float64(res.Distinct), "distinct")
		b.ReportMetric(float64(res.Alone), "alone")
		b.ReportMetric(float64(designs), "designs")
		b.ReportMetric(map[bool]float64{true: 1}[res.Proven], "proven")
		b.ReportMetric(float64(res.Bound), "bound")
		b.ReportMetric(map[bool]float64{true: 1}[res.TiesProven], "ties-proven")
	})
	nets, nvals := items(res)
	b.Run("select/exact", func(b *testing.B) {
		var sel selection
		for b.Loop() {
			sel = choose(context.Background(), prune(nets), nvals, DefaultMaxNodes, nil)
		}
		b.ReportMetric(float64(sel.obj.distinct), "distinct")
		b.ReportMetric(float64(sel.nodes), "nodes")
		b.ReportMetric(float64(sel.proofNodes), "proof-nodes")
		b.ReportMetric(map[bool]float64{true: 1}[sel.proven], "proven")
	})
	b.Run("select/greedy", func(b *testing.B) {
		var set []int32
		for b.Loop() {
			set = greedy(prune(nets), nvals)
		}
		b.ReportMetric(float64(len(set)), "distinct")
	})
	few := nets[:3]
	b.Run("select3/exact", func(b *testing.B) {
		for b.Loop() {
			choose(context.Background(), prune(few), nvals, DefaultMaxNodes, nil)
		}
	})
	b.Run("select3/enumeration", func(b *testing.B) {
		for b.Loop() {
			bruteBest(few)
		}
	})
}

// items gives a result's design lists as the selection sees them.
func items(res *Result) ([][]item, int) {
	ids := map[string]int32{}
	nets := make([][]item, len(res.Networks))
	for r, nr := range res.Networks {
		for i, d := range nr.Designs {
			it := item{rel: d.Rel, pow: d.Score.Power, idx: i}
			for _, v := range d.PartValues() {
				k := ValueKey(v)
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
	return nets, len(ids)
}

// BenchmarkBoardTwentyCLI runs the selection on the CLI's board of twenty
// networks (cmd/ohmfit/testdata/board/twenty: ten E96 dividers, ten E24
// ladders, sharing 10k, 11k, 13k, 15k, 20k and 75k and their decades), the
// one the profile bound is for. Run:
// go test ./synth/board -run '^$' -bench TwentyCLI -benchtime 1x
func BenchmarkBoardTwentyCLI(b *testing.B) {
	bd, err := Load(filepath.Join("..", "..", "cmd", "ohmfit", "testdata", "board", "twenty", "board.yaml"))
	if err != nil {
		b.Fatal(err)
	}
	res, err := Solve(context.Background(), bd, &Settings{Workers: 1, MaxNodes: 1})
	if err != nil {
		b.Fatal(err)
	}
	nets, nvals := items(res)
	var sel selection
	for b.Loop() {
		sel = choose(context.Background(), prune(nets), nvals, DefaultMaxNodes, nil)
	}
	b.ReportMetric(float64(sel.obj.distinct), "distinct")
	b.ReportMetric(float64(sel.bound), "bound")
	b.ReportMetric(map[bool]float64{true: 1}[sel.proven], "proven")
	b.ReportMetric(float64(sel.proofNodes), "proof-nodes")
}
