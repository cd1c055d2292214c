package board

import (
	"encoding/binary"
	"slices"
	"sort"
)

// The selection's lower bounds: the packing of waiting networks over the
// values they could still take, and the bound of network groups that share
// candidate values (groupNetworks, groupBound), with the keys the search
// remembers proven needs under.

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
	if len(s.groups) < 2 || len(nd.needs) < 2 || s.kS >= 0 {
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
