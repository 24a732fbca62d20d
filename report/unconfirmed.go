package report

import "reprise/pairs"

// unconfirmedPairs are the engine's pairs the reworded alignment found no
// passage in, for recomputing groups and clusters.
type unconfirmedPairs struct {
	dropped map[[2]uint32]bool
}

// dropUnconfirmed removes the unconfirmed pairs from rs (keeping order) and
// says which they were.
func dropUnconfirmed[T any](rs []T, unconfirmed func(T) bool, pair func(T) pairs.Pair) ([]T, unconfirmedPairs) {
	var u unconfirmedPairs
	out := rs[:0]
	for _, r := range rs {
		p := pair(r)
		if unconfirmed(r) {
			if u.dropped == nil {
				u.dropped = map[[2]uint32]bool{}
			}
			u.dropped[[2]uint32{p.A, p.B}] = true
			continue
		}
		out = append(out, r)
	}
	return out, u
}

// splits reports whether a group holds an unconfirmed pair: it is then no
// group of the report (its members do not all share passages).
func (u unconfirmedPairs) splits(docs []uint32) bool {
	if len(u.dropped) == 0 {
		return false
	}
	for i, a := range docs {
		for _, b := range docs[i+1:] {
			if u.dropped[[2]uint32{min(a, b), max(a, b)}] {
				return true
			}
		}
	}
	return false
}

// clusters returns the engine's clusters, or when pairs were dropped the
// connected components of the engine's other pairs (listed or not).
func (u unconfirmedPairs) clusters(eng *pairs.Result, n int) [][]uint32 {
	if len(u.dropped) == 0 {
		return eng.Clusters
	}
	kept := make([]pairs.Pair, 0, len(eng.Pairs))
	for _, p := range eng.Pairs {
		if !u.dropped[[2]uint32{p.A, p.B}] {
			kept = append(kept, p)
		}
	}
	return pairs.Clusters(kept, n)
}
