package synth_test

import (
	"context"
	"fmt"
	"math"
	"os"
	"testing"
	"time"

	"github.com/ohmfit/ohmfit/synth"
)

// The scale cases of synth/testdata/scale, each with a plain brute force
// written out by its closed form (series and parallel laws, the divider
// formula, the ideal op-amp's virtual short): every candidate of the space,
// no pruning, the best goal error kept. It is the baseline branch and bound
// is timed against.
type scaleCase struct {
	file string
	// brute returns the best goal error over the candidates whose first
	// position takes one of the given option indices (all of them for a
	// whole run) and how many candidates it scored.
	brute func(p *synth.Problem, first []int) (float64, int64)
}

func vals(p *synth.Problem, i int) []float64 {
	d := p.Domains[i]
	out := make([]float64, len(d.Options))
	for k, o := range d.Options {
		out[k] = o.Value
	}
	return out
}

func rel(v, goal float64) float64 { return math.Abs(v-goal) / goal }

var scaleCases = []scaleCase{
	{"loaded3-e96", func(p *synth.Problem, first []int) (float64, int64) {
		r1s, r2s, r3s := vals(p, 0), vals(p, 1), vals(p, 2)
		best, n := math.Inf(1), int64(0)
		for _, i := range first {
			r1 := r1s[i]
			for _, r2 := range r2s {
				for _, r3 := range r3s {
					n++
					z := r3 + 10e3                     // series law
					zm := r2 * z / (r2 + z)            // parallel law
					if 25/(r1+zm) > 2.5e-3*(1+1e-12) { // P = V²/R of the whole network
						continue
					}
					v := 5 * zm / (r1 + zm) * 10e3 / z // divider formula, twice
					best = math.Min(best, rel(v, 2.5))
				}
			}
		}
		return best, n
	}},
	{"ladder4-e96", func(p *synth.Problem, first []int) (float64, int64) {
		r := [4][]float64{vals(p, 0), vals(p, 1), vals(p, 2), vals(p, 3)}
		best, n := math.Inf(1), int64(0)
		for _, i := range first {
			r1 := r[0][i]
			for _, r2 := range r[1] {
				for _, r3 := range r[2] {
					for _, r4 := range r[3] {
						n++
						tot := r1 + r2 + r3 + r4 // series law
						if 3.3/tot > 1e-3*(1+1e-12) {
							continue
						}
						k := 3.3 / tot // divider formula at each tap
						e := math.Max(rel(k*(r2+r3+r4), 2.61), math.Max(rel(k*(r3+r4), 1.47), rel(k*r4, 0.62)))
						best = math.Min(best, e)
					}
				}
			}
		}
		return best, n
	}},
	{"diff4-e96", diffStage(1.25, [2][3]float64{{1.0, 1.05, 1.75}, {1.0, 1.2, 3.25}})},
	{"skew4-e96", diffStage(1.25, [2][3]float64{{2.0, 2.02, 1.4}, {2.0, 2.2, 2.9}})},
	{"taps5-e24", func(p *synth.Problem, first []int) (float64, int64) {
		r := [5][]float64{vals(p, 0), vals(p, 1), vals(p, 2), vals(p, 3), vals(p, 4)}
		best, n := math.Inf(1), int64(0)
		par := func(a, b float64) float64 { return a * b / (a + b) } // parallel law
		for _, i := range first {
			r1 := r[0][i]
			for _, r2 := range r[1] {
				for _, r3 := range r[2] {
					for _, r4 := range r[3] {
						for _, r5 := range r[4] {
							n++
							zc := r5 + 100e3
							zb := par(r4, zc)
							za := par(par(r2, 47e3), r3+zb)
							if 144/(r1+za) > 20e-3*(1+1e-12) { // P = V²/R
								continue
							}
							va := 12 * za / (r1 + za)              // divider formula
							vc := va * zb / (r3 + zb) * 100e3 / zc // and twice more
							best = math.Min(best, math.Max(rel(va, 5), rel(vc, 1.8)))
						}
					}
				}
			}
		}
		return best, n
	}},
	{"ladder6-e96", func(p *synth.Problem, first []int) (float64, int64) {
		var r [6][]float64
		for i := range r {
			r[i] = vals(p, i)
		}
		goals := [5]float64{4.1, 3.3, 2.4, 1.5, 0.7}
		best, n := math.Inf(1), int64(0)
		var rec func(k int, x *[6]float64)
		rec = func(k int, x *[6]float64) {
			if k == 6 {
				n++
				tot := x[0] + x[1] + x[2] + x[3] + x[4] + x[5] // series law
				if 5/tot > 2e-3*(1+1e-12) {
					return
				}
				below, e := tot, 0.0
				for t := 0; t < 5; t++ {
					below -= x[t]
					e = math.Max(e, rel(5*below/tot, goals[t])) // divider formula
				}
				best = math.Min(best, e)
				return
			}
			for _, v := range r[k] {
				x[k] = v
				rec(k+1, x)
			}
		}
		var x [6]float64
		for _, i := range first {
			x[0] = r[0][i]
			// One value of the second and third positions too: the whole
			// space is far beyond any run (see the benchmark's
			// extrapolation).
			x[1], x[2] = r[1][len(r[1])/2], r[2][len(r[2])/2]
			rec(3, &x)
		}
		return best, n
	}},
}

// diffStage is the brute force of a difference stage about a reference
// vref, with two conditions of (VA, VB, goal for the output).
func diffStage(vref float64, conds [2][3]float64) func(p *synth.Problem, first []int) (float64, int64) {
	return func(p *synth.Problem, first []int) (float64, int64) {
		r := [4][]float64{vals(p, 0), vals(p, 1), vals(p, 2), vals(p, 3)}
		va0, vb0, goal0 := conds[0][0], conds[0][1], conds[0][2]
		va1, vb1, goal1 := conds[1][0], conds[1][1], conds[1][2]
		best, n := math.Inf(1), int64(0)
		for _, i := range first {
			r1 := r[0][i]
			for _, r2 := range r[1] {
				for _, r3 := range r[2] {
					for _, r4 := range r[3] {
						n++
						// Ideal op-amp: V(m) = V(p), no input current, so
						// V(p) divides VB against the reference and
						// Vo = V(p) + (V(p) − VA)·R2/R1.
						g, k := r2/r1, 1/(r3+r4)
						vp0 := (vb0*r4 + vref*r3) * k
						vp1 := (vb1*r4 + vref*r3) * k
						e := math.Max(rel(vp0+(vp0-va0)*g, goal0), rel(vp1+(vp1-va1)*g, goal1))
						best = math.Min(best, e)
					}
				}
			}
		}
		return best, n
	}
}

func scaleProblem(t testing.TB, c scaleCase, series string) *synth.Problem {
	t.Helper()
	text, err := os.ReadFile("testdata/scale/" + c.file + ".yaml")
	if err != nil {
		t.Fatal(err)
	}
	return problemFromYAML(t, string(text), series)
}

func allIndices(p *synth.Problem) []int {
	out := make([]int, len(p.Domains[0].Options))
	for i := range out {
		out[i] = i
	}
	return out
}

// The closed-form brute forces agree with branch and bound on coarse
// versions of the scale cases (E6 or E3 in place of the case's series), so
// the baselines compute the same problem the benchmarks time.
func TestScaleBruteForcesAgree(t *testing.T) {
	for _, c := range scaleCases {
		if c.file == "ladder6-e96" {
			continue // its baseline covers only a slice
		}
		t.Run(c.file, func(t *testing.T) {
			p := scaleProblem(t, c, "E6")
			if p.Space() > 1e6 {
				p = scaleProblem(t, c, "E3")
			}
			want, n := c.brute(p, allIndices(p))
			if float64(n) != p.Space() {
				t.Fatalf("brute force scored %d of %g", n, p.Space())
			}
			res, err := synth.Search(context.Background(), p, nil, synth.BranchBound{})
			if err != nil {
				t.Fatal(err)
			}
			if res.Status != synth.Proven || !close(res.Solutions[0].Score.Error, want, 1e-9, 1e-12) {
				t.Fatalf("status %v, best %g; closed form %g", res.Status, res.Solutions[0].Score.Error, want)
			}
		})
	}
}

// BenchmarkScale times branch and bound (one worker) on each scale case, and
// the plain closed-form brute force on a slice of the same space (every
// 16th value of the first position), reporting the brute force's time per
// candidate and its time for the whole space extrapolated from the slice
// (the brute force's work is the same for every candidate).
//
//	go test ./synth -run '^$' -bench Scale -benchtime 1x
func BenchmarkScale(b *testing.B) {
	for _, c := range scaleCases {
		p := scaleProblem(b, c, "")
		if c.file != "ladder6-e96" || !testing.Short() {
			b.Run(c.file+"/bound", func(b *testing.B) { benchMethod(b, p, 1, synth.BranchBound{}) })
		}
		b.Run(c.file+"/brute", func(b *testing.B) {
			var first []int
			for i := 0; i < len(p.Domains[0].Options); i += 16 {
				first = append(first, i)
			}
			var n int64
			start := time.Now()
			for b.Loop() {
				_, n = c.brute(p, first)
			}
			per := float64(time.Since(start)) / float64(b.N) / float64(n)
			b.ReportMetric(per, "ns/candidate")
			b.ReportMetric(per*p.Space()/1e9, "s/whole-space")
		})
	}
}

// BenchmarkScaleLeafRows times branch and bound on the scale cases with
// leaves of 32 to 256 rows, the measurement behind BranchBound's default
// of 128 (see DEVELOPERS.md).
//
//	go test ./synth -run '^$' -bench ScaleLeafRows -benchtime 3x
func BenchmarkScaleLeafRows(b *testing.B) {
	for _, c := range scaleCases {
		if c.file == "ladder6-e96" {
			continue
		}
		p := scaleProblem(b, c, "")
		for _, leaf := range []int{32, 64, 128, 256} {
			b.Run(fmt.Sprintf("%s/rows%d", c.file, leaf), func(b *testing.B) { benchMethod(b, p, 1, synth.BranchBound{LeafRows: leaf}) })
		}
	}
}
