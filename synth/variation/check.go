package variation

import (
	"errors"
	"fmt"
	"math"

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
	// Low and High are the 0.135 % and 99.865 % points (±3σ of a
	// normal) where the run estimates them (TailsEstimated), else the
	// lowest and highest sample.
	Low, High float64
	Yield     float64 // fraction of samples within the target's band
	Failed    int     // samples whose network could not be solved
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

// warn adds the warnings and cautions the report calls for.
func (d *Design) warn(r *Report, st *Settings) {
	for _, v := range d.Parts {
		if v.Kind != solver.Resistor && v.Tol == 0 {
			r.Warnings = append(r.Warnings, fmt.Sprintf("%s has no tolerance and is taken as exact; give it `tolerance:` if it has one (a reference's ±1%% often matters more than the resistors')", v.Name))
		}
	}
	for _, g := range r.Goals {
		if !g.Pass() {
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
		r.Warnings = append(r.Warnings, fmt.Sprintf("Monte Carlo: %.2f%% of %d %s every limit in every condition", 100*r.Yield, r.Samples, Plural(r.Samples, "sample meets", "samples meet")))
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
