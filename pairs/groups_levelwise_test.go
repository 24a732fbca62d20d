package pairs

import "slices"

// The level-wise group search that the maximal-set search of groups.go
// replaced, kept here (tests only) so that the benchmark can run both on
// the same baskets, side by side: BenchmarkGroups in bench_test.go.

// lwLevel holds the frequent sets of one size k, flat (k IDs per set) and in
// lexicographic order, with the baskets containing each set (its support
// list, ascending basket indices) and whether a frequent set one larger
// contains it.
type lwLevel struct {
	k       int
	sets    []uint32
	support []uint32 // support of set i
	covered []bool
	tids    []uint32 // support lists, flat
	tidAt   []int    // set i's list is tids[tidAt[i]:tidAt[i+1]]
}

func (l *lwLevel) n() int                     { return len(l.support) }
func (l *lwLevel) set(i int) []uint32         { return l.sets[i*l.k : (i+1)*l.k] }
func (l *lwLevel) supportList(i int) []uint32 { return l.tids[l.tidAt[i]:l.tidAt[i+1]] }

// find returns the index of set x in l, or -1.
func (l *lwLevel) find(x []uint32) int {
	lo, hi := 0, l.n()
	for lo < hi {
		mid := int(uint(lo+hi) >> 1)
		if slices.Compare(l.set(mid), x) < 0 {
			lo = mid + 1
		} else {
			hi = mid
		}
	}
	if lo < l.n() && slices.Equal(l.set(lo), x) {
		return lo
	}
	return -1
}

// lwGrowth is the outcome of growing groups: the levels of size 3 and
// up, how many candidates were counted, and whether the bound stopped it.
type lwGrowth struct {
	levels    []*lwLevel
	examined  int
	truncated bool
}

// levelwiseGroups grows frequent sets of three or more documents from the
// frequent pairs, A-Priori style: a k-set is a candidate only when all its
// (k-1)-subsets are frequent. Candidates come from joining two frequent
// (k-1)-sets that share their first k-2 documents; the other subsets are
// looked up by binary search. A candidate's support is the length of the
// intersection of the two joined sets' support lists (the baskets
// containing each), which are kept for the current lwLevel only.
//
// At most maxCand candidates are counted; the next one stops the growth
// and sets truncated.
func levelwiseGroups(b *baskets, m int, pairs []countedPair, s, maxCand int) lwGrowth {
	var g lwGrowth
	if len(pairs) < 2 {
		return g
	}
	joinable := false
	for i := 1; i < len(pairs); i++ {
		if pairs[i].a == pairs[i-1].a {
			joinable = true
			break
		}
	}
	if !joinable {
		return g
	}
	cur := lwPairLevel(b, m, pairs)
	var scratch []uint32
	var subIdx []int
	for cur.n() >= 2 && !g.truncated {
		q := cur.k
		next := &lwLevel{k: q + 1, tidAt: []int{0}}
		z := make([]uint32, q+1)
		sub := make([]uint32, q)
	blocks:
		for lo := 0; lo < cur.n(); {
			hi := lo + 1
			for hi < cur.n() && slices.Equal(cur.set(hi)[:q-1], cur.set(lo)[:q-1]) {
				hi++
			}
			for i := lo; i < hi; i++ {
				for j := i + 1; j < hi; j++ {
					copy(z, cur.set(i))
					z[q] = cur.set(j)[q-1]
					// Omitting z[q] gives set i and omitting z[q-1]
					// gives set j; look the others up.
					subIdx = subIdx[:0]
					ok := true
					for p := 0; p < q-1; p++ {
						sub = append(append(sub[:0], z[:p]...), z[p+1:]...)
						x := cur.find(sub)
						if x < 0 {
							ok = false
							break
						}
						subIdx = append(subIdx, x)
					}
					if !ok {
						continue
					}
					if g.examined == maxCand {
						g.truncated = true
						break blocks
					}
					g.examined++
					scratch = intersect(scratch[:0], cur.supportList(i), cur.supportList(j))
					if len(scratch) < s {
						continue
					}
					next.sets = append(next.sets, z...)
					next.support = append(next.support, uint32(len(scratch)))
					next.tids = append(next.tids, scratch...)
					next.tidAt = append(next.tidAt, len(next.tids))
					cur.covered[i], cur.covered[j] = true, true
					for _, x := range subIdx {
						cur.covered[x] = true
					}
				}
			}
			lo = hi
		}
		next.covered = make([]bool, next.n())
		cur.tids, cur.tidAt = nil, nil // no longer needed
		if next.n() == 0 {
			break
		}
		g.levels = append(g.levels, next)
		cur = next
	}
	return g
}

// lwPairLevel makes the lwLevel of frequent pairs, with the support lists of
// the pairs that can be joined (those sharing their first document with
// another pair).
func lwPairLevel(b *baskets, m int, pairs []countedPair) *lwLevel {
	// Each compact document's baskets, ascending.
	at := make([]int, m+1)
	for _, d := range b.docs {
		at[d+1]++
	}
	for d := range m {
		at[d+1] += at[d]
	}
	list := make([]uint32, len(b.docs))
	fill := slices.Clone(at[:m])
	for i := range b.fps {
		for _, d := range b.row(i) {
			list[fill[d]] = uint32(i)
			fill[d]++
		}
	}
	docBaskets := func(d uint32) []uint32 { return list[at[d]:at[d+1]] }

	l := &lwLevel{k: 2, tidAt: []int{0}, covered: make([]bool, len(pairs))}
	for i, p := range pairs {
		l.sets = append(l.sets, p.a, p.b)
		l.support = append(l.support, p.n)
		joinable := (i > 0 && pairs[i-1].a == p.a) || (i+1 < len(pairs) && pairs[i+1].a == p.a)
		if joinable {
			l.tids = intersect(l.tids, docBaskets(p.a), docBaskets(p.b))
		}
		l.tidAt = append(l.tidAt, len(l.tids))
	}
	return l
}

// groups lists the maximal frequent sets (those no frequent set found one
// larger contains) in original IDs, by size desc, Shared desc, then Docs.
func (g *lwGrowth) groups(orig []uint32) []Group {
	var out []Group
	for _, l := range g.levels {
		for i := range l.n() {
			if l.covered[i] {
				continue
			}
			docs := make([]uint32, l.k)
			for x, d := range l.set(i) {
				docs[x] = orig[d]
			}
			out = append(out, Group{Docs: docs, Shared: l.support[i]})
		}
	}
	slices.SortFunc(out, func(x, y Group) int {
		if len(x.Docs) != len(y.Docs) {
			return len(y.Docs) - len(x.Docs)
		}
		if x.Shared != y.Shared {
			if x.Shared > y.Shared {
				return -1
			}
			return 1
		}
		return slices.Compare(x.Docs, y.Docs)
	})
	return out
}
