package synth_test

import (
	"fmt"
	"math"
	"math/rand/v2"
	"strings"
	"testing"

	"github.com/ohmfit/ohmfit/constraints"
	"github.com/ohmfit/ohmfit/synth"
)

// spaceValues scores every candidate of the space (brute-force enumeration)
// and returns each one's target values (target-major: t·nc+c) and
// total power, skipping candidates whose network cannot be solved.
func spaceValues(t *testing.T, p *synth.Problem) (vals [][]float64, power []float64) {
	t.Helper()
	s := p.Spec.Network.NewSolver()
	sc := p.Spec.NewScore()
	idx := make([]int, len(p.Domains))
	free := make([]float64, len(p.Domains))
	for {
		for i, d := range p.Domains {
			free[i] = d.Options[idx[i]].Value
		}
		if err := p.Spec.Evaluate(s, free, sc); err == nil {
			v := make([]float64, 0, len(p.Spec.Probes)*len(p.Spec.Conditions))
			for ti := range p.Spec.Probes {
				for c := range p.Spec.Conditions {
					v = append(v, sc.Value(ti, c))
				}
			}
			vals = append(vals, v)
			power = append(power, sc.Power)
		}
		k := len(idx) - 1
		for ; k >= 0; k-- {
			idx[k]++
			if idx[k] < len(p.Domains[k].Options) {
				break
			}
			idx[k] = 0
		}
		if k < 0 {
			return vals, power
		}
	}
}

// ReachLimits' claims hold over the whole space: a limit said never to bind
// is met by every candidate in every condition, one said always broken is
// failed by every candidate in the condition named (brute-force enumeration
// of the space, random networks with every target kind). Limits placed well
// outside the space's range of a monotone quantity in a network of
// resistors and sources are found (the bilinear theorem: such a quantity's
// range over a box is spanned by its corners).
func TestReachLimitsAgainstEnumeration(t *testing.T) {
	rng := rand.New(rand.NewPCG(23, 5))
	trials := 80
	if testing.Short() {
		trials = 20
	}
	claims := map[string]int{}
	for trial := range trials {
		text := randomBoundTemplate(rng)
		t.Run(fmt.Sprint(trial), func(t *testing.T) {
			p := problemFromYAML(t, text, "")
			if p.Space() > 20_000 {
				t.Skipf("space %g", p.Space())
			}
			vals, power := spaceValues(t, p)
			if len(vals) == 0 {
				t.Skip("no candidate solves")
			}
			nc := len(p.Spec.Conditions)
			passive := !strings.Contains(text, "opamp")
			// Replace every target's limits: well above, well below, or
			// inside the space's range, or none.
			mode := make([]int, len(p.Spec.Probes))
			for ti := range p.Spec.Probes {
				tg := &p.Spec.Template.Targets[ti]
				if tg.Kind.Derived() {
					continue
				}
				lo, hi := math.Inf(1), math.Inf(-1)
				for _, v := range vals {
					for c := 0; c < nc; c++ {
						if x := v[ti*nc+c]; !math.IsNaN(x) {
							lo, hi = math.Min(lo, x), math.Max(hi, x)
						}
					}
				}
				if math.IsInf(lo, 0) || math.IsInf(hi, 0) {
					continue
				}
				span := hi - lo + 1e-3*math.Max(math.Abs(lo), math.Abs(hi)) + 1e-12
				tg.Tolerance, tg.HasMin, tg.HasMax = 0, false, false
				mode[ti] = rng.IntN(4)
				switch mode[ti] {
				case 1: // never binds
					tg.HasMin, tg.Min, tg.HasMax, tg.Max = true, lo-0.1*span, true, hi+0.1*span
				case 2: // always broken: above everything
					tg.HasMin, tg.Min = true, hi+0.1*span
				case 3: // binds for some (a false claim fails the checks above)
					tg.HasMax, tg.Max = true, lo+0.5*span
				}
			}
			pmin, pmax := math.Inf(1), 0.0
			for _, w := range power {
				pmin, pmax = math.Min(pmin, w), math.Max(pmax, w)
			}
			pmode := rng.IntN(4)
			p.Spec.Template.Limits.SupplyPowerMax = [4]float64{0, 1.2 * pmax, (pmin + pmax) / 2, pmin / 2}[pmode]
			reach := synth.ReachLimits(p)
			found := map[int]bool{}
			for _, r := range reach {
				found[r.Target] = true // supply_power_max's Target is -1
				if r.Kind == constraints.SupplyPowerLimit {
					for k, w := range power {
						lim := p.Spec.Template.Limits.SupplyPowerMax
						if r.Never && w > lim {
							t.Errorf("supply power said never to bind, candidate %d draws %g > %g", k, w, lim)
						}
						if r.Always && w <= lim {
							t.Errorf("supply power said always broken, candidate %d draws %g <= %g", k, w, lim)
						}
					}
					claims["supply"]++
					continue
				}
				tg := p.Spec.Template.Targets[r.Target]
				for k, v := range vals {
					for c := 0; c < nc; c++ {
						x := v[r.Target*nc+c]
						if math.IsNaN(x) {
							continue
						}
						if r.Never && !tg.Meets(x) {
							t.Errorf("%s said never to bind; candidate %d reads %g in condition %d", tg.Label(), k, x, c)
						}
						if r.Always && c == r.Condition && tg.Meets(x) {
							t.Errorf("%s said always broken in condition %d; candidate %d reads %g", tg.Label(), c, k, x)
						}
						if x < r.Lo-1e-9*math.Abs(x) || x > r.Hi+1e-9*math.Abs(x) {
							if r.Never || c == r.Condition {
								t.Errorf("%s reads %g, outside the claimed range [%g, %g]", tg.Label(), x, r.Lo, r.Hi)
							}
						}
					}
				}
				if r.Never {
					claims["never"]++
				} else {
					claims["always"]++
				}
			}
			for ti, m := range mode {
				kind := p.Spec.Probes[ti].Kind.String()
				monotone := kind == "voltage" || kind == "current" || kind == "code" || kind == "resistance"
				if passive && monotone && (m == 1 || m == 2) && !found[ti] {
					t.Errorf("%s (mode %d) not settled; reach %+v", p.Spec.Template.Targets[ti].Label(), m, reach)
				}
			}
			if passive && pmode == 1 && !found[-1] {
				t.Errorf("supply_power_max 1.2× the largest power not found never to bind")
			}
		})
	}
	if claims["never"] == 0 || claims["always"] == 0 || claims["supply"] == 0 {
		t.Errorf("too few claims tested: %v", claims)
	}
}
