package pairs

import (
	"cmp"
	"math/bits"
	"slices"
)

// groupItems is what the group search sees. Only rows (baskets) holding
// three or more documents of frequent pairs can support a set of three,
// so only those rows count; each document's support list is the ascending
// list of those rows holding it. Documents with equal support lists are
// one item: a maximal set holds all of them or none (adding one to a set
// holding the other leaves its support as it was).
//
// Nothing below depends on how the rows are numbered, only on the sizes of
// intersections and on equality of lists, so the in-memory and spilling
// paths, which may order their rows differently, search the same tree.
type groupItems struct {
	tids [][]uint32 // item i's support list
	docs [][]uint32 // item i's documents (compact IDs), ascending
	adj  [][]int32  // the items sharing a frequent pair with item i, ascending
}

// makeGroupItems builds the items from the baskets (compact IDs) and the
// frequent pairs. Items are numbered by their first document.
func makeGroupItems(b *baskets, m int, pairs []countedPair, s int) groupItems {
	var g groupItems
	if len(pairs) == 0 {
		return g
	}
	in := make([]bool, m)
	for _, p := range pairs {
		in[p.a], in[p.b] = true, true
	}
	useful := func(row []uint32) bool {
		k := 0
		for _, d := range row {
			if in[d] {
				if k++; k == 3 {
					return true
				}
			}
		}
		return false
	}
	at := make([]int, m+1)
	for i := range b.len() {
		if row := b.row(i); useful(row) {
			for _, d := range row {
				if in[d] {
					at[d+1]++
				}
			}
		}
	}
	for d := range m {
		at[d+1] += at[d]
	}
	list := make([]uint32, at[m])
	fill := slices.Clone(at[:m])
	r := uint32(0)
	for i := range b.len() {
		row := b.row(i)
		if !useful(row) {
			continue
		}
		for _, d := range row {
			if in[d] {
				list[fill[d]] = r
				fill[d]++
			}
		}
		r++
	}
	itemOf := make([]int32, m)
	byHash := map[uint64][]int32{}
	for d := range m {
		itemOf[d] = -1
		t := list[at[d]:at[d+1]]
		if len(t) < s {
			continue // in no set of three with support s
		}
		h := hashList(t)
		it := int32(-1)
		for _, c := range byHash[h] {
			if slices.Equal(g.tids[c], t) {
				it = c
				break
			}
		}
		if it < 0 {
			it = int32(len(g.tids))
			g.tids = append(g.tids, t)
			g.docs = append(g.docs, nil)
			byHash[h] = append(byHash[h], it)
		}
		g.docs[it] = append(g.docs[it], uint32(d))
		itemOf[d] = it
	}
	g.adj = make([][]int32, len(g.tids))
	for _, p := range pairs {
		x, y := itemOf[p.a], itemOf[p.b]
		if x < 0 || y < 0 || x == y {
			continue
		}
		g.adj[x] = append(g.adj[x], y)
		g.adj[y] = append(g.adj[y], x)
	}
	for i := range g.adj {
		slices.Sort(g.adj[i])
		g.adj[i] = slices.Compact(g.adj[i])
	}
	return g
}

// hashList is FNV-1a over a list's values, to find equal lists quickly.
func hashList(t []uint32) uint64 {
	h := uint64(14695981039346656037)
	for _, v := range t {
		for range 4 {
			h ^= uint64(v & 0xff)
			h *= 1099511628211
			v >>= 8
		}
	}
	return h
}

// groupSearch finds the maximal frequent sets of items by depth-first
// search; see "Groups and their bound" in the package documentation.
type groupSearch struct {
	groupItems
	s         int
	limit     int // steps allowed
	steps     int
	truncated bool
	stopped   func() error // checked every stopEvery steps; nil: never

	sets    [][]int32   // the maximal sets found, items ascending
	support []uint32    // support of each
	holding [][]int32   // holding[i]: the found sets with item i, ascending
	mark    []int       // scratch of covers: stamp per item
	stamp   int         // current stamp of mark
	buf     [2][]uint32 // scratch of supportAll
	rootPos []int       // each item's place in the root's tail
}

// tailItem is an item that may extend a set, with the support it would
// have.
type tailItem struct {
	item int32
	sup  int
}

// searchGroups finds the maximal sets of items with support threshold s in
// at most limit steps: first by shared units (searchByUnits, with half of
// the steps), and when that does not finish, by documents (expand) with
// the steps left.
func searchGroups(items groupItems, s, limit int, stopped func() error) *groupSearch {
	g := &groupSearch{groupItems: items, s: s, limit: max(limit/2, 1), stopped: stopped}
	if len(g.tids) == 0 || g.searchByUnits() {
		g.limit = limit
		return g
	}
	g.limit, g.truncated = limit, false
	g.sets, g.support = nil, nil
	g.searchByDocs()
	return g
}

// searchByDocs finds the maximal sets by extending sets of items one item
// at a time (expand), from the empty set.
func (g *groupSearch) searchByDocs() {
	k := len(g.tids)
	g.holding = make([][]int32, k)
	g.mark = make([]int, k)
	g.rootPos = make([]int, k)
	tail := make([]tailItem, k)
	for i := range k {
		tail[i] = tailItem{int32(i), len(g.tids[i])}
	}
	sortTail(tail)
	order := make([]int32, k)
	for x, t := range tail {
		order[x] = t.item
		g.rootPos[t.item] = x
	}
	g.expand(nil, nil, order, nil)
}

// searchByUnits finds the maximal sets by their shared units: a set of
// items is frequent exactly when it lies inside the items holding some s
// units, so the maximal sets are the largest among the item sets of the
// closed unit sets (those equal to the units all their items share) of s
// or more units whose every closed subset has fewer. It walks the closed
// unit sets in prefix-preserving order (each reached once, from the one
// closed set it extends), never past one of s units, keeps those, then
// drops any inside another. It fills g.sets and g.support and returns
// true, or returns false when the bound stopped it.
func (g *groupSearch) searchByUnits() bool {
	k := len(g.tids)
	if k == 0 {
		return true
	}
	rows := 0
	for _, t := range g.tids {
		if len(t) > 0 {
			rows = max(rows, int(t[len(t)-1])+1)
		}
	}
	// The items holding each row, ascending.
	at := make([]int, rows+1)
	for _, t := range g.tids {
		for _, r := range t {
			at[r+1]++
		}
	}
	for r := range rows {
		at[r+1] += at[r]
	}
	flat := make([]int32, at[rows])
	fill := slices.Clone(at[:rows])
	for i, t := range g.tids {
		for _, r := range t {
			flat[fill[r]] = int32(i)
			fill[r]++
		}
	}
	rowItems := func(r uint32) []int32 { return flat[at[r]:at[r+1]] }
	weight := func(items []int32) int {
		n := 0
		for _, i := range items {
			n += len(g.docs[i])
		}
		return n
	}
	all := make([]int32, k)
	for i := range all {
		all[i] = int32(i)
	}
	// closure is the units all of items hold.
	closure := func(items []int32) ([]uint32, bool) {
		c := slices.Clone(g.tids[items[0]])
		for _, i := range items[1:] {
			if !g.step() {
				return nil, false
			}
			c = intersect(c[:0], c, g.tids[i])
		}
		return c, true
	}
	type found struct {
		items []int32
		sup   int
	}
	var cands []found
	var walk func(c []uint32, items []int32, from uint32) bool
	walk = func(c []uint32, items []int32, from uint32) bool {
		for e := from; e < uint32(rows); e++ {
			if _, in := slices.BinarySearch(c, e); in {
				continue
			}
			if !g.step() {
				return false
			}
			next := intersectItems(items, rowItems(e))
			if weight(next) < 3 {
				continue
			}
			cl, ok := closure(next)
			if !ok {
				return false
			}
			// Prefix-preserving: the closure adds no unit before e
			// (else this closed set is reached from another).
			if prefixChanged(c, cl, e) {
				continue
			}
			if len(cl) >= g.s {
				cands = append(cands, found{next, len(cl)})
				continue
			}
			if !walk(cl, next, e+1) {
				return false
			}
		}
		return true
	}
	root, ok := closure(all)
	if !ok {
		return false
	}
	if len(root) >= g.s {
		cands = append(cands, found{all, len(root)})
	} else if !walk(root, all, 0) {
		return false
	}
	// Keep the largest: a set inside another candidate is not maximal.
	slices.SortFunc(cands, func(x, y found) int {
		return cmp.Or(cmp.Compare(weight(y.items), weight(x.items)), slices.Compare(x.items, y.items))
	})
	holding := make([][]int32, k)
	for _, c := range cands {
		rare := c.items[0]
		for _, i := range c.items[1:] {
			if len(holding[i]) < len(holding[rare]) {
				rare = i
			}
		}
		inside := false
		for _, x := range holding[rare] {
			if !g.step() {
				return false
			}
			if isSubset(c.items, g.sets[x]) {
				inside = true
				break
			}
		}
		if inside {
			continue
		}
		x := int32(len(g.sets))
		g.sets = append(g.sets, c.items)
		g.support = append(g.support, uint32(c.sup))
		for _, i := range c.items {
			holding[i] = append(holding[i], x)
		}
	}
	return true
}

// intersectItems is the items in both ascending lists.
func intersectItems(x, y []int32) []int32 { return mergeCommon(nil, x, y) }

// mergeCommon appends to dst the values in both ascending lists, by a
// merge walk.
func mergeCommon[T cmp.Ordered](dst, x, y []T) []T {
	i, j := 0, 0
	for i < len(x) && j < len(y) {
		switch {
		case x[i] < y[j]:
			i++
		case x[i] > y[j]:
			j++
		default:
			dst = append(dst, x[i])
			i++
			j++
		}
	}
	return dst
}

// prefixChanged says whether cl (a superset of c, both ascending) holds a
// unit below e that c does not.
func prefixChanged(c, cl []uint32, e uint32) bool {
	i := 0
	for _, r := range cl {
		if r >= e {
			return false
		}
		for i < len(c) && c[i] < r {
			i++
		}
		if i == len(c) || c[i] != r {
			return true
		}
	}
	return false
}

// isSubset says whether every value of x (ascending) is in y (ascending).
func isSubset(x, y []int32) bool {
	if len(x) > len(y) {
		return false
	}
	j := 0
	for _, v := range x {
		for j < len(y) && y[j] < v {
			j++
		}
		if j == len(y) || y[j] != v {
			return false
		}
		j++
	}
	return true
}

// step takes one step of the search, or says that the bound is reached.
func (g *groupSearch) step() bool {
	if g.steps == g.limit {
		g.truncated = true
		return false
	}
	if g.stopped != nil && g.steps%stopEvery == 0 && g.stopped() != nil {
		g.limit, g.truncated = g.steps, true // the caller returns the error
		return false
	}
	g.steps++
	return true
}

// stopEvery is how many steps the search takes between looks at whether
// its caller was cancelled (some milliseconds of work).
const stopEvery = 1 << 16

// expand searches the sets holding head (all of its items) and some of
// tail (the items that extend head to a frequent set, in the order of this
// node), given t, the support list of head (nil at the root, where head is
// empty), and lmfi, every found set holding head. When it returns, every
// frequent set of head and items of tail lies inside a found set, unless
// the bound stopped the search.
func (g *groupSearch) expand(head []int32, t []uint32, tail []int32, lmfi []int32) {
	root := len(head) == 0
	if len(tail) == 0 {
		if !root && len(lmfi) == 0 {
			g.record(head, nil, len(t))
		}
		return
	}
	// A found set holding head and all of tail covers everything below.
	if covered, ok := g.covers(lmfi, tail); !ok || covered {
		return
	}
	// Look-ahead: head with all of tail is frequent, so it is the one
	// maximal set below.
	sup, ok := g.supportAll(t, tail)
	if !ok {
		return
	}
	if sup >= g.s {
		g.record(head, tail, sup)
		return
	}
	start := int32(len(g.sets))
	for x, i := range tail {
		if !g.step() {
			return
		}
		childL := g.within(lmfi, start, i)
		rest := g.adjacentAfter(tail, x, root)
		if covered, ok := g.covers(childL, rest); !ok || covered {
			if !ok {
				return
			}
			continue
		}
		ti := g.tids[i]
		if !root {
			if !g.step() {
				return
			}
			ti = intersect(make([]uint32, 0, min(len(t), len(ti))), t, ti)
		}
		childHead := append(slices.Clip(head), i)
		var childTail []tailItem
		for _, j := range rest {
			if !g.step() {
				return
			}
			switch c := intersectCount(ti, g.tids[j]); {
			case c == len(ti):
				// Every set holding head and i can take j too: any
				// maximal one holds it.
				childHead = append(childHead, j)
			case c >= g.s:
				childTail = append(childTail, tailItem{j, c})
			}
		}
		for _, j := range childHead[len(head)+1:] {
			childL = slices.DeleteFunc(childL, func(k int32) bool {
				_, found := slices.BinarySearch(g.sets[k], j)
				return !found
			})
		}
		sortTail(childTail)
		next := make([]int32, len(childTail))
		for y, c := range childTail {
			next[y] = c.item
		}
		g.expand(childHead, ti, next, childL)
		if g.truncated {
			return
		}
	}
}

// sortTail orders a tail by support ascending, then item.
func sortTail(tail []tailItem) {
	slices.SortFunc(tail, func(x, y tailItem) int {
		return cmp.Or(cmp.Compare(x.sup, y.sup), cmp.Compare(x.item, y.item))
	})
}

// adjacentAfter lists the items after tail[x] in tail that share a
// frequent pair with it, in tail's order. At the root it walks the item's
// adjacency (the root's tail is every item); below, the tail is short and
// each item is looked up.
func (g *groupSearch) adjacentAfter(tail []int32, x int, root bool) []int32 {
	i := tail[x]
	var rest []int32
	if root {
		for _, j := range g.adj[i] {
			if g.rootPos[j] > x {
				rest = append(rest, j)
			}
		}
		slices.SortFunc(rest, func(a, b int32) int { return cmp.Compare(g.rootPos[a], g.rootPos[b]) })
		return rest
	}
	for _, j := range tail[x+1:] {
		if _, found := slices.BinarySearch(g.adj[i], j); found {
			rest = append(rest, j)
		}
	}
	return rest
}

// within lists the found sets holding head and item i, ascending: those of
// lmfi (every found set holding head, when the node was entered) that hold
// i, and those found since (from index start on, all below this node, so
// all holding head) that hold i.
func (g *groupSearch) within(lmfi []int32, start, i int32) []int32 {
	h := g.holding[i]
	from, _ := slices.BinarySearch(h, start)
	return append(mergeCommon(nil, lmfi, h[:from]), h[from:]...)
}

// covers says whether one of the found sets sets holds every item of
// items (each set tested is a step); ok is false when the bound stopped it.
func (g *groupSearch) covers(sets []int32, items []int32) (covered, ok bool) {
	if len(sets) == 0 {
		return false, true
	}
	g.stamp++
	for _, j := range items {
		g.mark[j] = g.stamp
	}
	for _, k := range sets {
		if !g.step() {
			return false, false
		}
		set := g.sets[k]
		if len(set) < len(items) {
			continue
		}
		all := true
		if len(items)*bits.Len(uint(len(set))) < len(set) {
			for _, j := range items {
				if _, found := slices.BinarySearch(set, j); !found {
					all = false
					break
				}
			}
		} else {
			n := 0
			for _, j := range set {
				if g.mark[j] == g.stamp {
					n++
				}
			}
			all = n == len(items)
		}
		if all {
			return true, true
		}
	}
	return false, true
}

// supportAll is the support of head (support list t, nil at the root)
// with every item of tail, stopping once it is below s; ok is false when
// the bound stopped it.
func (g *groupSearch) supportAll(t []uint32, tail []int32) (sup int, ok bool) {
	cur, rest := t, tail
	if t == nil {
		cur, rest = g.tids[tail[0]], tail[1:]
	}
	w := 0
	for _, j := range rest {
		if !g.step() {
			return 0, false
		}
		g.buf[w] = intersect(g.buf[w][:0], cur, g.tids[j])
		cur = g.buf[w]
		w ^= 1
		if len(cur) < g.s {
			break
		}
	}
	return len(cur), true
}

// record adds head with tail as a maximal set of the given support.
func (g *groupSearch) record(head, tail []int32, sup int) {
	set := slices.Concat(head, tail)
	slices.Sort(set)
	k := int32(len(g.sets))
	g.sets = append(g.sets, set)
	g.support = append(g.support, uint32(sup))
	for _, i := range set {
		g.holding[i] = append(g.holding[i], k)
	}
}

// groups lists the maximal sets of three or more documents in original
// IDs, ranked: by size desc, Shared desc, then Docs.
func (g *groupSearch) groups(orig []uint32) []Group {
	var out []Group
	for k, set := range g.sets {
		n := 0
		for _, i := range set {
			n += len(g.docs[i])
		}
		if n < 3 {
			continue
		}
		docs := make([]uint32, 0, n)
		for _, i := range set {
			for _, d := range g.docs[i] {
				docs = append(docs, orig[d])
			}
		}
		slices.Sort(docs)
		out = append(out, Group{Docs: docs, Shared: g.support[k]})
	}
	slices.SortFunc(out, func(x, y Group) int {
		return cmp.Or(cmp.Compare(len(y.Docs), len(x.Docs)), cmp.Compare(y.Shared, x.Shared), slices.Compare(x.Docs, y.Docs))
	})
	return out
}

// intersect appends to dst the values in both ascending lists x and y.
// When one list is much longer, each value of the shorter is searched for
// in the rest of the longer.
func intersect(dst, x, y []uint32) []uint32 {
	if len(x) > len(y) {
		x, y = y, x
	}
	if len(x)*16 < len(y) {
		for _, v := range x {
			k, found := slices.BinarySearch(y, v)
			if found {
				dst = append(dst, v)
			}
			y = y[k:]
		}
		return dst
	}
	return mergeCommon(dst, x, y)
}

// intersectCount is len(intersect(nil, x, y)) without the list.
func intersectCount(x, y []uint32) int {
	if len(x) > len(y) {
		x, y = y, x
	}
	n := 0
	if len(x)*16 < len(y) {
		for _, v := range x {
			k, found := slices.BinarySearch(y, v)
			if found {
				n++
			}
			y = y[k:]
		}
		return n
	}
	i, j := 0, 0
	for i < len(x) && j < len(y) {
		switch {
		case x[i] < y[j]:
			i++
		case x[i] > y[j]:
			j++
		default:
			n++
			i++
			j++
		}
	}
	return n
}

// Clusters returns the connected components of ps among documents
// 0..n-1 by the rule Result.Clusters follows (each ascending, ordered by
// the smallest member, documents in no pair left out), for callers that
// keep only some of the engine's pairs.
func Clusters(ps []Pair, n int) [][]uint32 {
	counted := make([]countedPair, len(ps))
	for i, p := range ps {
		counted[i] = countedPair{a: p.A, b: p.B, n: p.Shared}
	}
	identity := make([]uint32, n)
	for i := range identity {
		identity[i] = uint32(i)
	}
	return clusters(counted, n, identity)
}

// clusters returns the connected components of the pairs (compact IDs), in
// original IDs, each ascending, ordered by their smallest member.
func clusters(pairs []countedPair, m int, orig []uint32) [][]uint32 {
	if len(pairs) == 0 {
		return nil
	}
	parent := make([]uint32, m)
	for i := range parent {
		parent[i] = uint32(i)
	}
	root := func(x uint32) uint32 {
		for parent[x] != x {
			parent[x] = parent[parent[x]]
			x = parent[x]
		}
		return x
	}
	inPair := make([]bool, m)
	for _, p := range pairs {
		inPair[p.a], inPair[p.b] = true, true
		ra, rb := root(p.a), root(p.b)
		if ra != rb {
			parent[max(ra, rb)] = min(ra, rb)
		}
	}
	// Scanning in ascending order meets each component at its smallest
	// member first and adds members in ascending order.
	const none = -1
	index := make([]int, m)
	for i := range index {
		index[i] = none
	}
	var out [][]uint32
	for d := range m {
		if !inPair[d] {
			continue
		}
		r := root(uint32(d))
		if index[r] == none {
			index[r] = len(out)
			out = append(out, nil)
		}
		out[index[r]] = append(out[index[r]], orig[d])
	}
	return out
}
