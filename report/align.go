package report

import (
	"cmp"
	"slices"

	"reprise/pairs"
	"reprise/shingle"
)

// maxRepeats is how many occurrences of one unit in one document may seed
// passages (see the package comment).
const maxRepeats = 64

// setAside holds the fingerprints that never match: common text and templates.
type setAside map[uint64]struct{}

func newSetAside(common []pairs.CommonUnit, excluded []uint64) setAside {
	s := make(setAside, len(common)+len(excluded))
	for _, c := range common {
		s[c.Hash] = struct{}{}
	}
	for _, h := range excluded {
		s[h] = struct{}{}
	}
	return s
}

// sequence is one document's units in text order, prepared for alignment.
type sequence struct {
	hashes   []uint64
	counted  []bool             // unit may match: not common, not a template, within maxRepeats
	where    map[uint64][]int32 // counted unit -> its positions, ascending
	distinct int                // distinct counted fingerprints
}

func newSequence(units []shingle.Unit, aside setAside) sequence {
	// The positions of each fingerprint are gathered as the units are
	// read: every alignment looks B's units up by fingerprint, and one
	// map built once costs less than a count map and then a position map
	// (pprof, --unit reworded). A unit is counted while its fingerprint has
	// fewer than maxRepeats earlier counted occurrences, which is while it
	// has fewer than maxRepeats earlier occurrences.
	s := sequence{hashes: make([]uint64, len(units)), counted: make([]bool, len(units)),
		where: make(map[uint64][]int32, len(units))}
	for i, u := range units {
		s.hashes[i] = u.Hash
		if _, ok := aside[u.Hash]; ok {
			continue
		}
		if ps := s.where[u.Hash]; len(ps) < maxRepeats {
			s.where[u.Hash] = append(ps, int32(i))
			s.counted[i] = true
		}
	}
	s.distinct = len(s.where)
	return s
}

func (s *sequence) positions() map[uint64][]int32 { return s.where }

// run is a passage in unit positions: units a..a+n-1 of A equal b..b+n-1 of B.
type run struct{ a, b, n int }

// align returns the maximal runs of matching units of a and b, ordered by
// their start in a, then in b.
func align(a, b *sequence) []run {
	match := func(i, j int) bool {
		return i >= 0 && j >= 0 && i < len(a.hashes) && j < len(b.hashes) &&
			a.counted[i] && b.counted[j] && a.hashes[i] == b.hashes[j]
	}
	where := b.positions()
	var runs []run
	for i, h := range a.hashes {
		if !a.counted[i] {
			continue
		}
		for _, j32 := range where[h] {
			j := int(j32)
			if match(i-1, j-1) {
				continue // inside a run that started earlier
			}
			n := 1
			for match(i+n, j+n) {
				n++
			}
			runs = append(runs, run{i, j, n})
		}
	}
	return runs
}

// span is a byte range [start, end) of a text.
type span struct{ start, end int }

// wordsIn counts the words of text inside the union of spans.
func wordsIn(text string, spans []span) int {
	if len(spans) == 0 {
		return 0
	}
	spans = slices.Clone(spans)
	slices.SortFunc(spans, func(x, y span) int { return cmp.Or(cmp.Compare(x.start, y.start), cmp.Compare(x.end, y.end)) })
	words := 0
	cur := spans[0]
	for _, s := range spans[1:] {
		if s.start <= cur.end {
			cur.end = max(cur.end, s.end)
			continue
		}
		words += shingle.CountWords(text[cur.start:cur.end])
		cur = s
	}
	return words + shingle.CountWords(text[cur.start:cur.end])
}
