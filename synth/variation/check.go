package variation

import (
	"errors"
	"fmt"
	"math"
	"math/rand/v2"
	"slices"

	"github.com/ohmfit/ohmfit/constraints"
	"github.com/ohmfit/ohmfit/constraints/ratings"
	"github.com/ohmfit/ohmfit/eseries/units"
	"github.com/ohmfit/ohmfit/solver"
)

// Distribution is how Monte Carlo draws a part's deviation.
type Distribution int

// Distributions.
const (
	Uniform Distribution = iota // flat over ±tolerance
	Normal                      // Gaussian with σ = tolerance/3, not truncated
)

// String returns "uniform" or "normal".
func (d Distribution) String() string {
	if d == Normal {
		return "normal"
	}
	return "uniform"
}

// Settings tune Check. The zero value (or nil) means the defaults.
type Settings struct {
	// Samples is the Monte Carlo sample count. Zero means DefaultSamples;
	// negative means no Monte Carlo.
	Samples int
	// Seed makes the Monte Carlo run repeatable; the same seed gives the
	// same numbers. Zero is a seed like any other.
	Seed uint64
	// Distribution of each part's deviation; zero means Uniform.
	Distribution Distribution
	// MaxCornerParts is the number of varying parts up to which the worst
	// case enumerates every corner (2^n solves per condition). Zero means
	// DefaultMaxCornerParts.
	MaxCornerParts int
	// MaxPackage, when not "", is the largest package allowed; a part that
	// needs a larger one is a hard failure. It overrides the template's
	// limits.max_package.
	MaxPackage string
	// KeepSamples keeps every Monte Carlo value in the report (for plots).
	KeepSamples bool
}

// Defaults.
const (
	DefaultSamples        = 10000
	DefaultMaxCornerParts = 16
)

// Methods of the worst case, as Report.Method names them.
const (
	MethodCorners    = "corners"    // every tolerance corner solved
	MethodLinearised = "linearised" // the corners the sensitivities pick, solved
)

// Stats summarise a Monte Carlo run of one target in one condition.
type Stats struct {
	Mean, Sigma float64
	Low, High   float64 // the 0.135 % and 99.865 % points (±3σ of a normal)
	Yield       float64 // fraction of samples within the target's band
	Failed      int     // samples whose network could not be solved
}

// Sensitivity is one target's sensitivity to one varied part, the
// derivative at nominal values (every part at its value, no tolerance, no
// TCR drift). x is the physical part's value: its ohms (each part of a pair
// on its own), a source's volts or amps, and for a thermistor or RTD its R25
// or R0, which scales its resistance at every temperature alike; for a
// sensor's extra entry (Varied.Extra) its B in kelvin, or its class error's
// offset (°C) or slope (°C/°C).
type Sensitivity struct {
	Part       string
	Absolute   float64 // dX/dx, in the target's unit per the part's unit; NaN when it cannot be computed
	Normalised float64 // (dX/X)/(dx/x); NaN when X is 0, or x is (a class error's terms)
}

// Goal is one target in one condition.
type Goal struct {
	Target, Condition int
	Label, CondName   string
	Nominal           float64
	WorstMin          float64
	WorstMax          float64
	// WorstError is the largest goal error over the worst-case range, for
	// targets with `equals`; NaN otherwise.
	WorstError float64
	// InBand reports whether the whole worst-case range meets the target's
	// hard limits; HasBand whether it has any.
	InBand, HasBand bool
	MonteCarlo      Stats
	Sens            []Sensitivity // one per varied part, Design.Parts order
	Samples         []float64     // Monte Carlo values when kept; NaN where a solve failed
}

// Rating is one resistor's load against its package.
type Rating struct {
	Part         string
	NominalWatts float64 // largest over conditions, nominal values
	Watts        float64 // largest over conditions and worst-case corners
	Volts        float64 // largest |voltage| likewise
	Package      string  // the package named in the template, or the smallest that fits
	Chosen       bool    // Package was chosen by ohmfit (no package given)
	Fits         bool    // a package in the table carries it (chosen case)
	Rated        float64 // rated watts of Package
	MaxVolts     float64 // working voltage of Package
	Load         ratings.Load
	Verdict      ratings.Verdict // Load.Verdict(), or ratings.VerdictNoPackage
}

// SensorLoad is a thermistor's or RTD's largest power and voltage. The
// resistor package table does not rate sensors; their datasheet does (and a
// self_heating target limits the rise the power causes).
type SensorLoad struct {
	Part         string
	NominalWatts float64 // largest over conditions, nominal values
	Watts        float64 // largest over conditions and worst-case corners
	Volts        float64 // largest |voltage| likewise
}

// Report is the outcome of Check.
type Report struct {
	Method  string // MethodCorners or MethodLinearised
	Corners int    // solves per condition spent on the worst case
	Parts   []Varied
	Goals   []Goal
	Ratings []Rating // resistors only
	Sensors []SensorLoad
	// Heating is each sensor's self-heating per condition, for sensors
	// with a dissipation constant (see Design.SelfHeating); nil otherwise.
	Heating      []Heating
	Samples      int
	Seed         uint64
	Distribution Distribution
	Ambient      constraints.Ambient
	// Yield is the fraction of Monte Carlo samples meeting every hard limit
	// in every condition.
	Yield float64
	// MaxVolts is the largest voltage between any two nodes, nominal or at a
	// worst-case corner, with where it occurs.
	MaxVolts         float64
	MaxSpan          ratings.Span // the nodes, their potentials and where
	Warnings         []string
	Cautions         []string
	Failures         []string // hard limits broken: a target outside them in the worst case, a package above MaxPackage
	WorstErrorDesign float64  // largest WorstError over goals

	hazards []string // the ratings.Watch cautions on the node potentials
}

// ErrUnsolvable is wrapped when a network with its parts moved within their
// tolerances cannot be solved. (A nominal network that cannot be solved
// gives the template's *constraints.Error, at the part at fault.)
var ErrUnsolvable = errors.New("variation: the network cannot be solved")

// Check analyses the design with real parts. It uses d as scratch while it
// runs (the TCR draws of the worst case and the Monte Carlo) and leaves it
// as it found it, so one Design must not be checked from two goroutines at
// once; give each its own NewDesign.
func Check(d *Design, set *Settings) (*Report, error) {
	var st Settings
	if set != nil {
		st = *set
	}
	if st.Samples == 0 {
		st.Samples = DefaultSamples
	}
	if st.MaxCornerParts <= 0 {
		st.MaxCornerParts = DefaultMaxCornerParts
	}
	p := d.Problem
	s := p.Network.NewSolver()
	s.SetRefinement(true) // the figures people read, to full accuracy
	r := &Report{Parts: d.Parts, Seed: st.Seed, Distribution: st.Distribution, Ambient: d.ambient}
	r.Warnings = append(r.Warnings, d.warnings...)
	if err := d.nominal(s, r); err != nil {
		return nil, err
	}
	for _, g := range r.Goals {
		if math.IsNaN(g.Nominal) || math.IsInf(g.Nominal, 0) {
			r.Warnings = append(r.Warnings, fmt.Sprintf("%s in %s is not a finite number (%v): the design does not define it, so it fails its target",
				g.Label, g.CondName, g.Nominal))
		}
	}
	rt := newRatingTracker(d, p.Network)
	d.worstCase(s, r, &st, rt)
	if st.Samples > 0 {
		r.Samples = st.Samples
		d.monteCarlo(s, r, &st, rt)
	}
	span := rt.watch.Span()
	r.MaxVolts = span.Volts
	r.MaxSpan = span
	r.hazards = rt.watch.Cautions()
	r.Ratings = rt.ratings(&st, p.Template, r)
	r.Sensors = rt.sensors()
	heating, err := d.SelfHeating()
	if err != nil {
		return nil, err
	}
	r.Heating = heating
	r.Warnings = append(r.Warnings, heatingWarnings(r.Heating)...)
	d.warn(r, &st)
	return r, nil
}

// nominal adds one goal to r per target and condition, with its nominal
// value and sensitivities, and one per sweep-wide target.
func (d *Design) nominal(s *solver.Solver, r *Report) error {
	p := d.Problem
	t := p.Template
	zero := make([]float64, len(d.Parts))
	for ci := range p.Conditions {
		d.setValues(s, ci, zero)
		if err := s.Solve(); err != nil {
			// The template's terms: the part at fault and what to change.
			return p.ConditionError(ci, err)
		}
		for ti, pr := range p.Probes {
			if !p.Applies[ti][ci] { // false in the conditions added for a derivative
				continue
			}
			x, err := pr.Read(s)
			if err != nil {
				return err
			}
			sens, err := d.sensitivities(s, ci, pr, x, zero)
			if err != nil {
				return err
			}
			tg := t.Targets[ti]
			lo, hi := tg.Band()
			r.Goals = append(r.Goals, Goal{Target: ti, Condition: ci, Label: tg.Label(), CondName: p.Conditions[ci].Name,
				Nominal: x, WorstMin: x, WorstMax: x, Sens: sens,
				HasBand: !math.IsInf(lo, -1) || !math.IsInf(hi, 1)})
		}
	}

	// Sweep-wide targets (linearity, sensitivity, resolution): one goal
	// each, over the conditions they read, with finite-difference
	// sensitivities (they are not one solve's linear functional).
	for ti, dp := range p.Derived {
		if dp == nil {
			continue
		}
		x, err := d.derivedAt(s, ti, zero)
		if err != nil {
			return err
		}
		tg := t.Targets[ti]
		lo, hi := tg.Band()
		r.Goals = append(r.Goals, Goal{Target: ti, Condition: SweepCondition, Label: tg.Label(), CondName: "sweep",
			Nominal: x, WorstMin: x, WorstMax: x, Sens: d.derivedSensitivities(s, ti, x),
			HasBand: !math.IsInf(lo, -1) || !math.IsInf(hi, 1)})
	}
	return nil
}

// worstCase widens every goal of r to its worst-case range, over every
// corner of the varied parts or, with more than st.MaxCornerParts of them,
// over the two corners the linearised sensitivities point to; the rating
// tracker sees every network solved. It then sets each goal's verdict and
// worst error.
func (d *Design) worstCase(s *solver.Solver, r *Report, st *Settings, rt *ratingTracker) {
	p := d.Problem
	t := p.Template
	nv := len(d.Parts)
	zero := make([]float64, nv)
	var varying []int
	for j := range d.Parts {
		if d.varies(j) {
			varying = append(varying, j)
		}
	}
	dev := make([]float64, nv)
	visit := func(ci int, goals []int) {
		d.setValues(s, ci, dev)
		if s.Solve() != nil {
			return
		}
		rt.observe(s, ci, dev)
		for _, gi := range goals {
			g := &r.Goals[gi]
			x, err := p.Probes[g.Target].Read(s)
			if err != nil || math.IsNaN(x) {
				continue
			}
			g.WorstMin = math.Min(g.WorstMin, x)
			g.WorstMax = math.Max(g.WorstMax, x)
		}
	}
	byCond := make([][]int, len(p.Conditions))
	var sweep []int // goals of sweep-wide targets
	for gi, g := range r.Goals {
		if g.Condition == SweepCondition {
			sweep = append(sweep, gi)
			continue
		}
		byCond[g.Condition] = append(byCond[g.Condition], gi)
	}
	visitSweep := func(gi int) {
		g := &r.Goals[gi]
		if x, err := d.derivedAt(s, g.Target, dev); err == nil && !math.IsNaN(x) {
			g.WorstMin = math.Min(g.WorstMin, x)
			g.WorstMax = math.Max(g.WorstMax, x)
		}
	}
	for ci := range p.Conditions {
		d.setValues(s, ci, zero)
		if s.Solve() == nil {
			rt.observe(s, ci, zero)
		}
	}
	if len(varying) <= st.MaxCornerParts {
		r.Method = MethodCorners
		r.Corners = 1 << len(varying)
		for ci := range p.Conditions {
			for mask := 0; mask < r.Corners; mask++ {
				d.corner(mask, varying, dev)
				visit(ci, byCond[ci])
			}
		}
		// A part is the same part at every temperature: each corner holds
		// across all the conditions a sweep-wide target reads. When the
		// conditions carry temperatures, a part's TCR sign is a corner of
		// its own (high when hot is low when cold), so each part has four:
		// tolerance ± times TCR ±.
		for _, gi := range sweep {
			tcrBits := 0
			if d.conditionTemperatures() && 2*len(varying) <= st.MaxCornerParts {
				tcrBits = len(varying)
				d.tcrDraw = make([]float64, len(d.Parts))
			}
			for mask := 0; mask < r.Corners<<tcrBits; mask++ {
				d.corner(mask&(r.Corners-1), varying, dev)
				for b, j := range varying {
					if tcrBits == 0 {
						break
					}
					d.tcrDraw[j] = -d.Parts[j].TCR
					if mask&(1<<(len(varying)+b)) != 0 {
						d.tcrDraw[j] = d.Parts[j].TCR
					}
				}
				visitSweep(gi)
			}
			d.tcrDraw = nil
		}
	} else {
		r.Method = MethodLinearised
		r.Corners = 0
		for gi := range r.Goals {
			g := r.Goals[gi]
			for _, sign := range []float64{1, -1} {
				clear(dev)
				for _, j := range varying {
					lo, hi := d.Bounds(j)
					if sign*g.Sens[j].Absolute >= 0 {
						dev[j] = hi
					} else {
						dev[j] = lo
					}
				}
				if g.Condition == SweepCondition {
					visitSweep(gi)
				} else {
					visit(g.Condition, []int{gi})
				}
				r.Corners++
			}
		}
	}
	for gi := range r.Goals {
		g := &r.Goals[gi]
		tg := t.Targets[g.Target]
		g.InBand = tg.Meets(g.WorstMin) && tg.Meets(g.WorstMax)
		g.WorstError = math.NaN()
		if tg.HasEquals {
			g.WorstError = math.Max(tg.GoalError(g.WorstMin), tg.GoalError(g.WorstMax))
			r.WorstErrorDesign = math.Max(r.WorstErrorDesign, g.WorstError)
		}
	}
}

// sensitivities returns the target's sensitivity to each varied part at the
// solver's current solution, by the adjoint method.
func (d *Design) sensitivities(s *solver.Solver, ci int, pr constraints.Probe, x float64, dev []float64) ([]Sensitivity, error) {
	net := s.Network()
	nn, np := len(net.Nodes()), len(d.Problem.Template.Parts)
	grad := make([]float64, np)
	var err error
	if pr.Kind == constraints.Resistance {
		err = s.ResistanceAdjoint(pr.A, pr.B, grad)
	} else {
		nodeW := make([]float64, nn)
		partW := make([]float64, np)
		switch pr.Kind {
		case constraints.Voltage:
			nodeW[pr.A] += 1
			nodeW[pr.B] -= 1
		case constraints.Code:
			nodeW[pr.A] += pr.Scale
			nodeW[pr.B] -= pr.Scale
		case constraints.Current:
			partW[pr.Part] = pr.Sign
		case constraints.Power, constraints.SelfHeating:
			// Watts = (V(from) - V(to))·Amps along the part's edge; a
			// rise is watts times 1/δ.
			k := 1.0
			if pr.Kind == constraints.SelfHeating {
				k = pr.Scale
			}
			for _, e := range net.Edges() {
				if e.Part == pr.Part {
					i := s.Amps(pr.Part)
					nodeW[e.From] += k * i
					nodeW[e.To] -= k * i
					partW[pr.Part] = k * (s.Voltage(e.From) - s.Voltage(e.To))
				}
			}
		case constraints.Ratio:
			vb := s.Voltage(pr.B)
			nodeW[pr.A] += 1 / vb
			nodeW[pr.B] -= s.Voltage(pr.A) / (vb * vb)
		}
		err = s.Adjoint(nodeW, partW, grad)
	}
	if err != nil {
		return nil, err
	}
	out := make([]Sensitivity, len(d.Parts))
	for j, v := range d.Parts {
		pos := s.Value(v.Part)
		g := grad[v.Part]
		xj := v.Nominal * (1 + dev[j])
		if v.pair > 0 {
			// Chain rule through the pair: series dR/dRa = 1, parallel
			// dR/dRa = (R/Ra)².
			if v.combine == constraints.Parallel {
				g *= (pos / xj) * (pos / xj)
			}
		} else if v.Extra() {
			// Per unit of the sensor's parameter (its B, its class
			// error's offset or slope), through dR/dx in this condition.
			g *= d.paramSlope(j, ci, pos)
			xj = v.Nominal
		} else {
			xj = pos
			if v.Sensor != "" {
				// Per ohm of R25 (R0), which scales the resistance pos it
				// has in this condition: dR/dR25 = pos/R25.
				g *= pos / v.Nominal
				xj = v.Nominal
			}
		}
		n := math.NaN()
		if x != 0 && xj != 0 {
			n = g * xj / x
		}
		out[j] = Sensitivity{Part: v.Name, Absolute: g, Normalised: n}
	}
	return out, nil
}

// monteCarlo fills each goal's Stats and the report's overall yield.
func (d *Design) monteCarlo(s *solver.Solver, r *Report, st *Settings, rt *ratingTracker) {
	p := d.Problem
	t := p.Template
	rng := rand.New(rand.NewPCG(st.Seed, 0x6f686d666974)) // "ohmfit"
	n := st.Samples
	vals := make([][]float64, len(r.Goals))
	for gi := range vals {
		vals[gi] = make([]float64, n)
	}
	byCond := make([][]int, len(p.Conditions))
	var sweep []int
	for gi, g := range r.Goals {
		if g.Condition == SweepCondition {
			sweep = append(sweep, gi)
			continue
		}
		byCond[g.Condition] = append(byCond[g.Condition], gi)
	}
	points := p.NewPoints()
	dev := make([]float64, len(d.Parts))
	good := 0
	if d.conditionTemperatures() {
		d.tcrDraw = make([]float64, len(d.Parts))
		defer func() { d.tcrDraw = nil }()
	}
	for k := range n {
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
		ok := true
		for ci := range p.Conditions {
			d.setValues(s, ci, dev)
			solved := s.Solve() == nil
			if solved && p.Visible(ci) {
				pw := s.ResistorPower() * p.OnFraction
				if lim := t.Limits.SupplyPowerMax; lim > 0 && pw > lim && !constraints.Same(pw, lim) {
					ok = false
				}
			}
			d.gatherPoints(s, ci, solved, points)
			for _, gi := range byCond[ci] {
				x := math.NaN()
				if solved {
					if v, err := p.Probes[r.Goals[gi].Target].Read(s); err == nil {
						x = v
					}
				}
				vals[gi][k] = x
				if !t.Targets[r.Goals[gi].Target].Meets(x) {
					ok = false
				}
			}
		}
		for _, gi := range sweep {
			x := points.Derived(r.Goals[gi].Target)
			vals[gi][k] = x
			if !t.Targets[r.Goals[gi].Target].Meets(x) {
				ok = false
			}
		}
		if ok {
			good++
		}
	}
	r.Yield = float64(good) / float64(n)
	for gi := range r.Goals {
		g := &r.Goals[gi]
		tg := t.Targets[g.Target]
		g.MonteCarlo = summarise(vals[gi], tg.Meets)
		if st.KeepSamples {
			g.Samples = vals[gi]
		}
	}
}

// summarise computes mean, σ (n-1), the 0.135 %/99.865 % points (linear
// interpolation between order statistics) and the yield.
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
	st.Low, st.High = Quantile(clean, 0.00135), Quantile(clean, 0.99865)
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

// ratingTracker follows each resistor's largest power and voltage, and the
// largest voltage between nodes, over every solve it is shown.
type ratingTracker struct {
	d              *Design
	net            *solver.Network
	nominal, watts []float64
	volts          []float64
	watch          ratings.Watch // the node-to-node span, by the one rule
	nodes          []string
	volts1         []float64 // scratch: one solve's node potentials
}

func newRatingTracker(d *Design, net *solver.Network) *ratingTracker {
	n := len(d.Parts)
	return &ratingTracker{d: d, net: net, nominal: make([]float64, n), watts: make([]float64, n), volts: make([]float64, n),
		nodes: net.Nodes(), volts1: make([]float64, len(net.Nodes()))}
}

func (rt *ratingTracker) observe(s *solver.Solver, ci int, dev []float64) {
	isNominal := !slices.ContainsFunc(dev, func(v float64) bool { return v != 0 })
	for j, v := range rt.d.Parts {
		if v.Kind != solver.Resistor || v.Extra() {
			continue
		}
		vo, w := rt.d.physical(s, j, dev)
		rt.watts[j] = math.Max(rt.watts[j], math.Abs(w))
		rt.volts[j] = math.Max(rt.volts[j], math.Abs(vo))
		if isNominal {
			rt.nominal[j] = math.Max(rt.nominal[j], math.Abs(w))
		}
	}
	if !rt.d.Problem.Visible(ci) {
		return // a derivative's helper condition, not one the user wrote
	}
	for k := range rt.nodes {
		rt.volts1[k] = s.Voltage(k)
	}
	rt.watch.Nodes(ratings.Where(rt.d.Problem.Conditions[ci].Name, !isNominal), rt.nodes, rt.volts1, rt.d.Problem.Template.Ground)
}

// ratings rates each resistor against its package and notes failures of the
// largest-package limit.
func (rt *ratingTracker) ratings(st *Settings, t *constraints.Template, r *Report) []Rating {
	maxPkg := t.Limits.MaxPackage
	if st.MaxPackage != "" {
		maxPkg = st.MaxPackage
	}
	var out []Rating
	for j, v := range rt.d.Parts {
		if v.Kind != solver.Resistor || v.Sensor != "" {
			continue
		}
		rg := Rating{Part: v.Name, NominalWatts: rt.nominal[j], Watts: rt.watts[j], Volts: rt.volts[j]}
		var pkg ratings.Package
		rg.Chosen = v.Package == ""
		pkg, rg.Fits = ratings.Fit(v.Package, rg.Watts, rg.Volts)
		rg.Package, rg.Rated, rg.MaxVolts = pkg.Name, pkg.Watts, pkg.Volts
		rg.Load = pkg.LoadOf(rg.Watts, rg.Volts)
		rg.Verdict = rg.Load.Verdict()
		if rg.Chosen && !rg.Fits {
			rg.Verdict = ratings.VerdictNoPackage
		}
		if maxPkg != "" {
			switch {
			case !rg.Chosen && ratings.Rank(rg.Package) > ratings.Rank(maxPkg):
				r.Failures = append(r.Failures, fmt.Sprintf("%s is a %s, larger than the allowed %s", v.Name, rg.Package, maxPkg))
			case !rg.Fits || ratings.Rank(rg.Package) > ratings.Rank(maxPkg):
				r.Failures = append(r.Failures, fmt.Sprintf("%s (%s, %s worst case) needs more than a %s gives at half its rating",
					v.Name, units.FormatUnit(rg.Watts, units.Watt), units.FormatUnit(rg.Volts, units.Volt), pkgLimit(rg, maxPkg)))
			}
		}
		out = append(out, rg)
	}
	return out
}

// sensors returns each sensor's load.
func (rt *ratingTracker) sensors() []SensorLoad {
	var out []SensorLoad
	for j, v := range rt.d.Parts {
		if v.Sensor != "" && !v.Extra() {
			out = append(out, SensorLoad{Part: v.Name, NominalWatts: rt.nominal[j], Watts: rt.watts[j], Volts: rt.volts[j]})
		}
	}
	return out
}

// pkgLimit names the package a failing part was held to.
func pkgLimit(rg Rating, maxPkg string) string {
	if !rg.Chosen {
		return rg.Package
	}
	return maxPkg
}

// warn adds the warnings and cautions the report calls for.
func (d *Design) warn(r *Report, st *Settings) {
	for _, v := range d.Parts {
		if v.Kind != solver.Resistor && v.Tol == 0 {
			r.Warnings = append(r.Warnings, fmt.Sprintf("%s has no tolerance and is taken as exact; give it `tolerance:` if it has one (a reference's ±1%% often matters more than the resistors')", v.Name))
		}
	}
	for _, g := range r.Goals {
		if g.HasBand && !g.InBand {
			tg := d.Problem.Template.Targets[g.Target]
			lo, hi := tg.Band()
			k := tg.Kind
			where := fmt.Sprintf("in %q", g.CondName)
			if g.Condition == SweepCondition {
				where = "over the sweep"
			}
			r.Failures = append(r.Failures, fmt.Sprintf("%s %s leaves its limits in the worst case: %s … %s against %s … %s",
				g.Label, where, k.Format(g.WorstMin), k.Format(g.WorstMax), k.Format(lo), k.Format(hi)))
		}
	}
	if r.Samples > 0 && r.Yield < 1 {
		r.Warnings = append(r.Warnings, fmt.Sprintf("Monte Carlo: %.2f%% of %d samples meet every limit in every condition", 100*r.Yield, r.Samples))
	}
	for _, rg := range r.Ratings {
		switch rg.Verdict {
		case ratings.VerdictOverload, ratings.VerdictNoPackage:
			r.Warnings = append(r.Warnings, fmt.Sprintf("%s overloads its %s: %s against %s rated, %s against %s",
				rg.Part, rg.Package, units.FormatUnit(rg.Watts, units.Watt), units.FormatUnit(rg.Rated, units.Watt),
				units.FormatUnit(rg.Volts, units.Volt), units.FormatUnit(rg.MaxVolts, units.Volt)))
			r.Cautions = append(r.Cautions, ratings.RatingCaution(rg.Part, rg.Package, rg.Load))
		case ratings.VerdictDerating:
			r.Warnings = append(r.Warnings, fmt.Sprintf("%s runs above half the rating of its %s (%.0f%%); half is the usual derating",
				rg.Part, rg.Package, 100*rg.Load.PowerFraction))
			r.Cautions = append(r.Cautions, ratings.RatingCaution(rg.Part, rg.Package, rg.Load))
		case ratings.VerdictNear:
			r.Cautions = append(r.Cautions, ratings.RatingCaution(rg.Part, rg.Package, rg.Load))
		}
	}
	r.Cautions = append(r.hazards, r.Cautions...)
}

// SweepCondition is the Condition of a Goal for a sweep-wide target
// (linearity, sensitivity, resolution), which reads several conditions.
const SweepCondition = -1

// gatherPoints records, after condition ci was solved, the node voltages the
// sweep-wide targets read in it (NaN when the solve failed).
func (d *Design) gatherPoints(s *solver.Solver, ci int, solved bool, points *constraints.Points) {
	if solved {
		points.Gather(ci, s)
		return
	}
	points.Fail(ci)
}

// derivedAt computes sweep-wide target ti with the parts at deviation dev,
// solving each condition it reads.
func (d *Design) derivedAt(s *solver.Solver, ti int, dev []float64) (float64, error) {
	p := d.Problem
	dp := p.Derived[ti]
	points := p.NewPoints()
	for _, ci := range dp.Conds {
		d.setValues(s, ci, dev)
		if err := s.Solve(); err != nil {
			return math.NaN(), errorf(ErrUnsolvable, "the network cannot be solved in condition %q: %v", p.Conditions[ci].Name, err)
		}
		d.gatherPoints(s, ci, true, points)
	}
	return points.Derived(ti), nil
}

// derivedSensitivities differentiates a sweep-wide target numerically: a
// central difference with a relative step of 1e-6 in each part's value
// (for a part with an absolute tolerance, a step of 1e-6 of its value), at
// nominal values. Nominal means no TCR drift either: while it runs every
// part's temperature coefficient is held at zero, so that the step moves
// the value alone and not also the drift a corner would add (factor turns a
// deviation's sign into a TCR corner).
func (d *Design) derivedSensitivities(s *solver.Solver, ti int, x float64) []Sensitivity {
	const h = 1e-6
	dev := make([]float64, len(d.Parts))
	saved := d.tcrDraw
	d.tcrDraw = make([]float64, len(d.Parts))
	defer func() { d.tcrDraw = saved }()
	out := make([]Sensitivity, len(d.Parts))
	for j, v := range d.Parts {
		out[j] = Sensitivity{Part: v.Name, Absolute: math.NaN(), Normalised: math.NaN()}
		step := h // relative
		if !v.Relative {
			step = h * math.Abs(v.Nominal)
			if step == 0 {
				step = h
			}
		}
		clear(dev)
		dev[j] = step
		up, err1 := d.derivedAt(s, ti, dev)
		dev[j] = -step
		down, err2 := d.derivedAt(s, ti, dev)
		if err1 != nil || err2 != nil {
			continue
		}
		slope := (up - down) / (2 * step) // per unit of dev
		if v.Relative {
			out[j].Absolute = slope / v.Nominal // dev is dx/x
		} else {
			out[j].Absolute = slope
		}
		if x != 0 && v.Nominal != 0 {
			out[j].Normalised = out[j].Absolute * v.Nominal / x
		}
	}
	return out
}

// corner sets dev to the tolerance corner numbered mask: bit b of mask puts
// varying part b at its upper bound, a clear bit at its lower one.
func (d *Design) corner(mask int, varying []int, dev []float64) {
	clear(dev)
	for b, j := range varying {
		lo, hi := d.Bounds(j)
		if mask&(1<<b) != 0 {
			dev[j] = hi
		} else {
			dev[j] = lo
		}
	}
}
