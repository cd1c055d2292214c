package solver

// Kind is the kind of a part in a circuit.
type Kind int

// The part kinds the solver understands. Edges of the circuit graph are
// enumerated in this order: resistors first, then voltage sources, then
// current sources, then op-amps.
const (
	Resistor      Kind = iota // linear resistor; Value in ohms
	VoltageSource             // ideal independent voltage source; Value in volts, V(From) - V(To)
	CurrentSource             // ideal independent current source; Value in amps, flowing From -> To inside it
	OpAmp                     // ideal op-amp (nullor): V(Plus) = V(Minus), output drives Out against ground
)

// String returns the kind's name as templates spell it.
func (k Kind) String() string {
	switch k {
	case Resistor:
		return "resistor"
	case VoltageSource:
		return "voltage-source"
	case CurrentSource:
		return "current-source"
	case OpAmp:
		return "opamp"
	}
	return "unknown"
}

// Part is one element of a circuit: an edge of the circuit graph.
//
// Two-terminal parts use From and To. For a resistor they give the reference
// direction of its current; for a voltage source From is the + terminal and To
// the - terminal; for a current source the current flows From -> To inside the
// source. An op-amp uses Plus, Minus and Out instead, and has no Value.
type Part struct {
	Name  string
	Kind  Kind
	From  string
	To    string
	Plus  string // op-amp non-inverting input
	Minus string // op-amp inverting input
	Out   string // op-amp output (driven against ground)
	Value float64
}

// Circuit is a plain description of a network: named parts between named
// nodes. It carries no analysis state; Compile turns it into a Network.
type Circuit struct {
	Ground string // name of the reference node; "" means "gnd"
	Parts  []Part
}
