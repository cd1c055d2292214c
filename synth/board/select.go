package board

import (
	"context"
	"slices"
	"sort"

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
	return constraints.PowerTie.Less(a.pow, b.pow)
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
	proofNodes int64 // the nodes up to the proof or the end of the search for it
	out        bool  // a stage stopped at the budget or the context
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
				if subset(b.vals, a.vals) && constraints.ErrorTie.AtMost(b.rel, a.rel) && constraints.PowerTie.AtMost(b.pow, a.pow) {
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
	nodes  int64
	budget int64
	out    bool // the budget ran out (or the context ended)

	// needs remembers, per subproblem, a proven lower bound on the new
	// values it needs. A subproblem is the networks not yet served and
	// the values of the set that some design of theirs uses: the other
	// values of the set can never serve them, so the answer depends on
	// nothing else. A search below it that finishes with s values to
	// spare and no set proves it needs s+1. The facts hold for every k,
	// so they are kept from one stage to the next; they make a board of
	// groups that share few values cost about the sum of the groups, not
	// their product.
	needs map[string]int
	// seen remembers the sets whose subtree the enumeration walked.
	seen map[string]struct{}
	// users[v] is the networks with a design that uses value v, as a
	// bitset over the networks.
	users [][]uint64
	// all lists every item of every network; lb is the trivial lower
	// bound, the most values any network's smallest design needs.
	all [][]int
	lb  int
	// group[r] is network r's group, groups the networks of each: networks
	// whose values mostly overlap are one group (groupBound).
	group       []int
	groups      [][]int
	free        []bool // scratch for groupBound
	partScratch []need
	// The profile bound (selectprofile.go): shared marks the values that
	// designs of two groups or more use, owner the group of every other
	// value; profile[g][t] is a lower bound on the other values group g
	// needs when it uses at most t shared values.
	shared  []bool
	owner   []int
	profile [][]int
	cnt     []int // scratch for profileBound
	more    []int // scratch for profileBound
	// kS, when not negative, is the most shared values a set may have (a
	// profile's search); -1 means no such limit.
	kS int
	// lift is added to the lower bounds: always zero, except in the test
	// that checks that a bound claiming too much is caught.
	lift int

	best    objective
	bestSet []int32
	key     []byte
	taken   []bool       // scratch for the packing bound
	levels  [][][]int    // per depth, per network: the items that still fit
	store   [][][]int    // per depth, per network: the storage of the lists it owns
	rels    [][]float64  // per depth, per network: its least relative error
	served  [][]bool     // per depth, per network: a design of it is inside the set
	unmet   []uint64     // scratch: the networks not yet served, as a bitset
	stamp   []int32      // scratch: value id -> the last network that listed it, plus one
	spread  []int32      // scratch: value id -> how many waiting networks could use it
	cand    []int32      // scratch for complete
	order   []need       // scratch for complete: the waiting networks, the last to rule out first
	pairs   [][][2]int32 // scratch for lastTwo: per network, what its fitting designs add
}

func newSelector(ctx context.Context, nets [][]item, nvals int) *selector {
	words := (len(nets) + 63) / 64
	s := &selector{ctx: ctx, nets: nets, nvals: nvals, in: make([]bool, nvals), taken: make([]bool, nvals),
		needs: map[string]int{}, stamp: make([]int32, nvals), spread: make([]int32, nvals), users: make([][]uint64, nvals), unmet: make([]uint64, words)}
	for v := range s.users {
		s.users[v] = make([]uint64, words)
	}
	for r, its := range nets {
		for _, it := range its {
			for _, v := range it.vals {
				s.users[v][r/64] |= 1 << (r % 64)
			}
		}
	}
	s.group, s.groups = groupNetworks(nets, nvals)
	s.kS = -1
	s.free = make([]bool, nvals)
	s.all = make([][]int, len(nets))
	for r, its := range nets {
		s.all[r] = make([]int, len(its))
		m := -1
		for i := range its {
			s.all[r][i] = i
			if m < 0 || len(its[i].vals) < m {
				m = len(its[i].vals)
			}
		}
		s.lb = max(s.lb, m)
	}
	return s
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

// need is a network not yet served, with the fewest new values any of
// its fitting designs adds.
type need struct{ r, min int }

// node is what one node of the search knows: each network's designs that
// still fit, the networks not yet served, the one with the fewest fitting
// designs to branch on (-1 when every network is served) and the largest
// of the networks' least relative errors.
type node struct {
	fit    [][]int
	needs  []need
	branch int
	relLB  float64
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
	slack := s.k - len(s.used)
	nd, ok := s.narrow(fit, depth, slack)
	if !ok {
		return false
	}
	if nd.branch < 0 {
		// Every network has a design inside the set.
		if !s.enum {
			s.bestSet = append([]int32(nil), s.used...)
			return true
		}
		if o := s.evaluate(s.used); s.bestSet == nil || o.better(s.best) {
			s.best, s.bestSet = o, append([]int32(nil), s.used...)
		}
		return false
	}
	key := s.subproblem(nd.needs)
	if s.kS >= 0 {
		// The fact holds for this many shared values to spare.
		key += string(rune(s.sharedSlack()))
	}
	if s.needs[key] > slack {
		return false
	}
	// proved records that the subproblem needs more than the slack.
	proved := func() bool {
		if !s.enum && len(s.needs) < maxMemo {
			s.needs[key] = slack + 1
		}
		return false
	}
	if s.enum {
		if s.bestSet != nil && nd.relLB > s.best.rel && !constraints.Same(nd.relLB, s.best.rel) {
			return false
		}
		set := s.setKey()
		if _, seen := s.seen[set]; seen {
			return false
		}
		if len(s.seen) < maxMemo {
			s.seen[set] = struct{}{}
		}
	}
	if s.profile != nil && s.profileBound(s.profileNode(nd, slack))+s.lift > s.k {
		return proved()
	}
	if max(s.packing(nd), s.groupBound(nd))+s.lift > slack {
		return proved()
	}
	if slack <= 2 && !s.enum && s.kS < 0 {
		// Few values left: decide the node at once rather than branch.
		if add, ok := s.lastTwo(nd, slack); ok {
			s.bestSet = append(append([]int32(nil), s.used...), add...)
			return true
		}
		return proved()
	}
	if found := s.branchOn(nd, depth); found || s.out {
		return found
	}
	return proved()
}

// lastTwo decides a node with one or two values to spare exactly, and
// returns the new values of a set that serves every network. Each waiting
// network's fitting designs add one or two values. With one to spare, the
// value must be one that a fitting design of every waiting network adds
// alone. With two, the set must contain what some fitting design of the
// branch network adds: two values are the whole set; one leaves one more,
// found as with one to spare.
func (s *selector) lastTwo(nd node, slack int) ([]int32, bool) {
	// Each waiting network's adds, as pairs (-1 for a second value not needed).
	if len(s.pairs) < len(s.nets) {
		s.pairs = make([][][2]int32, len(s.nets))
	}
	for _, n := range nd.needs {
		list := s.pairs[n.r][:0]
		for _, i := range nd.fit[n.r] {
			p := [2]int32{-1, -1}
			j := 0
			for _, v := range s.nets[n.r][i].vals {
				if !s.in[v] {
					p[j] = v
					j++
				}
			}
			list = append(list, p)
		}
		s.pairs[n.r] = list
	}
	s.order = append(s.order[:0], nd.needs...)
	if slack == 1 {
		v, ok := s.complete(nd, -1)
		return []int32{v}, ok
	}
	for _, p := range s.pairs[nd.branch] {
		if p[1] >= 0 {
			if v, ok := s.complete(nd, p[0], p[1]); ok && v < 0 {
				return p[:], true
			}
			continue
		}
		if v, ok := s.complete(nd, p[0]); ok {
			if v < 0 {
				return p[:1], true
			}
			return []int32{p[0], v}, true
		}
	}
	return nil, false
}

// complete reports whether, with the values given added to the set, at
// most one value more serves every waiting network (lastTwo's lists of
// adds), and returns it (-1 when none is needed). A network is served when
// one of its adds is inside the values given; else a value completes it
// when it is all that one of its adds has beyond them.
func (s *selector) complete(nd node, given ...int32) (int32, bool) {
	has := func(v int32) bool { return slices.Contains(given, v) }
	cand := s.cand[:0]
	first := true
	mark := int32(0)
	for j, n := range s.order {
		served := false
		for _, p := range s.pairs[n.r] {
			if has(p[0]) && (p[1] < 0 || has(p[1])) {
				served = true
				break
			}
		}
		if served {
			continue
		}
		// The values that complete this network, marked; the candidates
		// keep only those.
		mark++
		for _, p := range s.pairs[n.r] {
			switch {
			case p[1] < 0:
				s.stamp[p[0]] = mark
			case has(p[0]):
				s.stamp[p[1]] = mark
			case has(p[1]):
				s.stamp[p[0]] = mark
			}
		}
		if first {
			for _, p := range s.pairs[n.r] {
				for _, v := range p {
					if v >= 0 && s.stamp[v] == mark {
						s.stamp[v] = -mark // listed once
						cand = append(cand, v)
					}
				}
			}
			first = false
		} else {
			kept := cand[:0]
			for _, v := range cand {
				if s.stamp[v] == mark {
					kept = append(kept, v)
				}
			}
			cand = kept
		}
		if len(cand) == 0 {
			// This network ruled the values out: ask it first next time.
			copy(s.order[1:j+1], s.order[:j])
			s.order[0] = n
			break
		}
	}
	s.cand = cand
	clear(s.stamp)
	if first {
		return -1, true
	}
	if len(cand) == 0 {
		return 0, false
	}
	return cand[0], true
}

// narrow lists each network's items that fit at this node and picks the
// network to branch on. It reports false when some network has none left
// (the subproblem needs more than the slack).
func (s *selector) narrow(fit [][]int, depth, slack int) (node, bool) {
	for len(s.levels) <= depth+1 {
		s.levels = append(s.levels, make([][]int, len(s.nets)))
		s.store = append(s.store, make([][]int, len(s.nets)))
		s.rels = append(s.rels, make([]float64, len(s.nets)))
		s.served = append(s.served, make([]bool, len(s.nets)))
	}
	nd := node{fit: s.levels[depth+1], branch: -1}
	rels, served := s.rels[depth+1], s.served[depth+1]
	fewest := 0
	slackS := s.sharedSlack()
	for r, its := range s.nets {
		if depth > 0 && s.served[depth][r] {
			// Served above stays served (the set only grows): its list
			// is not needed again, and its least relative error above is
			// still a lower bound.
			nd.fit[r], rels[r], served[r] = fit[r], s.rels[depth][r], true
			nd.relLB = max(nd.relLB, rels[r])
			continue
		}
		list := s.store[depth+1][r][:0]
		minNew, minRel := slack+1, 0.0
		for _, i := range fit[r] {
			n := s.fitNew(&its[i])
			if n > slack || (slackS >= 0 && !s.fitsShared(&its[i], n, slack, slackS)) {
				continue
			}
			list = append(list, i)
			minNew = min(minNew, n)
			if len(list) == 1 || its[i].rel < minRel {
				minRel = its[i].rel
			}
		}
		nd.fit[r], s.store[depth+1][r] = list, list
		if len(list) == 0 {
			return nd, false
		}
		nd.relLB = max(nd.relLB, minRel)
		rels[r], served[r] = minRel, minNew == 0
		if minNew > 0 {
			nd.needs = append(nd.needs, need{r, minNew})
			if nd.branch < 0 || len(list) < fewest {
				nd.branch, fewest = r, len(list)
			}
		}
	}
	return nd, true
}

// branchOn tries the designs of the network with the fewest, fewest new
// values first. Of designs whose new values contain another's, only the
// smaller is tried: any complete set reached through the larger contains
// one reachable through the smaller.
func (s *selector) branchOn(nd node, depth int) bool {
	r := nd.branch
	var adds [][]int32
	for _, i := range nd.fit[r] {
		var add []int32
		for _, v := range s.nets[r][i].vals {
			if !s.in[v] {
				add = append(add, v)
			}
		}
		adds = append(adds, add)
	}
	// Popular values first: those that the most networks still waiting
	// could use, which is where a set that serves them all is found soonest.
	clear(s.spread)
	for _, n := range nd.needs {
		for _, i := range nd.fit[n.r] {
			for _, v := range s.nets[n.r][i].vals {
				if !s.in[v] && s.stamp[v] != int32(n.r+1) {
					s.stamp[v] = int32(n.r + 1)
					s.spread[v]++
				}
			}
		}
	}
	clear(s.stamp)
	pop := make([]int32, len(adds))
	for j, add := range adds {
		for _, v := range add {
			pop[j] += s.spread[v]
		}
	}
	order := make([]int, len(adds))
	for j := range order {
		order[j] = j
	}
	sort.SliceStable(order, func(a, b int) bool {
		x, y := order[a], order[b]
		if len(adds[x]) != len(adds[y]) {
			return len(adds[x]) < len(adds[y])
		}
		return pop[x] > pop[y]
	})
	sorted := make([][]int32, len(adds))
	for j, o := range order {
		sorted[j] = adds[o]
	}
	adds = sorted
	tried := map[addKey]bool{}
	for _, add := range adds {
		if triedSubset(tried, add) {
			continue
		}
		tried[keyOf(add)] = true
		for _, v := range add {
			s.in[v] = true
		}
		s.used = append(s.used, add...)
		found := s.run(nd.fit, depth+1)
		s.used = s.used[:len(s.used)-len(add)]
		for _, v := range add {
			s.in[v] = false
		}
		if found || s.out {
			return found
		}
	}
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

// choose solves the selection over pruned item lists. The greedy set, or
// the known set when it is better (nil for none: any value set every
// network can be served from), gives a first upper bound. On a board of groups that share values, the groups'
// profiles come next (at most a third of the budget) and raise the trivial
// bound (the most values any network's smallest design needs). Then, with
// half the node budget, a search over value sets looks for a set of one
// value fewer than the best so far, again and again (a set that exists is
// usually found fast): a search that finishes without one proves the best
// so far minimal. When that stage is also the first the lower bound needs,
// it may take the whole budget. If the budget ends first, the rest of it
// goes to the lower bound: for k from that bound upwards, each finished
// search without a set proves k values too few. The subproblems proven
// along the way serve every later stage. With the minimum proven, every
// set of that size is enumerated (bounded by the relative error) for the
// tie keys, with what is left of the budget.
func choose(ctx context.Context, nets [][]item, nvals int, budget int64, known []int32) selection {
	s := newSelector(ctx, nets, nvals)
	set := greedy(nets, nvals)
	bestObj, _ := evaluateSet(nets, nvals, set)
	// A known selection (the networks' own answers) starts the search when
	// it beats the greedy one, so that a search the budget stops never
	// shows more values than the networks need alone.
	if known != nil && feasible(nets, nvals, known) {
		_, ch := evaluateSet(nets, nvals, known)
		used := union(nets, ch) // only the values its choice uses
		if o, _ := evaluateSet(nets, nvals, used); o.better(bestObj) {
			set, bestObj = used, o
		}
	}
	sel := selection{bound: s.lb}
	// take makes the set found the best so far: the values its choice
	// uses (they may be fewer than the set's).
	take := func() {
		_, ch := evaluateSet(nets, nvals, s.bestSet)
		set = union(nets, ch)
		bestObj, _ = evaluateSet(nets, nvals, set)
	}
	proven := bestObj.distinct <= s.lb
	if !proven {
		// Boards of groups that share values: each group's profile, a
		// sixth of the budget each and a third in all at most, raises
		// the lower bound.
		s.profiles(bestObj.distinct-1, budget/6, s.nodes+budget/3)
		if s.profile != nil {
			s.k = bestObj.distinct - 1
			s.lb = max(s.lb, min(s.profileBound(node{}), bestObj.distinct))
			sel.bound = s.lb
			proven = bestObj.distinct <= s.lb
		}
	}
	for !proven {
		// Half the budget looks for smaller sets; all of it when this
		// stage is also the first the lower bound needs.
		until := budget / 2
		if bestObj.distinct-1 <= s.lb {
			until = budget
		}
		found, finished := s.exists(bestObj.distinct-1, until)
		if !finished {
			break
		}
		if proven = !found; found {
			take()
			proven = bestObj.distinct <= s.lb
		}
	}
	for k := sel.bound; !proven && k < bestObj.distinct; k++ {
		found, finished := s.exists(k, budget)
		if !finished {
			break
		}
		if found {
			take()
			proven = true
		}
		sel.bound = k + 1
		proven = proven || sel.bound >= bestObj.distinct
	}
	sel.out, sel.proofNodes = s.out, s.nodes
	if proven {
		sel.bound = bestObj.distinct
		set, bestObj, sel.tiesProven = s.ties(bestObj, set, budget)
		sel.out = sel.out || !sel.tiesProven
	}
	sel.proven = proven
	sel.obj, sel.choice = evaluateSet(nets, nvals, set)
	sel.nodes = s.nodes
	return sel
}

// exists runs one stage: is there a set of at most k values? It reports
// whether one was found (in s.bestSet) and whether the stage finished
// within the node budget until (counted over all stages) and the context.
func (s *selector) exists(k int, until int64) (found, finished bool) {
	s.k, s.enum, s.bestSet, s.out, s.budget = k, false, nil, false, until
	if s.out = s.ctx.Err() != nil; s.out {
		// A stage that starts after the limit stops at once.
		return false, false
	}
	found = s.run(s.all, 0)
	return found, !s.out
}

// ties enumerates every set of k values, k the proven minimum, for the
// best tie keys, starting from the best so far. It reports whether the
// enumeration finished within the budget.
func (s *selector) ties(best objective, set []int32, until int64) ([]int32, objective, bool) {
	s.k, s.seen, s.enum, s.out, s.budget = best.distinct, map[string]struct{}{}, true, false, until
	s.best, s.bestSet = best, set
	if s.out = s.ctx.Err() != nil; !s.out {
		s.run(s.all, 0)
	}
	return s.bestSet, s.best, !s.out
}
