package synth

import (
	"sort"

	"github.com/ohmfit/ohmfit/constraints"
)

// RankMerged ranks answers gathered from the shards of one search as the
// whole search ranks them: by CompareScores with keys (answers that tie on
// everything keep the order given), the first top kept, and each kept
// answer's Pareto mark taken again over the kept list (DominatesScore). It
// returns the indices into sols in rank order and each one's mark.
func RankMerged(keys []constraints.RankKey, sols []ScoreKey, top int) (order []int, pareto []bool) {
	order = make([]int, len(sols))
	for i := range order {
		order[i] = i
	}
	sort.SliceStable(order, func(i, j int) bool { return CompareScores(keys, sols[order[i]], sols[order[j]]) < 0 })
	if len(order) > top {
		order = order[:top]
	}
	shown := make([]ScoreKey, len(order))
	for i, k := range order {
		shown[i] = sols[k]
	}
	return order, paretoMarks(shown)
}
