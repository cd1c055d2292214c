package synth_test

import (
	"math"
	"sort"
	"testing"

	"github.com/ohmfit/ohmfit/eseries"
	"github.com/ohmfit/ohmfit/synth"
)

// Combine against a plain enumeration of every single part, every pair and
// every triple in each arrangement, valued by the series law (R = a + b) and
// the parallel law (1/R = 1/a + 1/b): the best error it reports must be the
// best error that exists, for targets on and between standard values, and
// each reported value must follow from its parts by those laws.
func TestCombineAgainstEnumeration(t *testing.T) {
	s, _ := eseries.Lookup("E12")
	base := s.Values(10, 10e3)
	par := func(x, y float64) float64 { return x * y / (x + y) }
	var all []float64 // every value up to three parts can make
	for i, a := range base {
		all = append(all, a)
		for j, b := range base[:i+1] {
			all = append(all, a+b, par(a, b))
			for _, c := range base[:j+1] {
				all = append(all, a+b+c, 1/(1/a+1/b+1/c))
			}
			for _, c := range base {
				all = append(all, a+par(b, c), b+par(a, c), par(a+b, c))
			}
		}
	}
	sort.Float64s(all)
	for _, target := range []float64{4320, 4700, 123.4, 7777, 15.5, 9990} {
		for _, maxParts := range []int{1, 2, 3} {
			got, err := synth.Combine(target, base, synth.CombineSettings{MaxParts: maxParts, Top: 5})
			if err != nil {
				t.Fatal(err)
			}
			best := math.Inf(1)
			for _, a := range base {
				best = math.Min(best, math.Abs(a-target)/target)
				if maxParts < 2 {
					continue
				}
				for _, b := range base {
					best = math.Min(best, math.Min(math.Abs(a+b-target), math.Abs(par(a, b)-target))/target)
				}
			}
			if maxParts == 3 {
				for _, v := range all {
					best = math.Min(best, math.Abs(v-target)/target)
				}
			}
			if math.Abs(got[0].Error-best) > 1e-12 {
				t.Errorf("target %g, %d parts: best error %g, enumeration %g (%v)", target, maxParts, got[0].Error, best, got[0])
			}
			for _, c := range got {
				if c.Arrangement.Count() > maxParts || len(c.Parts) != c.Arrangement.Count() {
					t.Errorf("%v uses more parts than allowed", c)
				}
				var v float64
				p := c.Parts
				switch c.Arrangement {
				case synth.ArrSingle:
					v = p[0]
				case synth.ArrSeries:
					v = p[0] + p[1]
				case synth.ArrParallel:
					v = par(p[0], p[1])
				case synth.ArrSeries3:
					v = p[0] + p[1] + p[2]
				case synth.ArrParallel3:
					v = 1 / (1/p[0] + 1/p[1] + 1/p[2])
				case synth.ArrSeriesParallel:
					v = p[0] + par(p[1], p[2])
				case synth.ArrParallelSeries:
					v = par(p[0]+p[1], p[2])
				}
				if math.Abs(v-c.Value) > 1e-9*v {
					t.Errorf("%v: parts give %g", c, v)
				}
			}
		}
	}
}
