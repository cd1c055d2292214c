package board

import "slices"

// The profile bound, for boards whose groups of networks (groupNetworks)
// share a few values, say E96 dividers beside E24 ladders that meet at
// 10k, 11k, 13k, 15k, 20k and 75k. A value is shared when designs of two
// groups or more use it; every other value belongs to one group. Group g's
// profile p_g(t) is the fewest of its own values it needs when it may use
// at most t shared values: it is found by the same search with two limits
// (kS for the shared values). Any set X serving the board has some number
// t of shared values and at least p_g(t) of each group's own, so
//
//	|X| >= min over t of  t + sum over g of p_g(t),
//
// and below a set U already chosen, with u_S shared values and u_g of
// group g's, min over t >= u_S of t + sum over g of max(u_g + m_g, p_g(t)),
// where m_g is the packing of group g's waiting networks over the own
// values they still lack (shared ones left out): X has those as well.

// sharedSlack returns how many more shared values a profile's search may
// take, or -1 outside one.
func (s *selector) sharedSlack() int {
	if s.kS < 0 {
		return -1
	}
	n := s.kS
	for _, v := range s.used {
		if s.shared[v] {
			n--
		}
	}
	return n
}

// fitsShared reports whether an item with n new values fits both limits of
// a profile's search: at most slackS new shared values and at most
// slack - slackS others.
func (s *selector) fitsShared(it *item, n, slack, slackS int) bool {
	ns := 0
	for _, v := range it.vals {
		if !s.in[v] && s.shared[v] {
			ns++
		}
	}
	return ns <= slackS && n-ns <= slack-slackS
}

// profileBound is the profile bound on the size of any set that contains
// the current one and serves every network, with the own values nd's
// waiting networks still lack (none for an empty node).
func (s *selector) profileBound(nd node) int {
	if len(s.cnt) < len(s.profile) {
		s.cnt = make([]int, len(s.profile))
		s.more = make([]int, len(s.profile))
	}
	clear(s.cnt)
	// more[g]: the own values group g's waiting networks still add at
	// least, over and above the set (a packing over own values).
	for g := range s.profile {
		part := s.partScratch[:0]
		for _, n := range nd.needs {
			if s.group[n.r] != g {
				continue
			}
			least := -1
			for _, i := range nd.fit[n.r] {
				c := 0
				for _, v := range s.nets[n.r][i].vals {
					if !s.in[v] && !s.shared[v] {
						c++
					}
				}
				if least < 0 || c < least {
					least = c
				}
			}
			if least > 0 {
				part = append(part, need{n.r, least})
			}
		}
		s.partScratch = part
		s.more[g] = 0
		if len(part) > 0 {
			s.more[g] = s.pack(part, nd.fit, s.shared)
		}
	}
	us, idle := 0, 0 // shared values in the set; values no design uses
	for _, v := range s.used {
		switch {
		case s.shared[v]:
			us++
		case s.owner[v] < 0:
			idle++
		default:
			s.cnt[s.owner[v]]++
		}
	}
	best := -1
	for t := us; t <= s.k; t++ {
		sum := t + idle
		for g, p := range s.profile {
			sum += max(s.cnt[g]+s.more[g], profileAt(p, t))
		}
		if best < 0 || sum < best {
			best = sum
		}
	}
	return best
}

// profileAt is p(t) from a profile: entries past the end are 0 (not
// computed), except that a profile ending in profileDone stays at its
// last entry (it reached every shared value of its group).
func profileAt(p []int, t int) int {
	if len(p) > 0 && p[len(p)-1] == profileDone {
		if t >= len(p)-1 {
			return p[len(p)-2]
		}
		return p[t]
	}
	if t < len(p) {
		return p[t]
	}
	return 0
}

// profileDone ends a profile that covers every number of shared values.
const profileDone = -1

// sharedValues marks the values that designs of two groups or more use and
// gives every other value its group.
func sharedValues(nets [][]item, nvals int, group []int) (shared []bool, owner []int) {
	shared, owner = make([]bool, nvals), make([]int, nvals)
	for v := range owner {
		owner[v] = -1
	}
	for r, its := range nets {
		for _, it := range its {
			for _, v := range it.vals {
				switch {
				case owner[v] < 0:
					owner[v] = group[r]
				case owner[v] != group[r]:
					shared[v] = true
				}
			}
		}
	}
	return shared, owner
}

// profiles computes every group's profile with the search, for t from at
// most kmax down to 0, each group within allowance nodes (counted with the
// selector's). Fewer shared values never need fewer others, so p(t) starts
// from p(t+1) and rises while a stage proves it too few; the stages of
// many shared values are the cheap ones. Where a group's allowance ends,
// the value reached is a proven lower bound for that t and every smaller
// one. No stage runs past the node budget until. It sets s.profile only
// when the board has groups that share values.
func (s *selector) profiles(kmax int, allowance, until int64) {
	if len(s.groups) < 2 {
		return
	}
	shared, owner := sharedValues(s.nets, s.nvals, s.group)
	if !slices.Contains(shared, true) {
		return
	}
	s.shared, s.owner = shared, owner
	profile := make([][]int, len(s.groups))
	for g, rs := range s.groups {
		sub := make([][]item, len(rs))
		mine := 0 // the shared values this group can use
		seen := make([]bool, s.nvals)
		for i, r := range rs {
			sub[i] = s.nets[r]
			for _, it := range s.nets[r] {
				for _, v := range it.vals {
					if shared[v] && !seen[v] {
						seen[v] = true
						mine++
					}
				}
			}
		}
		ps := newSelector(s.ctx, sub, s.nvals)
		ps.shared, ps.groups = shared, nil
		ps.nodes = s.nodes
		stop := min(s.nodes+allowance, until)
		top := min(mine, kmax)
		p := make([]int, top+1)
		n := 0
		for t := top; t >= 0; t-- {
			for {
				// A set with at most t shared values and n others?
				ps.kS = t
				found, finished := ps.exists(t+n, stop)
				if found {
					p[t] = n
					break
				}
				if finished {
					n++ // n proven too few
				}
				if !finished || n > kmax {
					// n is proven for t, so for every smaller t too;
					// past kmax it is as good as none, for no set the
					// search asks about has that many values.
					for u := range t + 1 {
						p[u] = n
					}
					t = 0
					break
				}
			}
		}
		if top == mine {
			p = append(p, profileDone)
		}
		s.nodes = ps.nodes
		profile[g] = p
	}
	s.profile = profile
}

// profileNode is the node profileBound is given: the node itself where
// counting its networks' own values pays (three values or more to spare,
// outside the enumeration of ties), else none (the set alone).
func (s *selector) profileNode(nd node, slack int) node {
	if slack < 3 || s.enum {
		return node{}
	}
	return nd
}
