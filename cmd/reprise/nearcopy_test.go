package main

import (
	"archive/zip"
	"bytes"
	"encoding/csv"
	"encoding/json"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"reprise/report"
)

// oneEssayEverywhere builds the folder of the false all-clear: the fixture
// essay (scripts/make-fixtures.sh: pandoc, groff, Ghostscript) as .txt,
// .md, .docx, .odt, .html, .rtf, .epub, .pdf and .eml, two more copies in
// a ZIP, and one unrelated document (the policy fixture): 12 documents, 11
// of them the same text. It returns the folder and the unrelated path.
func oneEssayEverywhere(t *testing.T) (dir, unrelated string) {
	t.Helper()
	dir = t.TempDir()
	read := func(rel string) []byte {
		raw, err := os.ReadFile(filepath.Join(formatsDir, rel))
		if err != nil {
			t.Fatal(err)
		}
		return raw
	}
	for _, ext := range []string{"txt", "docx", "odt", "html", "rtf", "epub", "pdf"} {
		writeFile(t, filepath.Join(dir, "essay."+ext), string(read("essay/essay."+ext)))
	}
	writeFile(t, filepath.Join(dir, "essay.md"), string(read("source/essay.md")))
	writeFile(t, filepath.Join(dir, "essay.eml"), "From: A Student <student@example.org>\r\nTo: Teacher <teacher@example.org>\r\n"+
		"Subject: my essay\r\nContent-Type: text/plain; charset=utf-8\r\n\r\n"+string(read("essay/essay.txt")))
	var buf bytes.Buffer
	zw := zip.NewWriter(&buf)
	for name, src := range map[string]string{"copies/first.txt": "essay/essay.txt", "copies/second.docx": "essay/essay.docx"} {
		w, err := zw.Create(name)
		if err != nil {
			t.Fatal(err)
		}
		w.Write(read(src))
	}
	if err := zw.Close(); err != nil {
		t.Fatal(err)
	}
	writeFile(t, filepath.Join(dir, "copies.zip"), buf.String())
	unrelated = filepath.Join(dir, "unrelated.txt")
	writeFile(t, unrelated, string(read("policy/policy.txt")))
	return dir, unrelated
}

// TestNearCopiesAreNeverCommonText: a folder that is mostly copies of one
// text gives, at the defaults, every pair of the copies at a score of at
// least 0.9, one set of 11 near-copies listed first, and the unrelated
// document in none; nothing is set aside as common text.
func TestNearCopiesAreNeverCommonText(t *testing.T) {
	needPDFToText(t)
	dir, unrelated := oneEssayEverywhere(t)
	res := scanJSON(t, exitOK, dir)
	if len(res.Documents) != 12 || len(res.Skipped) != 0 {
		t.Fatalf("%d documents, skipped %v; want 12 and none", len(res.Documents), res.Skipped)
	}
	if len(res.Pairs) != 55 {
		t.Fatalf("%d pairs, want 55 (every two of the 11 copies)", len(res.Pairs))
	}
	for _, p := range res.Pairs {
		if p.A == unrelated || p.B == unrelated {
			t.Errorf("the unrelated document is in pair %s ~ %s", p.A, p.B)
		}
		if p.Score < 0.9 {
			t.Errorf("%s ~ %s: score %.4f, want >= 0.9", p.A, p.B, p.Score)
		}
	}
	if len(res.NearCopies) != 1 || len(res.NearCopies[0].Documents) != 11 {
		t.Fatalf("near-copies %+v, want one set of 11", res.NearCopies)
	}
	set := res.NearCopies[0]
	for _, m := range set.Documents {
		if m.Path == unrelated || m.Resemblance < 0.9 {
			t.Errorf("member %+v", m)
		}
	}
	if set.Pairs != 55 || set.PairsListed != 55 || res.Summary.NearCopyDocuments != 11 || res.Summary.NearCopySets != 1 {
		t.Errorf("set pairs %d listed %d, summary %+v", set.Pairs, set.PairsListed, res.Summary)
	}
	if len(res.Common) != 0 || res.Summary.CommonWords != 0 {
		t.Errorf("common text set aside: %d units, %d words", len(res.Common), res.Summary.CommonWords)
	}
}

// TestNearCopiesInEveryFormat: the set of near-copies comes first in every
// rendering of the same run.
func TestNearCopiesInEveryFormat(t *testing.T) {
	needPDFToText(t)
	dir, _ := oneEssayEverywhere(t)
	render := func(format string) string {
		var out, errs bytes.Buffer
		if code := run([]string{"scan", "-q", "--format", format, dir}, &out, &errs); code != exitOK {
			t.Fatalf("%s: exit %d: %s", format, code, errs.String())
		}
		return out.String()
	}
	t.Run("text: a summary line, then the set before the pairs", func(t *testing.T) {
		out := render("text")
		if !strings.Contains(out, "11 documents are near-copies of each other") {
			t.Fatalf("no summary line:\n%s", out)
		}
		near, pairs := strings.Index(out, "\nNear-copies\n"), strings.Index(out, "\nPairs\n")
		if near < 0 || pairs < near || strings.Count(out[near:pairs], dir) != 11 {
			t.Fatalf("near-copies section missing, after the pairs, or not 11 members:\n%s", out)
		}
	})
	t.Run("json: near_copies before documents", func(t *testing.T) {
		out := render("json")
		near, docs := strings.Index(out, `"near_copies": [`), strings.Index(out, "\n  \"documents\": [")
		if near < 0 || docs < near {
			t.Fatalf("near_copies missing or after documents")
		}
		var res report.Result
		if err := json.Unmarshal([]byte(out), &res); err != nil || len(res.NearCopies) != 1 || len(res.NearCopies[0].Documents) != 11 {
			t.Fatalf("near_copies %+v (%v)", res.NearCopies, err)
		}
	})
	t.Run("ndjson: a near_copies line right after the report line", func(t *testing.T) {
		lines := strings.Split(render("ndjson"), "\n")
		var rec struct {
			Type string `json:"type"`
			report.NearCopySet
		}
		if err := json.Unmarshal([]byte(lines[1]), &rec); err != nil || rec.Type != "near_copies" || len(rec.Documents) != 11 {
			t.Fatalf("second line %q (%v)", lines[1], err)
		}
	})
	t.Run("csv: one near_copy row per member, first", func(t *testing.T) {
		rows, err := csv.NewReader(strings.NewReader(render("csv"))).ReadAll()
		if err != nil {
			t.Fatal(err)
		}
		for i := 1; i <= 11; i++ {
			if rows[i][0] != "near_copy" || rows[i][1] != "1" {
				t.Fatalf("row %d: %v", i, rows[i])
			}
		}
		if rows[12][0] != "pair" {
			t.Fatalf("row 12: %v, want the first pair", rows[12])
		}
	})
	t.Run("html: the section first in the page", func(t *testing.T) {
		out := render("html")
		near, summary := strings.Index(out, `<section id="near-copies"`), strings.Index(out, `<section id="summary"`)
		if near < 0 || summary < near {
			t.Fatalf("near-copies section missing or after the summary")
		}
		if n := strings.Count(out[near:summary], `<td class="n">`); n != 11 {
			t.Fatalf("%d members listed, want 11", n)
		}
	})
}

// TestNearCopiesOfArchivedDocumentsAreReported: an archive holding the
// same essay in six formats (distinct extracted texts) and a new copy with
// one added sentence: every archived copy is reported against it, although
// each of its sentences is in more than half of the documents.
func TestNearCopiesOfArchivedDocumentsAreReported(t *testing.T) {
	needPDFToText(t)
	dir, _ := oneEssayEverywhere(t)
	arch := filepath.Join(t.TempDir(), "archive")
	if code, _, stderr := runCLI(t, "archive", "--archive", arch, "add", "-q", dir); code != exitOK {
		t.Fatalf("add: exit %d: %s", code, stderr)
	}
	raw, err := os.ReadFile(filepath.Join(formatsDir, "essay", "essay.txt"))
	if err != nil {
		t.Fatal(err)
	}
	fresh := filepath.Join(t.TempDir(), "fresh.txt")
	writeFile(t, fresh, string(raw)+"\nA closing sentence of the new copy that no archived document holds.\n")
	code, stdout, stderr := runCLI(t, "archive", "--archive", arch, "check", "-q", "--format", "json", fresh)
	if code != exitOK {
		t.Fatalf("check: exit %d: %s", code, stderr)
	}
	var res report.Result
	if err := json.Unmarshal([]byte(stdout), &res); err != nil {
		t.Fatal(err)
	}
	// The archive keeps one of each distinct text: six of the eleven copies.
	if len(res.Pairs) < 5 {
		t.Fatalf("%d pairs with the archive, want every archived copy", len(res.Pairs))
	}
	for _, p := range res.Pairs {
		if p.B != fresh || p.Score < 0.85 {
			t.Errorf("pair %s ~ %s score %.4f", p.A, p.B, p.Score)
		}
	}
	if len(res.NearCopies) != 1 || len(res.NearCopies[0].Documents) != len(res.Pairs)+1 {
		t.Fatalf("near-copies %+v", res.NearCopies)
	}
}
