package synth

import (
	"cmp"

	"github.com/ohmfit/ohmfit/constraints"
)

// candidate is one scored assignment: an option index per free position.
type candidate struct {
	Opt   []int32 // option index per position, in Problem.Domains order
	Error float64
	Power float64
	Parts int
}

// ranker orders candidates by the template's rank keys, then by effective
// values in part order, then by physical parts: a strict total order, so the
// same input always gives the same list whatever the search visited first.
type ranker struct {
	keys    []constraints.RankKey
	domains []Domain
}

// less reports whether a ranks before b.
func (r *ranker) less(a, b *candidate) bool {
	return r.compare(a, b) < 0
}

func (r *ranker) compare(a, b *candidate) int {
	if c := compareKeys(r.keys, a.Error, a.Power, a.Parts, b.Error, b.Power, b.Parts); c != 0 {
		return c
	}
	for i, d := range r.domains {
		oa, ob := &d.Options[a.Opt[i]], &d.Options[b.Opt[i]]
		if oa.Value != ob.Value {
			return cmp.Compare(oa.Value, ob.Value)
		}
	}
	for i := range r.domains {
		if a.Opt[i] != b.Opt[i] {
			return cmp.Compare(a.Opt[i], b.Opt[i])
		}
	}
	return 0
}

// topList keeps the best n candidates seen, in rank order. Its storage grows
// with the candidates kept, never beyond n+1 of them, so asking for a long
// list costs only what is found; once the list is full, offering a
// candidate does not allocate.
type topList struct {
	r     *ranker
	n     int
	items []*candidate // sorted, len <= n
	spare *candidate   // storage recycled from the evicted candidate
	kept  int64        // candidates kept over the list's life, to notice a change
}

func newTopList(r *ranker, n, positions int) *topList {
	t := &topList{r: r, n: n, items: make([]*candidate, 0, min(n+1, 64))}
	// The list allocates at most n+1 candidates over its life: n kept and one spare.
	t.spare = &candidate{Opt: make([]int32, positions)}
	return t
}

// full reports whether the list holds n candidates.
func (t *topList) full() bool { return len(t.items) == t.n }

// worst returns the last candidate of a full list, or nil.
func (t *topList) worst() *candidate {
	if !t.full() {
		return nil
	}
	return t.items[t.n-1]
}

// offer inserts c (copied) if it ranks among the best n. It reports whether
// the candidate was kept.
func (t *topList) offer(c *candidate) bool {
	if t.full() && !t.r.less(c, t.items[t.n-1]) {
		return false
	}
	// Binary search for the insertion point.
	lo, hi := 0, len(t.items)
	for lo < hi {
		m := (lo + hi) / 2
		if t.r.less(t.items[m], c) {
			lo = m + 1
		} else {
			hi = m
		}
	}
	if lo < len(t.items) && t.r.compare(t.items[lo], c) == 0 {
		return false // the same candidate, seen twice
	}
	t.kept++
	slot := t.spare
	t.spare = nil
	if slot == nil {
		slot = &candidate{Opt: make([]int32, len(c.Opt))}
	}
	copy(slot.Opt, c.Opt)
	slot.Error, slot.Power, slot.Parts = c.Error, c.Power, c.Parts
	t.items = append(t.items, nil)
	copy(t.items[lo+1:], t.items[lo:])
	t.items[lo] = slot
	if len(t.items) > t.n {
		t.spare = t.items[t.n]
		t.items[t.n] = nil
		t.items = t.items[:t.n]
	}
	return true
}

// offerUnique is offer for a list that may see one candidate twice with
// numbers that differ by rounding (scored along two different paths): a
// candidate with the same options as a kept one is not kept again, so the
// list's last entry is always the n-th distinct candidate.
func (t *topList) offerUnique(c *candidate) bool {
	if t.full() && !t.r.less(c, t.items[t.n-1]) {
		return false
	}
	for _, m := range t.items {
		if sameOptions(m.Opt, c.Opt) {
			return false
		}
	}
	return t.offer(c)
}

func sameOptions(a, b []int32) bool {
	for i := range a {
		if a[i] != b[i] {
			return false
		}
	}
	return true
}

// frontList keeps the candidates no other kept candidate dominates: at least
// as good in error, power and part count, and better in one (error and power
// compared with the contract's tie tolerances). Of candidates equal in all
// three, the one that ranks first is kept, so the front is deterministic.
type frontList struct {
	r     *ranker
	items []*candidate
}

// dominatesCand reports whether a dominates b.
func dominatesCand(a, b *candidate) bool {
	return dominates(a.Error, a.Power, a.Parts, b.Error, b.Power, b.Parts)
}

// dominates reports whether figures (ae, ap, an) are at least as good as
// (be, bp, bn) in error, power and part count, and better in one, with the
// tie tolerances of each figure (constraints.TieOf).
func dominates(ae, ap float64, an int, be, bp float64, bn int) bool {
	et, pt := constraints.ErrorTie, constraints.PowerTie
	if !et.AtMost(ae, be) || !pt.AtMost(ap, bp) || an > bn {
		return false
	}
	return et.Less(ae, be) || pt.Less(ap, bp) || an < bn
}

// sameObjectives reports whether a and b tie in error, power and part count.
func sameObjectives(a, b *candidate) bool {
	return constraints.Same(a.Error, b.Error) && constraints.SamePower(a.Power, b.Power) && a.Parts == b.Parts
}

// mayTake reports whether offer could keep c: no kept candidate dominates
// it. For a c whose figures are a lower bound (see rowWorker.offer), false
// means no candidate at or above them can enter the front either.
func (f *frontList) mayTake(c *candidate) bool {
	for _, m := range f.items {
		if dominatesCand(m, c) {
			return false
		}
	}
	return true
}

// offer adds a copy of c unless a kept candidate dominates it, and drops the
// kept candidates c dominates.
func (f *frontList) offer(c *candidate) {
	for _, m := range f.items {
		if dominatesCand(m, c) || (sameObjectives(m, c) && !f.r.less(c, m)) {
			return
		}
	}
	kept := f.items[:0]
	for _, m := range f.items {
		if !dominatesCand(c, m) && !sameObjectives(c, m) {
			kept = append(kept, m)
		}
	}
	f.items = append(kept, &candidate{Opt: append([]int32(nil), c.Opt...), Error: c.Error, Power: c.Power, Parts: c.Parts})
}

// compareKeys orders two answers by the rank keys with the contract's tie
// tolerances; 0 when they tie on every key.
func compareKeys(keys []constraints.RankKey, ae, ap float64, an int, be, bp float64, bn int) int {
	for _, k := range keys {
		switch k {
		case constraints.ByError:
			if !constraints.Same(ae, be) {
				return cmp.Compare(ae, be)
			}
		case constraints.ByPower:
			if !constraints.SamePower(ap, bp) {
				return cmp.Compare(ap, bp)
			}
		case constraints.ByParts:
			if an != bn {
				return cmp.Compare(an, bn)
			}
		}
	}
	return 0
}

// ScoreKey is what ranks a finished answer: its error, power, part count and
// effective values in part order. RankMerged-style callers that hold only
// answers (not their option indices) rank with it.
type ScoreKey struct {
	Error, Power float64
	Parts        int
	Values       []float64
}

// CompareScores orders two answers as a search ranks them: the rank keys with
// the contract's tie tolerances, then the effective values in part order
// (unique within a position, so this is a total order on distinct answers).
func CompareScores(keys []constraints.RankKey, a, b ScoreKey) int {
	if c := compareKeys(keys, a.Error, a.Power, a.Parts, b.Error, b.Power, b.Parts); c != 0 {
		return c
	}
	for i := range a.Values {
		if a.Values[i] != b.Values[i] {
			return cmp.Compare(a.Values[i], b.Values[i])
		}
	}
	return 0
}

// DominatesScore reports whether a is at least as good as b in error, power
// and part count, and better in at least one (the Pareto mark of a list).
func DominatesScore(a, b ScoreKey) bool {
	return dominates(a.Error, a.Power, a.Parts, b.Error, b.Power, b.Parts)
}

// paretoMarks says, for each answer of a list, whether no other answer of
// the list dominates it (DominatesScore): the Pareto marks of a search's
// list and of merged shards alike.
func paretoMarks(keys []ScoreKey) []bool {
	marks := make([]bool, len(keys))
	for i := range keys {
		marks[i] = true
		for j := range keys {
			if i != j && DominatesScore(keys[j], keys[i]) {
				marks[i] = false
				break
			}
		}
	}
	return marks
}
