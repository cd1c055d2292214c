package synth_test

import (
	"fmt"
	"math"
	"sort"
	"testing"

	"github.com/ohmfit/ohmfit/eseries"
	"github.com/ohmfit/ohmfit/synth"
)

// plainComb is one arrangement of the plain enumeration below.
type plainComb struct {
	arr   synth.Arrangement
	parts []float64 // in the order Combination.Parts documents
	value float64
	err   float64
}

// Resistances by the series law (R = R1 + R2) and the parallel law
// (1/R = 1/R1 + 1/R2), written here without the library's formulas.
func series(r ...float64) float64 {
	s := 0.0
	for _, x := range r {
		s += x
	}
	return s
}

func parallel(r ...float64) float64 {
	g := 0.0
	for _, x := range r {
		g += 1 / x
	}
	return 1 / g
}

// sameTie is the contract's tie rule: equal within 1e-12 relative or 1e-15
// absolute (contract.md, "Errors that agree within ...").
func sameTie(a, b float64) bool {
	d := math.Abs(a - b)
	return d <= 1e-15 || d <= 1e-12*math.Max(math.Abs(a), math.Abs(b))
}

// eachCombination calls put with every single part, every pair and (with
// maxParts 3) every triple of base in each arrangement, each once, in the
// part order Combination.Parts documents.
func eachCombination(base []float64, maxParts int, put func(a synth.Arrangement, v float64, n int, p [3]float64)) {
	for i, a := range base {
		put(synth.ArrSingle, a, 1, [3]float64{a})
		if maxParts < 2 {
			continue
		}
		for j, b := range base[:i+1] { // a >= b
			put(synth.ArrSeries, series(a, b), 2, [3]float64{a, b})
			put(synth.ArrParallel, parallel(a, b), 2, [3]float64{a, b})
			if maxParts < 3 {
				continue
			}
			for _, c := range base[:j+1] { // a >= b >= c
				put(synth.ArrSeries3, series(a, b, c), 3, [3]float64{a, b, c})
				put(synth.ArrParallel3, parallel(a, b, c), 3, [3]float64{a, b, c})
			}
			for _, c := range base { // a >= b, any c
				put(synth.ArrParallelSeries, parallel(series(a, b), c), 3, [3]float64{a, b, c})
			}
		}
		if maxParts < 3 {
			continue
		}
		for j, b := range base { // any a, b >= c
			for _, c := range base[:j+1] {
				put(synth.ArrSeriesParallel, series(a, parallel(b, c)), 3, [3]float64{a, b, c})
			}
		}
	}
}

// simpler returns dominated, which reports whether a combination of n parts
// (up to maxParts) has as its value (by the tie rule) the value of some
// arrangement of fewer parts of base.
func simpler(base []float64, maxParts int) (dominated func(n int, v float64) bool) {
	var fewer [4][]float64
	eachCombination(base, maxParts-1, func(_ synth.Arrangement, v float64, n int, _ [3]float64) {
		for k := n + 1; k <= 3; k++ {
			fewer[k] = append(fewer[k], v)
		}
	})
	for k := range fewer {
		sort.Float64s(fewer[k])
	}
	return func(n int, v float64) bool {
		vals := fewer[n]
		i := sort.SearchFloat64s(vals, v)
		for _, j := range []int{i - 1, i} {
			if j >= 0 && j < len(vals) && sameTie(vals[j], v) {
				return true
			}
		}
		return false
	}
}

// plainLess is the ranking: error (ties by the tie rule), then part count,
// then arrangement, then larger parts first.
func plainLess(a, b plainComb) bool {
	if !sameTie(a.err, b.err) {
		return a.err < b.err
	}
	if len(a.parts) != len(b.parts) {
		return len(a.parts) < len(b.parts)
	}
	if a.arr != b.arr {
		return a.arr < b.arr
	}
	for k := range a.parts {
		if a.parts[k] != b.parts[k] {
			return a.parts[k] > b.parts[k]
		}
	}
	return false
}

// plainEnumeration lists every combination of up to maxParts parts of base,
// drops those whose value equals (by the tie rule) the value of some
// arrangement with fewer parts, and sorts the rest by plainLess.
func plainEnumeration(base []float64, target float64, maxParts int) []plainComb {
	dominated := simpler(base, maxParts)
	var kept []plainComb
	eachCombination(base, maxParts, func(a synth.Arrangement, v float64, n int, p [3]float64) {
		if !dominated(n, v) {
			kept = append(kept, plainComb{a, append([]float64(nil), p[:n]...), v, math.Abs(v-target) / target})
		}
	})
	sort.SliceStable(kept, func(i, j int) bool { return plainLess(kept[i], kept[j]) })
	return kept
}

// Every rank Combine prints, for several targets, series, ranges, part
// counts and list lengths, against the plain enumeration above: the same
// arrangements with the same parts in the same order, so nothing better is
// left out and nothing dominated is shown.
func TestCombineAgainstEnumeration(t *testing.T) {
	type tc struct {
		series   string
		lo, hi   float64
		targets  []float64
		maxParts []int
		long     bool // skipped under -short
	}
	cases := []tc{
		// The reported misses: 4.3k + 22, 68k + 10 … 68k + 62, 2.2k + 11,
		// and pairs that equal the single 4.3k.
		{"E24", 10, 10e6, []float64{4320, 68e3, 2210}, []int{1, 2}, false},
		{"E12", 10, 10e3, []float64{4320, 4700, 123.4, 7777, 15.5, 9990}, []int{1, 2}, false},
		{"E12", 10, 10e3, []float64{4320, 15.5}, []int{3}, false},
		{"E12", 10, 10e3, []float64{4700, 123.4, 7777, 9990}, []int{3}, true},
		// Targets outside what the range can reach: the best is at an end.
		{"E6", 1e3, 10e3, []float64{50, 400, 25e3, 1e6}, []int{1, 2, 3}, false},
		// Every value of a tiny series: the whole list fits in --top.
		{"E3", 100, 1e3, []float64{1500, 333}, []int{1, 2, 3}, false},
		{"E12", 1, 100, []float64{1.5, 0.47, 250}, []int{3}, false},
		{"E96", 100, 100e3, []float64{4320, 12345, 99.9}, []int{2}, true},
		{"E192", 1e3, 10e3, []float64{2000, 7654.3}, []int{2}, true},
		{"E24", 100, 100e3, []float64{4320, 68e3, 2210, 1000}, []int{3}, true},
	}
	for _, c := range cases {
		s, err := eseries.Lookup(c.series)
		if err != nil {
			t.Fatal(err)
		}
		base := s.Values(c.lo, c.hi)
		for _, target := range c.targets {
			for _, maxParts := range c.maxParts {
				name := fmt.Sprintf("%s_%g-%g/%g/%d", c.series, c.lo, c.hi, target, maxParts)
				t.Run(name, func(t *testing.T) {
					if c.long && testing.Short() {
						t.Skip("long enumeration")
					}
					want := plainEnumeration(base, target, maxParts)
					for _, top := range []int{1, 3, 12, 40, 150} {
						got, err := synth.Combine(target, base, synth.CombineSettings{MaxParts: maxParts, Top: top})
						if err != nil {
							t.Fatal(err)
						}
						checkCombineList(t, top, got, want)
					}
				})
			}
		}
	}
}

func checkCombineList(t *testing.T, top int, got []synth.Combination, all []plainComb) {
	t.Helper()
	want := all[:min(top, len(all))]
	if len(got) != len(want) {
		t.Errorf("--top %d: %d combinations, the enumeration has %d", top, len(got), len(want))
	}
	for i := range min(len(got), len(want)) {
		g, w := got[i], want[i]
		same := g.Arrangement == w.arr && len(g.Parts) == len(w.parts)
		for k := range w.parts {
			same = same && k < len(g.Parts) && g.Parts[k] == w.parts[k]
		}
		if !same || !sameTie(g.Error, w.err) || math.Abs(g.Value-w.value) > 1e-9*w.value {
			t.Errorf("--top %d rank %d: got %v %v = %g (error %g), enumeration %v %v = %g (error %g)",
				top, i+1, g.Arrangement, g.Parts, g.Value, g.Error, w.arr, w.parts, w.value, w.err)
			return
		}
	}
}

// A pair that equals a single part, and a triple that equals a pair, is not
// listed (4.3k exists, so 3.3k + 1k is dominated), while a pair with no
// single of its value is (2.2k + 10 for 2.21k).
func TestCombineDropsDominated(t *testing.T) {
	e24, _ := eseries.Lookup("E24")
	base := e24.Values(10, 10e6)
	tests := []struct {
		target   float64
		maxParts int
		absent   [][]float64
		present  [][]float64
	}{
		{4320, 2, [][]float64{{3300, 1000}, {3000, 1300}, {2700, 1600}}, [][]float64{{4300}, {4300, 22}, {4300, 20}}},
		{2210, 2, nil, [][]float64{{2200, 10}, {2200, 11}, {1300, 910}}},
		// 110 + 100 + 100 equals 300 + 10, and 310 is no E24 value.
		{310, 3, [][]float64{{110, 100, 100}}, [][]float64{{300, 10}}},
	}
	for _, tt := range tests {
		t.Run(fmt.Sprint(tt.target), func(t *testing.T) {
			got, err := synth.Combine(tt.target, base, synth.CombineSettings{MaxParts: tt.maxParts, Top: 60})
			if err != nil {
				t.Fatal(err)
			}
			has := func(p []float64) bool {
				for _, c := range got {
					if fmt.Sprint(c.Parts) == fmt.Sprint(p) {
						return true
					}
				}
				return false
			}
			for _, p := range tt.absent {
				if has(p) {
					t.Errorf("%v is listed, but a simpler arrangement has its value", p)
				}
			}
			for _, p := range tt.present {
				if !has(p) {
					t.Errorf("%v is missing", p)
				}
			}
		})
	}
}

// Every reported value follows from its parts by the series and parallel
// laws.
func TestCombineValues(t *testing.T) {
	e12, _ := eseries.Lookup("E12")
	got, err := synth.Combine(1234, e12.Values(10, 100e3), synth.CombineSettings{MaxParts: 3, Top: 200})
	if err != nil {
		t.Fatal(err)
	}
	for _, c := range got {
		p := c.Parts
		var v float64
		switch c.Arrangement {
		case synth.ArrSingle:
			v = p[0]
		case synth.ArrSeries, synth.ArrSeries3:
			v = series(p...)
		case synth.ArrParallel, synth.ArrParallel3:
			v = parallel(p...)
		case synth.ArrSeriesParallel:
			v = series(p[0], parallel(p[1], p[2]))
		case synth.ArrParallelSeries:
			v = parallel(series(p[0], p[1]), p[2])
		}
		if len(p) != c.Arrangement.Count() || math.Abs(v-c.Value) > 1e-9*v {
			t.Errorf("%v %v: parts give %g, reported %g", c.Arrangement, p, v, c.Value)
		}
		if e := math.Abs(v-1234) / 1234; math.Abs(e-c.Error) > 1e-12 {
			t.Errorf("%v %v: error %g, reported %g", c.Arrangement, p, e, c.Error)
		}
	}
}

// naiveCombine is the baseline for BenchmarkCombine: the value of every
// combination by eachCombination, kept in a pool pruned to the best top by
// plainLess (dominance is checked only for what is within the pool's bound).
func naiveCombine(base []float64, target float64, maxParts, top int) []plainComb {
	dominated := simpler(base, maxParts)
	var pool []plainComb
	bound := math.Inf(1)
	prune := func() {
		sort.SliceStable(pool, func(i, j int) bool { return plainLess(pool[i], pool[j]) })
		if len(pool) >= top {
			pool = pool[:top]
			bound = pool[top-1].err
		}
	}
	eachCombination(base, maxParts, func(a synth.Arrangement, v float64, n int, p [3]float64) {
		e := math.Abs(v-target) / target
		if (e > bound && !sameTie(e, bound)) || dominated(n, v) {
			return
		}
		pool = append(pool, plainComb{a, append([]float64(nil), p[:n]...), v, e})
		if len(pool) >= 2*top {
			prune()
		}
	})
	prune()
	return pool
}

// Combine against naiveCombine on the same inputs in the same run; each
// checks the other's list once.
func BenchmarkCombine(b *testing.B) {
	cases := []struct {
		name          string
		series        string
		lo, hi        float64
		target        float64
		maxParts, top int
	}{
		{"E24-pairs-top10", "E24", 10, 10e6, 4320, 2, 10},
		{"E24-pairs-top100", "E24", 10, 10e6, 4320, 2, 100},
		{"E192-pairs-top10", "E192", 10, 10e6, 4320, 2, 10},
		{"E24-triples-top10", "E24", 10, 10e6, 4320, 3, 10},
	}
	for _, c := range cases {
		s, err := eseries.Lookup(c.series)
		if err != nil {
			b.Fatal(err)
		}
		base := s.Values(c.lo, c.hi)
		b.Run(c.name, func(b *testing.B) {
			var got []synth.Combination
			for b.Loop() {
				got, err = synth.Combine(c.target, base, synth.CombineSettings{MaxParts: c.maxParts, Top: c.top})
				if err != nil {
					b.Fatal(err)
				}
			}
			want := naiveCombine(base, c.target, c.maxParts, c.top)
			if len(got) != len(want) || got[len(got)-1].Error != want[len(want)-1].err {
				b.Fatalf("Combine and the naive baseline disagree: %v, %v", got[len(got)-1], want[len(want)-1])
			}
		})
		b.Run(c.name+"-naive", func(b *testing.B) {
			for b.Loop() {
				naiveCombine(base, c.target, c.maxParts, c.top)
			}
		})
	}
}
