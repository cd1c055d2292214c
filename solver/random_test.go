package solver

import (
	"fmt"
	"math"
	"math/rand/v2"
	"testing"

	"gonum.org/v1/gonum/mat"
)

const eps = 0x1p-52 // float64 machine epsilon

// randomNetwork returns a connected, solvable network on n non-ground nodes:
// a random spanning tree of resistors (so every node has a DC path to ground
// and no current source can form a cutset), extra random resistors, up to
// three voltage sources that never close a loop, up to three current
// sources, and, when withOpAmp, an inverting stage whose summing node is not
// held by a source (so the nullor constraint is reachable).
func randomNetwork(rng *rand.Rand, n int, withOpAmp bool) Circuit {
	node := func(k int) string {
		if k == 0 {
			return "gnd"
		}
		return fmt.Sprintf("n%d", k)
	}
	ohms := func() float64 { return math.Pow(10, 1+5*rng.Float64()) } // 10 Ω .. 1 MΩ
	pair := func() (int, int) {
		a := rng.IntN(n + 1)
		b := (a + 1 + rng.IntN(n)) % (n + 1)
		return a, b
	}
	var parts []Part
	name := func(prefix string) string { return fmt.Sprintf("%s%d", prefix, len(parts)+1) }
	for k := 1; k <= n; k++ {
		parts = append(parts, res(name("R"), node(k), node(rng.IntN(k)), ohms()))
	}
	for range n / 2 {
		a, b := pair()
		parts = append(parts, res(name("R"), node(a), node(b), ohms()))
	}
	uf := newUnionFind(n + 1)
	for range 1 + rng.IntN(3) {
		a, b := pair()
		if uf.union(a, b) {
			parts = append(parts, vsrc(name("V"), node(a), node(b), 30*rng.Float64()-15))
		}
	}
	for range rng.IntN(4) {
		a, b := pair()
		parts = append(parts, isrc(name("I"), node(a), node(b), 1e-2*rng.Float64()-5e-3))
	}
	if withOpAmp {
		var free []int // nodes not held against ground by voltage sources
		for k := 1; k <= n; k++ {
			if uf.find(k) != uf.find(0) {
				free = append(free, k)
			}
		}
		if len(free) > 0 {
			m := free[rng.IntN(len(free))]
			// Plus must not be tied to m by voltage sources: the nullor
			// would close a loop with them.
			// Nor may Plus reach ground only through m (it would follow m).
			p := rng.IntN(n + 1)
			var cut []string // m and the nodes voltage sources tie to it
			for k := 1; k <= n; k++ {
				if uf.find(k) == uf.find(m) {
					cut = append(cut, node(k))
				}
			}
			for uf.find(p) == uf.find(m) || !groundWithout(parts, node(p), cut) {
				p = rng.IntN(n + 1)
			}
			parts = append(parts,
				res(name("RF"), "out", node(m), ohms()),
				res(name("RL"), "out", node(rng.IntN(n+1)), ohms()),
				opamp(name("U"), node(p), node(m), "out"))
		}
	}
	rng.Shuffle(len(parts), func(i, j int) { parts[i], parts[j] = parts[j], parts[i] })
	return Circuit{Parts: parts}
}

// groundWithout reports whether node from reaches ground through resistors
// and voltage sources without passing any node in cut.
func groundWithout(parts []Part, from string, cut []string) bool {
	seen := map[string]bool{from: true}
	for _, c := range cut {
		seen[c] = true
	}
	stack := []string{from}
	for len(stack) > 0 {
		x := stack[len(stack)-1]
		stack = stack[:len(stack)-1]
		if x == "gnd" {
			return true
		}
		for _, p := range parts {
			if p.Kind != Resistor && p.Kind != VoltageSource {
				continue
			}
			for _, y := range [2][2]string{{p.From, p.To}, {p.To, p.From}} {
				if y[0] == x && !seen[y[1]] {
					seen[y[1]] = true
					stack = append(stack, y[1])
				}
			}
		}
	}
	return false
}

// edgeVectors returns edge currents and edge voltages (V(From) - V(To) along
// the edge, so -V(Out) for an op-amp) in Edges order.
func edgeVectors(s *Solver) (cur, volt []float64) {
	for _, e := range s.Network().Edges() {
		cur = append(cur, s.Amps(e.Part))
		volt = append(volt, s.Voltage(e.From)-s.Voltage(e.To))
	}
	return cur, volt
}

func maxAbs(xs []float64) float64 {
	m := 0.0
	for _, x := range xs {
		m = math.Max(m, math.Abs(x))
	}
	return m
}

func TestRandomNetworks(t *testing.T) {
	rng := rand.New(rand.NewPCG(1, 2))
	for trial := range 300 {
		c := randomNetwork(rng, 2+rng.IntN(14), trial%2 == 1)
		name := fmt.Sprintf("trial%d", trial)
		sol, err := Analyze(c)
		if err != nil {
			t.Fatalf("%s: Analyze: %v\n%+v", name, err, c)
		}
		s := mustSolver(t, c)
		net := s.Network()
		m := len(net.Edges())
		nodes := net.Nodes()
		v := make([]float64, len(nodes))
		for k := range nodes {
			v[k] = s.Voltage(k)
		}
		cur, volt := edgeVectors(s)
		gmax := 0.0
		for _, p := range net.Parts() {
			if p.Kind == Resistor {
				gmax = math.Max(gmax, 1/p.Value)
			}
		}
		// LU with partial pivoting is backward stable: the residual is of
		// order n·ε·‖A‖·‖x‖ (Higham, Accuracy and Stability of Numerical
		// Algorithms, ch. 9; from memory). In current units ‖A‖·‖x‖ is about
		// gmax·max|V| + max|I|; the factor 64 allows for pivot growth
		// (common practice, no source).
		scale := gmax*maxAbs(v) + maxAbs(cur)
		kclTol := 64 * float64(net.Unknowns()) * eps * scale

		// KCL: reduced incidence · edge currents = 0 at every non-ground node.
		var kcl mat.VecDense
		kcl.MulVec(net.ReducedIncidence(), mat.NewVecDense(m, cur))
		if r := mat.Norm(&kcl, math.Inf(1)); r > kclTol {
			t.Errorf("%s: KCL residual %g > %g", name, r, kclTol)
		}
		// KVL: edge voltages = Aᵀ·v, and each voltage source holds its value.
		var kvl mat.VecDense
		kvl.MulVec(net.Incidence().T(), mat.NewVecDense(len(v), v))
		for j, e := range net.Edges() {
			if d := math.Abs(kvl.AtVec(j) - volt[j]); d > 4*eps*maxAbs(v) {
				t.Errorf("%s: KVL edge %d: Aᵀv %g vs %g", name, j, kvl.AtVec(j), volt[j])
			}
			if e.Kind == VoltageSource {
				want := net.Parts()[e.Part].Value
				if d := math.Abs(s.Volts(e.Part) - want); d > 64*float64(net.Unknowns())*eps*maxAbs(v) {
					t.Errorf("%s: source %d holds %g, want %g", name, e.Part, s.Volts(e.Part), want)
				}
			}
		}
		// Tellegen's theorem: Σ v_e·i_e = vᵀ·A·i = 0. Its numerical error is
		// bounded by max|V| times the KCL residual summed over nodes.
		sum, abs := 0.0, 0.0
		for _, p := range sol.Parts {
			sum += p.Watts
			abs += math.Abs(p.Watts)
		}
		if tol := maxAbs(v)*float64(len(v))*kclTol + 8*float64(m)*eps*abs; math.Abs(sum) > tol {
			t.Errorf("%s: Σ watts %g > %g", name, sum, tol)
		}

		// Independent cross-check: the same equations in textbook block form,
		// assembled with gonum and solved by QR. Perturbation bound for linear
		// systems: relative forward error ≤ κ(A) × relative backward error
		// (from memory; Higham ch. 7).
		a, b, names := plainMNA(c)
		xq := qrSolve(t, a, b)
		var lu mat.LU
		lu.Factorize(a)
		xs := make([]float64, len(xq))
		for k, nm := range names {
			idx, ok := net.NodeIndex(nm)
			if !ok {
				t.Fatalf("%s: node %q missing", name, nm)
			}
			xs[k] = s.Voltage(idx)
		}
		k := len(names)
		for _, kind := range []Kind{VoltageSource, OpAmp} {
			for i, p := range c.Parts {
				if p.Kind == kind {
					xs[k] = s.Amps(i)
					k++
				}
			}
		}
		tol := 64 * float64(len(xs)) * eps * lu.Cond() * maxAbs(xq)
		for i := range xs {
			if math.Abs(xs[i]-xq[i]) > tol {
				t.Errorf("%s: unknown %d: LU %.15g vs QR %.15g (tol %g)", name, i, xs[i], xq[i], tol)
			}
		}
	}
}

// TestSuperposition solves random networks with each independent source
// alone (the others zeroed) and checks the sum equals the full solution.
func TestSuperposition(t *testing.T) {
	rng := rand.New(rand.NewPCG(3, 4))
	for trial := range 100 {
		c := randomNetwork(rng, 3+rng.IntN(8), trial%2 == 0)
		s := mustSolver(t, c)
		net := s.Network()
		nn := len(net.Nodes())
		full := make([]float64, nn)
		for k := range full {
			full[k] = s.Voltage(k)
		}
		var sources []int
		for i, p := range c.Parts {
			if p.Kind == VoltageSource || p.Kind == CurrentSource {
				sources = append(sources, i)
			}
		}
		sum := make([]float64, nn)
		for _, alone := range sources {
			for _, i := range sources {
				v := 0.0
				if i == alone {
					v = c.Parts[i].Value
				}
				s.SetValue(i, v)
			}
			if err := s.Solve(); err != nil {
				t.Fatalf("trial %d: %v", trial, err)
			}
			for k := range sum {
				sum[k] += s.Voltage(k)
			}
		}
		// Superposition theorem for linear networks.
		tol := 1e-9 * math.Max(maxAbs(full), 1) // error grows with κ; networks here have κ ≲ 1e6 (common practice, no source)
		for k := range full {
			if math.Abs(sum[k]-full[k]) > tol {
				t.Errorf("trial %d node %s: Σ single-source %g, full %g", trial, net.Nodes()[k], sum[k], full[k])
			}
		}
	}
}
