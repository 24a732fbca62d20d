package main

import (
	"bytes"
	"fmt"
	"os"
	"path/filepath"
	"slices"
	"strings"
	"testing"
)

// TestErrorsNotSilence: inputs that give nothing to compare are errors with
// exit status 2 and one line that names the cause, never an empty report
// that reads as an all-clear.
func TestErrorsNotSilence(t *testing.T) {
	demo := "../../testdata/demo"
	empty := t.TempDir()
	missing := filepath.Join(t.TempDir(), "nope")
	cases := []struct {
		name string
		args []string
		want string
	}{
		{"a missing path says no such file", []string{"scan", missing}, missing + ": no such file or directory"},
		{"an empty folder says so", []string{"scan", empty}, empty + ": empty folder"},
		{"an --include that matches nothing says so", []string{"scan", "--include", "*.zzz", demo}, "matches --include *.zzz"},
		{"-o into a missing folder names the folder", []string{"scan", "-o", filepath.Join(missing, "r.json"), demo}, "folder " + missing + ": no such file or directory"},
		{"an unknown help topic", []string{"help", "bogus"}, `no help on "bogus"`},
		{"compare: a missing reference set", []string{"compare", "--against", missing, demo}, "reference set: " + missing + ": no such file or directory"},
		{"compare: an empty reference folder", []string{"compare", "--against", empty, demo}, "reference set: " + empty + ": empty folder"},
		{"compare: a reference set with --fail-on too", []string{"compare", "--fail-on", "50%", "--against", empty, demo}, "reference set: " + empty},
		{"compare: no new document read", []string{"compare", "--against", demo, empty}, "new documents: " + empty + ": empty folder"},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			var out, errs bytes.Buffer
			code := run(append(tc.args[:1:1], append([]string{"-q"}, tc.args[1:]...)...), &out, &errs)
			if tc.args[0] == "help" {
				code = run(tc.args, &out, &errs)
			}
			if code != exitUsage || !strings.Contains(errs.String(), tc.want) || out.Len() != 0 {
				t.Fatalf("exit %d, stderr %q, stdout %d bytes; want exit 2, %q, nothing", code, errs.String(), out.Len(), tc.want)
			}
		})
	}
	if _, err := os.Stat(missing); err == nil {
		t.Fatalf("%s was created", missing)
	}
}

// TestIdenticalTextsScoreWhole: two files with the same text are marked
// identical and score exactly 1 both ways, although some of their text
// gives no unit (short lines, and a run-on line longer than the sentence
// byte limit); each notes the other.
func TestIdenticalTextsScoreWhole(t *testing.T) {
	dir := t.TempDir()
	var b strings.Builder
	b.WriteString("Title\n\nThe committee met on a wet Tuesday to settle the budget for the spring term. ")
	b.WriteString("Every member brought figures from their own department and a list of requests. ")
	b.WriteString("Short one.\n")
	for i := range 400 {
		fmt.Fprintf(&b, "item %d and ", i) // one sentence far over the byte limit
	}
	b.WriteString("the end.\n")
	writeFile(t, filepath.Join(dir, "a.txt"), b.String())
	writeFile(t, filepath.Join(dir, "b.txt"), b.String())
	res := scanJSON(t, exitOK, dir)
	if len(res.Pairs) != 1 {
		t.Fatalf("%d pairs, want 1", len(res.Pairs))
	}
	p := res.Pairs[0]
	if !p.Identical || p.CoverageA != 1 || p.CoverageB != 1 || p.Score != 1 || p.Jaccard != 1 {
		t.Fatalf("pair %+v: want identical with every score 1", p)
	}
	for _, d := range res.Documents {
		if !slices.ContainsFunc(d.Notes, func(n string) bool { return strings.HasPrefix(n, "identical text to ") }) {
			t.Errorf("%s: notes %q", d.Path, d.Notes)
		}
	}
}

// TestEarlierReportsAreNotDocuments: reports written with -o into the
// scanned folder, in every format, are skipped with their reason by the
// next scan, which then finds what the first one found.
func TestEarlierReportsAreNotDocuments(t *testing.T) {
	dir := t.TempDir()
	copyFiles(t, "../../testdata/demo", dir)
	first := scanJSON(t, exitOK, dir)
	for _, f := range []string{"json", "ndjson", "csv", "text", "html"} {
		var out, errs bytes.Buffer
		if code := run([]string{"scan", "-q", "--format", f, "-o", filepath.Join(dir, "report."+f), dir}, &out, &errs); code != exitOK {
			t.Fatalf("%s: exit %d: %s", f, code, errs.String())
		}
	}
	again := scanJSON(t, exitOK, dir)
	if len(again.Documents) != len(first.Documents) || len(again.Pairs) != len(first.Pairs) {
		t.Fatalf("%d documents and %d pairs, want %d and %d", len(again.Documents), len(again.Pairs), len(first.Documents), len(first.Pairs))
	}
	if len(again.Skipped) != 5 {
		t.Fatalf("skipped %v, want the 5 reports", again.Skipped)
	}
	for _, s := range again.Skipped {
		if !strings.HasPrefix(filepath.Base(s.Path), "report.") || !strings.Contains(s.Reason, "report written by reprise") {
			t.Errorf("skipped %+v", s)
		}
	}
}

// TestHardWrappedQuotesMatchTheirOriginal: a reply that quotes a text with
// "> " on every line, wrapped at other places, shares its sentences with
// the original in sentence mode, as an e-mail and as a plain text.
func TestHardWrappedQuotesMatchTheirOriginal(t *testing.T) {
	dir := t.TempDir()
	original := "The committee met on a wet Tuesday to settle the budget for the spring term. " +
		"Every member brought figures from their own department and a long list of requests. " +
		"The chair asked that each request be justified in writing before the next meeting. " +
		"Nobody expected the roof repairs to take half of the money.\n"
	quote := "> The committee met on a wet Tuesday to settle the budget for the\n" +
		"> spring term. Every member brought figures from their own department\n" +
		"> and a long list of requests. The chair asked that each request be\n" +
		"> justified in writing before the next meeting. Nobody expected the roof\n" +
		"> repairs to take half of the money.\n"
	writeFile(t, filepath.Join(dir, "original.txt"), original)
	writeFile(t, filepath.Join(dir, "reply.eml"), "From: a@example.org\nSubject: Re: budget\n\nThanks, see below.\n\n"+quote+"\nRegards, and see you then.\n")
	writeFile(t, filepath.Join(dir, "notes.txt"), "My notes on the meeting, written afterwards at home.\n\n"+quote)
	res := scanJSON(t, exitOK, dir)
	for _, other := range []string{"reply.eml", "notes.txt"} {
		p := findPair(res, filepath.Join(dir, "original.txt"), filepath.Join(dir, other))
		if p == nil || p.Shared != 4 || coverageOf(p, filepath.Join(dir, "original.txt")) != 1 {
			t.Errorf("original ~ %s: %s, want all 4 sentences shared", other, brief(p))
		}
	}
}
