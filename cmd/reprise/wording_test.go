package main

import (
	"path/filepath"
	"regexp"
	"strings"
	"testing"
)

// oneThings finds a count of one with a plural noun ("1 passages").
var oneThings = regexp.MustCompile(`\b1 (passages|pairs|sentences|documents|words|groups|shingles|problems|units)\b`)

// TestWordingOfCounts: archive add run again on archived files says once,
// in one line, that they are unchanged, and its summary counts them; every
// count of one is singular in the messages and the text report.
func TestWordingOfCounts(t *testing.T) {
	dir := t.TempDir()
	docs := filepath.Join(dir, "docs")
	writeFile(t, filepath.Join(docs, "a.txt"), "The harbour office posts the tide tables every week. The ferry leaves at nine when the sea is calm.\n")
	writeFile(t, filepath.Join(docs, "b.txt"), "The orchard behind the chapel gives apples in the autumn. Its cider is pressed in the old barn.\n")
	ar := filepath.Join(dir, "ar")
	if code, out, e := runCLI(t, "archive", "--archive", ar, "add", docs); code != exitOK || !strings.Contains(out, "2 documents added, 0 replaced, 0 unchanged, 0 duplicates") {
		t.Fatalf("first add: exit %d\n%s%s", code, out, e)
	}
	code, out, e := runCLI(t, "archive", "--archive", ar, "add", docs)
	if code != exitOK {
		t.Fatalf("second add: exit %d: %s", code, e)
	}
	want := "2 documents already in the archive with the same path and content: left as they are\n" +
		"0 documents added, 0 replaced, 2 unchanged, 0 duplicates\n"
	if out != want {
		t.Errorf("second add said:\n%s\nwant:\n%s", out, want)
	}
	one := filepath.Join(dir, "one")
	writeFile(t, filepath.Join(one, "a.txt"), "The harbour office posts the tide tables every week. The ferry leaves at nine when the sea is calm.\n")
	ar1 := filepath.Join(dir, "ar1")
	if code, out, e := runCLI(t, "archive", "--archive", ar1, "add", one); code != exitOK || !strings.Contains(out, "1 document added,") {
		t.Fatalf("add of one: exit %d\n%s%s", code, out, e)
	}
	if code, out, _ := runCLI(t, "archive", "--archive", ar1, "verify"); code != exitOK || !strings.Contains(out, "1 document verified") {
		t.Errorf("verify of one document: exit %d: %s", code, out)
	}
	// A compare with one source, one passage, one pair.
	code, out, e = runCLI(t, "compare", "-q", "--master", demoSource, filepath.Join(demoDir, "hana-kobayashi.txt"))
	if code != exitOK {
		t.Fatalf("compare: exit %d: %s", code, e)
	}
	for _, text := range []string{out} {
		if m := oneThings.FindAllString(text, -1); len(m) > 0 {
			t.Errorf("plural after a count of one: %q in\n%s", m, text)
		}
	}
	if !strings.Contains(out, "1 passage,") {
		t.Errorf("compare's text does not count one passage:\n%s", out)
	}
}

// TestCompareSectionsAreCleaned: a master whose text holds terminal
// control sequences (ESC) never sends them to the terminal: the master
// section is cleaned as every other part of the text report is.
func TestCompareSectionsAreCleaned(t *testing.T) {
	dir := t.TempDir()
	master := filepath.Join(dir, "master.txt")
	body := "Staff must lock every cabinet before they leave the office. Visitors sign the book at the front desk on arrival. " +
		"Keys are returned to the duty manager at the end of each day. "
	writeFile(t, master, body+"A line with a \x1b[2J\x1b]0;title\x07 control sequence stays in the master only.\n")
	writeFile(t, filepath.Join(dir, "copies", "copy.txt"), body+"\n")
	code, out, e := runCLI(t, "compare", "-q", "--master", master, filepath.Join(dir, "copies"))
	if code != exitOK {
		t.Fatalf("compare: exit %d: %s", code, e)
	}
	if !strings.Contains(out, "What each copy keeps of its master") || !strings.Contains(out, "control sequence stays") {
		t.Fatalf("no master section with the missing passage:\n%s", out)
	}
	if strings.ContainsAny(out, "\x1b\x07") {
		t.Errorf("a control character reached the text report:\n%q", out)
	}
}
