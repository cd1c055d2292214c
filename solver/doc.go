// Package solver is the DC nodal solver of ohmfit: it turns a Circuit (named
// resistors, independent voltage and current sources and ideal op-amps between
// named nodes) into a modified nodal analysis (MNA) system and solves it.
//
// It is for two kinds of caller. The command line uses Analyze for a one-shot
// solution of a fully valued network. The synthesis search compiles a network
// once (Compile), then gives each goroutine a Solver that re-stamps, re-factors
// and re-solves the same structure for new part values without allocating.
//
// Graph faults an engineer can make (a node cut off from ground, a ring of voltage
// sources, a current source with nowhere to send its current, an op-amp
// without feedback, a shorted part) are found on the circuit's graph in
// Compile and reported as typed errors that name the nodes and parts, rather
// than left to surface as a singular matrix.
//
// It is not for: reading templates or values with units (package constraints
// does that), choosing preferred values or searching (synth), AC, transient or
// nonlinear analysis, or real op-amp models (offsets, finite gain, rails). The
// op-amp is the ideal nullor: it holds its inputs at equal voltage and drives
// whatever output current that takes. The package imports nothing else of
// ohmfit.
//
// Conventions. Nodes are numbered ground first (index 0), then in order of
// first appearance among the parts. Parts keep the caller's order; every
// per-part index in this package is an index into Circuit.Parts. Each part is
// one edge of the circuit graph: a resistor runs From -> To, a voltage source
// from its + terminal (From) to its - terminal (To), a current source along
// its current (From -> To), and an op-amp's output from ground to Out. Currents
// are positive along the edge; for an op-amp that is the current its output
// drives into Out. Power is absorbed power, so sources and op-amp outputs that
// deliver show negative watts.
package solver
