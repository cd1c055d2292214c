package variation

import (
	"math"
	"math/rand/v2"
	"slices"

	"github.com/ohmfit/ohmfit/constraints"
	"github.com/ohmfit/ohmfit/solver"
)

// monteCarlo fills each goal's Stats and the report's overall yield.
func (d *Design) monteCarlo(s *solver.Solver, r *Report, st *Settings, rt *ratingTracker) {
	p := d.Problem
	t := p.Template
	rng := rand.New(rand.NewPCG(st.Seed, 0x6f686d666974)) // "ohmfit"
	n := st.Samples
	mc := &sampleRun{d: d, s: s, r: r, points: p.NewPoints(), dev: make([]float64, len(d.Parts)), vals: make([][]float64, len(r.Goals))}
	for gi := range mc.vals {
		mc.vals[gi] = make([]float64, n)
	}
	mc.byCond, mc.sweep = goalsByCondition(r, len(p.Conditions))
	good := 0
	if d.conditionTemperatures() {
		d.tcrDraw = make([]float64, len(d.Parts))
		defer func() { d.tcrDraw = nil }()
	}
	for k := range n {
		d.drawSample(rng, st, mc.dev)
		if mc.sample(k) {
			good++
		}
	}
	r.Yield = float64(good) / float64(n)
	for gi := range r.Goals {
		g := &r.Goals[gi]
		tg := t.Targets[g.Target]
		g.MonteCarlo = summarise(mc.vals[gi], tg.Meets)
		if st.KeepSamples {
			g.Samples = mc.vals[gi]
		}
	}
}

// drawSample draws one Monte Carlo build into dev: each part within its
// tolerance, each resistor drifting by its TCR at an ambient temperature
// drawn over the range (and its own coefficient in d.tcrDraw when the
// conditions carry temperatures).
func (d *Design) drawSample(rng *rand.Rand, st *Settings, dev []float64) {
	temp := constraints.ReferenceCelsius
	if d.ambient.Set {
		temp = d.ambient.Min + (d.ambient.Max-d.ambient.Min)*rng.Float64()
	}
	for j, v := range d.Parts {
		var u float64
		if st.Distribution == Normal {
			u = rng.NormFloat64() * v.Tol / 3
		} else {
			u = (2*rng.Float64() - 1) * v.Tol
		}
		if !v.Relative {
			dev[j] = u
			continue
		}
		drift := 0.0
		if v.Kind == solver.Resistor && d.ambient.Set {
			drift = (2*rng.Float64() - 1) * v.TCR * (temp - constraints.ReferenceCelsius)
		}
		dev[j] = (1+u)*(1+drift) - 1
		if d.tcrDraw != nil && v.Kind == solver.Resistor {
			// This part's coefficient, the same at every temperature.
			d.tcrDraw[j] = (2*rng.Float64() - 1) * v.TCR
		}
	}
}

// sampleRun is a Monte Carlo run: the values each goal took in each sample.
type sampleRun struct {
	d      *Design
	s      *solver.Solver
	r      *Report
	points *constraints.Points
	dev    []float64   // the sample's deviation per varied part
	vals   [][]float64 // [goal][sample]
	byCond [][]int
	sweep  []int
}

// sample solves sample k (the build in mc.dev) in every condition and
// records each goal's value; it reports whether the build meets every hard
// limit, the supply power limit included.
func (mc *sampleRun) sample(k int) bool {
	d, s, r := mc.d, mc.s, mc.r
	p := d.Problem
	t := p.Template
	ok := true
	for ci := range p.Conditions {
		d.setValues(s, ci, mc.dev)
		solved := s.Solve() == nil
		if solved && p.Visible(ci) {
			pw := s.ResistorPower() * p.OnFraction
			if constraints.OverPowerLimit(pw, t.Limits.SupplyPowerMax) {
				ok = false
			}
		}
		d.gatherPoints(s, ci, solved, mc.points)
		for _, gi := range mc.byCond[ci] {
			x := math.NaN()
			if solved {
				if v, err := p.Probes[r.Goals[gi].Target].Read(s); err == nil {
					x = v
				}
			}
			mc.vals[gi][k] = x
			if !t.Targets[r.Goals[gi].Target].Meets(x) {
				ok = false
			}
		}
	}
	for _, gi := range mc.sweep {
		x := mc.points.Derived(r.Goals[gi].Target)
		mc.vals[gi][k] = x
		if !t.Targets[r.Goals[gi].Target].Meets(x) {
			ok = false
		}
	}
	return ok
}

// TailSamples is the fewest samples with which a run estimates the 0.135 %
// and 99.865 % points: n·0.00135 ≥ 1, so that some sample lies beyond each.
// With fewer the points would only be the lowest and highest sample under
// another name, so a run reports those as such.
const TailSamples = 741

// TailsEstimated reports whether a run of n samples estimates the 0.135 %
// and 99.865 % points (Stats.Low and High), or gives its lowest and highest
// sample: the one rule every output's labels follow.
func TailsEstimated(n int) bool { return n >= TailSamples }

// summarise computes mean, σ (n-1), the 0.135 %/99.865 % points (linear
// interpolation between order statistics; the lowest and highest sample
// with fewer than TailSamples) and the yield.
func summarise(x []float64, meets func(float64) bool) Stats {
	var st Stats
	clean := make([]float64, 0, len(x))
	in := 0
	for _, v := range x {
		if math.IsNaN(v) {
			st.Failed++
			continue
		}
		clean = append(clean, v)
		if meets(v) {
			in++
		}
	}
	if len(x) > 0 {
		st.Yield = float64(in) / float64(len(x))
	}
	if len(clean) == 0 {
		st.Mean, st.Sigma, st.Low, st.High = math.NaN(), math.NaN(), math.NaN(), math.NaN()
		return st
	}
	sum := 0.0
	for _, v := range clean {
		sum += v
	}
	st.Mean = sum / float64(len(clean))
	ss := 0.0
	for _, v := range clean {
		ss += (v - st.Mean) * (v - st.Mean)
	}
	if len(clean) > 1 {
		st.Sigma = math.Sqrt(ss / float64(len(clean)-1))
	}
	slices.Sort(clean)
	if TailsEstimated(len(x)) {
		st.Low, st.High = Quantile(clean, 0.00135), Quantile(clean, 0.99865)
	} else {
		st.Low, st.High = clean[0], clean[len(clean)-1]
	}
	return st
}

// Quantile returns the q-quantile of sorted data by linear interpolation
// between order statistics (position q·(n-1)).
func Quantile(sorted []float64, q float64) float64 {
	if len(sorted) == 0 {
		return math.NaN()
	}
	pos := q * float64(len(sorted)-1)
	i := int(math.Floor(pos))
	if i >= len(sorted)-1 {
		return sorted[len(sorted)-1]
	}
	f := pos - float64(i)
	return sorted[i]*(1-f) + sorted[i+1]*f
}
