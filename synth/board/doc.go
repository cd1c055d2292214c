// Package board chooses the values of every network on a board at once, so
// that each network meets its own template's hard limits within its goal-error
// cap (`error_max`) and the board as a whole uses as few distinct physical
// part values as possible (`ohmfit board`).
//
// It works in two steps. First every network's designs within its cap are
// listed completely by the exhaustive search (synth.Rows with
// synth.Settings.ErrorMax), up to Settings.MaxDesigns per network. Then the
// selection — one design per network, minimising the number of distinct
// values, ties to the smallest largest error relative to its cap and then the
// lowest total power — is solved exactly by a search over value sets with
// bounds (see Solve); beyond its node budget the best selection found by
// greedy choice and local improvement is kept and the proven lower bound is
// stated.
//
// board is not for loading templates (package constraints), searching one
// network (package synth) or rendering results (cmd/ohmfit).
package board
