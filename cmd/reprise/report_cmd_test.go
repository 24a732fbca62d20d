package main

import (
	"archive/zip"
	"bytes"
	"encoding/json"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"reprise/report"
	"reprise/scan"
)

// TestReportReadsDocumentsAgainAsTheScanDid: for the side-by-side view,
// 'reprise report' reads a ZIP member from its archive and a JSON Lines
// document from its file, with the reading options the result records
// (--skip-quoted-replies, --jsonl-text), so an unchanged document is shown
// and not called unreadable or changed.
func TestReportReadsDocumentsAgainAsTheScanDid(t *testing.T) {
	shared := "The first shared sentence has enough words in it. The second shared sentence also has enough words. The third shared sentence ends the copied part here."
	zipOf := func(members map[string]string) string {
		var buf bytes.Buffer
		zw := zip.NewWriter(&buf)
		for name, text := range members {
			w, err := zw.Create(name)
			if err != nil {
				t.Fatal(err)
			}
			if _, err := w.Write([]byte(text)); err != nil {
				t.Fatal(err)
			}
		}
		if err := zw.Close(); err != nil {
			t.Fatal(err)
		}
		return buf.String()
	}
	jsonLine := func(fields map[string]string) string {
		b, err := json.Marshal(fields)
		if err != nil {
			t.Fatal(err)
		}
		return string(b) + "\n"
	}
	mail := func(from, own string) string {
		return "From: " + from + "@example.org\nTo: desk@example.org\nSubject: notes\n\n" + own + "\n\n" + shared +
			"\n\n> An earlier message quoted here by " + from + " has many words of its own in it.\n"
	}
	tests := []struct {
		name  string
		files map[string]string
		flags []string
	}{
		{"a ZIP member is read again from its archive", map[string]string{
			"pack.zip": zipOf(map[string]string{"a.txt": "Alpha opens with words of its own today.\n\n" + shared, "b.txt": "Beta opens differently with other words.\n\n" + shared}),
		}, nil},
		{"a JSON Lines document is read again from its file", map[string]string{
			"set.jsonl": jsonLine(map[string]string{"id": "a", "text": "Alpha opens with words of its own. " + shared}) +
				jsonLine(map[string]string{"id": "b", "text": "Beta opens differently with words. " + shared}),
		}, nil},
		{"--jsonl-text is used again", map[string]string{
			"set.jsonl": jsonLine(map[string]string{"id": "a", "body": "Alpha opens with words of its own. " + shared, "text": "short"}) +
				jsonLine(map[string]string{"id": "b", "body": "Beta opens differently with words. " + shared, "text": "short"}),
		}, []string{"--jsonl-text", "body"}},
		{"--skip-quoted-replies is used again", map[string]string{
			"a.eml": mail("alpha", "Alpha opens with words of its own today."),
			"b.eml": mail("beta", "Beta opens differently with other words."),
		}, []string{"--skip-quoted-replies"}},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			dir := t.TempDir()
			docs := filepath.Join(dir, "docs")
			if err := os.Mkdir(docs, 0o755); err != nil {
				t.Fatal(err)
			}
			for name, text := range tc.files {
				writeFile(t, filepath.Join(docs, name), text)
			}
			saved := filepath.Join(dir, "result.json")
			var stderr bytes.Buffer
			args := append(append([]string{"scan", "-q", "--format", "json", "-o", saved}, tc.flags...), docs)
			if code := run(args, &bytes.Buffer{}, &stderr); code != exitOK {
				t.Fatalf("scan: exit %d: %s", code, stderr.String())
			}
			res, err := report.ReadJSONFile(saved)
			if err != nil {
				t.Fatal(err)
			}
			if len(res.Pairs) != 1 {
				t.Fatalf("scan found %d pairs, want 1: %+v", len(res.Pairs), res.Documents)
			}
			texts, _, _ := scan.ReloadTexts(res, 0, "")
			for i, d := range res.Documents {
				if texts[i].Missing != "" {
					t.Errorf("%s not shown: %s", d.Path, texts[i].Missing)
				}
			}
			page, _ := reportCmd(t, exitOK, "--format", "html", saved)
			if strings.Contains(page, "The text is not shown") {
				t.Errorf("the page does not show an unchanged document")
			}
		})
	}
}

// TestReportRootFindsTheDocuments: a JSON result redrawn as HTML from
// another folder warns that its documents could not be read again, and
// with --root naming the folder the scan ran in shows them side by side.
func TestReportRootFindsTheDocuments(t *testing.T) {
	result := filepath.Join(t.TempDir(), "result.json")
	if code, _, e := runCLI(t, "scan", "-q", "--format", "json", "-o", result, "../../testdata/demo"); code != exitOK {
		t.Fatalf("scan: %s", e)
	}
	root, err := filepath.Abs(".")
	if err != nil {
		t.Fatal(err)
	}
	t.Chdir(t.TempDir()) // the recorded paths no longer lead anywhere
	code, page, e := runCLI(t, "report", "--format", "html", result)
	if code != exitOK || !strings.Contains(e, "could not be read again") || !strings.Contains(e, "--root") {
		t.Fatalf("from another folder: exit %d, stderr %q; want a warning naming --root", code, e)
	}
	if !strings.Contains(page, "could not be read again") {
		t.Fatalf("the page does not say why the texts are missing")
	}
	code, page, e = runCLI(t, "report", "--root", root, "--format", "html", result)
	if code != exitOK || e != "" {
		t.Fatalf("--root: exit %d, stderr %q", code, e)
	}
	if strings.Contains(page, "could not be read again") {
		t.Fatalf("--root %s: some documents still not read again", root)
	}
}

// TestReportRereadsCutPassages: passages whose text the result cut
// (--passage-text) still match the documents read again.
func TestReportRereadsCutPassages(t *testing.T) {
	result := filepath.Join(t.TempDir(), "result.json")
	if code, _, e := runCLI(t, "scan", "-q", "--passage-text", "40", "--format", "json", "-o", result, "../../testdata/demo"); code != exitOK {
		t.Fatalf("scan: %s", e)
	}
	raw, err := os.ReadFile(result)
	if err != nil || !strings.Contains(string(raw), `"text_cut": true`) {
		t.Fatalf("no passage cut at 40 bytes (%v)", err)
	}
	code, page, e := runCLI(t, "report", "--format", "html", result)
	if code != exitOK || e != "" || strings.Contains(page, "has changed since the scan") {
		t.Fatalf("exit %d, stderr %q, or a cut passage read as a changed file", code, e)
	}
}
