package solver

import (
	"fmt"
	"math/rand/v2"
	"slices"
	"testing"

	"gonum.org/v1/gonum/mat"
)

func TestGraphFacts(t *testing.T) {
	rng := rand.New(rand.NewPCG(5, 6))
	for trial := range 100 {
		c := randomNetwork(rng, 2+rng.IntN(12), trial%2 == 0)
		net, err := Compile(c)
		if err != nil {
			t.Fatalf("trial %d: %v", trial, err)
		}
		edges := net.Edges()
		// One edge per part, each part exactly once.
		if len(edges) != len(c.Parts) {
			t.Fatalf("trial %d: %d edges for %d parts", trial, len(edges), len(c.Parts))
		}
		seen := make([]bool, len(c.Parts))
		for j, e := range edges {
			if seen[e.Part] {
				t.Errorf("trial %d: part %d on two edges", trial, e.Part)
			}
			seen[e.Part] = true
			if e.Kind != c.Parts[e.Part].Kind {
				t.Errorf("trial %d: edge %d kind %v, part kind %v", trial, j, e.Kind, c.Parts[e.Part].Kind)
			}
			// Enumeration order: by kind, then by the caller's order.
			if j > 0 && (edges[j-1].Kind > e.Kind || edges[j-1].Kind == e.Kind && edges[j-1].Part > e.Part) {
				t.Errorf("trial %d: edges %d, %d out of order", trial, j-1, j)
			}
			p := c.Parts[e.Part]
			from, to := p.From, p.To
			if p.Kind == OpAmp {
				from, to = "gnd", p.Out // the output edge runs ground -> Out
			}
			if net.Nodes()[e.From] != from || net.Nodes()[e.To] != to {
				t.Errorf("trial %d: edge %d runs %s -> %s, part %s -> %s", trial, j, net.Nodes()[e.From], net.Nodes()[e.To], from, to)
			}
		}
		// Every column of the full incidence matrix has one +1 (the node the
		// edge leaves) and one -1 (the node it enters); definition of a
		// directed graph's incidence matrix.
		a := net.Incidence()
		r, cols := a.Dims()
		if r != len(net.Nodes()) || cols != len(edges) {
			t.Fatalf("trial %d: incidence %dx%d", trial, r, cols)
		}
		for j := range cols {
			col := mat.Col(nil, j, a)
			plus, minus, zero := 0, 0, 0
			for _, x := range col {
				switch x {
				case 1:
					plus++
				case -1:
					minus++
				case 0:
					zero++
				}
			}
			if plus != 1 || minus != 1 || zero != r-2 || col[edges[j].From] != 1 || col[edges[j].To] != -1 {
				t.Errorf("trial %d: column %d = %v", trial, j, col)
			}
		}
		// Graph theory: the incidence matrix of a connected graph with N
		// nodes has rank N-1, and dropping any one row (ground) keeps it.
		var svd mat.SVD
		if !svd.Factorize(net.ReducedIncidence(), mat.SVDNone) {
			t.Fatal("SVD failed")
		}
		if got := svd.Rank(1e-10); got != r-1 {
			t.Errorf("trial %d: reduced incidence rank %d, want %d", trial, got, r-1)
		}
		// Unknowns: one per non-ground node, voltage source and op-amp (MNA).
		want := r - 1
		for _, p := range c.Parts {
			if p.Kind == VoltageSource || p.Kind == OpAmp {
				want++
			}
		}
		if net.Unknowns() != want {
			t.Errorf("trial %d: %d unknowns, want %d", trial, net.Unknowns(), want)
		}
	}
}

func TestNodeAndPartOrder(t *testing.T) {
	c := Circuit{Ground: "0", Parts: []Part{
		opamp("U1", "p", "m", "o"),
		res("R1", "o", "m", 1e3),
		vsrc("V1", "p", "0", 1),
		res("R2", "m", "0", 1e3),
		isrc("I1", "0", "x", 1e-3),
		res("R3", "x", "0", 1e3),
	}}
	net, err := Compile(c)
	if err != nil {
		t.Fatal(err)
	}
	if got, want := net.Nodes(), []string{"0", "p", "m", "o", "x"}; !slices.Equal(got, want) {
		t.Errorf("Nodes = %v, want %v", got, want)
	}
	var kinds []string
	for _, e := range net.Edges() {
		kinds = append(kinds, net.Parts()[e.Part].Name)
	}
	if want := []string{"R1", "R2", "R3", "V1", "I1", "U1"}; !slices.Equal(kinds, want) {
		t.Errorf("edge order %v, want %v", kinds, want)
	}
	for i, p := range c.Parts {
		if k, ok := net.PartIndex(p.Name); !ok || k != i {
			t.Errorf("PartIndex(%s) = %d, %v", p.Name, k, ok)
		}
	}
	if k, ok := net.NodeIndex("m"); !ok || k != 2 {
		t.Errorf("NodeIndex(m) = %d, %v", k, ok)
	}
	if _, ok := net.NodeIndex("nope"); ok {
		t.Error("NodeIndex found a node that does not exist")
	}
	var names []string
	for i := range net.Unknowns() {
		names = append(names, net.UnknownName(i))
	}
	want := []string{"voltage of node p", "voltage of node m", "voltage of node o", "voltage of node x",
		"current of voltage source V1", "output current of op-amp U1"}
	if !slices.Equal(names, want) {
		t.Errorf("unknowns %q, want %q", names, want)
	}
	if fmt.Sprint(Resistor, VoltageSource, CurrentSource, OpAmp) != "resistor voltage-source current-source opamp" {
		t.Error("Kind.String does not match the template spelling")
	}
}
