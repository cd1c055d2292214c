package constraints

import (
	"errors"
	"path/filepath"
	"strings"
	"testing"

	"github.com/ohmfit/ohmfit/solver"
)

// TestBadNetworks loads each template in testdata/bad/network, which the
// loader accepts but whose network the solver refuses. As in
// testdata/bad, the first line states the expected "line:col: message";
// Compile must return it as an *Error that still wraps the solver's error.
func TestBadNetworks(t *testing.T) {
	files, err := filepath.Glob(filepath.Join("..", "testdata", "bad", "network", "*.yaml"))
	if err != nil || len(files) == 0 {
		t.Fatalf("no bad networks found (%v)", err)
	}
	for _, f := range files {
		t.Run(filepath.Base(f), func(t *testing.T) {
			want := wantLine(t, f)
			tpl, err := Load(f)
			if err != nil {
				t.Fatalf("Load: %v (network templates must load)", err)
			}
			_, err = Compile(tpl)
			var e *Error
			if !errors.As(err, &e) || !errors.Is(err, solver.ErrSingular) {
				t.Fatalf("got %v, want an *Error wrapping solver.ErrSingular", err)
			}
			if got := strings.TrimPrefix(err.Error(), f+":"); got != want {
				t.Errorf("got  %s\nwant %s:%s", err, f, want)
			}
		})
	}
}

// TestNetworkErrorPlaces checks that each solver error lands on the part at
// fault and says what to change.
func TestNetworkErrorPlaces(t *testing.T) {
	cases := []struct {
		name, parts string
		want        string // prefix of Error() after the file name
	}{
		{"output to ground", `
  - {name: V1, type: voltage-source, plus: in, minus: gnd, volts: 5}
  - {name: R1, type: resistor, from: in, to: m, value: 1k}
  - {name: R2, type: resistor, from: m, to: gnd, value: 1k}
  - {name: U1, type: opamp, plus: in, minus: m, out: gnd}`,
			`6:5: op-amp U1 drives its output straight into ground; connect its out to a node of its own, not to gnd`},
		{"input loop", `
  - {name: V1, type: voltage-source, plus: p, minus: m, volts: 1}
  - {name: R1, type: resistor, from: p, to: gnd, value: 1k}
  - {name: R2, type: resistor, from: o, to: m, value: 1k}
  - {name: U1, type: opamp, plus: p, minus: m, out: o}`,
			`3:5: V1, U1 close a ring of fixed voltages through op-amp inputs`},
		{"input hangs on the other", `
  - {name: V1, type: voltage-source, plus: in, minus: gnd, volts: 1}
  - {name: R1, type: resistor, from: in, to: m, value: 1k}
  - {name: R2, type: resistor, from: m, to: p, value: 1k}
  - {name: RF, type: resistor, from: o, to: m, value: 1k}
  - {name: U1, type: opamp, plus: p, minus: m, out: o}`,
			`7:5: op-amp U1 has no usable feedback: input node p connects to the rest of the circuit only through its other input m; give node p a path to gnd of its own`},
		{"op-amp input floats", `
  - {name: V1, type: voltage-source, plus: in, minus: gnd, volts: 1}
  - {name: RF, type: resistor, from: o, to: in, value: 1k}
  - {name: U1, type: opamp, plus: x, minus: in, out: o}`,
			`5:5: node x is cut off from ground: no chain of resistors or sources reaches ground from it; connect it to the rest of the circuit or to gnd (through a resistor, say), or remove U1`},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			tpl, err := Parse("net.yaml", []byte("ohmfit: 1\nparts:"+c.parts+"\n"))
			if err != nil {
				t.Fatalf("Parse: %v", err)
			}
			_, err = Compile(tpl)
			if err == nil {
				t.Fatal("Compile accepted the network")
			}
			if !errors.Is(err, solver.ErrSingular) {
				t.Errorf("%v does not wrap the solver's error", err)
			}
			if got := strings.TrimPrefix(err.Error(), "net.yaml:"); !strings.HasPrefix(got, c.want) {
				t.Errorf("got  %s\nwant net.yaml:%s", err, c.want)
			}
		})
	}
	// The loader refuses shorted parts and duplicate names itself; a
	// template built in code can still reach the solver with them.
	tpl, err := Parse("net.yaml", []byte("ohmfit: 1\nparts:\n  - {name: R1, type: resistor, from: a, to: gnd, value: 1k}\n"+
		"  - {name: R2, type: resistor, from: a, to: gnd, value: 1k}\n"))
	if err != nil {
		t.Fatal(err)
	}
	for _, c := range []struct {
		err  error
		want string
	}{
		{&solver.ShortedError{Part: "R2", Kind: solver.Resistor, Node: "a"}, "net.yaml:4:5: part R2 is shorted: both ends on node a; connect its two ends"},
		{&solver.ShortedError{Part: "U9", Kind: solver.OpAmp, Node: "a"}, "net.yaml: op-amp U9 has both inputs on node a; connect plus and minus to different nodes"},
		{&solver.DuplicatePartError{Name: "R2"}, `net.yaml: duplicate part name "R2"; give each part its own name`},
		{&solver.PartError{Index: 1, Name: "R2", Reason: "terminal to has no node"}, "net.yaml:4:5: part R2: terminal to has no node"},
		{&solver.ValueError{Part: "R1", Kind: solver.Resistor, Value: 0}, "net.yaml:3:5: resistor R1 has unusable resistance 0"},
		{&solver.IllConditionedError{Cond: 1e20}, "net.yaml: network is ill-conditioned"}, // equal values: no part to blame
		{&solver.SingularError{Unknown: "voltage of node a", Node: "a"}, "net.yaml:3:5: singular network: no pivot for the voltage of node a; the values of R1, R2 (at node a) are too many decades apart"},
		{&solver.SingularError{Unknown: "current of voltage source R2", Part: "R2"}, "net.yaml:4:5: singular network: no pivot for the current of voltage source R2; check the values around R2"},
		{&solver.OverflowError{Quantity: "power of resistor R2", Part: "R2"}, "net.yaml:4:5: the power of resistor R2 is too large to compute"},
		{&solver.OverflowError{Quantity: "voltage of node a", Node: "a"}, "net.yaml:3:5: the voltage of node a is too large to compute"},
	} {
		if got := tpl.NetworkError(c.err).Error(); !strings.HasPrefix(got, c.want) {
			t.Errorf("got  %s\nwant %s", got, c.want)
		}
	}
	if tpl.NetworkError(nil) != nil {
		t.Error("NetworkError(nil) is not nil")
	}
}

// TestDegenerate loads each template in testdata/bad/degenerate, which
// loads and whose network solves, but in which every candidate would score
// the same or none could be scored (no excitation, a goal the free parts
// cannot move, a figure undefined everywhere). Compile must refuse it up
// front, at the part or target at fault, wrapping ErrDegenerate.
func TestDegenerate(t *testing.T) {
	files, err := filepath.Glob(filepath.Join("..", "testdata", "bad", "degenerate", "*.yaml"))
	if err != nil || len(files) == 0 {
		t.Fatalf("no degenerate templates found (%v)", err)
	}
	for _, f := range files {
		t.Run(filepath.Base(f), func(t *testing.T) {
			want := wantLine(t, f)
			tpl, err := Load(f)
			if err != nil {
				t.Fatalf("Load: %v (degenerate templates must load)", err)
			}
			_, err = Compile(tpl)
			var e *Error
			if !errors.As(err, &e) || !errors.Is(err, ErrDegenerate) {
				t.Fatalf("got %v, want an *Error wrapping ErrDegenerate", err)
			}
			if got := strings.TrimPrefix(err.Error(), f+":"); got != want {
				t.Errorf("got  %s\nwant %s:%s", err, f, want)
			}
		})
	}
}
