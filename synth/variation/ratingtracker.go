package variation

import (
	"fmt"
	"math"
	"slices"

	"github.com/ohmfit/ohmfit/constraints"
	"github.com/ohmfit/ohmfit/constraints/ratings"
	"github.com/ohmfit/ohmfit/eseries/units"
	"github.com/ohmfit/ohmfit/solver"
)

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
	if !rt.d.Problem.Visible(ci) {
		// A derivative's helper condition, not one the user wrote (it
		// may lie outside the sweep): no rating or watch reads it.
		return
	}
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
