package pairs

import (
	"cmp"
	"slices"
)

// commonShares turns the per-document counts of common units into the
// Result's list, and, under the automatic cap (auto), marks the documents
// that are mostly common text: more than half of their distinct units are
// common. Both are nil when no document holds a common unit; mostly is nil
// when none is mostly common or the cap is not automatic.
func commonShares(freq []uint32, docs [][]uint64, auto bool) (shares []CommonShare, mostly []bool) {
	for d, f := range freq {
		if f == 0 {
			continue
		}
		units := uint32(len(docs[d]))
		sh := CommonShare{Doc: uint32(d), Common: f, Units: units, Mostly: auto && 2*f > units}
		if sh.Mostly {
			if mostly == nil {
				mostly = make([]bool, len(docs))
			}
			mostly[d] = true
		}
		shares = append(shares, sh)
	}
	return shares, mostly
}

// NearCopiesOf finds the sets of near-copies among res.Pairs by the rule
// Count follows (threshold 0 means 0.7), for callers that keep only some of
// the engine's pairs; in is the Input res was counted from.
func NearCopiesOf(in Input, res *Result, threshold float64) []NearCopies {
	if threshold == 0 {
		threshold = defaultNearCopy
	}
	return nearCopies(in, res, threshold)
}

// nearCopies finds the sets of near-copies among res.Pairs: the connected
// components of the pairs whose documents each hold at least threshold of
// the other's counted units. Counted units are found by walking each paired
// document's fingerprints against the excluded and the common ones, so the
// cost is linear in the units of the paired documents (times a binary
// search), plus the pairs.
func nearCopies(in Input, res *Result, threshold float64) []NearCopies {
	if len(res.Pairs) == 0 {
		return nil
	}
	commonFP := make([]uint64, len(res.Common))
	for i, c := range res.Common {
		commonFP[i] = c.Hash
	}
	slices.Sort(commonFP)
	mostly := map[uint32]bool{}
	for _, sh := range res.CommonShares {
		if sh.Mostly {
			mostly[sh.Doc] = true
		}
	}
	counts := func(d uint32, fp uint64) bool {
		if _, ok := slices.BinarySearch(in.Excluded, fp); ok {
			return false
		}
		if _, ok := slices.BinarySearch(commonFP, fp); ok {
			return mostly[d]
		}
		return true
	}
	units := map[uint32]uint32{}
	countedUnits := func(d uint32) uint32 {
		if u, ok := units[d]; ok {
			return u
		}
		var u uint32
		for _, fp := range in.Docs[d] {
			if counts(d, fp) {
				u++
			}
		}
		units[d] = u
		return u
	}

	// Near-copy pairs, joined by union-find over the documents they touch.
	parent := map[uint32]uint32{}
	root := func(x uint32) uint32 {
		for parent[x] != x {
			parent[x] = parent[parent[x]]
			x = parent[x]
		}
		return x
	}
	var near []Pair
	for _, p := range res.Pairs {
		ua, ub := countedUnits(p.A), countedUnits(p.B)
		if float64(p.Shared) < threshold*float64(max(ua, ub)) {
			continue
		}
		near = append(near, p)
		for _, d := range [2]uint32{p.A, p.B} {
			if _, ok := parent[d]; !ok {
				parent[d] = d
			}
		}
		ra, rb := root(p.A), root(p.B)
		if ra != rb {
			parent[max(ra, rb)] = min(ra, rb)
		}
	}
	if len(near) == 0 {
		return nil
	}
	members := map[uint32][]uint32{}
	for d := range parent {
		r := root(d)
		members[r] = append(members[r], d)
	}
	// The representative shares the most counted units with its
	// near-copies (the lowest ID among equals).
	affinity := map[uint32]uint64{}
	for _, p := range near {
		affinity[p.A] += uint64(p.Shared)
		affinity[p.B] += uint64(p.Shared)
	}
	out := make([]NearCopies, 0, len(members))
	for _, docs := range members {
		slices.Sort(docs)
		nc := NearCopies{Docs: docs, Representative: docs[0]}
		for _, d := range docs {
			if affinity[d] > affinity[nc.Representative] {
				nc.Representative = d
			}
		}
		nc.Shared = make([]uint32, len(docs))
		nc.Units = make([]uint32, len(docs))
		rep := in.Docs[nc.Representative]
		for k, d := range docs {
			nc.Units[k] = countedUnits(d)
			nc.Shared[k] = sharedCounted(rep, in.Docs[d], func(fp uint64) bool {
				return counts(nc.Representative, fp) && counts(d, fp)
			})
		}
		out = append(out, nc)
	}
	inSet := map[uint32]int{}
	for k, nc := range out {
		for _, d := range nc.Docs {
			inSet[d] = k
		}
	}
	for _, p := range res.Pairs {
		if ka, ok := inSet[p.A]; ok {
			if kb, ok := inSet[p.B]; ok && ka == kb {
				out[ka].Pairs++
			}
		}
	}
	slices.SortFunc(out, func(x, y NearCopies) int {
		return cmp.Or(cmp.Compare(len(y.Docs), len(x.Docs)), cmp.Compare(x.Docs[0], y.Docs[0]))
	})
	return out
}

// sharedCounted counts the fingerprints of two ascending lists that are in
// both and count (merge walk).
func sharedCounted(x, y []uint64, count func(uint64) bool) uint32 {
	var n uint32
	for i, j := 0, 0; i < len(x) && j < len(y); {
		switch {
		case x[i] < y[j]:
			i++
		case x[i] > y[j]:
			j++
		default:
			if count(x[i]) {
				n++
			}
			i++
			j++
		}
	}
	return n
}
