package synth

import (
	"math"

	"github.com/ohmfit/ohmfit/constraints"
)

// LimitReach says how one hard limit stands over the whole search space,
// as proven by the corner bounds of BranchBound (see its doc comment for
// why a quantity's range over a box is spanned by the box's corners).
type LimitReach struct {
	// Kind says whether the limit is a target's or supply_power_max.
	Kind constraints.LimitKind
	// Target is, for a TargetLimit, the index into Template.Targets; -1
	// for supply_power_max.
	Target int
	// Never is true when no candidate in the space breaks the limit, in any
	// condition it applies in: the limit cannot change the answer.
	Never bool
	// Always is true when every candidate in the space breaks the limit in
	// Condition: no design can meet it.
	Always bool
	// Condition is, for Always, the condition that shows it; -1 for Never.
	Condition int
	// Lo and Hi enclose the limited quantity over the space: in Condition
	// for Always, over every condition for Never. NaN when only one side
	// is known (the supply power's lower bound is not kept per condition).
	Lo, Hi float64
}

// reachMaxSolves caps the corner solves ReachLimits spends (corners times
// conditions): the check is a courtesy before the search, not a search.
const reachMaxSolves = 1 << 16

// ReachLimits finds the hard limits that no candidate can break and those
// that every candidate breaks, proven from the corners of the whole space.
// It returns nothing for a limit it cannot settle either way (the limit
// binds for some candidates, a sweep-wide target, a network whose
// determinant changes sign over the space, a space with too many corners):
// absence is no claim.
func ReachLimits(p *Problem) []LimitReach {
	nc := len(p.Spec.Conditions)
	vary := 0
	for _, d := range p.Domains {
		if len(d.Options) > 1 {
			vary++
		}
	}
	if len(p.Domains) == 0 || vary > 20 || float64(nc)*math.Ldexp(1, vary) > reachMaxSolves {
		return nil
	}
	set := &Settings{Top: 1}
	st := newRunState(p, set)
	sh := newBBShared(p, set, st, 1)
	w := newBBWorker(sh, set, st)
	root := rootBox(p)
	w.bound(root, nil)
	if !root.bounded {
		return nil
	}
	steady := func(c int) bool { return w.det[c] == 1 || w.det[c] == -1 }
	var out []LimitReach
	for ti := range p.Spec.Probes {
		tg := &p.Spec.Template.Targets[ti]
		blo, bhi := tg.Band()
		if tg.Kind.Derived() || (math.IsInf(blo, -1) && math.IsInf(bhi, 1)) {
			continue
		}
		never, seen := true, false
		all := LimitReach{Target: ti, Condition: -1, Lo: math.Inf(1), Hi: math.Inf(-1)}
		for c := 0; c < nc; c++ {
			if !p.Spec.Applies[ti][c] { // false in the conditions added for a derivative
				continue
			}
			lo, hi, ok := 0.0, 0.0, steady(c)
			if ok {
				lo, hi, ok = w.enclose(ti, c)
			}
			if !ok {
				never = false
				continue
			}
			if (hi < blo && !constraints.Same(hi, blo)) || (lo > bhi && !constraints.Same(lo, bhi)) {
				out = append(out, LimitReach{Target: ti, Always: true, Condition: c, Lo: lo, Hi: hi})
				never = false
				break
			}
			// Strictly inside, with the rounding allowance already in lo
			// and hi: a candidate on the edge might still be refused.
			if lo < blo || hi > bhi {
				never = false
			}
			seen = true
			all.Lo, all.Hi = math.Min(all.Lo, lo), math.Max(all.Hi, hi)
		}
		if never && seen {
			all.Never = true
			out = append(out, all)
		}
	}
	if lim := p.Spec.Template.Limits.SupplyPowerMax; lim > 0 {
		supply := constraints.SupplyPowerLimit
		if root.infeasible && root.viol.Kind == supply {
			out = append(out, LimitReach{Kind: supply, Target: -1, Always: true, Condition: root.viol.Condition, Lo: math.NaN(), Hi: math.NaN()})
		} else if up, ok := w.powerCeiling(steady); ok && up <= lim {
			out = append(out, LimitReach{Kind: supply, Target: -1, Never: true, Condition: -1, Lo: math.NaN(), Hi: up})
		}
	}
	return out
}

// powerCeiling returns an upper bound on the total resistor power, over the
// conditions, of every candidate of the box just bounded: by Tellegen's
// theorem what the sources and op-amp outputs deliver. false when a
// condition has no bound.
func (w *bbWorker) powerCeiling(steady func(int) bool) (float64, bool) {
	nc, top := w.nc, 0.0
	for c := 0; c < nc; c++ {
		if !w.p.Spec.Visible(c) {
			continue
		}
		if !steady(c) {
			return 0, false
		}
		up := 0.0
		for k := range w.srcs {
			lo, _ := padded(w.wlo[k*nc+c], w.whi[k*nc+c])
			up -= lo // absorbed watts: the most delivered is minus the least absorbed
		}
		for k := range w.amps {
			vlo, vhi := padded(w.ovlo[k*nc+c], w.ovhi[k*nc+c])
			ilo, ihi := padded(w.oilo[k*nc+c], w.oihi[k*nc+c])
			_, hi := product(vlo, vhi, ilo, ihi)
			up += hi
		}
		top = math.Max(top, up*w.p.Spec.OnFraction)
	}
	return top, true
}
