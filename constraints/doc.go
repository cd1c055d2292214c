// Package constraints is the problem statement of a synthesis: the network's
// parts, the targets its quantities must meet, the limits it must not exceed,
// the values each free resistor may take, the operating conditions, and how
// candidates are scored and ranked. It loads all of this from a schema-1 YAML
// template (Load, Parse) into a typed model (Template), checking every key and
// value and reporting the first mistake with its file position (Error).
//
// It is not for analysing a network (package solver), searching values
// (package synth), reading or listing preferred values (package eseries), or
// rendering results (the ohmfit command). The examples sub-package embeds
// the sample templates that ship with the binary.
package constraints
