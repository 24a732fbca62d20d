package pairs

import (
	"slices"
	"testing"

	"pgregory.net/rapid"
)

// groupStart runs Count's in-memory steps up to the group search and
// returns what the search starts from, so that tests and benchmarks can
// run each search on its own.
func groupStart(in Input, opt Options) (bk baskets, m int, found []countedPair, s int, orig []uint32, err error) {
	cfg, err := resolve(in, opt)
	if err != nil {
		return bk, 0, nil, 0, nil, err
	}
	bk, _, _, _ = formBaskets(gather(in.Docs, 1), in.Excluded, cfg.maxDocs, in.Docs, cfg.auto)
	bk.prune(cfg.documents, cfg.s)
	orig = bk.compact(cfg.documents)
	found = countSparse(&bk, bk.increments(), uint32(cfg.s))
	return bk, len(orig), found, cfg.s, orig, nil
}

// drawTemplateDocs draws a small corpus of near-identical documents: a few
// short template texts, each document holding some of them with some of
// their units dropped, and a unit or two from a small shared pool.
func drawTemplateDocs(t *rapid.T) [][]uint64 {
	templates := rapid.IntRange(1, 3).Draw(t, "templates")
	size := rapid.IntRange(2, 8).Draw(t, "template units")
	n := rapid.IntRange(3, 10).Draw(t, "documents")
	docs := make([][]uint64, n)
	for d := range docs {
		var fps []uint64
		for tm := range templates {
			if !rapid.Bool().Draw(t, "holds") {
				continue
			}
			for u := range size {
				if rapid.IntRange(0, 9).Draw(t, "kept") < 8 {
					fps = append(fps, uint64(tm*100+u+1))
				}
			}
		}
		for range rapid.IntRange(0, 2).Draw(t, "pool units") {
			fps = append(fps, uint64(1000+rapid.IntRange(0, 5).Draw(t, "pool")))
		}
		slices.Sort(fps)
		docs[d] = slices.Compact(fps)
	}
	return docs
}

// TestGroupSearchesMatchBruteForce checks each of the two searches on its
// own against the oracle's maximal groups (every subset of documents
// tried), on corpora of near-identical documents, where sets of equal
// support lists, look-ahead and the fall-back search all matter; then
// Count, whichever search it ends with, in memory and spilling. A bound
// below what the search by documents needs must say so, and what it lists
// then must be maximal groups all the same.
func TestGroupSearchesMatchBruteForce(t *testing.T) {
	rapid.Check(t, func(t *rapid.T) {
		docs := drawTemplateDocs(t)
		opt := Options{MinShared: rapid.IntRange(1, 4).Draw(t, "MinShared")}
		if rapid.Bool().Draw(t, "no cap") {
			opt.MaxDocs = len(docs)
		}
		in := Input{Docs: docs}
		maxDocs := opt.MaxDocs
		if maxDocs == 0 {
			maxDocs = DefaultMaxDocs(len(docs))
		}
		want := oracle(docs, nil, opt.MinShared, maxDocs, opt.MaxDocs == 0).groups

		bk, m, found, s, orig, err := groupStart(in, opt)
		if err != nil {
			t.Fatal(err)
		}
		byUnits := &groupSearch{groupItems: makeGroupItems(&bk, m, found, s), s: s, limit: 1 << 40}
		if !byUnits.searchByUnits() {
			t.Fatalf("search by units stopped at %d steps", byUnits.steps)
		}
		if got := byUnits.groups(orig); !groupsEqual(got, want) {
			t.Fatalf("by units:\n got %v\nwant %v", got, want)
		}
		byDocs := &groupSearch{groupItems: makeGroupItems(&bk, m, found, s), s: s, limit: 1 << 40}
		byDocs.searchByDocs()
		if got := byDocs.groups(orig); byDocs.truncated || !groupsEqual(got, want) {
			t.Fatalf("by documents (truncated %v):\n got %v\nwant %v", byDocs.truncated, got, want)
		}
		if byDocs.steps > 0 {
			bound := rapid.IntRange(1, byDocs.steps).Draw(t, "bound")
			cut := &groupSearch{groupItems: makeGroupItems(&bk, m, found, s), s: s, limit: bound}
			cut.searchByDocs()
			if cut.truncated != (bound < byDocs.steps) || cut.steps != bound {
				t.Fatalf("bound %d of %d steps: truncated %v after %d", bound, byDocs.steps, cut.truncated, cut.steps)
			}
			for _, g := range cut.groups(orig) {
				if !slices.ContainsFunc(want, func(w Group) bool { return groupsEqual([]Group{g}, []Group{w}) }) {
					t.Fatalf("bound %d: %v is not a maximal group; they are %v", bound, g, want)
				}
			}
		}

		got, err := Count(in, opt)
		if err != nil {
			t.Fatal(err)
		}
		if !groupsEqual(got.Groups, want) || got.GroupsTruncated {
			t.Fatalf("Count (truncated %v):\n got %v\nwant %v", got.GroupsTruncated, got.Groups, want)
		}
		// The spilling path (a tiny budget) must give the same Result,
		// steps included; it writes temporary files, so one corpus in
		// four.
		if rapid.IntRange(0, 3).Draw(t, "spill") == 0 {
			checkBudgets(t, in, opt, got)
		}
	})
}

// TestGroupStepBound: the search stops at its bound, says so, and lists
// only groups the unbounded search lists too (each a maximal group). The
// corpus is one the search by units cannot finish in half of the bound,
// so the bound below the need ends in the search by documents.
func TestGroupStepBound(t *testing.T) {
	in := templateCorpus(120, 3, 12, 2, 0.9, 5)
	full, err := Count(in, Options{})
	if err != nil {
		t.Fatal(err)
	}
	need := full.Stats.GroupSteps
	if full.GroupsTruncated || need == 0 || len(full.Groups) < 5 {
		t.Fatalf("unbounded: truncated %v after %d steps, %d groups", full.GroupsTruncated, need, len(full.Groups))
	}
	same, err := Count(in, Options{MaxGroupSteps: 2 * need})
	if err != nil {
		t.Fatal(err)
	}
	if same.GroupsTruncated || !groupsEqual(same.Groups, full.Groups) {
		t.Errorf("bound twice the need: truncated %v, %d groups, want %d", same.GroupsTruncated, len(same.Groups), len(full.Groups))
	}
	listed := 0
	for _, bound := range []int{1, 10, need / 4, need / 2, need - 1} {
		got, err := Count(in, Options{MaxGroupSteps: bound})
		if err != nil {
			t.Fatal(err)
		}
		if !got.GroupsTruncated {
			// The search by units finished in half the bound: then
			// it is the whole answer.
			if !groupsEqual(got.Groups, full.Groups) {
				t.Errorf("bound %d, not truncated: %d groups, want %d", bound, len(got.Groups), len(full.Groups))
			}
			continue
		}
		if got.Stats.GroupSteps != bound {
			t.Errorf("bound %d: truncated after %d steps", bound, got.Stats.GroupSteps)
		}
		for _, g := range got.Groups {
			if !slices.ContainsFunc(full.Groups, func(w Group) bool { return groupsEqual([]Group{g}, []Group{w}) }) {
				t.Fatalf("bound %d: %v is not a maximal group", bound, g)
			}
		}
		listed += len(got.Groups)
	}
	if listed == 0 {
		t.Errorf("no truncated search listed any group: the check above checked nothing")
	}
}

// TestIdenticalDocumentsAreOneGroup: four documents with the same units are
// one group of four (one item for the search), not four groups of three,
// beside a crowd of other documents whose shared passage makes the
// level-wise search stop at its bound.
func TestIdenticalDocumentsAreOneGroup(t *testing.T) {
	var docs [][]uint64
	// 60 documents of their own, each quoting the same three units
	// (500-502), and 140 more sharing nothing, so that the quoted units
	// stay under the automatic cap; then the four copies, last.
	for d := range 200 {
		own := seq(uint64(1000+10*d), uint64(1000+10*d+5))
		if d < 60 {
			own = join(own, seq(500, 502))
		}
		docs = append(docs, own)
	}
	for range 4 {
		docs = append(docs, seq(1, 10))
	}
	res, err := Count(Input{Docs: docs}, Options{})
	if err != nil {
		t.Fatal(err)
	}
	var quoters []uint32
	for d := range 60 {
		quoters = append(quoters, uint32(d))
	}
	want := []Group{{Docs: quoters, Shared: 3}, {Docs: []uint32{200, 201, 202, 203}, Shared: 10}}
	if res.GroupsTruncated || !groupsEqual(res.Groups, want) {
		t.Fatalf("truncated %v, groups %v\nwant %v", res.GroupsTruncated, res.Groups, want)
	}
	// The level-wise search this one replaced counted all C(60, 3) =
	// 34,220 triples and stopped at its bound in the fourth level, before
	// it reached the copies' four: it listed them as four groups of three.
	bk, m, found, s, orig, err := groupStart(Input{Docs: docs}, Options{})
	if err != nil {
		t.Fatal(err)
	}
	old := levelwiseGroups(&bk, m, found, s, 200000)
	copies := 0
	for _, g := range old.groups(orig) {
		if g.Docs[0] >= 200 {
			copies++
			if len(g.Docs) != 3 {
				t.Errorf("the level-wise search listed %v", g)
			}
		}
	}
	if !old.truncated || copies != 4 {
		t.Errorf("the level-wise search: truncated %v, %d groups of the copies (this test no longer shows the case it guards against)", old.truncated, copies)
	}
}
