package solver

import (
	"fmt"

	"gonum.org/v1/gonum/mat"
)

// Edge is one edge of the circuit graph: the part with index Part (into
// Circuit.Parts) seen as a directed branch from node From to node To.
// For an op-amp the edge is its output: From is ground and To is Out; its
// inputs draw no current and are not edges.
type Edge struct {
	Part     int
	Kind     Kind
	From, To int // node indices (ground is 0)
}

// Network is a compiled circuit: its graph checked, its nodes numbered and the
// structure of its MNA system (which matrix entries each part stamps) worked
// out. It is immutable after Compile and safe for concurrent use; the values
// live in Solvers.
//
// The MNA unknowns are, in order: the voltages of the non-ground nodes (node
// k is unknown k-1), the currents of the voltage sources in edge order, then
// the output currents of the op-amps in edge order.
type Network struct {
	ground  string
	nodes   []string
	nodeIdx map[string]int
	parts   []Part
	partIdx map[string]int
	edges   []Edge
	nv, no  int // voltage sources, op-amps
	n       int // unknowns

	// Per part, in the caller's order: the edge's ends and, for voltage
	// sources and op-amps, the unknown holding its current (-1 otherwise).
	pKind          []Kind
	pFrom, pTo     []int
	pRow           []int
	resistors      []int // part indices of resistors, for ResistorPower
	resStamps      []resStamp
	vStamps        []vStamp
	iStamps        []iStamp
	base           []float64 // constant entries (source incidences, nullor rows); n*n+1
	nodeUnknownOff int       // = len(nodes)-1, where branch-current unknowns start
	unitMax        float64   // 1 if the matrix has source or nullor entries, else 0
}

// resStamp holds the four flat matrix offsets a resistor's conductance goes
// to. Offsets involving ground point at a scratch slot past the matrix so the
// hot loop needs no branches.
type resStamp struct {
	part           int32
	aa, bb, ab, ba int32
}

// vStamp: a voltage source writes its value into one right-hand-side row.
type vStamp struct{ part, row int32 }

// iStamp: a current source leaves one right-hand-side row and enters another
// (the scratch slot for ground).
type iStamp struct{ part, from, to int32 }

// Compile checks the circuit's graph and builds the structure of its MNA
// system. It does not look at Value fields; Analyze and Solver.Check do.
//
// Errors, in the order they are looked for: ErrEmpty; PartError (no name,
// unknown kind, terminal without a node name); DuplicatePartError;
// ShortedError; SourceLoopError; InputLoopError; CurrentCutsetError or FloatingError for the
// first group of nodes (in node order) without a DC path to ground;
// OpAmpFeedbackError.
//
// DC paths to ground run through resistors, voltage sources and op-amp
// outputs (each a source between ground and Out); current sources and op-amp
// inputs are no path. A floating group touched by a current source with one
// end outside it is a current cutset; otherwise it is floating.
//
// Feedback rules (OpAmpFeedbackError), both needed for an op-amp U's output
// to be able to bring its inputs together:
//
//  1. A change of U's output voltage must reach Plus or Minus. The change
//     spreads from Out to every node stacked on it through voltage sources,
//     then through resistors and floating voltage sources, but never into a
//     node held against ground by a chain of voltage sources and op-amp
//     outputs (ground included): such a node does not move. When the change
//     reaches an input of another op-amp V, V's output (and what is stacked
//     on it) moves too and the change spreads on from there. So feedback may
//     run around several op-amps (a composite amplifier), but not through
//     ground or a source-held node.
//  2. Each input must have a DC path to ground (through resistors, voltage
//     sources or op-amp outputs) that avoids the other input and the nodes
//     tied to it by voltage sources, unless that other input is itself held
//     against ground. An input hanging only on the other one sits at an
//     offset from it that the parts between them fix, whatever the output.
//  3. The change must reach Minus (by the spread of rule 1), or else not
//     reach Plus through resistors and voltage sources alone: a resistive
//     path from Out to Plus with none to Minus is positive feedback only
//     (OpAmpFeedbackError with Positive set). The ideal op-amp has a
//     solution there, but a real one latches at a rail.
//
// Voltage sources and op-amp input pairs forming a loop (InputLoopError) are
// checked before both. The rules are structural: values can still make a
// loop gain of exactly zero (a balanced bridge between the inputs), which
// Solve reports as a *SingularError and Analyze as a singular or
// ill-conditioned network.
func Compile(c Circuit) (*Network, error) {
	if len(c.Parts) == 0 {
		return nil, ErrEmpty
	}
	ground := c.Ground
	if ground == "" {
		ground = "gnd"
	}
	net := &Network{
		ground:  ground,
		nodes:   []string{ground},
		nodeIdx: map[string]int{ground: 0},
		parts:   append([]Part(nil), c.Parts...),
		partIdx: make(map[string]int, len(c.Parts)),
	}
	node := func(name string) int {
		if k, ok := net.nodeIdx[name]; ok {
			return k
		}
		net.nodeIdx[name] = len(net.nodes)
		net.nodes = append(net.nodes, name)
		return len(net.nodes) - 1
	}
	np := len(c.Parts)
	net.pKind = make([]Kind, np)
	net.pFrom = make([]int, np)
	net.pTo = make([]int, np)
	net.pRow = make([]int, np)
	plus := make([]int, np)
	minus := make([]int, np)
	for i, p := range c.Parts {
		if p.Name == "" {
			return nil, &PartError{Index: i, Reason: "has no name"}
		}
		if _, dup := net.partIdx[p.Name]; dup {
			return nil, &DuplicatePartError{Name: p.Name}
		}
		net.partIdx[p.Name] = i
		net.pKind[i] = p.Kind
		net.pRow[i] = -1
		switch p.Kind {
		case Resistor, VoltageSource, CurrentSource:
			from, to := "from", "to"
			if p.Kind == VoltageSource {
				from, to = "plus (from)", "minus (to)"
			}
			if p.From == "" {
				return nil, &PartError{Index: i, Name: p.Name, Reason: "terminal " + from + " has no node"}
			}
			if p.To == "" {
				return nil, &PartError{Index: i, Name: p.Name, Reason: "terminal " + to + " has no node"}
			}
			net.pFrom[i], net.pTo[i] = node(p.From), node(p.To)
			if p.From == p.To {
				return nil, &ShortedError{Part: p.Name, Kind: p.Kind, Node: p.From}
			}
		case OpAmp:
			for _, t := range [...]struct{ name, node string }{{"plus", p.Plus}, {"minus", p.Minus}, {"out", p.Out}} {
				if t.node == "" {
					return nil, &PartError{Index: i, Name: p.Name, Reason: "terminal " + t.name + " has no node"}
				}
			}
			plus[i], minus[i] = node(p.Plus), node(p.Minus)
			net.pFrom[i], net.pTo[i] = 0, node(p.Out)
			if p.Plus == p.Minus {
				return nil, &ShortedError{Part: p.Name, Kind: OpAmp, Node: p.Plus}
			}
		default:
			return nil, &PartError{Index: i, Name: p.Name, Reason: fmt.Sprintf("unknown kind %d", int(p.Kind))}
		}
	}

	// Edges by kind, caller order within a kind.
	for _, k := range [...]Kind{Resistor, VoltageSource, CurrentSource, OpAmp} {
		for i, p := range c.Parts {
			if p.Kind == k {
				net.edges = append(net.edges, Edge{Part: i, Kind: k, From: net.pFrom[i], To: net.pTo[i]})
			}
		}
	}

	g := newGraph(net, plus, minus)
	if err := g.checkSourceLoops(); err != nil {
		return nil, err
	}
	if err := g.checkInputLoops(); err != nil {
		return nil, err
	}
	if err := g.checkFloating(); err != nil {
		return nil, err
	}
	if err := g.checkFeedback(); err != nil {
		return nil, err
	}
	net.buildStamps(plus, minus)
	return net, nil
}

// buildStamps numbers the unknowns and precomputes every flat offset a part
// stamps, plus the constant entries (source incidences and nullor rows), so a
// Solver only adds conductances and writes the right-hand side.
func (net *Network) buildStamps(plus, minus []int) {
	nn := len(net.nodes) - 1
	net.nodeUnknownOff = nn
	for _, e := range net.edges {
		switch e.Kind {
		case VoltageSource:
			net.nv++
		case OpAmp:
			net.no++
		}
	}
	n := nn + net.nv + net.no
	net.n = n
	if n > nn {
		net.unitMax = 1
	}
	scratch := n * n
	row := func(node int) int { return node - 1 } // ground -> -1
	off := func(r, c int) int {
		if r < 0 || c < 0 {
			return scratch
		}
		return r*n + c
	}
	rhsOff := func(node int) int {
		if node == 0 {
			return n
		}
		return node - 1
	}
	net.base = make([]float64, n*n+1)
	vi, oi := 0, 0
	for _, e := range net.edges {
		a, b := row(e.From), row(e.To)
		switch e.Kind {
		case Resistor:
			net.resistors = append(net.resistors, e.Part)
			net.resStamps = append(net.resStamps, resStamp{
				part: int32(e.Part),
				aa:   int32(off(a, a)), bb: int32(off(b, b)),
				ab: int32(off(a, b)), ba: int32(off(b, a)),
			})
		case VoltageSource:
			r := nn + vi
			vi++
			net.pRow[e.Part] = r
			// Column: the branch current leaves From and enters To (KCL rows).
			// Row: V(From) - V(To) = value.
			net.base[off(a, r)] += 1
			net.base[off(b, r)] -= 1
			net.base[off(r, a)] += 1
			net.base[off(r, b)] -= 1
			net.vStamps = append(net.vStamps, vStamp{part: int32(e.Part), row: int32(r)})
		case CurrentSource:
			net.iStamps = append(net.iStamps, iStamp{part: int32(e.Part), from: int32(rhsOff(e.From)), to: int32(rhsOff(e.To))})
		case OpAmp:
			r := nn + net.nv + oi
			oi++
			net.pRow[e.Part] = r
			// The output edge enters Out from ground; the nullor row forces
			// V(Plus) - V(Minus) = 0 and no input current enters any KCL row.
			net.base[off(b, r)] -= 1
			net.base[off(r, row(plus[e.Part]))] += 1
			net.base[off(r, row(minus[e.Part]))] -= 1
		}
	}
}

// Ground returns the name of the reference node (node 0).
func (net *Network) Ground() string { return net.ground }

// Nodes returns the node names: ground first, then in order of first
// appearance in the parts (From, To; or Plus, Minus, Out).
func (net *Network) Nodes() []string { return append([]string(nil), net.nodes...) }

// NodeIndex returns the index of the named node.
func (net *Network) NodeIndex(name string) (int, bool) {
	k, ok := net.nodeIdx[name]
	return k, ok
}

// Parts returns a copy of the parts in the caller's order.
func (net *Network) Parts() []Part { return append([]Part(nil), net.parts...) }

// PartIndex returns the index (in the caller's order) of the named part.
func (net *Network) PartIndex(name string) (int, bool) {
	k, ok := net.partIdx[name]
	return k, ok
}

// Unknowns returns the size of the MNA system.
func (net *Network) Unknowns() int { return net.n }

// UnknownName describes MNA unknown i in words, for messages. It panics if i
// is out of range.
func (net *Network) UnknownName(i int) string {
	nn := net.nodeUnknownOff
	switch {
	case i < 0 || i >= net.n:
		panic(fmt.Sprintf("solver: unknown %d out of range [0,%d)", i, net.n))
	case i < nn:
		return fmt.Sprintf("voltage of node %s", net.nodes[i+1])
	default:
		for p, r := range net.pRow {
			if r == i {
				if net.pKind[p] == OpAmp {
					return "output current of op-amp " + net.parts[p].Name
				}
				return "current of voltage source " + net.parts[p].Name
			}
		}
	}
	panic("solver: unknown without an owner") // unreachable: every branch row has a part
}

// unknownOwner returns the node of voltage unknown i, or the part whose
// branch current unknown i is.
func (net *Network) unknownOwner(i int) (node, part string) {
	if i >= 0 && i < net.nodeUnknownOff {
		return net.nodes[i+1], ""
	}
	for p, r := range net.pRow {
		if r == i {
			return "", net.parts[p].Name
		}
	}
	return "", ""
}

// Edges returns the graph's edges: resistors, then voltage sources, then
// current sources, then op-amps, each kind in the caller's order.
func (net *Network) Edges() []Edge { return append([]Edge(nil), net.edges...) }

// Incidence returns the full node-edge incidence matrix (rows: nodes in
// Nodes order, ground first; columns: edges in Edges order). Entry (k, e) is
// +1 where edge e leaves node k, -1 where it enters it, 0 otherwise, so A·i
// is the net current leaving each node (KCL: A·i = 0) and Aᵀ·v gives the
// edge voltages V(From) - V(To) (KVL). Each call returns a new matrix. The
// solver does not use it (it stamps from the edges directly); it is the
// graph in the textbook form, for checking a solution by KCL and KVL
// independently of the solver, as the tests do.
func (net *Network) Incidence() *mat.Dense {
	a := mat.NewDense(len(net.nodes), len(net.edges), nil)
	for j, e := range net.edges {
		a.Set(e.From, j, 1)
		a.Set(e.To, j, -1)
	}
	return a
}

// ReducedIncidence returns Incidence without the ground row: its KCL rows are
// the independent ones.
func (net *Network) ReducedIncidence() *mat.Dense {
	full := net.Incidence()
	r := mat.NewDense(len(net.nodes)-1, len(net.edges), nil)
	r.Copy(full.Slice(1, len(net.nodes), 0, len(net.edges)))
	return r
}
