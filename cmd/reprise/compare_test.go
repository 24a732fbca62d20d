package main

import (
	"archive/zip"
	"bufio"
	"bytes"
	"encoding/json"
	"fmt"
	"os"
	"path/filepath"
	"slices"
	"strings"
	"testing"

	"reprise/report"
)

const (
	demoSource = "../../testdata/demo-sources/hillward-monthly-tanner-avenue.txt"
	demoDir    = "../../testdata/demo"
)

// copiersOfTheSource are the three essays that copy sentences 6–10 of the
// invented article (testdata/demo-planted.md, "Outside source").
var copiersOfTheSource = []string{"hana-kobayashi.txt", "marisol-quintero.txt", "wesley-tran.txt"}

func jsonResult(t *testing.T, args ...string) *report.Result {
	t.Helper()
	code, out, e := runCLI(t, args...)
	if code != 0 {
		t.Fatalf("%v: exit %d: %s", args, code, e)
	}
	var res report.Result
	if err := json.Unmarshal([]byte(out), &res); err != nil {
		t.Fatalf("%v: %v", args, err)
	}
	return &res
}

func TestCompareRules(t *testing.T) {
	src := filepath.Dir(demoSource)
	cases := []struct {
		name  string
		args  []string
		pairs []string // "a ~ b" by base name
	}{
		{"only pairs with one side in the reference set",
			[]string{"compare", "--format", "json", "--against", src, demoDir},
			[]string{"hillward-monthly-tanner-avenue.txt ~ hana-kobayashi.txt",
				"hillward-monthly-tanner-avenue.txt ~ marisol-quintero.txt",
				"hillward-monthly-tanner-avenue.txt ~ wesley-tran.txt"}},
	}
	for _, c := range cases {
		res := jsonResult(t, c.args...)
		var got []string
		for _, p := range res.Pairs {
			got = append(got, filepath.Base(p.A)+" ~ "+filepath.Base(p.B))
		}
		slices.Sort(got)
		if !slices.Equal(got, c.pairs) {
			t.Errorf("%s: pairs %q, want %q", c.name, got, c.pairs)
		}
		for _, d := range res.Documents {
			want := 0.0
			if slices.Contains(copiersOfTheSource, filepath.Base(d.Path)) || strings.Contains(d.Path, "demo-sources") {
				want = -1 // some reuse
			}
			if (want == 0) != (d.Reused == 0) {
				t.Errorf("%s: %s reused %.4f", c.name, d.Path, d.Reused)
			}
		}
		if len(res.Groups) != 1 || len(res.Groups[0].Documents) != 4 {
			t.Errorf("%s: groups %v, want the article and its three copiers", c.name, res.Groups)
		}
	}
	// --within adds the pairs among the new documents: the verbatim copy
	// (testdata/demo-planted.md, case 1) appears, the reference pairs stay.
	res := jsonResult(t, "compare", "--format", "json", "--within", "--against", src, demoDir)
	var verbatim, withSource int
	for _, p := range res.Pairs {
		if strings.HasSuffix(p.A, "ethan-kowalczyk.txt") && strings.HasSuffix(p.B, "tyler-boone.txt") {
			verbatim++
		}
		if strings.Contains(p.A, "demo-sources") || strings.Contains(p.B, "demo-sources") {
			withSource++
		}
	}
	if verbatim != 1 || withSource != 3 {
		t.Errorf("--within: verbatim pair found %d times, pairs with the source %d", verbatim, withSource)
	}
}

// TestCompareMasterCoverage: every master sentence is either in a passage
// the copy shares or in a missing passage, and a copy's coverage is the
// master side's coverage of its pair, on the demo and with many copies.
func TestCompareMasterCoverage(t *testing.T) {
	master, copies := writeMasterAndCopies(t, 12)
	cases := []struct {
		name   string
		master string
		news   string
		copies int
		check  func(t *testing.T, c report.MasterCoverage, kept int)
	}{
		{"the demo article against the 24 essays", demoSource, demoDir, 24,
			func(t *testing.T, c report.MasterCoverage, kept int) {
				if slices.Contains(copiersOfTheSource, filepath.Base(c.Copy)) {
					// The copiers take sentences 6–10 (five) and lack the rest.
					if kept != 5 || len(c.Missing) != 2 {
						t.Errorf("%s: kept %d sentences in %d gaps, want 5 kept and 2 gaps", c.Copy, kept, len(c.Missing))
					}
				}
			}},
		{"a master and 12 copies, each with one word changed: each lacks only its changed sentence", master, copies, 12,
			func(t *testing.T, c report.MasterCoverage, kept int) {
				var k int
				if _, err := fmt.Sscanf(filepath.Base(c.Copy), "copy-%02d.txt", &k); err != nil {
					t.Fatal(err)
				}
				if kept != len(masterSentences)-1 || len(c.Missing) != 1 || c.Missing[0].Text != masterSentences[k] || c.Missing[0].Line != k+1 {
					t.Errorf("%s: kept %d sentences, missing %+v; want all but sentence %d", c.Copy, kept, c.Missing, k+1)
				}
			}},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			r := compareNDJSON(t, "--master", tc.master, tc.news)
			masterUnits := r.docs[tc.master].Units
			pairs := map[string]report.Pair{}
			for _, p := range r.pairs {
				if p.A == tc.master {
					pairs[p.B] = p
				} else {
					pairs[p.A] = p
				}
			}
			if tc.master == demoSource {
				if len(r.sources) != len(copiersOfTheSource) {
					t.Errorf("%d documents with sources, want the %d copiers", len(r.sources), len(copiersOfTheSource))
				}
				for _, src := range r.sources {
					if len(src.Sources) != 1 || !strings.Contains(src.Sources[0].Path, "demo-sources") || src.Reused == 0 {
						t.Errorf("sources of %s: %+v", src.Document, src)
					}
				}
			}
			if masterUnits == 0 || len(r.cover) != tc.copies {
				t.Fatalf("master has %d units; %d copies covered, want %d", masterUnits, len(r.cover), tc.copies)
			}
			for _, c := range r.cover {
				p, paired := pairs[c.Copy]
				missing, kept := 0, 0
				for k, g := range c.Missing {
					missing += g.Units
					if k > 0 && g.Start < c.Missing[k-1].End {
						t.Errorf("%s: missing passages out of order", c.Copy)
					}
				}
				for _, g := range p.Passages {
					kept += g.Units
				}
				// Every master sentence is either in a shared passage or missing.
				if kept+missing != masterUnits {
					t.Errorf("%s: %d kept + %d missing sentences, the master has %d", c.Copy, kept, missing, masterUnits)
				}
				if paired != (c.Coverage > 0) || (paired && c.Coverage != coverageOf(&p, tc.master)) {
					t.Errorf("%s: coverage %.4f, pair %v with master-side coverage %.4f", c.Copy, c.Coverage, paired, coverageOf(&p, tc.master))
				}
				tc.check(t, c, kept)
			}
		})
	}
}

// TestCompareSectionsInEveryFormat: compare's sources and master coverage
// are part of the result, written in all five formats, and `reprise report`
// redraws them from the JSON.
func TestCompareSectionsInEveryFormat(t *testing.T) {
	want := map[string][]string{
		"text":   {"Where each new document's shared passages were found", "What each copy keeps of its master", "of the master not in it"},
		"json":   {`"sources": [`, `"masters": [`, `"missing": [`},
		"ndjson": {`{"type":"sources"`, `{"type":"master"`},
		"csv":    {"\nsource,1,", "\nmissing,1,"},
		"html":   {"Where each new document", "What each copy keeps of its master"},
	}
	for _, format := range report.Formats {
		code, out, e := runCLI(t, "compare", "-q", "--format", format, "--master", demoSource, demoDir)
		if code != exitOK {
			t.Fatalf("--master --format %s: exit %d: %s", format, code, e)
		}
		for _, w := range want[format] {
			if !strings.Contains(out, w) {
				t.Errorf("--master --format %s: no %q in the output", format, w)
			}
		}
	}
	saved := filepath.Join(t.TempDir(), "compare.json")
	if code, _, e := runCLI(t, "compare", "-q", "--format", "json", "-o", saved, "--master", demoSource, demoDir); code != exitOK {
		t.Fatalf("compare -o: exit %d: %s", code, e)
	}
	code, out, e := runCLI(t, "report", "--format", "text", saved)
	if code != exitOK || !strings.Contains(out, "What each copy keeps of its master") || !strings.Contains(out, "Where each new document") {
		t.Errorf("report of a saved compare: exit %d, %s; sections missing from:\n%s", code, e, out)
	}
}

// TestArchiveCheckMatchesCompare: checking the demo against an archive of
// the article gives the pairs and passages of compare against the article
// file, every number equal, the archived article as side A (two routes to one answer: postings in the
// store, and the engine over both sets).
func TestArchiveCheckMatchesCompare(t *testing.T) {
	dir := filepath.Join(t.TempDir(), "ar")
	if code, _, e := runCLI(t, "archive", "--archive", dir, "add", "-q", demoSource); code != 0 {
		t.Fatalf("add: %d %s", code, e)
	}
	viaArchive := jsonResult(t, "archive", "--archive", dir, "check", "--format", "json", demoDir)
	viaCompare := jsonResult(t, "compare", "--format", "json", "--against", demoSource, demoDir)
	for i := range viaArchive.Pairs {
		p := &viaArchive.Pairs[i]
		p.A = strings.TrimPrefix(p.A, "archive:")
	}
	a, _ := json.Marshal(viaArchive.Pairs)
	c, _ := json.Marshal(viaCompare.Pairs)
	if len(viaCompare.Pairs) != 3 || string(a) != string(c) {
		t.Errorf("archive check pairs\n%s\ncompare pairs\n%s", a, c)
	}
	// Every format renders the check, each with the caution.
	for _, format := range report.Formats {
		code, out, e := runCLI(t, "archive", "--archive", dir, "check", "--format", format, demoDir)
		if code != 0 || !strings.Contains(out, "not proof of misconduct") || !strings.Contains(out, "hillward-monthly") {
			t.Errorf("check --format %s: exit %d, %d bytes, %s", format, code, len(out), e)
		}
	}
	// The archived side is shown after the original file is gone.
	moved := filepath.Join(t.TempDir(), "article.txt")
	b, _ := os.ReadFile(demoSource)
	os.WriteFile(moved, b, 0o600)
	dir2 := filepath.Join(t.TempDir(), "ar2")
	runCLI(t, "archive", "--archive", dir2, "add", "-q", moved)
	os.Remove(moved)
	res := jsonResult(t, "archive", "--archive", dir2, "check", "--format", "json", demoDir)
	if len(res.Pairs) != 3 || !strings.Contains(res.Pairs[0].Passages[0].Text, "Tanner Avenue") || res.Pairs[0].Passages[0].AWhere != "line 14" || res.Pairs[0].A != "archive:"+moved {
		t.Errorf("check after the archived file was deleted: %+v", res.Pairs)
	}
}

func TestArchiveCommandErrors(t *testing.T) {
	dir := filepath.Join(t.TempDir(), "ar")
	runCLI(t, "archive", "--archive", dir, "add", "-q", demoSource)
	cases := []struct {
		name string
		args []string
		want string
	}{
		{"a check with other unit settings is refused, naming the setting",
			[]string{"archive", "--archive", dir, "check", "--min-words", "4", demoDir}, "--min-words 5"},
		{"no archive folder", []string{"archive", "check", demoDir}, "REPRISE_ARCHIVE"},
		{"a folder that holds no archive", []string{"archive", "--archive", t.TempDir(), "list"}, "holds no archive"},
		{"an unknown subcommand", []string{"archive", "--archive", dir, "frobnicate"}, "unknown command"},
		{"remove of a path not archived", []string{"archive", "--archive", dir, "remove", "nothing.txt"}, "no archived document"},
	}
	t.Setenv("REPRISE_ARCHIVE", "")
	for _, c := range cases {
		code, _, e := runCLI(t, c.args...)
		if code != exitUsage || !strings.Contains(e, c.want) {
			t.Errorf("%s: exit %d, %q; want %q", c.name, code, e, c.want)
		}
	}
	// remove by path, then the archive is empty and whole.
	code, out, e := runCLI(t, "archive", "--archive", dir, "remove", demoSource)
	if code != 0 || !strings.Contains(out, "removed") {
		t.Fatalf("remove: %d %s %s", code, out, e)
	}
	if code, out, _ := runCLI(t, "archive", "--archive", dir, "verify", "--resplit"); code != 0 || !strings.Contains(out, "0 documents") {
		t.Errorf("verify after remove: %d %s", code, out)
	}
}

func TestArchiveCheckSkipsTheDocumentItself(t *testing.T) {
	dir := filepath.Join(t.TempDir(), "ar")
	tyler := filepath.Join(demoDir, "tyler-boone.txt")
	if code, _, e := runCLI(t, "archive", "--archive", dir, "add", "-q", tyler); code != 0 {
		t.Fatal(e)
	}
	res := jsonResult(t, "archive", "--archive", dir, "check", "--format", "json", demoDir)
	// Ethan's essay is the verbatim copy of Tyler's (testdata/demo-planted.md, case 1):
	// it pairs with the archived Tyler; Tyler's own file does not.
	var got []string
	for _, p := range res.Pairs {
		got = append(got, filepath.Base(p.A)+" ~ "+filepath.Base(p.B))
	}
	if !slices.Equal(got, []string{"tyler-boone.txt ~ ethan-kowalczyk.txt"}) {
		t.Errorf("pairs %q, want only the archived Tyler with Ethan", got)
	}
}

// masterSentences is an invented policy of 14 sentences, one a line.
var masterSentences = []string{
	"Every visitor signs the register at the front desk before entering the workshop.",
	"Safety glasses are worn by everyone standing within three metres of a running machine.",
	"The band saw is switched off and unplugged before its blade is changed or cleaned.",
	"Offcuts longer than a forearm go to the rack by the north door for reuse.",
	"Sawdust is swept up at the end of every session and never blown away with air.",
	"Members who notice a blunt chisel report it in the maintenance book the same day.",
	"Children under twelve may use hand tools only with an adult member beside them.",
	"The dust extractor runs whenever the lathe, the planer or the sander is in use.",
	"Nobody works alone in the building after the caretaker has locked the gate.",
	"Flammable finishes stay in the steel cabinet with its door closed and latched.",
	"A member who cuts themselves washes the wound and records it in the incident log.",
	"The first aid kit is checked on the first Monday of each month by the duty steward.",
	"Borrowed clamps are returned to the wall before the borrower leaves the workshop.",
	"Questions about these rules go to the committee through the letterbox in the hall.",
}

// writeMasterAndCopies writes the master and n copies, copy k with one word
// of sentence k changed; it returns the master's path and the copies' folder.
func writeMasterAndCopies(t *testing.T, n int) (master, copies string) {
	t.Helper()
	dir := t.TempDir()
	master = filepath.Join(dir, "master.txt")
	writeFile(t, master, strings.Join(masterSentences, "\n")+"\n")
	copies = filepath.Join(dir, "copies")
	for k := range n {
		s := slices.Clone(masterSentences)
		w := strings.Fields(s[k])
		w[3] = "quite"
		s[k] = strings.Join(w, " ")
		writeFile(t, filepath.Join(copies, fmt.Sprintf("copy-%02d.txt", k)), strings.Join(s, "\n")+"\n")
	}
	return master, copies
}

// compareOutput is one ndjson compare report, every line decoded.
type compareOutput struct {
	settings report.Settings
	docs     map[string]report.Document // by path
	pairs    []report.Pair
	sources  []report.Sources
	cover    []report.MasterCoverage
}

// compareNDJSON runs compare with --format ndjson and decodes every line,
// failing the test on any line that does not decode.
func compareNDJSON(t *testing.T, args ...string) *compareOutput {
	t.Helper()
	code, out, e := runCLI(t, slices.Concat([]string{"compare", "--format", "ndjson", "-q"}, args)...)
	if code != 0 {
		t.Fatalf("compare %v: exit %d: %s", args, code, e)
	}
	r := &compareOutput{docs: map[string]report.Document{}}
	sc := bufio.NewScanner(strings.NewReader(out))
	sc.Buffer(nil, 1<<24)
	for sc.Scan() {
		var line struct {
			Type     string          `json:"type"`
			Settings report.Settings `json:"settings"`
		}
		b := sc.Bytes()
		var err error
		if err = json.Unmarshal(b, &line); err != nil {
			t.Fatalf("compare %v: %v: %s", args, err, b)
		}
		switch line.Type {
		case "report":
			r.settings = line.Settings
		case "document":
			var d report.Document
			if err = json.Unmarshal(b, &d); err == nil {
				r.docs[d.Path] = d
			}
		case "pair":
			var p report.Pair
			if err = json.Unmarshal(b, &p); err == nil {
				r.pairs = append(r.pairs, p)
			}
		case "sources":
			var s report.Sources
			if err = json.Unmarshal(b, &s); err == nil {
				r.sources = append(r.sources, s)
			}
		case "master":
			var c report.MasterCoverage
			if err = json.Unmarshal(b, &c); err == nil {
				r.cover = append(r.cover, c)
			}
		}
		if err != nil {
			t.Fatalf("compare %v: %s line: %v: %s", args, line.Type, err, b)
		}
	}
	if err := sc.Err(); err != nil {
		t.Fatal(err)
	}
	return r
}

// TestCompareMasterLiftsTheDefaultCap: with --master and no --max-docs no
// sentence is common text (the cap is the number of documents), so a master
// with more copies than half the documents still pairs with each; a cap set
// with --max-docs stays as it was. --against alone keeps the default cap, and
// its rule that documents mostly made of common text still count it: the
// copies pair with the master all the same (no false all-clear).
func TestCompareMasterLiftsTheDefaultCap(t *testing.T) {
	master, copies := writeMasterAndCopies(t, 12)
	cases := []struct {
		name    string
		args    []string
		maxDocs int
		rule    string
		pairs   int
	}{
		{"--master without --max-docs: the cap is the number of documents",
			[]string{"--master", master, copies}, 13, "--master without --max-docs", 12},
		{"--master with --max-docs: the cap given",
			[]string{"--master", master, "--max-docs", "6", copies}, 6, "set by --max-docs", 0},
		{"--against alone: the default cap, still counted in the copies",
			[]string{"--against", master, copies}, 6, "default", 12},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			r := compareNDJSON(t, tc.args...)
			if r.settings.MaxDocs != tc.maxDocs || !strings.Contains(r.settings.MaxDocsRule, tc.rule) || len(r.pairs) != tc.pairs {
				t.Errorf("max_docs %d (%q), %d pairs; want %d (%q), %d pairs",
					r.settings.MaxDocs, r.settings.MaxDocsRule, len(r.pairs), tc.maxDocs, tc.rule, tc.pairs)
			}
			for _, c := range r.cover {
				if tc.pairs > 0 && c.Coverage < 0.9 || len(c.Missing) != 1 {
					t.Errorf("%s: covers %.4f, %d missing passages; want all but one sentence", c.Copy, c.Coverage, len(c.Missing))
				}
			}
		})
	}
}

// TestCompareMasterIsSplitAsTheRunSplitsIt: the master's missing passages
// come from the text the run read (its read options) and the units the run
// split it into (its --unit), so their offsets agree with the passages.
func TestCompareMasterIsSplitAsTheRunSplitsIt(t *testing.T) {
	dir := t.TempDir()
	// An e-mail master whose quoted reply --skip-quoted-replies leaves out.
	eml := filepath.Join(dir, "mail", "rules.eml")
	writeFile(t, eml, "From: Warden <warden@example.org>\nDate: Mon, 3 Mar 2025 09:00:00 +0000\nSubject: Rules\n\n"+
		strings.Join(masterSentences[:7], "\n")+"\n"+
		"> The old rule said that members could leave the lathe running for a minute.\n"+
		"> Another old rule let visitors walk in without signing anything at all.\n")
	changed := slices.Clone(masterSentences[:7])
	changed[2] = "The band saw is switched off before its blade is changed."
	writeFile(t, filepath.Join(dir, "mailcopies", "a.txt"), strings.Join(changed, "\n")+"\n")
	// A text master, and a copy that drops its last two sentences.
	txt := filepath.Join(dir, "text", "rules.txt")
	writeFile(t, txt, strings.Join(masterSentences, "\n")+"\n")
	writeFile(t, filepath.Join(dir, "textcopies", "a.txt"), strings.Join(masterSentences[:12], "\n")+"\n")
	// Word shingles end at a word: the final full stop is not in one.
	dropped := strings.TrimSuffix(strings.Join(masterSentences[12:], "\n"), ".")

	cases := []struct {
		name  string
		args  []string
		text  string // the one missing passage
		units int    // its units
		line  int    // the text starts "Subject\n\n", then the body
	}{
		{"read with the run's options (--skip-quoted-replies)",
			[]string{"--skip-quoted-replies", "--master", eml, filepath.Join(dir, "mailcopies")}, masterSentences[2], 1, 5},
		{"split into the run's units (--unit words: shingles)",
			[]string{"--unit", "words", "--master", txt, filepath.Join(dir, "textcopies")}, dropped, shingleWordCount(dropped), 13},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			r := compareNDJSON(t, tc.args...)
			if len(r.cover) != 1 {
				t.Fatalf("%d copies covered, want 1", len(r.cover))
			}
			c := r.cover[0]
			if len(c.Missing) != 1 || c.Missing[0].Text != tc.text || c.Missing[0].Units != tc.units || c.Missing[0].Line != tc.line {
				t.Errorf("missing %+v; want one passage of %d units at line %d: %q", c.Missing, tc.units, tc.line, tc.text)
			}
		})
	}
}

// shingleWordCount is the number of words in text: the word shingles a copy
// that drops text at the end of the master lacks.
func shingleWordCount(text string) int { return len(strings.Fields(text)) }

// TestCompareReferencesInsideArchivesAndJSONL: a document inside a ZIP or
// JSON Lines file given with --against is a reference; a file that merely
// starts with a reference file's name is not.
func TestCompareReferencesInsideArchivesAndJSONL(t *testing.T) {
	dir := t.TempDir()
	text := strings.Join(masterSentences, "\n") + "\n"
	zipPath := filepath.Join(dir, "refs.zip")
	var buf bytes.Buffer
	zw := zip.NewWriter(&buf)
	w, err := zw.Create("a.txt")
	if err != nil {
		t.Fatal(err)
	}
	if _, err := w.Write([]byte(text)); err != nil {
		t.Fatal(err)
	}
	if err := zw.Close(); err != nil {
		t.Fatal(err)
	}
	writeFile(t, zipPath, buf.String())
	line, err := json.Marshal(map[string]string{"id": "r1", "text": text})
	if err != nil {
		t.Fatal(err)
	}
	jsonlPath := filepath.Join(dir, "refs.jsonl")
	writeFile(t, jsonlPath, string(line)+"\n")
	plain := filepath.Join(dir, "plain", "policy.txt")
	writeFile(t, plain, text)
	lookalike := filepath.Join(dir, "plain", "policy.txt#2.txt")
	writeFile(t, lookalike, text)
	news := filepath.Join(dir, "news")
	writeFile(t, filepath.Join(news, "copy.txt"), text)

	cases := []struct {
		name string
		args []string
		want []string // "reference ~ new"
	}{
		{"a ZIP's members are references", []string{"--against", zipPath, news},
			[]string{zipPath + "!/a.txt ~ " + filepath.Join(news, "copy.txt")}},
		{"a JSON Lines file's records are references", []string{"--against", jsonlPath, news},
			[]string{jsonlPath + "#r1 ~ " + filepath.Join(news, "copy.txt")}},
		{"a file named like a record of a reference file is new", []string{"--against", plain, lookalike},
			[]string{plain + " ~ " + lookalike}},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			r := compareNDJSON(t, tc.args...)
			var got []string
			for _, p := range r.pairs {
				ref, nw := p.A, p.B
				if len(r.sources) == 1 && r.sources[0].Document == p.A {
					ref, nw = p.B, p.A
				}
				got = append(got, ref+" ~ "+nw)
			}
			if !slices.Equal(got, tc.want) {
				t.Errorf("pairs %q, want %q", got, tc.want)
			}
			if len(r.sources) != len(tc.want) {
				t.Errorf("sources %+v, want one new document with sources", r.sources)
			}
		})
	}
}

// TestCompareFilesFromListsNewDocuments: paths read with --files-from are
// new documents like positional paths, with or without positional ones.
func TestCompareFilesFromListsNewDocuments(t *testing.T) {
	master, copies := writeMasterAndCopies(t, 2)
	list := filepath.Join(t.TempDir(), "list.txt")
	writeFile(t, list, filepath.Join(copies, "copy-00.txt")+"\n")
	empty := filepath.Join(t.TempDir(), "empty.txt")
	writeFile(t, empty, "\n")
	cases := []struct {
		name  string
		args  []string
		code  int
		pairs int
		err   string
	}{
		{"listed paths only", []string{"--against", master, "--files-from", list}, exitOK, 1, ""},
		{"listed and positional paths", []string{"--against", master, "--files-from", list, filepath.Join(copies, "copy-01.txt")}, exitOK, 2, ""},
		{"no new document is refused", []string{"--against", master}, exitUsage, 0, "no PATH of new documents"},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			code, out, e := runCLI(t, slices.Concat([]string{"compare", "--format", "json", "-q"}, tc.args)...)
			if code != tc.code || !strings.Contains(e, tc.err) {
				t.Fatalf("exit %d, %q; want %d, %q", code, e, tc.code, tc.err)
			}
			if code != exitOK {
				return
			}
			var res report.Result
			if err := json.Unmarshal([]byte(out), &res); err != nil {
				t.Fatal(err)
			}
			if len(res.Pairs) != tc.pairs {
				t.Errorf("%d pairs, want %d", len(res.Pairs), tc.pairs)
			}
		})
	}
}

// TestCompareAndArchiveAgree: the same pairs read the same way in compare
// and in archive check: the reference (archived) side is A, and every
// figure of the pair, longest passage included, is the same.
func TestCompareAndArchiveAgree(t *testing.T) {
	// The references in a folder whose path sorts after the new
	// documents' ("/tmp/…" after "../…"), so that path order alone would
	// put them on side B.
	demo := "../../testdata/demo"
	sources := t.TempDir()
	copyFiles(t, "../../testdata/demo-sources", sources)
	cmp := compareNDJSON(t, "--against", sources, demo)
	arch := filepath.Join(t.TempDir(), "archive")
	if code, _, e := runCLI(t, "archive", "--archive", arch, "add", "-q", sources); code != exitOK {
		t.Fatalf("add: %s", e)
	}
	code, out, e := runCLI(t, "archive", "--archive", arch, "check", "-q", "--format", "json", demo)
	if code != exitOK {
		t.Fatalf("check: %s", e)
	}
	var res report.Result
	if err := json.Unmarshal([]byte(out), &res); err != nil {
		t.Fatal(err)
	}
	if len(cmp.pairs) == 0 || len(cmp.pairs) != len(res.Pairs) {
		t.Fatalf("compare %d pairs, archive check %d", len(cmp.pairs), len(res.Pairs))
	}
	for i, p := range cmp.pairs {
		q := res.Pairs[i]
		if !strings.HasPrefix(p.A, sources) || q.A != "archive:"+p.A || q.B != p.B {
			t.Errorf("pair %d: compare %s ~ %s, archive check %s ~ %s", i, p.A, p.B, q.A, q.B)
		}
		if p.Score != q.Score || p.CoverageA != q.CoverageA || p.CoverageB != q.CoverageB || p.Shared != q.Shared || p.LongestWords() != q.LongestWords() {
			t.Errorf("pair %d figures: compare %v/%v/%v/%d/%d, archive %v/%v/%v/%d/%d", i,
				p.Score, p.CoverageA, p.CoverageB, p.Shared, p.LongestWords(), q.Score, q.CoverageA, q.CoverageB, q.Shared, q.LongestWords())
		}
	}
}
