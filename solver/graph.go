package solver

// This file holds the graph checks Compile runs before any matrix exists, so
// that a degenerate circuit is named in an engineer's words rather than found
// as a zero pivot.

// unionFind is a disjoint-set forest over node indices.
type unionFind []int

func newUnionFind(n int) unionFind {
	u := make(unionFind, n)
	for i := range u {
		u[i] = i
	}
	return u
}

func (u unionFind) find(x int) int {
	for u[x] != x {
		u[x] = u[u[x]] // path halving
		x = u[x]
	}
	return x
}

// union joins the sets of a and b and reports whether they were apart.
func (u unionFind) union(a, b int) bool {
	ra, rb := u.find(a), u.find(b)
	if ra == rb {
		return false
	}
	u[rb] = ra
	return true
}

type halfEdge struct{ to, edge int }

// graph is the scratch state of the checks.
type graph struct {
	net         *Network
	plus, minus []int        // op-amp inputs per part index
	forced      [][]halfEdge // forest of voltage-source and op-amp-output edges
	held        []bool       // node held against ground by forced edges
}

func newGraph(net *Network, plus, minus []int) *graph {
	return &graph{net: net, plus: plus, minus: minus, forced: make([][]halfEdge, len(net.nodes))}
}

// isForced reports whether an edge fixes the voltage between its ends: a
// voltage source, or an op-amp output (a source between ground and Out).
func isForced(k Kind) bool { return k == VoltageSource || k == OpAmp }

// checkSourceLoops finds the first loop of forced edges, in edge order, and
// names the sources on it. It leaves the forced forest in g.forced.
func (g *graph) checkSourceLoops() error {
	net := g.net
	uf := newUnionFind(len(net.nodes))
	for j, e := range net.edges {
		if !isForced(e.Kind) {
			continue
		}
		if e.From == e.To { // op-amp output on ground
			return &SourceLoopError{Sources: []string{net.parts[e.Part].Name}}
		}
		if !uf.union(e.From, e.To) {
			return &SourceLoopError{Sources: g.loopNames(g.forced, e.From, e.To, j)}
		}
		g.forced[e.From] = append(g.forced[e.From], halfEdge{e.To, j})
		g.forced[e.To] = append(g.forced[e.To], halfEdge{e.From, j})
	}
	// Nodes held against ground: the forced tree that contains ground.
	g.held = make([]bool, len(net.nodes))
	g.walkForced(0, -1, func(k int) { g.held[k] = true })
	return nil
}

// checkInputLoops treats each op-amp's input pair as what the nullor makes
// it, a 0 V constraint that carries no current, and finds the first loop of
// such pairs and voltage sources. Around such a loop the sources' values
// either contradict the inputs' equality or leave an output current
// undetermined. (Op-amp outputs do not count: their voltage is free.)
func (g *graph) checkInputLoops() error {
	net := g.net
	uf := newUnionFind(len(net.nodes))
	adj := make([][]halfEdge, len(net.nodes))
	for j, e := range net.edges {
		a, b := e.From, e.To
		switch e.Kind {
		case VoltageSource:
		case OpAmp:
			a, b = g.plus[e.Part], g.minus[e.Part]
		default:
			continue
		}
		if !uf.union(a, b) {
			return &InputLoopError{Parts: g.loopNames(adj, a, b, j)}
		}
		adj[a] = append(adj[a], halfEdge{b, j})
		adj[b] = append(adj[b], halfEdge{a, j})
	}
	return nil
}

// loopNames returns, in edge order, the names of the parts on the loop that
// edge closing (between a and b) makes with the forest adj.
func (g *graph) loopNames(adj [][]halfEdge, a, b, closing int) []string {
	in := map[int]bool{closing: true}
	for _, p := range forestPath(adj, a, b) {
		in[p] = true
	}
	var names []string
	for k, e := range g.net.edges {
		if in[k] {
			names = append(names, g.net.parts[e.Part].Name)
		}
	}
	return names
}

// forestPath returns the edges of the path from a to b in the forest adj
// (they are known to be connected).
func forestPath(adj [][]halfEdge, a, b int) []int {
	prev := make([]halfEdge, len(adj))
	seen := make([]bool, len(adj))
	seen[a] = true
	queue := []int{a}
	for len(queue) > 0 {
		x := queue[0]
		queue = queue[1:]
		for _, h := range adj[x] {
			if !seen[h.to] {
				seen[h.to] = true
				prev[h.to] = halfEdge{x, h.edge}
				queue = append(queue, h.to)
			}
		}
	}
	var path []int
	for x := b; x != a; x = prev[x].to {
		path = append(path, prev[x].edge)
	}
	return path
}

// walkForced visits every node reachable from start over forced edges other
// than the edge skip.
func (g *graph) walkForced(start, skip int, visit func(int)) {
	seen := map[int]bool{start: true}
	stack := []int{start}
	for len(stack) > 0 {
		x := stack[len(stack)-1]
		stack = stack[:len(stack)-1]
		visit(x)
		for _, h := range g.forced[x] {
			if h.edge != skip && !seen[h.to] {
				seen[h.to] = true
				stack = append(stack, h.to)
			}
		}
	}
}

// checkFloating joins nodes over every edge that carries a DC path
// (resistors, voltage sources, op-amp outputs) and reports the first group,
// in node order, that does not contain ground.
func (g *graph) checkFloating() error {
	net := g.net
	uf := newUnionFind(len(net.nodes))
	for _, e := range net.edges {
		if e.Kind != CurrentSource {
			uf.union(e.From, e.To)
		}
	}
	root := uf.find(0)
	for k := 1; k < len(net.nodes); k++ {
		r := uf.find(k)
		if r == root {
			continue
		}
		var nodes []string
		for m := k; m < len(net.nodes); m++ {
			if uf.find(m) == r {
				nodes = append(nodes, net.nodes[m])
			}
		}
		var sources []string
		for _, e := range net.edges {
			if e.Kind == CurrentSource && (uf.find(e.From) == r) != (uf.find(e.To) == r) {
				sources = append(sources, net.parts[e.Part].Name)
			}
		}
		if len(sources) > 0 {
			return &CurrentCutsetError{Sources: sources, Nodes: nodes}
		}
		return &FloatingError{Nodes: nodes}
	}
	return nil
}

// checkFeedback applies the rule documented on Compile to every op-amp.
func (g *graph) checkFeedback() error {
	net := g.net
	nn := len(net.nodes)
	// driven[p]: nodes whose voltage follows op-amp p's output, i.e. the
	// forced subtree hanging from Out once p's own output edge is removed.
	driven := map[int][]int{}
	inputsAt := make([][]int, nn)
	var opamps []int
	for j, e := range net.edges {
		if e.Kind != OpAmp {
			continue
		}
		p := e.Part
		opamps = append(opamps, p)
		g.walkForced(e.To, j, func(k int) { driven[p] = append(driven[p], k) })
		inputsAt[g.plus[p]] = append(inputsAt[g.plus[p]], p)
		inputsAt[g.minus[p]] = append(inputsAt[g.minus[p]], p)
	}
	if len(opamps) == 0 {
		return nil
	}
	// Passive neighbours: resistors and voltage sources, both ways.
	adj := make([][]int, nn)
	for _, e := range net.edges {
		if e.Kind == Resistor || e.Kind == VoltageSource {
			adj[e.From] = append(adj[e.From], e.To)
			adj[e.To] = append(adj[e.To], e.From)
		}
	}
	// DC paths for the input test below: the passive edges plus every op-amp
	// output (an edge from ground to Out).
	dc := make([][]int, nn)
	for k := range adj {
		dc[k] = append([]int(nil), adj[k]...)
	}
	for _, e := range net.edges {
		if e.Kind == OpAmp {
			dc[e.From] = append(dc[e.From], e.To)
			dc[e.To] = append(dc[e.To], e.From)
		}
	}
	// Groups of nodes tied together by voltage sources alone.
	vuf := newUnionFind(nn)
	for _, e := range net.edges {
		if e.Kind == VoltageSource {
			vuf.union(e.From, e.To)
		}
	}
	vgroup := map[int][]int{}
	for k := range nn {
		vgroup[vuf.find(k)] = append(vgroup[vuf.find(k)], k)
	}
	for _, u := range opamps {
		name := net.parts[u].Name
		// A change of the output must reach one of its own inputs, through
		// other stages if need be, or nothing closes the loop.
		reached := g.moves(u, driven, inputsAt, adj, true)
		if !reached[g.plus[u]] && !reached[g.minus[u]] {
			return &OpAmpFeedbackError{OpAmp: name}
		}
		// Rule 3: a change of the output reaching Plus through passive
		// parts alone, and Minus by no path at all, is feedback of one
		// sign only: positive (a resistive path passes a change on with
		// a factor from 0 to 1). The ideal op-amp still has a solution,
		// but a real one latches at a rail.
		if !reached[g.minus[u]] && g.moves(u, driven, inputsAt, adj, false)[g.plus[u]] {
			return &OpAmpFeedbackError{OpAmp: name, Positive: true}
		}
		// An input that reaches ground only through the other input (or
		// nodes tied to it by voltage sources, which move with it) hangs on
		// it: the parts in between fix the input difference whatever the
		// output does. A held input does not move, so it cannot be hung on.
		p, m := g.plus[u], g.minus[u]
		for _, in := range [...][2]int{{p, m}, {m, p}} {
			if g.held[in[1]] {
				continue
			}
			if !reachesWithout(dc, in[0], 0, vgroup[vuf.find(in[1])]) {
				return &OpAmpFeedbackError{OpAmp: name, Input: net.nodes[in[0]], Other: net.nodes[in[1]]}
			}
		}
	}
	return nil
}

// reachesWithout reports whether node to can be reached from node from over
// adj without passing through any node of cut.
func reachesWithout(adj [][]int, from, to int, cut []int) bool {
	seen := make([]bool, len(adj))
	for _, k := range cut {
		seen[k] = true
	}
	seen[from] = true
	stack := []int{from}
	for len(stack) > 0 {
		x := stack[len(stack)-1]
		stack = stack[:len(stack)-1]
		if x == to {
			return true
		}
		for _, y := range adj[x] {
			if !seen[y] {
				seen[y] = true
				stack = append(stack, y)
			}
		}
	}
	return false
}

// moves returns the nodes a change of op-amp u's output moves, by the
// spread of rule 1; through other op-amps only when stages is true.
func (g *graph) moves(u int, driven map[int][]int, inputsAt [][]int, adj [][]int, stages bool) []bool {
	moved := make([]bool, len(g.net.nodes))
	triggered := map[int]bool{u: true}
	var queue []int
	push := func(k int) {
		if !moved[k] {
			moved[k] = true
			queue = append(queue, k)
		}
	}
	for _, k := range driven[u] {
		push(k)
	}
	for len(queue) > 0 {
		x := queue[0]
		queue = queue[1:]
		for _, p := range inputsAt[x] {
			if stages && !triggered[p] {
				triggered[p] = true
				for _, k := range driven[p] {
					push(k)
				}
			}
		}
		for _, y := range adj[x] {
			if !g.held[y] {
				push(y)
			}
		}
	}
	return moved
}
