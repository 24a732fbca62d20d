package report

import (
	"cmp"
	"slices"

	"reprise/shingle"
)

// Passages from word shingles.
//
// Runs of consecutive equal units (align.go) suit sentences, which do not
// overlap and all count. Word shingles overlap, an edit removes the K
// shingles that hold the edited word, and winnowing keeps only some
// shingles, so a copied passage shows up as many short runs with gaps. For
// word units a passage is built in two steps:
//
//  1. Chaining. Matches are the (i, j) pairs of counted units equal in A and
//     B, taken in A's text order. A match extends a chain when its first
//     word lies after the chain's last match in both documents (positions
//     advance in both) and at most Gap words after the end of that match's
//     shingle in each; among chains it may extend it joins the one whose last
//     match is nearest in B. Otherwise it starts a chain. A chain ends once
//     A's text is more than Gap words past it.
//  2. Merging. Two chains whose word ranges overlap or lie within Gap words
//     of each other in both documents are one passage. This is how crossing
//     matches are handled: text reordered inside a copied passage (sentences
//     swapped) gives chains that cross, and they are reported as the one
//     region they cover in each document; crossing matches farther apart
//     than Gap words stay separate passages, as a reordered copy of distant
//     parts should.
//
// Repeated units: a unit found r times in A and t times in B gives r·t
// matches (each document's occurrences capped at maxRepeats, as for
// sentences); the stray ones, a repeated phrase matched to its other
// occurrences, become short chains of their own. After merging, a passage
// whose word range in either document lies inside a passage with more
// matched units is dropped as such an echo: that text is already shown,
// with its better partner. The passage with the most units always stays, so
// a reported pair always has a passage.
//
// Short passages: a passage spanning fewer than MinWords words in either
// document (a stray shared phrase, such as "at the end of the") is dropped,
// unless it is the pair's largest, so that every reported pair still shows
// where its shared units are.
//
// A passage spans, in each document, from its first matched word's first
// byte to its last matched word's last byte; Units counts its matches.
// Cost: O(m·c) for m matches and c open chains (few: chains close after Gap
// words), plus sorting; merging repeats a sweep until nothing changes,
// usually once or twice.

// Chaining turns on passage chaining for word units; nil in Input keeps the
// runs of consecutive units that sentences use.
type Chaining struct {
	// Gap is G: matches merge into one passage across gaps of up to G words
	// in both documents.
	Gap int
	// MinWords: a passage spanning fewer words than this in either
	// document is not shown, unless it is the pair's largest (0: all shown).
	MinWords int
	// Reworded, when set, aligns pairs sentence by sentence on shared
	// content words instead of chaining (reworded.go), and drops pairs it
	// finds no passage in.
	Reworded *Reworded
}

// link is a passage in unit indices: A's units aFirst..aLast, B's units
// bFirst..bLast, holding n matches.
type link struct{ aFirst, aLast, bFirst, bLast, n int }

// pairPassages returns the passages of one pair by the rule of the units.
func pairPassages(ch *Chaining, sa, sb *sequence, da, db *Doc) []link {
	if ch == nil {
		runs := align(sa, sb)
		out := make([]link, len(runs))
		for k, r := range runs {
			out[k] = link{r.a, r.a + r.n - 1, r.b, r.b + r.n - 1, r.n}
		}
		return out
	}
	return chainPassages(sa, sb, da.Units, db.Units, max(0, ch.Gap), ch.MinWords)
}

// group is a chain or merged passage, in word positions and unit indices.
type group struct {
	aLo, aHi, bLo, bHi int // word ranges [lo, hi)
	aFirst, aLast      int // A units with the smallest start and largest end
	bFirst, bLast      int
	lastA, lastB       int // positions of the chain's last match
	lastI, lastJ       int // its unit indices
	n                  int
	dead               bool
}

func chainPassages(sa, sb *sequence, ua, ub []shingle.Unit, gap, minWords int) []link {
	where := sb.positions()
	var open, done []group
	for i, h := range sa.hashes {
		if !sa.counted[i] {
			continue
		}
		pa := int(ua[i].Pos)
		// Close chains A has left behind.
		kept := open[:0]
		for _, c := range open {
			if pa-(c.lastA+int(ua[c.lastI].Words)) > gap {
				done = append(done, c)
			} else {
				kept = append(kept, c)
			}
		}
		open = kept
		for _, j32 := range where[h] {
			j := int(j32)
			pb := int(ub[j].Pos)
			best := -1
			for k := range open {
				c := &open[k]
				if pa <= c.lastA || pb <= c.lastB || c.lastI == i {
					continue
				}
				if pa-(c.lastA+int(ua[c.lastI].Words)) > gap || pb-(c.lastB+int(ub[c.lastJ].Words)) > gap {
					continue
				}
				if best < 0 || pb-c.lastB < pb-open[best].lastB {
					best = k
				}
			}
			if best < 0 {
				open = append(open, newGroup(ua, ub, i, j))
				continue
			}
			open[best].add(ua, ub, i, j)
		}
	}
	done = append(done, open...)
	done = mergeGroups(done, ua, ub, gap)
	done = dropEchoes(done)
	done = dropShort(done, minWords)
	out := make([]link, len(done))
	for k, g := range done {
		out[k] = link{g.aFirst, g.aLast, g.bFirst, g.bLast, g.n}
	}
	slices.SortFunc(out, func(x, y link) int {
		return cmp.Or(cmp.Compare(x.aFirst, y.aFirst), cmp.Compare(x.bFirst, y.bFirst),
			cmp.Compare(x.aLast, y.aLast), cmp.Compare(x.bLast, y.bLast))
	})
	return out
}

func newGroup(ua, ub []shingle.Unit, i, j int) group {
	pa, pb := int(ua[i].Pos), int(ub[j].Pos)
	return group{
		aLo: pa, aHi: pa + int(ua[i].Words), bLo: pb, bHi: pb + int(ub[j].Words),
		aFirst: i, aLast: i, bFirst: j, bLast: j,
		lastA: pa, lastB: pb, lastI: i, lastJ: j, n: 1,
	}
}

// add extends the chain by the match (i, j).
func (g *group) add(ua, ub []shingle.Unit, i, j int) {
	o := newGroup(ua, ub, i, j)
	g.absorb(&o, ua, ub)
	g.lastA, g.lastB, g.lastI, g.lastJ = o.lastA, o.lastB, i, j
}

// absorb widens g to cover o.
func (g *group) absorb(o *group, ua, ub []shingle.Unit) {
	g.aLo, g.aHi = min(g.aLo, o.aLo), max(g.aHi, o.aHi)
	g.bLo, g.bHi = min(g.bLo, o.bLo), max(g.bHi, o.bHi)
	if ua[o.aFirst].Start < ua[g.aFirst].Start {
		g.aFirst = o.aFirst
	}
	if ua[o.aLast].End > ua[g.aLast].End {
		g.aLast = o.aLast
	}
	if ub[o.bFirst].Start < ub[g.bFirst].Start {
		g.bFirst = o.bFirst
	}
	if ub[o.bLast].End > ub[g.bLast].End {
		g.bLast = o.bLast
	}
	g.n += o.n
}

// near reports whether word ranges [lo1, hi1) and [lo2, hi2) overlap or lie
// within gap words of each other.
func near(lo1, hi1, lo2, hi2, gap int) bool {
	return lo2-hi1 <= gap && lo1-hi2 <= gap
}

// mergeGroups merges groups near each other in both documents until no two
// are (step 2 of the package comment above).
func mergeGroups(gs []group, ua, ub []shingle.Unit, gap int) []group {
	for {
		slices.SortFunc(gs, func(x, y group) int {
			return cmp.Or(cmp.Compare(x.aLo, y.aLo), cmp.Compare(x.bLo, y.bLo), cmp.Compare(x.aHi, y.aHi), cmp.Compare(x.bHi, y.bHi))
		})
		merged := false
		for i := range gs {
			if gs[i].dead {
				continue
			}
			for j := i + 1; j < len(gs) && gs[j].aLo-gs[i].aHi <= gap; j++ {
				if gs[j].dead || !near(gs[i].bLo, gs[i].bHi, gs[j].bLo, gs[j].bHi, gap) {
					continue
				}
				gs[i].absorb(&gs[j], ua, ub)
				gs[j].dead = true
				merged = true
			}
		}
		gs = slices.DeleteFunc(gs, func(g group) bool { return g.dead })
		if !merged {
			return gs
		}
	}
}

// dropEchoes removes every group whose range in A or in B lies inside a
// group with more matches (of two alike, both stay).
func dropEchoes(gs []group) []group {
	if len(gs) < 2 {
		return gs
	}
	for i := range gs {
		for j := range gs {
			if i == j || gs[j].dead {
				continue
			}
			bigger := gs[j].n > gs[i].n
			inA := gs[j].aLo <= gs[i].aLo && gs[i].aHi <= gs[j].aHi
			inB := gs[j].bLo <= gs[i].bLo && gs[i].bHi <= gs[j].bHi
			if bigger && (inA || inB) {
				gs[i].dead = true
				break
			}
		}
	}
	return slices.DeleteFunc(gs, func(g group) bool { return g.dead })
}

// dropShort removes groups spanning fewer than minWords words in either
// document, keeping the one with the most matches (the first of equals) if
// none is long enough.
func dropShort(gs []group, minWords int) []group {
	if minWords <= 0 || len(gs) == 0 {
		return gs
	}
	best := 0
	for i := range gs {
		if gs[i].n > gs[best].n {
			best = i
		}
	}
	keep := gs[best]
	gs = slices.DeleteFunc(gs, func(g group) bool { return g.aHi-g.aLo < minWords || g.bHi-g.bLo < minWords })
	if len(gs) == 0 {
		gs = append(gs, keep)
	}
	return gs
}
