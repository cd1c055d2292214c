package synth

import (
	"cmp"

	"github.com/ohmfit/ohmfit/constraints"
)

// Candidate is one scored assignment: an option index per free position.
type Candidate struct {
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
func (r *ranker) less(a, b *Candidate) bool {
	return r.compare(a, b) < 0
}

func (r *ranker) compare(a, b *Candidate) int {
	for _, k := range r.keys {
		switch k {
		case constraints.ByError:
			if !constraints.Same(a.Error, b.Error) {
				return cmp.Compare(a.Error, b.Error)
			}
		case constraints.ByPower:
			if !constraints.Same(a.Power, b.Power) {
				return cmp.Compare(a.Power, b.Power)
			}
		case constraints.ByParts:
			if a.Parts != b.Parts {
				return cmp.Compare(a.Parts, b.Parts)
			}
		}
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
	items []*Candidate // sorted, len <= n
	spare *Candidate   // storage recycled from the evicted candidate
}

func newTopList(r *ranker, n, positions int) *topList {
	t := &topList{r: r, n: n, items: make([]*Candidate, 0, min(n+1, 64))}
	// The list allocates at most n+1 candidates over its life: n kept and one spare.
	t.spare = &Candidate{Opt: make([]int32, positions)}
	return t
}

// full reports whether the list holds n candidates.
func (t *topList) full() bool { return len(t.items) == t.n }

// worst returns the last candidate of a full list, or nil.
func (t *topList) worst() *Candidate {
	if !t.full() {
		return nil
	}
	return t.items[t.n-1]
}

// offer inserts c (copied) if it ranks among the best n. It reports whether
// the candidate was kept.
func (t *topList) offer(c *Candidate) bool {
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
	slot := t.spare
	t.spare = nil
	if slot == nil {
		slot = &Candidate{Opt: make([]int32, len(c.Opt))}
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

// frontList keeps the candidates no other kept candidate dominates: at least
// as good in error, power and part count, and better in one (error and power
// compared with the contract's tie tolerances). Of candidates equal in all
// three, the one that ranks first is kept, so the front is deterministic.
type frontList struct {
	r     *ranker
	items []*Candidate
}

// dominatesCand reports whether a dominates b.
func dominatesCand(a, b *Candidate) bool {
	le := func(x, y float64) bool { return x <= y || constraints.Same(x, y) }
	lt := func(x, y float64) bool { return x < y && !constraints.Same(x, y) }
	if !le(a.Error, b.Error) || !le(a.Power, b.Power) || a.Parts > b.Parts {
		return false
	}
	return lt(a.Error, b.Error) || lt(a.Power, b.Power) || a.Parts < b.Parts
}

// sameObjectives reports whether a and b tie in error, power and part count.
func sameObjectives(a, b *Candidate) bool {
	return constraints.Same(a.Error, b.Error) && constraints.Same(a.Power, b.Power) && a.Parts == b.Parts
}

// offer adds a copy of c unless a kept candidate dominates it, and drops the
// kept candidates c dominates.
func (f *frontList) offer(c *Candidate) {
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
	f.items = append(kept, &Candidate{Opt: append([]int32(nil), c.Opt...), Error: c.Error, Power: c.Power, Parts: c.Parts})
}
