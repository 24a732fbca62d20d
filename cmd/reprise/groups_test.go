package main

import (
	"fmt"
	"path/filepath"
	"slices"
	"strings"
	"testing"
)

// word spells n in letters (a, b, …, z, ba, bb, …), so that invented
// sentences differ in words, not only in digits.
func word(n int) string {
	s := ""
	for {
		s = string(rune('a'+n%26)) + s
		n /= 26
		if n == 0 {
			return s
		}
	}
}

// TestIdenticalFilesAreOneGroup: four byte-identical files are one group
// of four, not four groups of three, even beside sixty essays that all
// quote the same three sentences, a crowd whose C(60, 3) = 34,220 triples
// made the level-wise search stop at its bound with nothing but groups of
// three listed. The four make one set of near-copies, which stands for
// their group (counted in groups_not_listed); the sixty are one group.
func TestIdenticalFilesAreOneGroup(t *testing.T) {
	dir := t.TempDir()
	quote := "The committee met on a cold morning to discuss the river bridge. " +
		"Everyone agreed that the old stones could not carry heavy trucks any longer. " +
		"A new span of steel was promised before the spring floods arrived. "
	own := func(d, n int) string {
		var b strings.Builder
		for k := range n {
			fmt.Fprintf(&b, "Writer %s describes how garden %s grew the plant %s in summer. ", word(d+100), word(k+50), word(d*7+k+3000))
		}
		return b.String()
	}
	var quoters []string
	for d := range 200 {
		text := own(d, 4)
		name := fmt.Sprintf("essay-%03d.txt", d)
		if d < 60 {
			text += quote
			quoters = append(quoters, filepath.ToSlash(filepath.Join(dir, name)))
		}
		writeFile(t, filepath.Join(dir, name), text)
	}
	copyText := "Our lab keeps every sample in a locked cabinet overnight. " +
		"Each visitor signs the book at the front desk before entering. " +
		"Gloves and goggles must be worn near the open benches at all times. " +
		"Broken glass goes into the yellow box beside the sink, never the bin. "
	var copies []string
	for k := range 4 {
		name := fmt.Sprintf("lab-rules-%d.txt", k)
		writeFile(t, filepath.Join(dir, name), copyText)
		copies = append(copies, filepath.ToSlash(filepath.Join(dir, name)))
	}

	res := scanJSON(t, exitOK, dir)
	s := res.Summary
	if s.GroupsTruncated || s.Groups != 1 || s.GroupsNotListed != 1 {
		t.Fatalf("groups %d listed, %d not listed, truncated %v after %d steps; want 1, 1 and false", s.Groups, s.GroupsNotListed, s.GroupsTruncated, s.GroupSteps)
	}
	if g := res.Groups[0]; !slices.Equal(g.Documents, quoters) || g.Shared != 3 {
		t.Errorf("group: %d documents sharing %d, want the 60 quoting essays sharing 3", len(g.Documents), g.Shared)
	}
	if len(res.NearCopies) != 1 {
		t.Fatalf("%d sets of near-copies, want the four copies", len(res.NearCopies))
	}
	var members []string
	for _, m := range res.NearCopies[0].Documents {
		members = append(members, m.Path)
	}
	slices.Sort(members)
	if !slices.Equal(members, copies) {
		t.Errorf("near-copies %v, want %v", members, copies)
	}
	if s.GroupStepLimit <= 0 || s.GroupSteps > s.GroupStepLimit {
		t.Errorf("group search: %d steps of a limit of %d", s.GroupSteps, s.GroupStepLimit)
	}
}
