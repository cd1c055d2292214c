package synth

import (
	"fmt"
	"math"
)

// MethodNames are the method names Choose accepts, as the CLI's --method
// flag spells them.
var MethodNames = []string{"auto", "bound", "exhaustive", "heuristic"}

// Choose returns the method a name asks for, and for "auto" decides which:
// branch and bound where its box bounds cover every goal and the space is
// more than one of its leaves (below that it would only run the rows method
// once); the rows method where its row budget allows; the heuristic
// otherwise. A search split into shards (s.Shards > 1) must cover its part,
// so auto never picks the heuristic for one. Choose may raise s.MaxRows for
// a method that must cover the space. note, when not empty, is a sentence
// for the user: that auto fell back to the heuristic and why, or that the
// branch and bound asked for cannot bound a goal.
//
// Every command that searches calls Choose, so the rule lives here only.
func Choose(name string, p *Problem, s *Settings) (m Method, note string, err error) {
	switch name {
	case "heuristic":
		return Relax{}, "", nil
	case "bound":
		if !(BranchBound{}).Applies(p) {
			return BranchBound{}, "a sweep-wide goal (linearity, sensitivity or resolution) has no box bound: " +
				"branch and bound rules out boxes and rows only by what it can bound (the other goals, the hard limits " +
				"on single conditions, power), so it scores more candidates; nothing is ruled out without proof", nil
		}
		return BranchBound{}, "", nil
	case "exhaustive":
		s.MaxRows = math.Inf(1)
		return Rows{}, "", nil
	case "auto", "":
	default:
		return nil, "", errorf(nil, "unknown method %q", name)
	}
	rows := RowCount(p)
	switch {
	case BranchBound{}.Applies(p) && (rows > autoBoundRows || s.Shards > 1):
		return BranchBound{}, "", nil
	case s.Shards > 1:
		s.MaxRows = math.Inf(1)
		return Rows{}, "", nil
	case rows > DefaultMaxRows && p.Space() <= MaxSpace:
		return Relax{}, fmt.Sprintf("%.3g rows is too many to prove the best answer (budget %.3g), and a sweep-wide goal has no box bound; searching heuristically",
			rows, float64(DefaultMaxRows)), nil
	}
	return Rows{}, "", nil
}

// autoBoundRows is the row count above which auto prefers branch and bound
// to the rows method: below it the space is about one of its leaves.
const autoBoundRows = 2048
