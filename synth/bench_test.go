package synth_test

import (
	"context"
	"testing"

	"github.com/ohmfit/ohmfit/synth"
)

const dividerE192YAML = `ohmfit: 1
name: bench divider
parts:
  - {name: V1, type: voltage-source, plus: in, minus: gnd, volts: 3.3}
  - {name: R1, type: resistor, from: in, to: out}
  - {name: R2, type: resistor, from: out, to: gnd}
targets:
  - {voltage: out, equals: 0.8}
choose: {series: E192, min: 1, max: 10M}
`

// benchSearch times the default method.
func benchSearch(b *testing.B, p *synth.Problem, workers int) {
	b.Helper()
	benchMethod(b, p, workers, nil)
}

// Two positions, E192 over 1 Ω … 10 MΩ each: 1345² ≈ 1.8 million pairs.
func BenchmarkDividerE192(b *testing.B) {
	benchSearch(b, problemFromYAML(b, dividerE192YAML, ""), 1)
}

// Three positions into a fixed 10k load, 100 Ω … 1 MΩ: E24 ≈ 913 thousand
// triples, E96 ≈ 57 million.
func BenchmarkLoadedDivider(b *testing.B) {
	for _, s := range []string{"E24", "E96"} {
		b.Run(s, func(b *testing.B) {
			benchSearch(b, problemFromYAML(b, loadedDividerYAML(s), ""), 1)
		})
	}
}

// The naive exhaustive baseline on the E24 case: every triple, one full
// re-solve each (already the allocation-free solver, so the ratio measures
// the search, not the solver).
func BenchmarkLoadedDividerNaive(b *testing.B) {
	p := problemFromYAML(b, loadedDividerYAML("E24"), "")
	s := p.Spec.Network.NewSolver()
	sc := p.Spec.NewScore()
	free := make([]float64, 3)
	for b.Loop() {
		best := 2.0
		for _, o1 := range p.Domains[0].Options {
			for _, o2 := range p.Domains[1].Options {
				for _, o3 := range p.Domains[2].Options {
					free[0], free[1], free[2] = o1.Value, o2.Value, o3.Value
					if err := p.Spec.Evaluate(s, free, sc); err != nil {
						b.Fatal(err)
					}
					if sc.Feasible && sc.Error < best {
						best = sc.Error
					}
				}
			}
		}
		if best > 1 {
			b.Fatal("nothing feasible")
		}
	}
}

// One against two workers on the E96 loaded divider.
func BenchmarkWorkers(b *testing.B) {
	p := problemFromYAML(b, loadedDividerYAML("E96"), "")
	for _, w := range []int{1, 2} {
		b.Run(map[int]string{1: "1", 2: "2"}[w], func(b *testing.B) { benchSearch(b, p, w) })
	}
}

// Branch and bound beside the rows method on the same problems.
func BenchmarkBranchBound(b *testing.B) {
	cases := []struct {
		name string
		text string
	}{
		{"loaded-E96", loadedDividerYAML("E96")},
		{"ladder4-E24", ladderYAML("E24", 4)},
	}
	for _, c := range cases {
		p := problemFromYAML(b, c.text, "")
		b.Run(c.name+"/bound", func(b *testing.B) { benchMethod(b, p, 1, synth.BranchBound{}) })
		b.Run(c.name+"/rows", func(b *testing.B) { benchMethod(b, p, 1, synth.Rows{}) })
	}
}

// benchMethod times one method and checks that it proved its answer.
func benchMethod(b *testing.B, p *synth.Problem, workers int, m synth.Method) {
	b.Helper()
	set := &synth.Settings{Workers: workers, MaxRows: 1e12}
	var res *synth.Result
	for b.Loop() {
		var err error
		res, err = synth.Search(context.Background(), p, set, m)
		if err != nil {
			b.Fatal(err)
		}
	}
	if res.Status != synth.Proven {
		b.Fatalf("status %v", res.Status)
	}
	b.ReportMetric(float64(res.Stats.Evaluated), "scored/op")
	b.ReportMetric(float64(res.Stats.Solves), "solves/op")
	b.ReportMetric(float64(res.Stats.Rows), "rows/op")
}
