package variation

import (
	"math"
	"slices"

	"github.com/ohmfit/ohmfit/solver"
)

// worstCase widens every goal of r to its worst-case range, over every
// corner of the varied parts or, with more than st.MaxCornerParts of them,
// over the two corners the linearised sensitivities point to; the rating
// tracker sees every network solved. It then sets each goal's verdict and
// worst error.
func (d *Design) worstCase(s *solver.Solver, r *Report, st *Settings, rt *ratingTracker) {
	w := d.newWorstRun(s, r, rt)
	w.observeNominal()
	if len(w.varying) <= st.MaxCornerParts {
		w.everyCorner(st)
	} else {
		w.linearised()
	}
	t := d.Problem.Template
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

// worstRun is one worst-case run: the report whose goals it widens, and
// the deviations of the corner being solved.
type worstRun struct {
	d       *Design
	s       *solver.Solver
	r       *Report
	rt      *ratingTracker
	varying []int     // the varied parts that vary (Design.varies)
	dev     []float64 // the corner's deviation per varied part
	byCond  [][]int   // the goals of each condition, by index in r.Goals
	sweep   []int     // the goals of sweep-wide targets
	solves  int       // networks solved by visit and the sweep-wide pass
}

func (d *Design) newWorstRun(s *solver.Solver, r *Report, rt *ratingTracker) *worstRun {
	w := &worstRun{d: d, s: s, r: r, rt: rt, dev: make([]float64, len(d.Parts))}
	for j := range d.Parts {
		if d.varies(j) {
			w.varying = append(w.varying, j)
		}
	}
	w.byCond, w.sweep = goalsByCondition(r, len(d.Problem.Conditions))
	return w
}

// observeNominal shows the rating tracker every condition at nominal values
// (the visible ones: the tracker takes no other).
func (w *worstRun) observeNominal() {
	zero := make([]float64, len(w.d.Parts))
	for ci := range w.d.Problem.VisibleConditions() {
		w.d.setValues(w.s, ci, zero)
		if w.s.Solve() == nil {
			w.rt.observe(w.s, ci, zero)
		}
	}
}

// visit solves condition ci at the corner w.dev and widens the goals given.
func (w *worstRun) visit(ci int, goals []int) {
	w.d.setValues(w.s, ci, w.dev)
	w.solves++
	if w.s.Solve() != nil {
		return
	}
	w.rt.observe(w.s, ci, w.dev)
	for _, gi := range goals {
		g := &w.r.Goals[gi]
		x, err := w.d.Problem.Probes[g.Target].Read(w.s)
		if err != nil || math.IsNaN(x) {
			continue
		}
		widen(g, x)
	}
}

// visitSweep widens sweep-wide goal gi at the corner w.dev.
func (w *worstRun) visitSweep(gi int) {
	g := &w.r.Goals[gi]
	if x, err := w.d.derivedAt(w.s, g.Target, w.dev); err == nil && !math.IsNaN(x) {
		widen(g, x)
	}
}

// widen stretches goal g's worst-case range to take in x.
func widen(g *Goal, x float64) {
	g.WorstMin = math.Min(g.WorstMin, x)
	g.WorstMax = math.Max(g.WorstMax, x)
}

// everyCorner solves every corner of the varying parts in every visible
// condition (a derivative's helper conditions have no goals or ratings of
// their own; the sweep-wide pass below solves them where a goal reads them).
func (w *worstRun) everyCorner(st *Settings) {
	d, r, varying := w.d, w.r, w.varying
	r.Method = MethodCorners
	r.Corners = 1 << len(varying)
	for ci := range d.Problem.VisibleConditions() {
		for mask := 0; mask < r.Corners; mask++ {
			d.corner(mask, varying, w.dev)
			w.visit(ci, w.byCond[ci])
		}
	}
	if len(w.sweep) == 0 {
		return
	}
	// A part is the same part at every temperature: each corner holds
	// across all the conditions a sweep-wide target reads. Each corner is
	// solved once in every condition any sweep-wide goal reads, and every
	// such goal is read from those solutions.
	tcrBits := w.sweepTCRBits(st)
	conds := w.sweepConditions()
	points := d.Problem.NewPoints()
	failed := make([]bool, len(d.Problem.Conditions))
	for mask := range w.sweepCorners(tcrBits) {
		w.sweepCorner(mask, tcrBits)
		for _, ci := range conds {
			w.solves++
			failed[ci] = d.pointsAt(w.s, ci, w.dev, points) != nil
		}
		for _, gi := range w.sweep {
			g := &r.Goals[gi]
			if slices.ContainsFunc(d.Problem.Derived[g.Target].Conds, func(ci int) bool { return failed[ci] }) {
				continue // derivedAt gives no value when a condition it reads fails
			}
			if x := points.Derived(g.Target); !math.IsNaN(x) {
				widen(g, x)
			}
		}
	}
	d.tcrDraw = nil
}

// sweepTCRBits is how many bits of a sweep-wide corner's number pick TCR
// signs: when the conditions carry temperatures, a part's TCR sign is a
// corner of its own (high when hot is low when cold), so each part has
// four: tolerance ± times TCR ±. It is 0 (the TCR follows the tolerance's
// sign) without temperatures, or when four per part would exceed
// st.MaxCornerParts doublings.
func (w *worstRun) sweepTCRBits(st *Settings) int {
	if w.d.conditionTemperatures() && 2*len(w.varying) <= st.MaxCornerParts {
		return len(w.varying)
	}
	return 0
}

// sweepCorners is the number of sweep-wide corners with tcrBits TCR bits.
func (w *worstRun) sweepCorners(tcrBits int) int { return w.r.Corners << tcrBits }

// sweepCorner sets w.dev (and, with TCR bits, d.tcrDraw) to sweep-wide
// corner mask: its low bits are the tolerance corner, the bits above them
// each varying part's TCR sign (set: +TCR).
func (w *worstRun) sweepCorner(mask, tcrBits int) {
	d := w.d
	d.corner(mask&(w.r.Corners-1), w.varying, w.dev)
	if tcrBits == 0 {
		return
	}
	if d.tcrDraw == nil {
		d.tcrDraw = make([]float64, len(d.Parts))
	}
	for b, j := range w.varying {
		d.tcrDraw[j] = -d.Parts[j].TCR
		if mask&(1<<(len(w.varying)+b)) != 0 {
			d.tcrDraw[j] = d.Parts[j].TCR
		}
	}
}

// sweepConditions lists, ascending, every condition a sweep-wide goal reads.
func (w *worstRun) sweepConditions() []int {
	var conds []int
	for _, gi := range w.sweep {
		conds = append(conds, w.d.Problem.Derived[w.r.Goals[gi].Target].Conds...)
	}
	slices.Sort(conds)
	return slices.Compact(conds)
}

// linearised solves, for each goal, the two corners its sensitivities
// point to.
func (w *worstRun) linearised() {
	r := w.r
	r.Method = MethodLinearised
	r.Corners = 0
	for gi := range r.Goals {
		g := r.Goals[gi]
		for _, sign := range []float64{1, -1} {
			clear(w.dev)
			for _, j := range w.varying {
				lo, hi := w.d.Bounds(j)
				if sign*g.Sens[j].Absolute >= 0 {
					w.dev[j] = hi
				} else {
					w.dev[j] = lo
				}
			}
			if g.Condition == SweepCondition {
				w.visitSweep(gi)
			} else {
				w.visit(g.Condition, []int{gi})
			}
			r.Corners++
		}
	}
}

// goalsByCondition groups a report's goals (indices into r.Goals) by their
// condition, and lists those of sweep-wide targets apart.
func goalsByCondition(r *Report, nc int) (byCond [][]int, sweep []int) {
	byCond = make([][]int, nc)
	for gi, g := range r.Goals {
		if g.Condition == SweepCondition {
			sweep = append(sweep, gi)
			continue
		}
		byCond[g.Condition] = append(byCond[g.Condition], gi)
	}
	return byCond, sweep
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
