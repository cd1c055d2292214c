package board

import (
	"context"
	"encoding/binary"
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
	// lift is added to the lower bounds: always zero, except in the test
	// that checks that a bound claiming too much is caught.
	lift int

	best    objective
	bestSet []int32
	key     []byte
	taken   []bool      // scratch for the packing bound
	levels  [][][]int   // per depth, per network: the items that still fit
	store   [][][]int   // per depth, per network: the storage of the lists it owns
	rels    [][]float64 // per depth, per network: its least relative error
	served  [][]bool    // per depth, per network: a design of it is inside the set
	unmet   []uint64    // scratch: the networks not yet served, as a bitset
	stamp   []int32     // scratch: value id -> the last network that listed it, plus one
	spread  []int32     // scratch: value id -> how many waiting networks could use it
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

// groupNetworks joins networks whose sets of values overlap by at least
// half of the smaller: the same series over the same range is one group,
// E96 beside E24 is two. The groups only steer groupBound; any grouping
// gives a valid bound.
func groupNetworks(nets [][]item, nvals int) ([]int, [][]int) {
	uses := make([][]bool, len(nets))
	size := make([]int, len(nets))
	for r, its := range nets {
		uses[r] = make([]bool, nvals)
		for _, it := range its {
			for _, v := range it.vals {
				if !uses[r][v] {
					uses[r][v] = true
					size[r]++
				}
			}
		}
	}
	root := make([]int, len(nets))
	for r := range root {
		root[r] = r
	}
	var find func(int) int
	find = func(r int) int {
		if root[r] != r {
			root[r] = find(root[r])
		}
		return root[r]
	}
	for a := range nets {
		for b := a + 1; b < len(nets); b++ {
			common := 0
			for v := range nvals {
				if uses[a][v] && uses[b][v] {
					common++
				}
			}
			if 2*common >= min(size[a], size[b]) {
				root[find(a)] = find(b)
			}
		}
	}
	group := make([]int, len(nets))
	ids := map[int]int{}
	var groups [][]int
	for r := range nets {
		g, ok := ids[find(r)]
		if !ok {
			g = len(groups)
			ids[find(r)] = g
			groups = append(groups, nil)
		}
		group[r] = g
		groups[g] = append(groups[g], r)
	}
	return group, groups
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
	if max(s.packing(nd), s.groupBound(nd))+s.lift > slack {
		return proved()
	}
	if found := s.branchOn(nd, depth); found || s.out {
		return found
	}
	return proved()
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
			if n > slack {
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

// subproblem returns the key of the networks in needs with the values of
// the set that some design of theirs uses.
func (s *selector) subproblem(needs []need) string {
	clear(s.unmet)
	for _, n := range needs {
		s.unmet[n.r/64] |= 1 << (n.r % 64)
	}
	k := s.key[:0]
	for _, w := range s.unmet {
		k = binary.LittleEndian.AppendUint64(k, w)
	}
	vals := make([]int32, 0, len(s.used))
	for _, v := range s.used {
		for i, w := range s.users[v] {
			if w&s.unmet[i] != 0 {
				vals = append(vals, v)
				break
			}
		}
	}
	slices.Sort(vals)
	for _, v := range vals {
		k = binary.LittleEndian.AppendUint32(k, uint32(v))
	}
	s.key = k
	return string(k)
}

// setKey returns the key of the current set.
func (s *selector) setKey() string {
	vals := slices.Clone(s.used)
	slices.Sort(vals)
	k := s.key[:0]
	for _, v := range vals {
		k = binary.LittleEndian.AppendUint32(k, uint32(v))
	}
	s.key = k
	return string(k)
}

// packing is a lower bound on the new values still needed: networks whose
// possible new values are pairwise disjoint each need their own, so their
// least needs add up (the largest needs are taken first).
func (s *selector) packing(nd node) int {
	if len(nd.needs) == 1 {
		return nd.needs[0].min
	}
	return s.pack(slices.Clone(nd.needs), nd.fit, nil)
}

// pack adds up the least needs of networks whose possible new values,
// leaving out those marked free, are pairwise disjoint (the largest needs
// first). It sorts needs.
func (s *selector) pack(needs []need, fit [][]int, free []bool) int {
	sort.Slice(needs, func(a, b int) bool { return needs[a].min > needs[b].min })
	counted := func(v int32) bool { return !s.in[v] && (free == nil || !free[v]) }
	clear(s.taken)
	sum := 0
	for _, n := range needs {
		disjoint := true
		for _, i := range fit[n.r] {
			for _, v := range s.nets[n.r][i].vals {
				if counted(v) && s.taken[v] {
					disjoint = false
				}
			}
		}
		if !disjoint {
			continue
		}
		for _, i := range fit[n.r] {
			for _, v := range s.nets[n.r][i].vals {
				if counted(v) {
					s.taken[v] = true
				}
			}
		}
		sum += n.min
	}
	return sum
}

// groupBound is a second lower bound on the new values still needed, for
// boards whose networks fall into groups that share few values (E96
// dividers beside E24 ladders, say). Of the groups, take the one whose
// waiting networks have the largest need f proven for them alone (a
// remembered fact). Every set that serves the node gives them f new values
// among their own candidates C. The other waiting networks are then served
// by values outside C as well, and those of them whose candidates outside
// C are disjoint need their own: f plus their least needs outside C.
func (s *selector) groupBound(nd node) int {
	if len(s.groups) < 2 || len(nd.needs) < 2 {
		return 0
	}
	bestG, f := -1, 0
	for g := range s.groups {
		part := s.partScratch[:0]
		for _, n := range nd.needs {
			if s.group[n.r] == g {
				part = append(part, n)
			}
		}
		s.partScratch = part
		if len(part) == 0 || len(part) == len(nd.needs) {
			continue // the node's own subproblem, already looked up
		}
		if v := s.needs[s.subproblem(part)]; v > f {
			bestG, f = g, v
		}
	}
	if bestG < 0 {
		return 0
	}
	clear(s.free)
	for _, n := range nd.needs {
		if s.group[n.r] != bestG {
			continue
		}
		for _, i := range nd.fit[n.r] {
			for _, v := range s.nets[n.r][i].vals {
				s.free[v] = !s.in[v]
			}
		}
	}
	var rest []need
	for _, n := range nd.needs {
		if s.group[n.r] == bestG {
			continue
		}
		least := -1
		for _, i := range nd.fit[n.r] {
			c := 0
			for _, v := range s.nets[n.r][i].vals {
				if !s.in[v] && !s.free[v] {
					c++
				}
			}
			if least < 0 || c < least {
				least = c
			}
		}
		if least > 0 {
			rest = append(rest, need{n.r, least})
		}
	}
	return f + s.pack(rest, nd.fit, s.free)
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
// search without a set proves k values too few. The subproblems proven
// along the way serve every later stage. With the minimum proven, every
// set of that size is enumerated (bounded by the relative error) for the
// tie keys, with what is left of the budget.
func choose(ctx context.Context, nets [][]item, nvals int, budget int64) selection {
	s := newSelector(ctx, nets, nvals)
	set := greedy(nets, nvals)
	bestObj, _ := evaluateSet(nets, nvals, set)
	sel := selection{bound: s.lb}
	// take makes the set found the best so far: the values its choice
	// uses (they may be fewer than the set's).
	take := func() {
		_, ch := evaluateSet(nets, nvals, s.bestSet)
		set = union(nets, ch)
		bestObj, _ = evaluateSet(nets, nvals, set)
	}
	proven := bestObj.distinct <= s.lb
	for !proven {
		found, finished := s.exists(bestObj.distinct-1, budget/2)
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
	sel.out = s.out
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
