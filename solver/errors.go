package solver

import (
	"errors"
	"fmt"
	"strings"
)

// ErrSingular is wrapped by every error that means the network's equations
// have no unique solution: floating nodes, source loops, current-source
// cutsets, op-amps without feedback, a lost pivot and ill conditioning. Test
// for it with errors.Is.
var ErrSingular = errors.New("solver: network has no unique DC solution")

// ErrNotSolved is returned by Solver.Resistance when there are no valid
// factors to reuse: Solve has not succeeded since the solver was made or a
// value was last set.
var ErrNotSolved = errors.New("solver: no valid factorisation; call Solve first")

// ErrOffLine is returned by Solver.SolveBetween when it cannot give the
// solution by its update: the value is not between the two solutions', their
// determinant signs differ (a pole between them), the part's voltage differs
// in sign at the two ends (rounding of a part that carries almost no
// current), or refinement is on. Solve gives the solution instead.
var ErrOffLine = errors.New("solver: no update along the line between the two solutions applies here; call Solve")

// ErrEmpty is returned by Compile for a circuit without parts.
var ErrEmpty = errors.New("solver: circuit has no parts")

// FloatingError reports a group of nodes with no DC path to ground: nothing
// but op-amp inputs (or nothing at all) ties them to the rest of the circuit.
type FloatingError struct {
	Nodes []string // every node of the group, in node order
}

// Message names the fault in an engineer's words.
func (e *FloatingError) Message() string {
	if len(e.Nodes) == 1 {
		return fmt.Sprintf("node %s is cut off from ground: no chain of resistors or sources reaches ground from it", e.Nodes[0])
	}
	return fmt.Sprintf("nodes %s are cut off from ground: no chain of resistors or sources reaches ground from them", strings.Join(e.Nodes, ", "))
}

// Error is Message with the package's name in front.
func (e *FloatingError) Error() string { return "solver: " + e.Message() }

// Unwrap returns ErrSingular.
func (e *FloatingError) Unwrap() error { return ErrSingular }

// SourceLoopError reports a loop made only of voltage sources and op-amp
// outputs. An ideal op-amp output is a voltage source against ground, so an
// output tied to ground, to another output or to a node held by a voltage
// source closes such a loop.
type SourceLoopError struct {
	Sources []string // the voltage sources and op-amps in the loop, in edge order
}

// Message names the fault in an engineer's words.
func (e *SourceLoopError) Message() string {
	names := strings.Join(e.Sources, ", ")
	if len(e.Sources) == 1 {
		return fmt.Sprintf("op-amp %s drives its output straight into ground", names)
	}
	return fmt.Sprintf("%s close a ring of fixed voltages, nothing but voltage sources and op-amp outputs "+
		"(an ideal op-amp output is a voltage source against ground)", names)
}

// Error is Message with the package's name in front.
func (e *SourceLoopError) Error() string { return "solver: " + e.Message() }

// Unwrap returns ErrSingular.
func (e *SourceLoopError) Unwrap() error { return ErrSingular }

// InputLoopError reports a loop made of voltage sources and op-amp input
// pairs. An ideal op-amp holds its inputs at equal voltage, so sources around
// such a loop either contradict that or leave an output current undetermined
// (for example a voltage source straight across an op-amp's inputs, or two
// op-amps sharing both input nodes).
type InputLoopError struct {
	Parts []string // the voltage sources and op-amps on the loop, in edge order
}

// Message names the fault in an engineer's words.
func (e *InputLoopError) Message() string {
	return fmt.Sprintf("%s close a ring of fixed voltages through op-amp inputs "+
		"(an ideal op-amp's inputs sit at equal voltage)", strings.Join(e.Parts, ", "))
}

// Error is Message with the package's name in front.
func (e *InputLoopError) Error() string { return "solver: " + e.Message() }

// Unwrap returns ErrSingular.
func (e *InputLoopError) Unwrap() error { return ErrSingular }

// CurrentCutsetError reports current sources that feed a group of nodes with
// no other DC path to ground, so their current has nowhere to go (or the
// group's voltage is undetermined).
type CurrentCutsetError struct {
	Sources []string // current sources with one end in the group, in edge order
	Nodes   []string // every node of the group, in node order
}

// Message names the fault in an engineer's words.
func (e *CurrentCutsetError) Message() string {
	return fmt.Sprintf("current from %s has nowhere to go: %s %s no other DC path to ground",
		strings.Join(e.Sources, ", "), plural(len(e.Nodes), "node", "nodes"), nodeList(e.Nodes))
}

// Error is Message with the package's name in front.
func (e *CurrentCutsetError) Error() string { return "solver: " + e.Message() }

// Unwrap returns ErrSingular.
func (e *CurrentCutsetError) Unwrap() error { return ErrSingular }

// OpAmpFeedbackError reports an op-amp whose output cannot bring its inputs
// together: either no feedback path reaches an input (Input empty), or input
// node Input reaches ground only through the other input node Other, so the
// parts between them fix the input difference whatever the output does,
// or (Positive) the output feeds back to plus only. See Compile for the
// exact rules.
type OpAmpFeedbackError struct {
	OpAmp        string
	Input, Other string
	// Positive is set when the output reaches only the plus input, through
	// passive parts: positive feedback, which latches a real op-amp.
	Positive bool
}

// Message names the fault in an engineer's words.
func (e *OpAmpFeedbackError) Message() string {
	if e.Positive {
		return fmt.Sprintf("op-amp %s has only positive feedback: its output reaches its plus input and never its minus input, so a real op-amp latches at a rail", e.OpAmp)
	}
	if e.Input != "" {
		return fmt.Sprintf("op-amp %s has no usable feedback: input node %s connects to the "+
			"rest of the circuit only through its other input %s", e.OpAmp, e.Input, e.Other)
	}
	return fmt.Sprintf("op-amp %s has no feedback path from its output to an input", e.OpAmp)
}

// Error is Message with the package's name in front.
func (e *OpAmpFeedbackError) Error() string { return "solver: " + e.Message() }

// Unwrap returns ErrSingular.
func (e *OpAmpFeedbackError) Unwrap() error { return ErrSingular }

// SingularError reports a pivot lost during factorisation that the graph
// checks did not foresee (for example two op-amps fighting over one node
// through a balanced network). Unknown names the unknown whose column had no
// usable pivot.
type SingularError struct {
	Unknown string // e.g. `node "fb"`, `current of voltage source "V1"`
	// Node or Part is the unknown's owner: the node of a voltage, the
	// source or op-amp of a branch current (the other is "").
	Node, Part string
}

// Message names the fault in an engineer's words.
func (e *SingularError) Message() string {
	return fmt.Sprintf("singular network: no pivot for the %s", e.Unknown)
}

// Error is Message with the package's name in front.
func (e *SingularError) Error() string { return "solver: " + e.Message() }

// Unwrap returns ErrSingular.
func (e *SingularError) Unwrap() error { return ErrSingular }

// IllConditionedError reports an MNA matrix whose condition number is too
// large for the solution to be trusted (values spread over too many decades).
// Like gonum's mat.Condition it carries the estimate.
type IllConditionedError struct {
	Cond float64
}

// Message names the fault in an engineer's words.
func (e *IllConditionedError) Message() string {
	return fmt.Sprintf("network is ill-conditioned (condition number %.3g); "+
		"check for values many decades apart", e.Cond)
}

// Error is Message with the package's name in front.
func (e *IllConditionedError) Error() string { return "solver: " + e.Message() }

// Unwrap returns ErrSingular.
func (e *IllConditionedError) Unwrap() error { return ErrSingular }

// OverflowError reports a solution that does not fit in a float64: values
// near the ends of its range (sources of 1e308 V, say) make a voltage,
// current or power overflow to infinity or NaN. Quantity names the first
// such result, e.g. "voltage of node out".
type OverflowError struct {
	Quantity string
	// Node or Part is where the quantity belongs (both "" for the total
	// resistor power).
	Node, Part string
}

// Message names the fault in an engineer's words.
func (e *OverflowError) Message() string {
	return fmt.Sprintf("the %s is too large to compute; check for values off by many decades", e.Quantity)
}

// Error is Message with the package's name in front.
func (e *OverflowError) Error() string { return "solver: " + e.Message() }

// ValueError reports a value the solver cannot use: a resistance that is
// zero, negative, NaN or infinite, or a source value that is NaN or infinite.
type ValueError struct {
	Part  string
	Kind  Kind
	Value float64
}

// Message names the fault in an engineer's words.
func (e *ValueError) Message() string {
	if e.Kind == Resistor {
		return fmt.Sprintf("resistor %s has unusable resistance %g (must be finite and > 0)", e.Part, e.Value)
	}
	return fmt.Sprintf("%s %s has unusable value %g (must be finite)", e.Kind, e.Part, e.Value)
}

// Error is Message with the package's name in front.
func (e *ValueError) Error() string { return "solver: " + e.Message() }

// DuplicatePartError reports two parts with the same name.
type DuplicatePartError struct {
	Name string
}

// Message names the fault in an engineer's words.
func (e *DuplicatePartError) Message() string {
	return fmt.Sprintf("duplicate part name %q", e.Name)
}

// Error is Message with the package's name in front.
func (e *DuplicatePartError) Error() string { return "solver: " + e.Message() }

// PartError reports a part that cannot be placed in the graph at all: no
// name, an unknown kind, or a terminal without a node name.
type PartError struct {
	Index  int    // position in Circuit.Parts
	Name   string // part name, possibly empty
	Reason string
}

// Message names the fault in an engineer's words.
func (e *PartError) Message() string {
	if e.Name == "" {
		return fmt.Sprintf("part #%d: %s", e.Index+1, e.Reason)
	}
	return fmt.Sprintf("part %s: %s", e.Name, e.Reason)
}

// Error is Message with the package's name in front.
func (e *PartError) Error() string { return "solver: " + e.Message() }

// ShortedError reports a part whose terminals sit on one node: a two-terminal
// part with both ends on Node, or an op-amp with both inputs on Node. Such a
// part does nothing (a resistor) or makes the equations contradictory (a
// source), and is always a template mistake.
type ShortedError struct {
	Part string
	Kind Kind
	Node string
}

// Message names the fault in an engineer's words.
func (e *ShortedError) Message() string {
	if e.Kind == OpAmp {
		return fmt.Sprintf("op-amp %s has both inputs on node %s", e.Part, e.Node)
	}
	return fmt.Sprintf("part %s is shorted: both ends on node %s", e.Part, e.Node)
}

// Error is Message with the package's name in front.
func (e *ShortedError) Error() string { return "solver: " + e.Message() }

func plural(n int, one, many string) string {
	if n == 1 {
		return one
	}
	return many
}

func nodeList(nodes []string) string {
	if len(nodes) == 1 {
		return nodes[0] + " has"
	}
	return strings.Join(nodes, ", ") + " have"
}
