package report

import (
	"fmt"
	"slices"
	"testing"

	"reprise/pairs"
)

// copiesCorpus is k copies of one five-sentence text; copy i (i >= 1) has
// its last i%3 sentences replaced by its own, so that the copies differ
// from the first by zero to two sentences.
func copiesCorpus(k int) (docs []Doc, in pairs.Input) {
	base := []string{"a:One two three four five.", "b:Six seven eight nine ten.", "c:Eleven twelve thirteen fourteen fifteen.",
		"d:Sixteen seventeen eighteen nineteen twenty.", "e:Twentyone twentytwo twentythree twentyfour twentyfive."}
	for i := range k {
		sentences := slices.Clone(base)
		if i > 0 {
			for j := range i % 3 {
				sentences[4-j] = fmt.Sprintf("own%d-%d:Words of copy %d only, number %d.", i, j, i, j)
			}
		}
		d := doc(fmt.Sprintf("copy-%03d.txt", i), sentences...)
		docs = append(docs, d)
		fps := make([]uint64, 0, len(d.Units))
		for _, u := range d.Units {
			fps = append(fps, u.Hash)
		}
		slices.Sort(fps)
		in.Docs = append(in.Docs, fps)
	}
	return docs, in
}

// TestLargeNearCopySetListsBoundedPairs: a set of 30 copies (435 pairs)
// with NearCopyPairs 5 aligns and lists only the representative's pairs
// with the 5 members least like it; the summary counts the rest.
func TestLargeNearCopySetListsBoundedPairs(t *testing.T) {
	docs, in := copiesCorpus(30)
	// NearCopy 0.5: copies differing by two of five sentences are still
	// near-copies here.
	eng, err := pairs.Count(in, pairs.Options{MinShared: 2, MaxDocs: 100, NearCopy: 0.5})
	if err != nil {
		t.Fatal(err)
	}
	if len(eng.Pairs) != 435 || len(eng.NearCopies) != 1 {
		t.Fatalf("%d pairs, %d sets; want 435 and 1", len(eng.Pairs), len(eng.NearCopies))
	}
	res, err := Build(Input{Docs: docs, Engine: eng, Settings: Settings{Unit: "sentence"}, NearCopyPairs: 5})
	if err != nil {
		t.Fatal(err)
	}
	set := res.NearCopies[0]
	if len(res.Pairs) != 5 || set.PairsListed != 5 || set.Pairs != 435 || res.Summary.PairsNotListed != 430 {
		t.Fatalf("%d pairs listed, set %d/%d, not listed %d; want 5, 5/435, 430", len(res.Pairs), set.PairsListed, set.Pairs, res.Summary.PairsNotListed)
	}
	// The representative shares the most with the others: an unedited
	// copy (copies 0, 3, 6, … keep all five sentences), the first by ID.
	if set.Representative != "copy-000.txt" {
		t.Fatalf("representative %s", set.Representative)
	}
	for _, p := range res.Pairs {
		other := p.B
		if p.B == set.Representative {
			other = p.A
		}
		if p.A != set.Representative && p.B != set.Representative {
			t.Fatalf("listed pair %s ~ %s without the representative", p.A, p.B)
		}
		var r float64
		for _, m := range set.Documents {
			if m.Path == other {
				r = m.Resemblance
			}
		}
		// Members with two sentences of their own: 3 of 7 in either.
		if r != fraction(3, 7) {
			t.Fatalf("listed %s with resemblance %v, want the least alike (%v)", other, r, fraction(3, 7))
		}
	}
	if set.Documents[0].Path != set.Representative || set.Documents[0].Resemblance != 1 {
		t.Fatalf("first member %+v", set.Documents[0])
	}
	t.Run("-1 lists every pair", func(t *testing.T) {
		res, err := Build(Input{Docs: docs, Engine: eng, Settings: Settings{Unit: "sentence"}, NearCopyPairs: -1})
		if err != nil {
			t.Fatal(err)
		}
		if len(res.Pairs) != 435 || res.Summary.PairsNotListed != 0 {
			t.Fatalf("%d pairs, %d not listed", len(res.Pairs), res.Summary.PairsNotListed)
		}
	})
}
