package main

import (
	"bytes"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// reportCmd runs 'reprise report ARGS...' in process.
func reportCmd(t *testing.T, want int, args ...string) (string, string) {
	t.Helper()
	var out, errs bytes.Buffer
	if code := run(append([]string{"report"}, args...), &out, &errs); code != want {
		t.Fatalf("reprise report %v: exit %d, want %d; stderr:\n%s", args, code, want, errs.String())
	}
	return out.String(), errs.String()
}

func TestReportRendersASavedResultLikeScan(t *testing.T) {
	demo := filepath.Join("..", "..", "testdata", "demo")
	dir := t.TempDir()
	saved := filepath.Join(dir, "result.json")
	var stderr bytes.Buffer
	for _, format := range []string{"json", "html", "text", "csv", "ndjson"} {
		out := filepath.Join(dir, "scan."+format)
		if code := run([]string{"scan", "-q", "--format", format, "-o", out, demo}, &bytes.Buffer{}, &stderr); code != exitOK {
			t.Fatalf("scan --format %s: exit %d: %s", format, code, stderr.String())
		}
	}
	if err := os.Rename(filepath.Join(dir, "scan.json"), saved); err != nil {
		t.Fatal(err)
	}
	for _, format := range []string{"json", "html", "text", "csv", "ndjson"} {
		got, _ := reportCmd(t, exitOK, "--format", format, saved)
		want, err := os.ReadFile(filepath.Join(dir, "scan."+format))
		if format == "json" {
			want, err = os.ReadFile(saved)
		}
		if err != nil {
			t.Fatal(err)
		}
		if got != string(want) {
			t.Errorf("report --format %s differs from scan --format %s", format, format)
		}
	}
}

func TestReportShowsAChangedFileByItsPassagesOnly(t *testing.T) {
	dir := t.TempDir()
	shared := "The first shared sentence has enough words in it. The second shared sentence also has enough words. The third shared sentence ends the copied part here.\n"
	a, b := filepath.Join(dir, "a.txt"), filepath.Join(dir, "b.txt")
	writeFile(t, a, "Alpha opens with words of its own today.\n\n"+shared)
	writeFile(t, b, "Beta opens differently with other words.\n\n"+shared)
	saved := filepath.Join(dir, "result.json")
	var stderr bytes.Buffer
	if code := run([]string{"scan", "-q", "--format", "json", "-o", saved, dir}, &bytes.Buffer{}, &stderr); code != exitOK {
		t.Fatalf("scan: %s", stderr.String())
	}
	page, _ := reportCmd(t, exitOK, "--format", "html", saved)
	if strings.Contains(page, "The text is not shown") {
		t.Fatalf("unchanged files are not shown")
	}
	writeFile(t, b, "Beta was rewritten after the scan, with many more words than it had before it changed.\n\n"+shared)
	page, _ = reportCmd(t, exitOK, "--format", "html", saved)
	if !strings.Contains(page, "The text is not shown: the file has changed since the scan") {
		t.Errorf("a changed file is not explained")
	}
	if err := os.Remove(a); err != nil {
		t.Fatal(err)
	}
	page, _ = reportCmd(t, exitOK, "--format", "html", saved)
	if !strings.Contains(page, "The text is not shown: the file could not be read again") {
		t.Errorf("a removed file is not explained")
	}
	// No detail views: nothing is read again.
	page, _ = reportCmd(t, exitOK, "--format", "html", "--html-pairs", "0", saved)
	if strings.Contains(page, `class="pair block"`) {
		t.Errorf("--html-pairs 0 still shows a pair side by side")
	}
}

func TestReportRefusesBadInput(t *testing.T) {
	dir := t.TempDir()
	notJSON := filepath.Join(dir, "x.json")
	writeFile(t, notJSON, "<html>")
	other := filepath.Join(dir, "y.json")
	writeFile(t, other, `{"format": 99}`)
	for _, c := range []struct {
		name string
		args []string
		want string
	}{
		{"no argument", nil, "want one RESULT.json"},
		{"missing file", []string{filepath.Join(dir, "none.json")}, "no such file"},
		{"not JSON", []string{notJSON}, "not a reprise JSON result"},
		{"another format version", []string{other}, "result format 99"},
		{"unknown format", []string{"--format", "pdf", other}, `--format "pdf"`},
		{"negative pairs", []string{"--html-pairs", "-1", other}, "--html-pairs must be 0 or more"},
	} {
		t.Run(c.name, func(t *testing.T) {
			_, errs := reportCmd(t, exitUsage, c.args...)
			if !strings.Contains(errs, c.want) {
				t.Errorf("stderr %q lacks %q", errs, c.want)
			}
		})
	}
}
