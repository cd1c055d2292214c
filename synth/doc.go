// Package synth chooses standard resistor values for the free positions of a
// compiled template and ranks the answers.
//
// The entry point is Search(ctx, Problem, *Settings, Method). The default
// method, Rows, enumerates every combination of all positions but one and
// treats the remaining position analytically: with everything else fixed, a
// linear network's response to one resistor is a bilinear function of its
// conductance (the bilinear theorem), obtained exactly from one factorised
// nodal solve and one extra back-substitution (a rank-one update of the nodal
// matrix). Every candidate of that row is then scored without another solve,
// and the candidates that cannot reach the current top list are skipped by
// binary search on the monotone quantities, so the result is proven best over
// the whole space.
//
// An outside program fits a network in four steps (see ExampleSearch):
// constraints.Parse or constraints.Load reads a template,
// constraints.Compile checks its network, NewProblem builds each free
// position's options from the preferred series, and Search ranks them.
// Choose picks the method the way the ohmfit commands do ("auto": branch
// and bound where its bounds apply, else Rows or the heuristic), and
// Result.Status says whether the list is proven. ReachLimits tells, before
// a search, which hard limits no candidate can break or every candidate
// breaks.
//
// synth is not for loading templates (package constraints), for solving
// networks (package solver) or for rendering results (cmd/ohmfit).
package synth
