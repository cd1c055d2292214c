package synth

import (
	"math"
	"math/rand/v2"
	"testing"
)

// tapsYAML is a loaded two-tap ladder from one source: four free parts.
const tapsYAML = `ohmfit: 1
name: taps
parts:
  - {name: V1, type: voltage-source, plus: in, minus: gnd, volts: 12}
  - {name: R1, type: resistor, from: in, to: a}
  - {name: R2, type: resistor, from: a, to: gnd}
  - {name: R3, type: resistor, from: a, to: b}
  - {name: R4, type: resistor, from: b, to: gnd}
  - {name: L, type: resistor, from: b, to: gnd, value: 47k}
targets:
  - {voltage: a, equals: 5}
  - {current: R3, equals: 50u}
choose: {series: E24, min: 100, max: 1M}
`

// A row updated from its line's first (rowWorker.updateLine, the
// Sherman–Morrison formula for one resistor's conductance, i.e. the
// bilinear theorem), itself sometimes updated from its plane's first
// (nextLineFromPlane, the same formula for another resistor), equals the
// row solved afresh: solution, port response,
// the update formula's z and V0, the power coefficients and the part
// values, within the update's rounding allowance (rescoreSlack), on
// networks with one and with two conditions, an op-amp, and a current
// target.
func TestLineUpdateMatchesSolve(t *testing.T) {
	for _, tc := range []struct{ name, yaml string }{
		{"taps", tapsYAML},
		{"difference stage, two conditions", `ohmfit: 1
name: diff
parts:
  - {name: VA, type: voltage-source, plus: a, minus: gnd, volts: 2.0}
  - {name: VB, type: voltage-source, plus: b, minus: gnd, volts: 2.1}
  - {name: VOFF, type: voltage-source, plus: off, minus: gnd, volts: 1.25}
  - {name: R1, type: resistor, from: a, to: m}
  - {name: R2, type: resistor, from: m, to: o}
  - {name: R3, type: resistor, from: b, to: p}
  - {name: R4, type: resistor, from: p, to: off}
  - {name: RL, type: resistor, from: o, to: gnd, value: 10k}
  - {name: U1, type: opamp, plus: p, minus: m, out: o}
conditions:
  - {name: low, set: {VB: 2.02}}
  - {name: high, set: {VB: 2.2}}
targets:
  - {voltage: o, equals: 1.4, when: [low]}
  - {voltage: o, equals: 2.9, when: [high]}
choose: {series: E24, min: 1k, max: 1M}
`},
	} {
		t.Run(tc.name, func(t *testing.T) {
			p := parsedProblem(t, "line.yaml", []byte(tc.yaml))
			set := &Settings{Top: 1}
			st := newRunState(p, set)
			sh := newBBShared(p, set, st, 1)
			w := newRowWorker(p, st.r, set, sh.j, sh.outer)
			n := len(w.cond[0].x0)
			type row struct {
				x, wr             [][]float64
				z, v0, p0, p1, p2 []float64
				vals              [][]float64
			}
			snap := func() row {
				var r row
				for c := range w.cond {
					rc := &w.cond[c]
					r.x = append(r.x, append([]float64(nil), rc.x0...))
					r.wr = append(r.wr, append([]float64(nil), rc.w...))
					r.vals = append(r.vals, append([]float64(nil), rc.vals...))
					r.z, r.v0 = append(r.z, rc.z), append(r.v0, rc.v0)
					r.p0, r.p1, r.p2 = append(r.p0, rc.p0), append(r.p1, rc.p1), append(r.p2, rc.p2)
				}
				return r
			}
			near := func(what string, got, want float64) {
				t.Helper()
				if math.Abs(got-want) > rescoreSlack*math.Max(1e-3, math.Abs(want)) {
					t.Fatalf("%s: updated %.17g, solved %.17g", what, got, want)
				}
			}
			rng := rand.New(rand.NewPCG(7, uint64(len(tc.yaml))))
			updated, planes := 0, 0
			for range 200 {
				for _, i := range sh.outer {
					w.cur[i] = rng.Int32N(int32(len(p.Domains[i].Options)))
				}
				perm := rng.Perm(len(sh.outer))
				k, m := sh.outer[perm[0]], sh.outer[perm[1]]
				ref := rng.IntN(len(w.opts))
				w.line, w.kPart = k, p.Domains[k].Part
				e := w.edges[w.kPart]
				w.ka, w.kb = e.From, e.To
				// Half the rows begin a new line of a plane along m
				// (nextLineFromPlane) before moving along the line.
				viaPlane := rng.IntN(2) == 0
				w.plane = -1
				if viaPlane {
					w.plane, w.mPart = m, p.Domains[m].Part
					e := w.edges[w.mPart]
					w.ma, w.mb = e.From, e.To
				}
				if !w.prepare(w.opts[ref].Value) {
					continue
				}
				if viaPlane {
					w.cur[m] = rng.Int32N(int32(len(p.Domains[m].Options)))
					if !w.nextLineFromPlane() {
						continue
					}
					planes++
				}
				if rng.IntN(4) > 0 {
					w.cur[k] = rng.Int32N(int32(len(p.Domains[k].Options)))
					if !w.updateLine() {
						continue
					}
				}
				updated++
				got := snap()
				w.line, w.plane = -1, -1
				if !w.prepare(w.opts[ref].Value) {
					t.Fatal("a fresh solve failed where the update did not")
				}
				want := snap()
				for c := range w.cond {
					for i := 0; i < n; i++ {
						near("solution", got.x[c][i], want.x[c][i])
						near("port response", got.wr[c][i], want.wr[c][i])
					}
					for i := range got.vals[c] {
						if got.vals[c][i] != want.vals[c][i] {
							t.Fatalf("part %d's value %g, want %g", i, got.vals[c][i], want.vals[c][i])
						}
					}
					near("z", got.z[c], want.z[c])
					near("V0", got.v0[c], want.v0[c])
					scale := math.Abs(want.p0[c]) + math.Abs(want.p1[c]) + math.Abs(want.p2[c])
					for _, q := range [][2]float64{{got.p0[c], want.p0[c]}, {got.p1[c], want.p1[c]}, {got.p2[c], want.p2[c]}} {
						if math.Abs(q[0]-q[1]) > rescoreSlack*scale {
							t.Fatalf("power coefficient: updated %.17g, solved %.17g", q[0], q[1])
						}
					}
				}
			}
			if updated < 100 || planes < 50 {
				t.Fatalf("only %d of 200 rows updated, %d from a plane's first: the check proves little", updated, planes)
			}
		})
	}
}

// The line update's guard (lineMinDen): updateLine refuses a move whose
// determinant ratio d = 1 + ΔG·z is below 1/8, so the row is solved afresh,
// and takes every other. d is computed here apart from the update: by the
// bilinear theorem (rank-one determinant lemma) d = 1 + ΔG·Rp, Rp the
// driving-point resistance across the moved resistor with it in place and
// the source zeroed, written in closed form by series and parallel rules for
// this ladder (tapsYAML).
func TestLineUpdateGuard(t *testing.T) {
	p := parsedProblem(t, "guard.yaml", []byte(tapsYAML))
	par := func(rs ...float64) float64 {
		g := 0.0
		for _, r := range rs {
			g += 1 / r
		}
		return 1 / g
	}
	// Driving-point resistance across each free part, by part index (V1 is 0).
	rp := func(v []float64) map[int]float64 {
		r1, r2, r3, r4, l := v[1], v[2], v[3], v[4], v[5]
		return map[int]float64{
			1: par(r1, r2, r3+par(r4, l)),
			2: par(r1, r2, r3+par(r4, l)),
			3: par(r3, par(r1, r2)+par(r4, l)),
			4: par(r4, l, r3+par(r1, r2)),
		}
	}
	set := &Settings{Top: 1}
	st := newRunState(p, set)
	sh := newBBShared(p, set, st, 1)
	w := newRowWorker(p, st.r, set, sh.j, sh.outer)
	rng := rand.New(rand.NewPCG(3, 5))
	refused, taken := 0, 0
	for range 400 {
		for _, i := range sh.outer {
			w.cur[i] = rng.Int32N(int32(len(p.Domains[i].Options)))
		}
		k := sh.outer[rng.IntN(len(sh.outer))]
		w.line, w.kPart, w.plane = k, p.Domains[k].Part, -1
		e := w.edges[w.kPart]
		w.ka, w.kb = e.From, e.To
		if !w.prepare(w.opts[rng.IntN(len(w.opts))].Value) {
			t.Fatal("solve failed")
		}
		old := append([]float64(nil), w.cond[0].vals...)
		w.cur[k] = rng.Int32N(int32(len(p.Domains[k].Options)))
		rNew := p.Domains[k].Options[w.cur[k]].Value
		d := 1 + (1/rNew-1/old[w.kPart])*rp(old)[w.kPart]
		if math.Abs(d-lineMinDen) < 1e-6 {
			continue // too close to the edge to say which side rounding puts it
		}
		if got, want := w.updateLine(), d >= lineMinDen; got != want {
			t.Fatalf("part %d from %g to %g Ω: d = %g, update taken %v, want %v", w.kPart, old[w.kPart], rNew, d, got, want)
		}
		if d < lineMinDen {
			refused++
		} else {
			taken++
		}
	}
	if refused < 20 || taken < 20 {
		t.Fatalf("%d moves refused, %d taken: the check proves little", refused, taken)
	}
}
