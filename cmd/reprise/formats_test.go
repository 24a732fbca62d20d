package main

import (
	"archive/zip"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"testing"
)

// formatsDir holds the fixtures of scripts/make-fixtures.sh: invented
// Markdown documents converted by pandoc 2.17.1.1 (PDF through pandoc -t
// ms, GNU groff 1.22.4 and Ghostscript 10.00.0).
const formatsDir = "../../corpus/testdata/formats"

func needPDFToText(t *testing.T) {
	t.Helper()
	if _, err := exec.LookPath("pdftotext"); err != nil {
		if os.Getenv("CI") != "" {
			t.Fatalf("pdftotext missing (.ci/run installs poppler-utils): %v", err)
		}
		t.Skip("pdftotext missing: apt-get install poppler-utils to run this test")
	}
}

// TestScanSameEssayInEveryFormat: one essay saved by pandoc as .txt,
// .docx, .odt, .epub, .html, .rtf and .pdf; every two of them pair with
// coverage of at least 0.95 on both sides. --max-docs 10 keeps the essay's
// sentences, in all seven documents, from counting as common text.
func TestScanSameEssayInEveryFormat(t *testing.T) {
	needPDFToText(t)
	dir := filepath.Join(formatsDir, "essay")
	res := scanJSON(t, exitOK, "--max-docs", "10", dir)
	exts := []string{"txt", "docx", "odt", "epub", "html", "rtf", "pdf"}
	if len(res.Documents) != len(exts) {
		t.Fatalf("%d documents read, want %d; skipped %v", len(res.Documents), len(exts), res.Skipped)
	}
	for i, x := range exts {
		for _, y := range exts[i+1:] {
			a, b := filepath.Join(dir, "essay."+x), filepath.Join(dir, "essay."+y)
			p := findPair(res, a, b)
			if p == nil {
				t.Errorf("%s ~ %s: not paired", x, y)
				continue
			}
			if ca, cb := coverageOf(p, a), coverageOf(p, b); ca < 0.95 || cb < 0.95 {
				t.Errorf("%s ~ %s: coverage %.4f / %.4f, want both >= 0.95", x, y, ca, cb)
			}
		}
	}
}

// TestScanPlantedPassageLocations: a paragraph of the essay planted in
// the memo is found between memo.docx and essay.pdf with its paragraph in
// the DOCX (5: title, heading, two paragraphs, then it, as in memo.md) and
// its page in the PDF (2: essay.md forces a page break before it, and
// make-fixtures.sh checks it lands on page 2).
func TestScanPlantedPassageLocations(t *testing.T) {
	needPDFToText(t)
	docx := filepath.Join(formatsDir, "memo", "memo.docx")
	pdf := filepath.Join(formatsDir, "essay", "essay.pdf")
	res := scanJSON(t, exitOK, docx, pdf)
	p := findPair(res, docx, pdf)
	if p == nil || len(p.Passages) != 1 {
		t.Fatalf("want one pair with one passage, got %+v", res.Pairs)
	}
	g := p.Passages[0]
	where := map[string]string{p.A: g.AWhere, p.B: g.BWhere}
	if where[docx] != "paragraph 5" || where[pdf] != "page 2" {
		t.Fatalf("passage located at %q in the DOCX and %q in the PDF, want paragraph 5 and page 2", where[docx], where[pdf])
	}
	if !strings.HasPrefix(g.Text, "A roof is a harsh place for a colony") {
		t.Fatalf("passage text %q", g.Text)
	}
}

// TestScanFolderAndZip: a folder mixing every format, with a ZIP of the
// essay in every format and bad files beside them, scans: the members are
// documents named archive!/member, pair with the loose files, and the bad
// files are listed with reasons.
func TestScanFolderAndZip(t *testing.T) {
	needPDFToText(t)
	dir := t.TempDir()
	copyTo := func(src, dst string) []byte {
		raw, err := os.ReadFile(filepath.Join(formatsDir, src))
		if err != nil {
			t.Fatal(err)
		}
		writeFile(t, filepath.Join(dir, dst), string(raw))
		return raw
	}
	for _, ext := range []string{"docx", "odt", "epub", "html", "rtf", "pdf", "txt"} {
		copyTo("policy/policy."+ext, "policies/policy."+ext)
	}
	copyTo("essay/essay.pdf", "essay.pdf")
	zf, err := os.Create(filepath.Join(dir, "batch.zip"))
	if err != nil {
		t.Fatal(err)
	}
	zw := zip.NewWriter(zf)
	for _, ext := range []string{"docx", "odt", "rtf"} {
		raw, err := os.ReadFile(filepath.Join(formatsDir, "essay", "essay."+ext))
		if err != nil {
			t.Fatal(err)
		}
		w, _ := zw.Create("submissions/essay." + ext)
		w.Write(raw)
	}
	if err := zw.Close(); err != nil {
		t.Fatal(err)
	}
	zf.Close()
	writeFile(t, filepath.Join(dir, "reply.eml"), "From: Rowing Secretary <secretary@example.org>\r\nDate: Mon, 4 Mar 2024 09:30:00 +0000\r\nSubject: Loan rules\r\n\r\n> Every crew must carry a charged radio and a throw line on the water.\r\nNoted, thank you.\r\n")
	writeFile(t, filepath.Join(dir, "broken.docx"), "not a word document")
	writeFile(t, filepath.Join(dir, "empty.pdf"), "")

	res := scanJSON(t, exitOK, "--max-docs", "10", dir)
	if len(res.Documents) != 12 {
		var got []string
		for _, d := range res.Documents {
			got = append(got, d.Path)
		}
		t.Fatalf("%d documents, want 12: %v; skipped %v", len(res.Documents), got, res.Skipped)
	}
	member := filepath.Join(dir, "batch.zip") + "!/submissions/essay.docx"
	if p := findPair(res, member, filepath.Join(dir, "essay.pdf")); p == nil || coverageOf(p, member) < 0.95 {
		t.Fatalf("ZIP member and loose PDF: pair %+v, want coverage >= 0.95", p)
	}
	if p := findPair(res, filepath.Join(dir, "policies", "policy.odt"), filepath.Join(dir, "policies", "policy.pdf")); p == nil {
		t.Fatal("policy.odt and policy.pdf not paired")
	}
	reasons := map[string]string{}
	for _, s := range res.Skipped {
		reasons[filepath.Base(s.Path)] = s.Reason
	}
	if !strings.Contains(reasons["broken.docx"], "not a DOCX file") || reasons["empty.pdf"] != "empty file" {
		t.Fatalf("skipped %v, want broken.docx and empty.pdf with their reasons", res.Skipped)
	}
	for _, d := range res.Documents {
		if strings.HasSuffix(d.Path, "reply.eml") && (d.Format != "email" || !strings.Contains(strings.Join(d.Notes, " "), "1 quoted reply lines")) {
			t.Fatalf("reply.eml: format %q notes %q", d.Format, d.Notes)
		}
	}
}
