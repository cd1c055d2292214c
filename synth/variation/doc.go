// Package variation answers what a design does with real parts: each
// resistor within its tolerance and drifting with its TCR over an ambient
// range, each source within its own tolerance, each thermistor or RTD within
// its tolerance alone (its model is its temperature dependence). For a fully valued template,
// or a template with one answer of a search filled in, it gives
//
//   - the worst case of every target in every condition: the exact extremes
//     over all tolerance corners while 2^n corners are affordable, beyond
//     that the corners the linearised worst case picks from the
//     sensitivities, each solved exactly (Report.Method says which);
//   - a Monte Carlo run (uniform, or normal with tolerance = 3σ) with mean,
//     σ, the 0.135 % and 99.865 % points and the yield against each target's
//     band;
//   - normalised sensitivities (dX/X)/(dx/x) of every target to every part
//     at nominal values, by the adjoint method (one transposed solve per
//     target and condition), sweep-wide targets by central differences;
//   - each resistor's worst power and voltage against its package's rating
//     (package constraints/ratings), and the cautions those call for;
//   - the bill of materials (BOM, MergeBOM) that every command writes.
//
// Rerank orders a search's answers by worst-case error instead of nominal
// error (`fit --robust`). It re-ranks the answers it is given, normally the
// best few hundred by nominal error; it does not search the whole space and
// so proves nothing about answers outside that list.
//
// It is not for searching values (package synth), for the nodal analysis
// itself (package solver), or for rendering (the ohmfit command).
package variation
