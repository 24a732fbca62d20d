package main

import (
	"bytes"
	"path/filepath"
	"strings"
	"testing"

	"reprise/report"
)

func TestUnitFlagsBadUsage(t *testing.T) {
	dir := t.TempDir()
	writeFile(t, filepath.Join(dir, "one.txt"), "Some words in a file here.\n")
	tests := []struct {
		name string
		args []string
	}{
		{"unknown unit", []string{"--unit", "paragraph"}},
		{"--words without --unit words", []string{"--words", "6"}},
		{"--gap without --unit words", []string{"--gap", "6"}},
		{"--winnow without --unit words", []string{"--winnow", "4"}},
		{"--min-passage without --unit words", []string{"--min-passage", "4"}},
		{"--min-words with --unit words", []string{"--unit", "words", "--min-words", "3"}},
		{"zero words per shingle", []string{"--unit", "words", "--words", "0"}},
		{"negative gap", []string{"--unit", "words", "--gap", "-1"}},
		{"negative winnow", []string{"--unit", "words", "--winnow", "-2"}},
		{"explicit zero --min-shared with words", []string{"--unit", "words", "--min-shared", "0"}},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			var out, errs bytes.Buffer
			args := append(append([]string{"scan", "-q"}, tc.args...), dir)
			if code := run(args, &out, &errs); code != exitUsage {
				t.Errorf("exit %d, want %d; stderr %s", code, exitUsage, errs.String())
			}
			if !strings.Contains(errs.String(), "--") {
				t.Errorf("error does not name the flag: %s", errs.String())
			}
		})
	}
}

func TestUnitSettingsRecorded(t *testing.T) {
	dir := t.TempDir()
	copied := "The harbor master kept a ledger of every ship that entered the bay, with its cargo, its crew " +
		"and the weather on the day it arrived. Over forty years the ledger grew to eleven volumes, and " +
		"historians now read it as the best record of the town's trade in those busy decades."
	writeFile(t, filepath.Join(dir, "a.txt"), "A first essay opens here with its own words.\n\n"+copied+"\n")
	writeFile(t, filepath.Join(dir, "b.txt"), "Another essay, with “a quoted line of several words”, begins.\n\n"+
		strings.Replace(copied, "every ship", "each vessel", 1)+"\n\nReferences\nHarbor Office (1901). Ledger.\n")

	res := scanJSON(t, exitOK, dir)
	if s := res.Settings; s.Unit != "sentence" || s.MinShared != sentenceMinShared || s.MinWords != sentenceMinWords ||
		s.Shingles != nil || s.SkipQuoted || s.SkipReferences {
		t.Errorf("sentence defaults: settings %+v", s)
	}

	res = scanJSON(t, exitOK, "--unit", "words", "--skip-quoted", "--skip-references", dir)
	s := res.Settings
	if s.Unit != "shingle" || s.MinShared != wordsMinShared || s.Shingles == nil ||
		*s.Shingles != (report.ShingleSettings{Words: defaultShingleWords, Winnow: defaultWinnow, Gap: defaultGap, MinPassage: defaultMinPassage}) ||
		!s.SkipQuoted || !s.SkipReferences {
		t.Errorf("words defaults: settings %+v, shingles %+v", s, s.Shingles)
	}
	if len(res.Pairs) != 1 || len(res.Pairs[0].Passages) != 1 {
		t.Fatalf("want one pair with one passage (the edited copy), got %+v", res.Pairs)
	}
	var notes []string
	for _, d := range res.Documents {
		notes = append(notes, d.Notes...)
	}
	joined := strings.Join(notes, "; ")
	if !strings.Contains(joined, "6 words inside quotation marks not compared") ||
		!strings.Contains(joined, "references section from line 5 (5 words) not compared") {
		t.Errorf("notes do not say what was left out: %q", joined)
	}

	res = scanJSON(t, exitOK, "--unit", "words", "--words", "3", "--winnow", "4", "--gap", "7", "--min-passage", "9", "--min-shared", "2", dir)
	if g := res.Settings.Shingles; g == nil || g.Words != 3 || g.Winnow != 4 || g.Gap != 7 || g.MinPassage != 9 || res.Settings.MinShared != 2 {
		t.Errorf("set values not recorded: %+v %+v", res.Settings, g)
	}
}
