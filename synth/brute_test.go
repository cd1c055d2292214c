package synth_test

import (
	"context"
	"fmt"
	"math"
	"math/big"
	"sort"
	"testing"

	"gonum.org/v1/gonum/mat"

	"github.com/ohmfit/ohmfit/constraints"
	"github.com/ohmfit/ohmfit/solver"
	"github.com/ohmfit/ohmfit/synth"
)

// plainNet is an independent modified-nodal-analysis assembly written
// plainly for the tests: nodes by name, one gonum dense matrix per solve,
// solved with gonum's LU. It shares no code with package solver, so that the
// search is checked against a second implementation of the same circuit laws
// (KCL at every node, the sources' constitutive equations, the nullor).
type plainNet struct {
	t     *constraints.Template
	node  map[string]int // non-ground nodes -> 0..nn-1
	nn    int
	extra map[int]int // part index -> branch-current unknown
	n     int
}

func newPlainNet(t *constraints.Template) *plainNet {
	pn := &plainNet{t: t, node: map[string]int{}, extra: map[int]int{}}
	add := func(name string) {
		if name == t.Ground {
			return
		}
		if _, ok := pn.node[name]; !ok {
			pn.node[name] = len(pn.node)
		}
	}
	for _, p := range t.Parts {
		for _, n := range []string{p.From, p.To, p.Plus, p.Minus, p.Out} {
			if n != "" {
				add(n)
			}
		}
	}
	pn.nn = len(pn.node)
	pn.n = pn.nn
	for i, p := range t.Parts {
		if p.Kind == solver.VoltageSource || p.Kind == solver.OpAmp {
			pn.extra[i] = pn.n
			pn.n++
		}
	}
	return pn
}

func (pn *plainNet) idx(name string) int {
	if name == pn.t.Ground {
		return -1
	}
	return pn.node[name]
}

// matrix assembles the MNA matrix for the given part values.
func (pn *plainNet) matrix(vals []float64) *mat.Dense {
	a := mat.NewDense(pn.n, pn.n, nil)
	addTo := func(r, c int, v float64) {
		if r >= 0 && c >= 0 {
			a.Set(r, c, a.At(r, c)+v)
		}
	}
	for i, p := range pn.t.Parts {
		switch p.Kind {
		case solver.Resistor:
			g := 1 / vals[i]
			f, t := pn.idx(p.From), pn.idx(p.To)
			addTo(f, f, g)
			addTo(t, t, g)
			addTo(f, t, -g)
			addTo(t, f, -g)
		case solver.VoltageSource:
			k := pn.extra[i]
			f, t := pn.idx(p.From), pn.idx(p.To)
			// Branch current k flows + -> - inside the source: it leaves
			// node + ... through the source, i.e. it is drawn out of + (KCL
			// sums currents leaving a node through parts).
			addTo(f, k, 1)
			addTo(t, k, -1)
			addTo(k, f, 1)
			addTo(k, t, -1)
		case solver.OpAmp:
			k := pn.extra[i]
			o := pn.idx(p.Out)
			// Output current k is driven into Out: it enters Out.
			addTo(o, k, -1)
			addTo(k, pn.idx(p.Plus), 1)
			addTo(k, pn.idx(p.Minus), -1)
		}
	}
	return a
}

// rhs is the right-hand side with the sources' values.
func (pn *plainNet) rhs(vals []float64) *mat.VecDense {
	b := mat.NewVecDense(pn.n, nil)
	for i, p := range pn.t.Parts {
		switch p.Kind {
		case solver.VoltageSource:
			b.SetVec(pn.extra[i], vals[i])
		case solver.CurrentSource:
			// The current leaves From through the source and enters To.
			if f := pn.idx(p.From); f >= 0 {
				b.SetVec(f, b.AtVec(f)-vals[i])
			}
			if t := pn.idx(p.To); t >= 0 {
				b.SetVec(t, b.AtVec(t)+vals[i])
			}
		}
	}
	return b
}

type plainSolution struct {
	pn  *plainNet
	x   *mat.VecDense
	lu  *mat.LU
	val []float64
}

func (ps *plainSolution) v(name string) float64 {
	k := ps.pn.idx(name)
	if k < 0 {
		return 0
	}
	return ps.x.AtVec(k)
}

func (ps *plainSolution) amps(i int) float64 {
	p := ps.pn.t.Parts[i]
	switch p.Kind {
	case solver.Resistor:
		return (ps.v(p.From) - ps.v(p.To)) / ps.val[i]
	case solver.CurrentSource:
		return ps.val[i]
	}
	return ps.x.AtVec(ps.pn.extra[i])
}

func (ps *plainSolution) watts(i int) float64 {
	p := ps.pn.t.Parts[i]
	if p.Kind == solver.OpAmp {
		return -ps.v(p.Out) * ps.amps(i)
	}
	return (ps.v(p.From) - ps.v(p.To)) * ps.amps(i)
}

func (pn *plainNet) solve(vals []float64) (*plainSolution, error) {
	a, b := pn.matrix(vals), pn.rhs(vals)
	var lu mat.LU
	lu.Factorize(a)
	var x mat.VecDense
	if err := lu.SolveVecTo(&x, false, b); err != nil {
		return nil, err
	}
	// Two steps of iterative refinement with the residual summed in
	// extended precision (math/big), as the search's final scores are: so
	// that designs that tie exactly (symmetric positions) tie here too and
	// are ordered by the contract's later keys, not by rounding noise.
	n := pn.n
	for range 2 {
		r := mat.NewVecDense(n, nil)
		for i := 0; i < n; i++ {
			sum := new(big.Float).SetPrec(200).SetFloat64(b.AtVec(i))
			for j := 0; j < n; j++ {
				if aij := a.At(i, j); aij != 0 {
					p := new(big.Float).SetPrec(200).SetFloat64(aij)
					p.Mul(p, new(big.Float).SetPrec(200).SetFloat64(x.AtVec(j)))
					sum.Sub(sum, p)
				}
			}
			f, _ := sum.Float64()
			r.SetVec(i, f)
		}
		var d mat.VecDense
		if err := lu.SolveVecTo(&d, false, r); err != nil {
			return nil, err
		}
		x.AddVec(&x, &d)
	}
	return &plainSolution{pn: pn, x: &x, lu: &lu, val: vals}, nil
}

// resistance: inject 1 A into a, out of b, every source zeroed (same matrix).
func (ps *plainSolution) resistance(a, b string) float64 {
	r := mat.NewVecDense(ps.pn.n, nil)
	if k := ps.pn.idx(a); k >= 0 {
		r.SetVec(k, 1)
	}
	if k := ps.pn.idx(b); k >= 0 {
		r.SetVec(k, r.AtVec(k)-1)
	}
	var x mat.VecDense
	if err := ps.lu.SolveVecTo(&x, false, r); err != nil {
		return math.NaN()
	}
	get := func(n string) float64 {
		if k := ps.pn.idx(n); k >= 0 {
			return x.AtVec(k)
		}
		return 0
	}
	return get(a) - get(b)
}

type bruteCand struct {
	opt   []int
	vals  []float64
	err   float64
	power float64
	parts int
}

// bruteForce scores every candidate of the space with plainNet and returns
// the feasible ones in rank order, the contract's rules written out plainly.
func bruteForce(t *testing.T, p *synth.Problem) []bruteCand {
	t.Helper()
	tp := p.Spec.Template
	pn := newPlainNet(tp)
	var out []bruteCand
	k := len(p.Domains)
	idx := make([]int, k)
	for {
		c := bruteCand{opt: append([]int(nil), idx...), vals: make([]float64, k)}
		feasible := true
		for i, d := range p.Domains {
			o := d.Options[idx[i]]
			c.vals[i] = o.Value
			c.parts += o.Count
		}
		points := make([][]float64, len(tp.Targets)) // per sweep-wide target, in its conditions' order
		for ti, dp := range p.Spec.Derived {
			if dp != nil {
				points[ti] = make([]float64, len(dp.Conds))
			}
		}
		for ci, cond := range p.Spec.Conditions {
			vals := append([]float64(nil), cond.Values...)
			for i, d := range p.Domains {
				vals[d.Part] = c.vals[i]
			}
			ps, err := pn.solve(vals)
			if err != nil {
				feasible = false
				break
			}
			pw := 0.0
			for i, part := range tp.Parts {
				if part.Kind == solver.Resistor {
					pw += ps.watts(i)
				}
			}
			pw *= tp.OnFraction // average power of a duty-cycled supply
			// Conditions past the template's own are those added for a
			// derivative (read directly, not through Problem.Visible).
			added := ci >= len(tp.Conditions)
			if added {
				pw = 0 // helper conditions of a derivative carry no power figure
			}
			c.power = math.Max(c.power, pw)
			if constraints.OverPowerLimit(pw, tp.Limits.SupplyPowerMax) {
				feasible = false
			}
			for ti, tg := range tp.Targets {
				if dp := p.Spec.Derived[ti]; dp != nil {
					for k, dc := range dp.Conds {
						if dc == ci {
							points[ti][k] = ps.v(tg.Nodes[0])
						}
					}
					continue
				}
				if !tg.Applies(cond.Name) || added {
					continue
				}
				var v float64
				switch tg.Kind {
				case constraints.Voltage:
					v = ps.v(tg.Nodes[0])
					if len(tg.Nodes) > 1 {
						v -= ps.v(tg.Nodes[1])
					}
				case constraints.Ratio:
					v = ps.v(tg.Nodes[0]) / ps.v(tg.Nodes[1])
				case constraints.Code:
					// An ADC reads V(in) / (ref / 2^bits) codes.
					for _, a := range tp.ADCs {
						if a.Name == tg.ADC {
							v = ps.v(tg.Nodes[0]) * math.Pow(2, float64(a.Bits)) / a.Ref
						}
					}
				case constraints.Current:
					i, _ := tp.Part(tg.Part)
					v = ps.amps(i)
					if tp.Parts[i].Kind == solver.VoltageSource {
						// The contract: a current target on a voltage source reads
						// what it delivers out of plus; the plain MNA's branch
						// current runs plus -> minus inside it.
						v = -v
					}
				case constraints.Power:
					i, _ := tp.Part(tg.Part)
					v = ps.watts(i)
				case constraints.SelfHeating:
					// Temperature rise = P / δ (the dissipation constant's definition).
					i, _ := tp.Part(tg.Part)
					v = ps.watts(i) / tp.Parts[i].Dissipation
				case constraints.Resistance:
					v = ps.resistance(tg.Nodes[0], tg.Nodes[1])
				}
				if !tg.Meets(v) {
					feasible = false
				}
				if tg.HasEquals {
					c.err = math.Max(c.err, tg.GoalError(v))
				}
			}
		}
		for ti, tg := range tp.Targets {
			if p.Spec.Derived[ti] == nil {
				continue
			}
			v := p.Spec.Derived[ti].Value(points[ti])
			if !tg.Meets(v) {
				feasible = false
			}
			if tg.HasEquals {
				c.err = math.Max(c.err, tg.GoalError(v))
			}
		}
		if feasible {
			out = append(out, c)
		}
		// Next combination.
		i := k - 1
		for ; i >= 0; i-- {
			idx[i]++
			if idx[i] < len(p.Domains[i].Options) {
				break
			}
			idx[i] = 0
		}
		if i < 0 {
			break
		}
	}
	keys := tp.Rank
	sort.SliceStable(out, func(a, b int) bool {
		x, y := out[a], out[b]
		for _, key := range keys {
			switch key {
			case constraints.ByError:
				if !constraints.Same(x.err, y.err) {
					return x.err < y.err
				}
			case constraints.ByPower:
				if !constraints.SamePower(x.power, y.power) {
					return x.power < y.power
				}
			case constraints.ByParts:
				if x.parts != y.parts {
					return x.parts < y.parts
				}
			}
		}
		for i := range x.vals {
			if x.vals[i] != y.vals[i] {
				return x.vals[i] < y.vals[i]
			}
		}
		for i := range x.opt {
			if x.opt[i] != y.opt[i] {
				return x.opt[i] < y.opt[i]
			}
		}
		return false
	})
	return out
}

// compareWithBrute runs the search and checks its top list against the
// plain enumeration: the same candidates in the same order, with the same
// error and power within rounding.
func compareWithBrute(t *testing.T, p *synth.Problem, top, workers int) {
	t.Helper()
	compareMethodWithBrute(t, p, top, workers, nil)
}

// compareMethodWithBrute is compareWithBrute for a given method.
func compareMethodWithBrute(t *testing.T, p *synth.Problem, top, workers int, m synth.Method) {
	t.Helper()
	compareWantWithMethod(t, p, bruteForce(t, p), top, workers, m)
}

// compareWantWithMethod checks a method's list against an enumeration's.
func compareWantWithMethod(t *testing.T, p *synth.Problem, want []bruteCand, top, workers int, m synth.Method) {
	t.Helper()
	compareWantWithSettings(t, p, want, &synth.Settings{Top: top, Workers: workers}, m)
}

// compareWantWithSettings is compareWantWithMethod with any settings; set.Top
// must be given.
func compareWantWithSettings(t *testing.T, p *synth.Problem, want []bruteCand, set *synth.Settings, m synth.Method) {
	t.Helper()
	top := set.Top
	res, err := synth.Search(context.Background(), p, set, m)
	if err != nil {
		t.Fatal(err)
	}
	if len(want) > top {
		want = want[:top]
	}
	if len(res.Solutions) != len(want) {
		t.Fatalf("search kept %d answers, enumeration %d (status %v)", len(res.Solutions), len(want), res.Status)
	}
	if len(want) == 0 && res.Status != synth.NoFeasible {
		t.Errorf("status %v, want NoFeasible", res.Status)
	}
	if len(want) > 0 && res.Status != synth.Proven {
		t.Errorf("status %v, want Proven", res.Status)
	}
	for r, w := range want {
		got := res.Solutions[r]
		if fmt.Sprint(got.Values()) != fmt.Sprint(w.vals) {
			t.Errorf("rank %d: search %v, enumeration %v (errors %.6g vs %.6g)", r+1, got.Values(), w.vals, got.Score.Error, w.err)
			continue
		}
		if !close(got.Score.Error, w.err, 1e-9, 1e-12) || !close(got.Score.Power, w.power, 1e-9, 1e-15) {
			t.Errorf("rank %d %v: error %g power %g; enumeration %g %g", r+1, w.vals, got.Score.Error, got.Score.Power, w.err, w.power)
		}
	}
}

func close(a, b, rel, abs float64) bool {
	d := math.Abs(a - b)
	return d <= abs || d <= rel*math.Max(math.Abs(a), math.Abs(b))
}

// bruteFront is the trade-off front of a rank-ordered list written plainly:
// every candidate with error within cap that no other such candidate
// dominates (no worse in error, power and part count, better in one); of
// candidates tied in all three, the first in rank order.
func bruteFront(all []bruteCand, cap float64) []bruteCand {
	le, lt := constraints.ErrorTie.AtMost, constraints.ErrorTie.Less
	ple, plt := constraints.PowerTie.AtMost, constraints.PowerTie.Less
	var in []bruteCand
	for _, c := range all {
		if le(c.err, cap) {
			in = append(in, c)
		}
	}
	var out []bruteCand
	for i, c := range in {
		keep := true
		for j, d := range in {
			if i == j {
				continue
			}
			noWorse := le(d.err, c.err) && ple(d.power, c.power) && d.parts <= c.parts
			better := lt(d.err, c.err) || plt(d.power, c.power) || d.parts < c.parts
			tie := constraints.Same(d.err, c.err) && constraints.SamePower(d.power, c.power) && d.parts == c.parts
			if (noWorse && better) || (tie && j < i) {
				keep = false
				break
			}
		}
		if keep {
			out = append(out, c)
		}
	}
	sort.SliceStable(out, func(i, j int) bool {
		if !constraints.Same(out[i].err, out[j].err) {
			return out[i].err < out[j].err
		}
		return out[i].power < out[j].power
	})
	return out
}

// compareFrontWithBrute checks the search's trade-off front against the
// plain enumeration's.
func compareFrontWithBrute(t *testing.T, p *synth.Problem, cap float64, workers int) {
	t.Helper()
	want := bruteFront(bruteForce(t, p), cap)
	res, err := synth.Search(context.Background(), p, &synth.Settings{Top: 3, Workers: workers, FrontErrorCap: cap}, nil)
	if err != nil {
		t.Fatal(err)
	}
	if len(res.Front) != len(want) {
		t.Fatalf("front has %d answers, enumeration %d", len(res.Front), len(want))
	}
	for i, w := range want {
		if fmt.Sprint(res.Front[i].Values()) != fmt.Sprint(w.vals) {
			t.Errorf("front %d: search %v (%g, %g), enumeration %v (%g, %g)", i, res.Front[i].Values(),
				res.Front[i].Score.Error, res.Front[i].Score.Power, w.vals, w.err, w.power)
		}
	}
}
