package solver

import (
	"encoding/binary"
	"errors"
	"fmt"
	"math"
	"testing"

	"gonum.org/v1/gonum/mat"
)

// fuzzNodes is the small node pool fuzzed circuits draw from: ground, five
// named nodes and the empty name (a terminal left unconnected), so that
// random parts often share nodes, form loops and cutsets, or float.
var fuzzNodes = [...]string{"gnd", "a", "b", "c", "d", "e", ""}

// fuzzValues are the values a fuzzed part may take besides a free-form one:
// the degenerate ones (zero, negative, NaN, infinities, extremes of float64)
// and ordinary ones.
var fuzzValues = [...]float64{
	0, -1, math.NaN(), math.Inf(1), math.Inf(-1), math.MaxFloat64, math.SmallestNonzeroFloat64,
	1e-300, 1e300, 1, 1e3, 4.7e3, 1e6, 3.3, -12, 1e-3, 20e-9,
}

// decodeCircuit turns fuzz bytes into a circuit, five bytes per part:
// kind, three node picks (From/Plus, To/Minus, Out) and a value pick. A
// value pick past the table reads eight more bytes as a raw float64, so any
// value can occur. Names come from a short list so duplicates happen too.
func decodeCircuit(data []byte) Circuit {
	var c Circuit
	if len(data) > 0 && data[0]&0x80 != 0 {
		c.Ground = "a" // a ground name other than the default
	}
	for i := 0; len(data) >= 5 && len(c.Parts) < 12; i++ {
		kind := Kind(data[0] % 5) // 4 is an unknown kind
		n1 := fuzzNodes[int(data[1])%len(fuzzNodes)]
		n2 := fuzzNodes[int(data[2])%len(fuzzNodes)]
		n3 := fuzzNodes[int(data[3])%len(fuzzNodes)]
		pick := int(data[4])
		data = data[5:]
		var v float64
		if pick < len(fuzzValues) {
			v = fuzzValues[pick]
		} else if len(data) >= 8 && pick >= 128 {
			v = math.Float64frombits(binary.LittleEndian.Uint64(data))
			data = data[8:]
		} else {
			v = math.Pow(10, float64(pick%24-12)) // 1e-12 .. 1e11
		}
		name := fmt.Sprintf("P%d", i)
		if pick%29 == 0 {
			name = "P0" // a duplicate (or, for the first part, its own name)
		}
		if pick%31 == 0 {
			name = ""
		}
		p := Part{Name: name, Kind: kind, Value: v}
		if kind == OpAmp {
			p.Plus, p.Minus, p.Out = n1, n2, n3
		} else {
			p.From, p.To = n1, n2
		}
		c.Parts = append(c.Parts, p)
	}
	return c
}

// typedError reports whether err is one of the errors Compile and Analyze
// document: a sentinel, a typed error, or anything wrapping ErrSingular.
func typedError(err error) bool {
	var (
		pe *PartError
		de *DuplicatePartError
		se *ShortedError
		ve *ValueError
		oe *OverflowError
	)
	return errors.Is(err, ErrSingular) || errors.Is(err, ErrEmpty) ||
		errors.As(err, &pe) || errors.As(err, &de) || errors.As(err, &se) || errors.As(err, &ve) ||
		errors.As(err, &oe)
}

// FuzzSolve builds random circuits (random kinds between random nodes of a
// small pool, random values including zero, negative, NaN and huge ones)
// and checks that Compile and Analyze never panic, fail only with the
// solver's typed errors, and that every accepted circuit's solution obeys
// Kirchhoff's laws and Tellegen's theorem.
func FuzzSolve(f *testing.F) {
	for _, s := range [][]byte{
		{0, 1, 0, 0, 10, 1, 1, 0, 0, 13},                 // V across R: the simplest valid network
		{0, 1, 2, 0, 11, 0, 2, 0, 0, 12, 1, 1, 0, 0, 13}, // divider
		{0, 1, 2, 0, 0, 0, 2, 0, 0, 12, 1, 1, 0, 0, 13},  // zero resistor
		{0, 1, 2, 0, 2, 1, 1, 0, 0, 13},                  // NaN resistor
		{1, 1, 0, 0, 13, 1, 1, 0, 0, 14},                 // two sources in parallel: a loop
		{2, 0, 1, 0, 17, 0, 2, 3, 0, 11},                 // current source into an open node
		{3, 1, 2, 3, 0, 0, 3, 0, 0, 11, 1, 1, 0, 0, 13},  // op-amp without feedback
		{3, 1, 2, 3, 0, 0, 3, 2, 0, 11, 0, 2, 0, 0, 11, 1, 1, 0, 0, 13},
		{0, 1, 0, 0, 8, 1, 1, 0, 0, 8},  // 1e300 everywhere
		{0, 1, 0, 0, 7, 1, 1, 0, 0, 13}, // 1e-300 ohms
		{4, 1, 0, 0, 11},                // unknown kind
		{0, 6, 0, 0, 11},                // empty node name
		{},
	} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, data []byte) {
		c := decodeCircuit(data)
		net, cerr := Compile(c)
		if cerr != nil && !typedError(cerr) {
			t.Fatalf("Compile: untyped error %T: %v", cerr, cerr)
		}
		sol, err := Analyze(c)
		if err != nil {
			if !typedError(err) {
				t.Fatalf("Analyze: untyped error %T: %v", err, err)
			}
			if cerr != nil && err.Error() != cerr.Error() {
				t.Fatalf("Analyze and Compile disagree: %v vs %v", err, cerr)
			}
			return
		}
		if cerr != nil {
			t.Fatalf("Analyze accepted a circuit Compile refused: %v", cerr)
		}
		if err := checkLaws(net, sol); err != nil {
			t.Fatal(err)
		}
	})
}

// checkLaws returns an error unless an accepted solution obeys the circuit
// laws (KCL, KVL, each part's branch law, Tellegen's theorem), with
// tolerances scaled to the system's size and magnitudes.
func checkLaws(net *Network, sol *Solution) error {
	edges := net.Edges()
	parts := net.Parts()
	v := make([]float64, len(sol.Nodes))
	for k, nv := range sol.Nodes {
		v[k] = nv.Volts
	}
	cur := make([]float64, len(edges))
	volt := make([]float64, len(edges))
	gmax := 0.0
	for j, e := range edges {
		r := sol.Parts[e.Part]
		cur[j] = r.Amps
		volt[j] = r.Volts
		if e.Kind == OpAmp {
			volt[j] = -r.Volts // the output edge runs ground -> Out
		}
		if e.Kind == Resistor {
			gmax = math.Max(gmax, 1/parts[e.Part].Value)
		}
	}
	all := append(append(append([]float64(nil), v...), cur...), volt...)
	for _, p := range sol.Parts {
		all = append(all, p.Watts)
	}
	for _, x := range append(all, sol.ResistorPower) {
		if math.IsNaN(x) || math.IsInf(x, 0) {
			return fmt.Errorf("accepted solution is not finite: nodes %v, edge currents %v", v, cur)
		}
	}
	n := float64(net.Unknowns())
	// LU with partial pivoting is backward stable: the residual is of order
	// n·ε·‖A‖·‖x‖ (Higham, Accuracy and Stability of Numerical Algorithms,
	// ch. 9; from memory), in current units gmax·max|V| + max|I|. The 64
	// allows for pivot growth (common practice, no source), as in
	// TestRandomNetworks.
	scale := gmax*maxAbs(v) + maxAbs(cur)
	// Gradual underflow: a result in the subnormal range carries an
	// absolute error up to half of 2^-1074 (IEEE 754 subnormal spacing),
	// which a conductance of up to gmax turns into current. (A 9e-308 A
	// source into 1e-12 Ω gives a 9e-320 V node, good to 4 digits.)
	const tiny = 0x1p-1074
	kclTol := 64*n*eps*scale + 64*n*(1+gmax)*tiny

	// KCL: reduced incidence × edge currents = 0 at every non-ground node.
	var kcl mat.VecDense
	kcl.MulVec(net.ReducedIncidence(), mat.NewVecDense(len(cur), cur))
	if r := mat.Norm(&kcl, math.Inf(1)); r > kclTol {
		return fmt.Errorf("KCL residual %g > %g (scale %g)", r, kclTol, scale)
	}
	// KVL: edge voltages = Aᵀ × node voltages.
	var kvl mat.VecDense
	kvl.MulVec(net.Incidence().T(), mat.NewVecDense(len(v), v))
	for j, e := range edges {
		if d := math.Abs(kvl.AtVec(j) - volt[j]); d > 4*eps*maxAbs(v) {
			return fmt.Errorf("KVL edge %d (%s): Aᵀv = %g, edge volts %g", j, parts[e.Part].Name, kvl.AtVec(j), volt[j])
		}
		p := parts[e.Part]
		switch e.Kind {
		case VoltageSource: // branch law: the source holds its value
			// Its MNA row's residual has the same normwise backward-error
			// bound as the KCL rows: the system mixes volts and amps, and
			// elimination carries conductance-sized entries into it. (A
			// 1e-12 V source feeding 1000 A came out 500 ulps off.)
			if d := math.Abs(volt[j] - p.Value); d > kclTol+64*n*eps*maxAbs(v) {
				return fmt.Errorf("source %s holds %g, want %g", p.Name, volt[j], p.Value)
			}
		case CurrentSource: // branch law: the source carries its value
			if cur[j] != p.Value {
				return fmt.Errorf("current source %s carries %g, want %g", p.Name, cur[j], p.Value)
			}
		case OpAmp: // nullor: the inputs sit at one voltage
			ip, _ := net.NodeIndex(p.Plus)
			im, _ := net.NodeIndex(p.Minus)
			if d := math.Abs(v[ip] - v[im]); d > kclTol+64*n*eps*maxAbs(v) { // as for sources
				return fmt.Errorf("op-amp %s inputs differ by %g", p.Name, d)
			}
		}
	}
	// Tellegen's theorem: Σ v_e·i_e = vᵀ·A·i = 0, within max|V| times the
	// KCL residual summed over nodes plus rounding of the products and sum.
	sum, abs := 0.0, 0.0
	for _, p := range sol.Parts {
		sum += p.Watts
		abs += math.Abs(p.Watts)
	}
	// Each product v_e·i_e may underflow too (a 2e-312 V edge carrying
	// 2e-12 A absorbs 5e-324 W where the sources show 0).
	if tol := maxAbs(v)*float64(len(v))*kclTol + 8*float64(len(edges))*(eps*abs+tiny); math.Abs(sum) > tol {
		return fmt.Errorf("Tellegen: Σ watts %g > %g", sum, tol)
	}
	return nil
}

// TestFuzzDecoderReachesLaws guards FuzzSolve against checking nothing: its
// first two seeds must decode to circuits Analyze accepts, so checkLaws runs,
// and checkLaws must catch a solution that breaks KCL.
func TestFuzzDecoderReachesLaws(t *testing.T) {
	for _, s := range [][]byte{
		{0, 1, 0, 0, 10, 1, 1, 0, 0, 13},
		{0, 1, 2, 0, 11, 0, 2, 0, 0, 12, 1, 1, 0, 0, 13},
	} {
		c := decodeCircuit(s)
		sol, err := Analyze(c)
		if err != nil {
			t.Fatalf("seed %v: %v", s, err)
		}
		net, _ := Compile(c)
		if err := checkLaws(net, sol); err != nil {
			t.Fatalf("seed %v: %v", s, err)
		}
	}
	// A divider whose R1 current is off by 1%: KCL at the middle node fails.
	c := decodeCircuit([]byte{0, 1, 2, 0, 11, 0, 2, 0, 0, 12, 1, 1, 0, 0, 13})
	sol := mustAnalyze(t, c)
	sol.Parts[0].Amps *= 1.01
	net, _ := Compile(c)
	if checkLaws(net, sol) == nil {
		t.Error("checkLaws accepted a solution that breaks KCL")
	}
}
