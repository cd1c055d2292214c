package solver

import (
	"errors"
	"math"
	"slices"
	"strings"
	"testing"
)

func TestDegenerateCircuits(t *testing.T) {
	inf, nan := math.Inf(1), math.NaN()
	cases := []struct {
		name  string
		parts []Part
		check func(t *testing.T, err error)
	}{
		{"empty", nil, isErr(ErrEmpty)},
		{"part without name", []Part{res("", "a", "gnd", 1)}, as(func(e *PartError) bool { return e.Index == 0 })},
		{"unknown kind", []Part{{Name: "X1", Kind: Kind(9), From: "a", To: "gnd"}}, as(func(e *PartError) bool { return e.Name == "X1" })},
		{"empty node", []Part{res("R1", "a", "", 1)}, as(func(e *PartError) bool { return e.Name == "R1" && strings.Contains(e.Reason, "to") })},
		{"op-amp without out", []Part{opamp("U1", "p", "m", "")}, as(func(e *PartError) bool { return strings.Contains(e.Reason, "out") })},
		{"duplicate name", []Part{res("R1", "a", "gnd", 1), res("R1", "a", "b", 1)}, as(func(e *DuplicatePartError) bool { return e.Name == "R1" })},
		{"shorted resistor", []Part{vsrc("V1", "a", "gnd", 1), res("R1", "a", "a", 1)},
			as(func(e *ShortedError) bool { return e.Part == "R1" && e.Node == "a" })},
		{"shorted source", []Part{vsrc("V1", "gnd", "gnd", 1)}, as(func(e *ShortedError) bool { return e.Part == "V1" && e.Node == "gnd" })},
		{"op-amp inputs on one node", []Part{opamp("U1", "m", "m", "o"), res("R1", "o", "m", 1)},
			as(func(e *ShortedError) bool { return e.Part == "U1" && e.Kind == OpAmp })},
		{"parallel voltage sources", []Part{vsrc("V1", "a", "gnd", 1), vsrc("V2", "a", "gnd", 2), res("R1", "a", "gnd", 1)},
			loop("V1", "V2")},
		{"voltage source ring", []Part{vsrc("V1", "a", "b", 1), vsrc("V4", "a", "gnd", 1), vsrc("V2", "b", "c", 1), res("R1", "c", "gnd", 1), vsrc("V3", "c", "a", 1)},
			loop("V1", "V2", "V3")}, // V4 hangs off the ring and is not named
		{"op-amp output on ground", []Part{opamp("U1", "p", "m", "gnd"), res("R1", "p", "gnd", 1), res("R2", "m", "gnd", 1)},
			loop("U1")},
		{"op-amp output on source node", []Part{vsrc("V1", "o", "gnd", 1), opamp("U1", "gnd", "m", "o"), res("R1", "o", "m", 1), res("R2", "m", "gnd", 1)},
			loop("V1", "U1")},
		{"two op-amp outputs on one node", []Part{opamp("U1", "gnd", "m", "o"), opamp("U2", "gnd", "m", "o"), res("R1", "o", "m", 1), res("R2", "m", "gnd", 1)},
			loop("U1", "U2")},
		{"source across op-amp inputs", []Part{vsrc("V1", "in", "gnd", 1), vsrc("V2", "p", "m", 0.1), res("R1", "in", "p", 1), opamp("U1", "p", "m", "o"), res("R2", "o", "m", 1)},
			as(func(e *InputLoopError) bool { return slices.Equal(e.Parts, []string{"V2", "U1"}) })},
		{"floating pair", []Part{vsrc("V1", "in", "gnd", 1), res("R1", "in", "gnd", 1), res("R2", "a", "b", 1), res("R3", "b", "c", 1)},
			as(func(e *FloatingError) bool { return slices.Equal(e.Nodes, []string{"a", "b", "c"}) })},
		{"open op-amp input", []Part{opamp("U1", "p", "o", "o"), res("RL", "o", "gnd", 1)},
			as(func(e *FloatingError) bool { return slices.Equal(e.Nodes, []string{"p"}) })},
		{"current into open node", []Part{vsrc("V1", "in", "gnd", 1), res("R1", "in", "gnd", 1), isrc("I1", "gnd", "a", 1e-3)},
			as(func(e *CurrentCutsetError) bool {
				return slices.Equal(e.Sources, []string{"I1"}) && slices.Equal(e.Nodes, []string{"a"})
			})},
		{"current sources into isolated group", []Part{isrc("I1", "gnd", "a", 1e-3), res("R1", "a", "b", 1), isrc("I2", "b", "c", 1e-3), res("R2", "c", "gnd", 1)},
			as(func(e *CurrentCutsetError) bool {
				return slices.Equal(e.Sources, []string{"I1", "I2"}) && slices.Equal(e.Nodes, []string{"a", "b"})
			})},
		{"open-loop op-amp", []Part{vsrc("V1", "p", "gnd", 1), res("R1", "m", "gnd", 1), opamp("U1", "p", "m", "o"), res("RL", "o", "gnd", 1)},
			as(func(e *OpAmpFeedbackError) bool { return e.OpAmp == "U1" && e.Input == "" })},
		{"feedback only through a held node", []Part{vsrc("V1", "x", "gnd", 1), res("RF", "o", "x", 1), res("R1", "x", "m", 1), res("R2", "m", "gnd", 1), opamp("U1", "gnd", "m", "o")},
			as(func(e *OpAmpFeedbackError) bool { return e.OpAmp == "U1" })},
		{"input hanging on the other input", []Part{vsrc("V1", "in", "gnd", 1), res("R1", "in", "m", 1), res("RF", "o", "m", 1), res("RH", "h", "m", 1), opamp("U1", "h", "m", "o")},
			as(func(e *OpAmpFeedbackError) bool { return e.OpAmp == "U1" && e.Input == "h" && e.Other == "m" })},
		{"positive feedback only", []Part{vsrc("V1", "in", "gnd", 1), opamp("U1", "p", "in", "o"), res("R1", "o", "p", 1), res("R2", "p", "gnd", 1)},
			as(func(e *OpAmpFeedbackError) bool { return e.OpAmp == "U1" && e.Positive })},
		{"follower on plus", []Part{vsrc("V1", "in", "gnd", 1), opamp("U1", "o", "in", "o"), res("RL", "o", "gnd", 1)},
			as(func(e *OpAmpFeedbackError) bool { return e.OpAmp == "U1" && e.Positive })},
		{"zero resistance", []Part{vsrc("V1", "a", "gnd", 1), res("R1", "a", "gnd", 0)}, badValue("R1")},
		{"negative resistance", []Part{vsrc("V1", "a", "gnd", 1), res("R1", "a", "gnd", -1)}, badValue("R1")},
		{"NaN resistance", []Part{vsrc("V1", "a", "gnd", 1), res("R1", "a", "gnd", nan)}, badValue("R1")},
		{"infinite resistance", []Part{vsrc("V1", "a", "gnd", 1), res("R1", "a", "gnd", inf)}, badValue("R1")},
		{"NaN source", []Part{vsrc("V1", "a", "gnd", nan), res("R1", "a", "gnd", 1)}, badValue("V1")},
		{"infinite current", []Part{isrc("I1", "gnd", "a", -inf), res("R1", "a", "gnd", 1)}, badValue("I1")},
		// The graph checks pass (the output reaches both inputs), but a
		// balanced bridge makes V(a) - V(b) independent of the output
		// (Wheatstone balance), so the nullor row is zero: a numeric singularity.
		{"balanced bridge in the loop", []Part{vsrc("V1", "in", "gnd", 1), res("RI", "in", "o", 1e3), opamp("U1", "a", "b", "o"),
			res("R1", "o", "a", 1e3), res("R2", "a", "gnd", 2e3), res("R3", "o", "b", 1e3), res("R4", "b", "gnd", 2e3)},
			as(func(e *SingularError) bool { return e.Unknown == "output current of op-amp U1" })},
		// 1 Ω against 1 PΩ: solvable in exact arithmetic, not in float64.
		{"values fifteen decades apart", []Part{isrc("I1", "gnd", "a", 1e-3), res("R1", "a", "b", 1), res("R2", "b", "gnd", 1e15)},
			as(func(e *IllConditionedError) bool { return e.Cond > CondLimit })},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			_, err := Analyze(Circuit{Parts: tc.parts})
			if err == nil {
				t.Fatal("no error")
			}
			if !strings.HasPrefix(err.Error(), "solver: ") {
				t.Errorf("message %q lacks the package prefix", err)
			}
			tc.check(t, err)
		})
	}
}

// as checks that err is a *E satisfying ok.
func as[E error](ok func(E) bool) func(*testing.T, error) {
	return func(t *testing.T, err error) {
		t.Helper()
		var e E
		if !errors.As(err, &e) {
			t.Fatalf("error %q (%T) is not a %T", err, err, e)
		}
		if !ok(e) {
			t.Errorf("wrong details: %#v", e)
		}
	}
}

func isErr(target error) func(*testing.T, error) {
	return func(t *testing.T, err error) {
		t.Helper()
		if !errors.Is(err, target) {
			t.Errorf("error %q is not %q", err, target)
		}
	}
}

func loop(names ...string) func(*testing.T, error) {
	return as(func(e *SourceLoopError) bool { return slices.Equal(e.Sources, names) })
}

func badValue(part string) func(*testing.T, error) {
	return as(func(e *ValueError) bool { return e.Part == part })
}

// TestSingularFamily: every error that means "no unique solution" wraps
// ErrSingular, and the others do not.
func TestSingularFamily(t *testing.T) {
	singular := []error{&FloatingError{Nodes: []string{"a"}}, &SourceLoopError{Sources: []string{"V1", "V2"}},
		&InputLoopError{Parts: []string{"V1", "U1"}}, &CurrentCutsetError{Sources: []string{"I1"}, Nodes: []string{"a"}},
		&OpAmpFeedbackError{OpAmp: "U1"}, &SingularError{Unknown: "voltage of node a"}, &IllConditionedError{Cond: 1e15}}
	for _, err := range singular {
		if !errors.Is(err, ErrSingular) {
			t.Errorf("%T does not wrap ErrSingular", err)
		}
	}
	other := []error{&ValueError{Part: "R1"}, &DuplicatePartError{Name: "R1"}, &ShortedError{Part: "R1"}, &PartError{Name: "R1"}}
	for _, err := range other {
		if errors.Is(err, ErrSingular) {
			t.Errorf("%T wraps ErrSingular", err)
		}
	}
}

// TestValidOpAmpTopologies: feedback rules must not reject working circuits.
func TestValidOpAmpTopologies(t *testing.T) {
	cases := []struct {
		name  string
		parts []Part
		node  string
		want  float64
	}{
		// Voltage follower: unity gain (non-inverting gain with Rf = 0, Rg = ∞).
		{"follower", []Part{vsrc("V1", "p", "gnd", 1.25), opamp("U1", "p", "o", "o"), res("RL", "o", "gnd", 1e3)}, "o", 1.25},
		// Composite: U1 drives U2's input, U2's output closes U1's loop;
		// overall an inverting stage -RF/RI around both (U2 is a follower).
		{"composite", []Part{vsrc("V1", "in", "gnd", 0.3), res("RI", "in", "m", 1e3), opamp("U1", "gnd", "m", "x"),
			opamp("U2", "x", "o", "o"), res("RF", "o", "m", 4.7e3)}, "o", -4.7 * 0.3},
		// Feedback through a floating voltage source stacked on the output:
		// V(m) = V(o) - 0.5 = V(in) (nullor), so V(o) = V(in) + 0.5 (KVL).
		// Feedback to both inputs, the negative stronger (1/2 of the
		// output at minus against 1/3 at plus): accepted. Nullor V(p) =
		// V(m) = V(o)/2 and KCL at p, (1 - V(p))/1 + (V(o) - V(p))/2 = 0,
		// give V(o) = 4.
		{"both feedbacks", []Part{vsrc("V1", "in", "gnd", 1), res("R3", "in", "p", 1), res("RP", "o", "p", 2), opamp("U1", "p", "m", "o"),
			res("RF", "o", "m", 1), res("RG", "m", "gnd", 1)}, "o", 4},
		{"stacked source", []Part{vsrc("V1", "in", "gnd", 1), opamp("U1", "in", "m", "o"), vsrc("V2", "o", "m", 0.5), res("R1", "m", "gnd", 1e3)}, "o", 1.5},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			sol := mustAnalyze(t, Circuit{Parts: tc.parts})
			if got := nodeV(t, sol, tc.node); !near(got, tc.want, lawTol) {
				t.Errorf("V(%s) = %.15g, want %.15g", tc.node, got, tc.want)
			}
		})
	}
}
