package board

import (
	"context"
	"slices"
	"sort"
	"unsafe"

	"github.com/ohmfit/ohmfit/constraints"
)

// item is one design of one network as the selection sees it: the set of
// physical values it uses (ids into the board's value table, ascending, no
// repeats) and its tie keys.
type item struct {
	vals []int32
	rel  float64 // goal error relative to the network's cap
	pow  float64 // total power
	idx  int     // index in the network's design list
}

// objective is a selection's score, compared lexicographically: distinct
// values, then the largest relative error, then the total power (the last
// two with the contract's tie tolerances).
type objective struct {
	distinct int
	rel, pow float64
}

// better reports whether a is strictly better than b.
func (a objective) better(b objective) bool {
	if a.distinct != b.distinct {
		return a.distinct < b.distinct
	}
	if !constraints.Same(a.rel, b.rel) {
		return a.rel < b.rel
	}
	return a.pow < b.pow && !constraints.Same(a.pow, b.pow)
}

// selection is the outcome of select.
type selection struct {
	choice []int // per network, index into its item list
	obj    objective
	// proven: no selection with fewer distinct values exists (over the
	// items given).
	proven bool
	// bound is a proven lower bound on the distinct values of any
	// selection; it equals obj.distinct when proven.
	bound int
	// tiesProven: among selections with obj.distinct values, none is
	// better on the tie keys.
	tiesProven bool
	nodes      int64
	out        bool // a stage stopped at the budget or the context
}

// prune drops, within each network, every item whose value set contains
// another item's and that is no better on either tie key: swapping it for
// the other never adds a value nor worsens the objective, so the optimum is
// unchanged. Of items equal in values and keys the first is kept.
func prune(nets [][]item) [][]item {
	out := make([][]item, len(nets))
	for r, its := range nets {
		order := make([]int, len(its))
		for i := range order {
			order[i] = i
		}
		// Smaller sets first, so a dominating item is always seen before
		// the items it dominates (a set contains only sets no larger).
		sort.SliceStable(order, func(a, b int) bool { return len(its[order[a]].vals) < len(its[order[b]].vals) })
		var kept []item
		for _, i := range order {
			a := its[i]
			dominated := false
			for _, b := range kept {
				if subset(b.vals, a.vals) && le(b.rel, a.rel) && le(b.pow, a.pow) {
					dominated = true
					break
				}
			}
			if !dominated {
				kept = append(kept, a)
			}
		}
		// Back to the network's own order (by error).
		sort.SliceStable(kept, func(a, b int) bool { return kept[a].idx < kept[b].idx })
		out[r] = kept
	}
	return out
}

func le(x, y float64) bool { return x <= y || constraints.Same(x, y) }

// subset reports whether sorted a is a subset of sorted b.
func subset(a, b []int32) bool {
	j := 0
	for _, v := range a {
		for j < len(b) && b[j] < v {
			j++
		}
		if j == len(b) || b[j] != v {
			return false
		}
		j++
	}
	return true
}

// selector holds the state of the exact search over value sets.
type selector struct {
	ctx    context.Context
	nets   [][]item
	nvals  int
	in     []bool  // value id -> in the current set
	used   []int32 // the current set, in the order added
	k      int     // most values allowed
	enum   bool    // enumerate every set of k values (tie keys) rather than stop at the first
	memo   map[string]struct{}
	nodes  int64
	budget int64
	out    bool // the budget ran out (or the context ended)

	best    objective
	bestSet []int32
	key     []int32
	taken   []bool // scratch for the packing bound
	levels  [][][]int
}

// fitNew returns how many of item it's values are not in the set.
func (s *selector) fitNew(it *item) int {
	n := 0
	for _, v := range it.vals {
		if !s.in[v] {
			n++
		}
	}
	return n
}

// run searches below the current set. fit[r] lists network r's items that
// still fit (whose new values are within the slack). It returns true when
// a set was found and the search is not enumerating.
func (s *selector) run(fit [][]int, depth int) bool {
	s.nodes++
	if s.nodes > s.budget || (s.nodes&1023 == 0 && s.ctx.Err() != nil) {
		s.out = true
		return false
	}
	s.key = append(s.key[:0], s.used...)
	slices.Sort(s.key)
	// The set's key: its ids' bytes, copied (s.key is reused below).
	key := string(unsafe.Slice((*byte)(unsafe.Pointer(unsafe.SliceData(s.key))), 4*len(s.key)))
	if _, seen := s.memo[key]; seen {
		return false
	}
	remember := func() {
		if len(s.memo) < maxMemo {
			s.memo[key] = struct{}{}
		}
	}
	slack := s.k - len(s.used)
	for len(s.levels) <= depth+1 {
		s.levels = append(s.levels, make([][]int, len(s.nets)))
	}
	next := s.levels[depth+1]
	branch, fewest := -1, 0
	relLB := 0.0
	type need struct{ r, min int }
	var needs []need
	for r, its := range s.nets {
		list := next[r][:0]
		minNew, minRel := slack+1, 0.0
		for _, i := range fit[r] {
			n := s.fitNew(&its[i])
			if n > slack {
				continue
			}
			list = append(list, i)
			if n < minNew {
				minNew = n
			}
			if len(list) == 1 || its[i].rel < minRel {
				minRel = its[i].rel
			}
		}
		next[r] = list
		if len(list) == 0 {
			remember()
			return false
		}
		relLB = max(relLB, minRel)
		if minNew > 0 {
			needs = append(needs, need{r, minNew})
			if branch < 0 || len(list) < fewest {
				branch, fewest = r, len(list)
			}
		}
	}
	if s.enum && s.bestSet != nil && relLB > s.best.rel && !constraints.Same(relLB, s.best.rel) {
		remember()
		return false
	}
	if branch < 0 {
		// Every network has a design inside the set.
		if !s.enum {
			s.bestSet = append([]int32(nil), s.used...)
			return true
		}
		if o := s.evaluate(s.used); s.bestSet == nil || o.better(s.best) {
			s.best, s.bestSet = o, append([]int32(nil), s.used...)
		}
		remember()
		return false
	}
	// Packing bound: networks whose possible new values are pairwise
	// disjoint each need their own; their least needs add up.
	if len(needs) > 1 {
		sort.Slice(needs, func(a, b int) bool { return needs[a].min > needs[b].min })
		clear(s.taken)
		sum := 0
		for _, nd := range needs {
			disjoint := true
			for _, i := range next[nd.r] {
				for _, v := range s.nets[nd.r][i].vals {
					if !s.in[v] && s.taken[v] {
						disjoint = false
					}
				}
			}
			if !disjoint {
				continue
			}
			for _, i := range next[nd.r] {
				for _, v := range s.nets[nd.r][i].vals {
					if !s.in[v] {
						s.taken[v] = true
					}
				}
			}
			if sum += nd.min; sum > slack {
				remember()
				return false
			}
		}
	}
	// Branch on the network with the fewest fitting designs. Of designs
	// whose new values contain another's, only the smaller is tried: any
	// complete set reached through the larger contains one reachable
	// through the smaller.
	var adds [][]int32
	for _, i := range next[branch] {
		var add []int32
		for _, v := range s.nets[branch][i].vals {
			if !s.in[v] {
				add = append(add, v)
			}
		}
		adds = append(adds, add)
	}
	order := make([]int, len(adds))
	for i := range order {
		order[i] = i
	}
	sort.SliceStable(order, func(a, b int) bool { return len(adds[order[a]]) < len(adds[order[b]]) })
	tried := map[addKey]bool{}
	for _, o := range order {
		add := adds[o]
		if triedSubset(tried, add) {
			continue
		}
		tried[keyOf(add)] = true
		for _, v := range add {
			s.in[v] = true
		}
		s.used = append(s.used, add...)
		found := s.run(next, depth+1)
		s.used = s.used[:len(s.used)-len(add)]
		for _, v := range add {
			s.in[v] = false
		}
		if found || s.out {
			return found
		}
	}
	remember()
	return false
}

// addKey is a set of at most maxAdd value ids, ascending, padded with -1,
// usable as a map key.
type addKey [maxAdd]int32

// maxAdd is the most new values one design can add that triedSubset looks
// up by its subsets; a longer add is never skipped (which is always safe).
const maxAdd = 8

func keyOf(add []int32) addKey {
	var k addKey
	for i := range k {
		k[i] = -1
	}
	copy(k[:], add)
	return k
}

// triedSubset reports whether some non-empty subset of add (ascending) was
// tried already: every one of its 2^len(add) - 1 subsets is looked up.
func triedSubset(tried map[addKey]bool, add []int32) bool {
	if len(add) > maxAdd || len(tried) == 0 {
		return false
	}
	var sub [maxAdd]int32
	for mask := 1; mask < 1<<len(add); mask++ {
		n := 0
		for i, v := range add {
			if mask&(1<<i) != 0 {
				sub[n] = v
				n++
			}
		}
		if tried[keyOf(sub[:n])] {
			return true
		}
	}
	return false
}

// maxMemo bounds the remembered sets (about 100 MB at most).
const maxMemo = 1 << 20

// evaluate scores a value set: each network takes, of its designs inside
// the set, one with the least relative error; the largest of those is the
// set's relative error; then each network takes its lowest-power design
// inside the set within that error, and those powers add up.
func (s *selector) evaluate(set []int32) objective {
	o, _ := evaluateSet(s.nets, s.nvals, set)
	return o
}

// evaluateSet is evaluate with the choice it implies (first in list order
// among equals).
func evaluateSet(nets [][]item, nvals int, set []int32) (objective, []int) {
	in := make([]bool, nvals)
	for _, v := range set {
		in[v] = true
	}
	inside := func(it *item) bool {
		for _, v := range it.vals {
			if !in[v] {
				return false
			}
		}
		return true
	}
	o := objective{distinct: len(set)}
	for _, its := range nets {
		m := -1.0
		for i := range its {
			if inside(&its[i]) && (m < 0 || its[i].rel < m) {
				m = its[i].rel
			}
		}
		o.rel = max(o.rel, m)
	}
	choice := make([]int, len(nets))
	for r, its := range nets {
		choice[r] = -1
		for i := range its {
			if !inside(&its[i]) || !le(its[i].rel, o.rel) {
				continue
			}
			if c := choice[r]; c < 0 || (its[i].pow < its[c].pow && !constraints.Same(its[i].pow, its[c].pow)) {
				choice[r] = i
			}
		}
		o.pow += its[choice[r]].pow
	}
	return o, choice
}

// union returns the values a choice uses, ascending.
func union(nets [][]item, choice []int) []int32 {
	var set []int32
	for r, c := range choice {
		set = append(set, nets[r][c].vals...)
	}
	slices.Sort(set)
	return slices.Compact(set)
}

// greedy builds a selection network by network (fewest designs first),
// each taking the design that adds the fewest new values, then improves it
// locally: a network switches design when that shrinks the set, and a
// value is dropped when every network still has a design without it.
func greedy(nets [][]item, nvals int) []int32 {
	order := make([]int, len(nets))
	for i := range order {
		order[i] = i
	}
	sort.SliceStable(order, func(a, b int) bool { return len(nets[order[a]]) < len(nets[order[b]]) })
	count := make([]int, nvals)
	choice := make([]int, len(nets))
	cost := func(it *item) int {
		n := 0
		for _, v := range it.vals {
			if count[v] == 0 {
				n++
			}
		}
		return n
	}
	for _, r := range order {
		best, bc := 0, -1
		for i := range nets[r] {
			if c := cost(&nets[r][i]); bc < 0 || c < bc {
				best, bc = i, c
			}
		}
		choice[r] = best
		for _, v := range nets[r][best].vals {
			count[v]++
		}
	}
	for improved := true; improved; {
		improved = false
		for _, r := range order {
			cur := &nets[r][choice[r]]
			for _, v := range cur.vals {
				count[v]--
			}
			here := cost(cur)
			best := choice[r]
			for i := range nets[r] {
				if c := cost(&nets[r][i]); c < here {
					best, here = i, c
				}
			}
			if best != choice[r] {
				improved = true
				choice[r] = best
			}
			for _, v := range nets[r][choice[r]].vals {
				count[v]++
			}
		}
	}
	set := union(nets, choice)
	// Drop values no network needs.
	for i := 0; i < len(set); {
		trial := slices.Delete(slices.Clone(set), i, i+1)
		if feasible(nets, nvals, trial) {
			set = trial
			continue
		}
		i++
	}
	return set
}

// feasible reports whether every network has a design inside set.
func feasible(nets [][]item, nvals int, set []int32) bool {
	in := make([]bool, nvals)
	for _, v := range set {
		in[v] = true
	}
	for _, its := range nets {
		ok := false
		for i := range its {
			all := true
			for _, v := range its[i].vals {
				if !in[v] {
					all = false
					break
				}
			}
			if all {
				ok = true
				break
			}
		}
		if !ok {
			return false
		}
	}
	return true
}

// choose solves the selection over pruned item lists. The greedy set gives
// a first upper bound. Then, with half the node budget, a search over value
// sets looks for a set of one value fewer than the best so far, again and
// again (a set that exists is usually found fast): a search that finishes
// without one proves the best so far minimal. If the budget ends first,
// the rest of it goes to the lower bound: for k from the trivial bound (the
// most values any network's smallest design needs) upwards, each finished
// search without a set proves k values too few. With the minimum proven,
// every set of that size is enumerated (bounded by the relative error) for
// the tie keys, with what is left of the budget.
func choose(ctx context.Context, nets [][]item, nvals int, budget int64) selection {
	set := greedy(nets, nvals)
	bestObj, _ := evaluateSet(nets, nvals, set)
	s := &selector{ctx: ctx, nets: nets, nvals: nvals, in: make([]bool, nvals), taken: make([]bool, nvals)}
	all := make([][]int, len(nets))
	lb := 0
	for r, its := range nets {
		all[r] = make([]int, len(its))
		m := -1
		for i := range its {
			all[r][i] = i
			if m < 0 || len(its[i].vals) < m {
				m = len(its[i].vals)
			}
		}
		lb = max(lb, m)
	}
	sel := selection{bound: lb}
	// search runs one stage: is there a set of at most k values? It
	// reports whether one was found and whether the stage finished.
	search := func(k int, until int64) (found, finished bool) {
		s.k, s.memo, s.bestSet, s.out, s.budget = k, map[string]struct{}{}, nil, false, until
		found = s.run(all, 0)
		if s.out {
			sel.out = true
			return false, false
		}
		return found, true
	}
	// take makes the set found the best so far: the values its choice
	// uses (they may be fewer than the set's).
	take := func() {
		_, ch := evaluateSet(nets, nvals, s.bestSet)
		set = union(nets, ch)
		bestObj, _ = evaluateSet(nets, nvals, set)
	}
	proven := bestObj.distinct <= lb
	for !proven && bestObj.distinct > lb {
		found, finished := search(bestObj.distinct-1, budget/2)
		if !finished {
			break
		}
		if !found {
			proven = true
			break
		}
		take()
	}
	if proven {
		sel.bound = bestObj.distinct
	} else {
		for k := lb; k < bestObj.distinct; k++ {
			found, finished := search(k, budget)
			if !finished {
				break
			}
			if found {
				take()
				proven = true
				break
			}
			sel.bound = k + 1
		}
		if sel.bound >= bestObj.distinct {
			proven = true
		}
	}
	if proven {
		sel.bound = bestObj.distinct
		// Every set of the minimal size, for the tie keys.
		s.k, s.memo, s.enum, s.out, s.budget = bestObj.distinct, map[string]struct{}{}, true, false, budget
		s.best, s.bestSet = bestObj, set
		s.run(all, 0)
		sel.out = sel.out || s.out
		set, bestObj = s.bestSet, s.best
		sel.tiesProven = !s.out
	}
	sel.proven = proven
	sel.obj, sel.choice = evaluateSet(nets, nvals, set)
	sel.nodes = s.nodes
	return sel
}
