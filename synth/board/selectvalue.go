package board

import (
	"slices"
	"sort"

	"github.com/ohmfit/ohmfit/constraints"
)

// Scoring a set of values: which design each network takes from it
// (evaluateSet), whether every network can (feasible), and the greedy
// start of the exact search.

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
			if !inside(&its[i]) || !constraints.ErrorTie.AtMost(its[i].rel, o.rel) {
				continue
			}
			if c := choice[r]; c < 0 || constraints.PowerTie.Less(its[i].pow, its[c].pow) {
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
