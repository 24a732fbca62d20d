package main

import (
	"archive/zip"
	"bytes"
	"encoding/json"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

func TestExitCodes(t *testing.T) {
	dir := t.TempDir()
	essay := "The river rose every spring and flooded the low fields near the mill. " +
		"Farmers learned to plant late and to build their barns on the ridge. " +
		"Nobody in the valley remembers a year without water in the cellars. " +
		"The council finally voted to raise the old levee by two full metres.\n"
	writeFile(t, filepath.Join(dir, "one.txt"), essay)
	writeFile(t, filepath.Join(dir, "two.txt"), "A title line\n\n"+essay)
	empty := t.TempDir()
	writeFile(t, filepath.Join(empty, "blank.txt"), "")

	tests := []struct {
		name string
		args []string
		want int
	}{
		{"no arguments is bad usage", []string{}, exitUsage},
		{"unknown command is bad usage", []string{"compare-all"}, exitUsage},
		{"scan without a path is bad usage", []string{"scan"}, exitUsage},
		{"unknown flag is bad usage", []string{"scan", "--no-such-flag", dir}, exitUsage},
		{"unknown format is bad usage", []string{"scan", "--format", "xml", dir}, exitUsage},
		{"zero support threshold is bad usage", []string{"scan", "--min-shared", "0", dir}, exitUsage},
		{"bad size is bad usage", []string{"scan", "--max-file-size", "lots", dir}, exitUsage},
		{"bad glob is bad usage", []string{"scan", "--include", "[", dir}, exitUsage},
		{"score above one is bad usage", []string{"scan", "--fail-on", "1.5", dir}, exitUsage},
		{"NaN score is bad usage", []string{"scan", "--fail-on", "NaN", dir}, exitUsage},
		{"NaN size is bad usage", []string{"scan", "--max-file-size", "NaN", dir}, exitUsage},
		{"folder with nothing readable exits 2", []string{"scan", empty}, exitUsage},
		{"missing path only exits 2", []string{"scan", filepath.Join(dir, "absent")}, exitUsage},
		{"help exits 0", []string{"scan", "--help"}, exitOK},
		{"version exits 0", []string{"--version"}, exitOK},
		{"a finished scan exits 0", []string{"scan", "-q", dir}, exitOK},
		{"fail-on reached exits 1", []string{"scan", "-q", "--fail-on", "0.9", dir}, exitFailOn},
		{"fail-on as percentage reached exits 1", []string{"scan", "-q", "--fail-on", "90%", dir}, exitFailOn},
		{"compare fail-on reached exits 1", []string{"compare", "-q", "--fail-on", "0.3", "--against", filepath.Join("..", "..", "testdata", "demo-sources"), filepath.Join("..", "..", "testdata", "demo")}, exitFailOn},
		{"compare fail-on not reached exits 0", []string{"compare", "-q", "--fail-on", "0.9", "--against", filepath.Join("..", "..", "testdata", "demo-sources"), filepath.Join("..", "..", "testdata", "demo")}, exitOK},
		{"fail-on not reached exits 0", []string{"scan", "-q", "--fail-on", "1.0", "--min-shared", "5", dir}, exitOK},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			var out, errs bytes.Buffer
			if got := run(tc.args, &out, &errs); got != tc.want {
				t.Errorf("reprise %v: exit %d, want %d\nstdout: %s\nstderr: %s", tc.args, got, tc.want, out.String(), errs.String())
			}
		})
	}
}

func TestHelpExplainsEveryFlag(t *testing.T) {
	var out, errs bytes.Buffer
	if code := run([]string{"scan", "--help"}, &out, &errs); code != exitOK {
		t.Fatalf("exit %d", code)
	}
	help := out.String()
	for _, flag := range []string{"--min-shared", "--min-words", "--max-docs", "--exclude", "--format", "--output",
		"--top", "--jobs", "--include", "--skip", "--max-file-size", "--quiet", "--fail-on", "Examples:", "not proof"} {
		if !strings.Contains(help, flag) {
			t.Errorf("scan --help does not mention %s", flag)
		}
	}
}

// TestOutputIsAtomicAndIdenticalAcrossJobs writes every format with -o for
// several --jobs values and compares the bytes.
func TestOutputIsAtomicAndIdenticalAcrossJobs(t *testing.T) {
	demo := filepath.Join("..", "..", "testdata", "demo")
	out := t.TempDir()
	for _, format := range []string{"text", "json", "ndjson", "csv", "html"} {
		var first []byte
		for _, jobs := range []string{"1", "2", "7"} {
			file := filepath.Join(out, format+"-"+jobs)
			var stdout, stderr bytes.Buffer
			if code := run([]string{"scan", "-q", "--format", format, "--jobs", jobs, "-o", file, demo}, &stdout, &stderr); code != exitOK {
				t.Fatalf("%s --jobs %s: exit %d: %s", format, jobs, code, stderr.String())
			}
			got, err := os.ReadFile(file)
			if err != nil {
				t.Fatal(err)
			}
			if stdout.Len() != 0 {
				t.Errorf("%s with -o also wrote %d bytes to stdout", format, stdout.Len())
			}
			if first == nil {
				first = got
			} else if !bytes.Equal(first, got) {
				t.Errorf("%s: --jobs %s output differs from --jobs 1", format, jobs)
			}
		}
	}
	entries, _ := os.ReadDir(out)
	for _, e := range entries {
		if strings.Contains(e.Name(), ".tmp-") {
			t.Errorf("temporary file left behind: %s", e.Name())
		}
	}
}

// TestBadInputNeverStopsTheRun mixes unreadable and odd files with good ones.
func TestBadInputNeverStopsTheRun(t *testing.T) {
	dir := t.TempDir()
	para := "Our policy requires every visitor to sign in at the front desk before entering. " +
		"Visitors must wear the badge they receive where staff can see it at all times. " +
		"Badges are returned at the front desk when the visitor leaves the building. " +
		"Lost badges are reported to the security office on the same working day.\n"
	writeFile(t, filepath.Join(dir, "policy-a.txt"), para)
	writeFile(t, filepath.Join(dir, "policy-b.md"), "# Visitors\n\n"+para)
	writeFile(t, filepath.Join(dir, "empty.txt"), "")
	writeFile(t, filepath.Join(dir, "image.bin"), "\x89PNG\r\n\x1a\n\x00\x00\x00\rIHDR\x00\x00")
	writeFile(t, filepath.Join(dir, "latin1.txt"), "Caf\xe9 au lait is served \x93hot\x94 in the staff room every morning.\n")
	writeFile(t, filepath.Join(dir, "no-punctuation.txt"), strings.Repeat("a line of words without any sentence end\n", 20))
	writeFile(t, filepath.Join(dir, "long-line.txt"), strings.Repeat("word ", 5000)+"\n")
	if err := os.Symlink(filepath.Join(dir, "nowhere"), filepath.Join(dir, "broken-link.txt")); err != nil {
		t.Fatal(err)
	}

	res := scanJSON(t, exitOK, dir)
	if len(res.Pairs) != 1 {
		t.Fatalf("want the one policy pair, got %d pairs", len(res.Pairs))
	}
	reasons := map[string]string{}
	for _, s := range res.Skipped {
		reasons[filepath.Base(s.Path)] = s.Reason
	}
	for _, name := range []string{"empty.txt", "image.bin", "broken-link.txt"} {
		if reasons[name] == "" {
			t.Errorf("%s not listed as skipped (skipped: %v)", name, res.Skipped)
		}
	}
	notes := map[string]string{}
	for _, d := range res.Documents {
		notes[filepath.Base(d.Path)] = strings.Join(d.Notes, "; ")
	}
	for name, want := range map[string]string{
		"latin1.txt":         "Windows-1252",
		"no-punctuation.txt": "line breaks",
		"long-line.txt":      "cut",
	} {
		if !strings.Contains(notes[name], want) {
			t.Errorf("%s: notes %q do not say %q", name, notes[name], want)
		}
	}
	// The JSON contract's top-level fields are all present.
	var raw map[string]json.RawMessage
	b, _ := json.Marshal(res)
	_ = json.Unmarshal(b, &raw)
	for _, k := range []string{"format", "settings", "documents", "skipped", "common", "pairs", "groups", "clusters"} {
		if _, ok := raw[k]; !ok {
			t.Errorf("JSON lacks %q", k)
		}
	}
}

func TestExcludedTemplateNeverCounts(t *testing.T) {
	dir := t.TempDir()
	prompt := "Describe a place in your town that has changed over the last ten years. " +
		"Explain what the place was like before the change and what it is like now. " +
		"Say whether you think the change was good for the people who live nearby. " +
		"Give at least two reasons for your opinion and an example for each reason.\n"
	writeFile(t, filepath.Join(dir, "prompt.txt"), prompt)
	writeFile(t, filepath.Join(dir, "ana.txt"), prompt+"\nThe old bakery on Linden Street became a phone shop in the spring.\n")
	writeFile(t, filepath.Join(dir, "bo.txt"), prompt+"\nOur swimming pool closed and nobody has opened it again since then.\n")

	with := scanJSON(t, exitOK, dir)
	if len(with.Pairs) == 0 {
		t.Fatalf("without --exclude the pasted prompt should pair the essays")
	}
	without := scanJSON(t, exitOK, "--exclude", filepath.Join(dir, "prompt.txt"), dir)
	if len(without.Pairs) != 0 {
		t.Errorf("with --exclude the prompt's sentences still count: %d pairs", len(without.Pairs))
	}
	if without.Summary.TemplateUnits == 0 {
		t.Errorf("template sentences found in the documents are not counted in the summary")
	}
	for _, d := range without.Documents {
		if filepath.Base(d.Path) == "prompt.txt" {
			t.Errorf("the template itself was compared as a document")
		}
	}
}

// TestSettingsRecordTheReadingLimits: the report's settings block holds
// every effective setting, the reading limits included.
func TestSettingsRecordTheReadingLimits(t *testing.T) {
	demo := filepath.Join("..", "..", "testdata", "demo")
	def := scanJSON(t, exitOK, demo)
	if r := def.Settings.Read; r == nil || r.MaxDepth != 256 || r.MaxMembers != 10000 || r.JSONLText != "text" {
		t.Errorf("default reading settings %+v, want the documented defaults (depth 256, 10000 members, text field \"text\")", r)
	}
	if r := def.Settings.Read; r == nil || r.FileTimeoutSeconds != 60 {
		t.Errorf("default reading settings %+v, want file_timeout_seconds 60", r)
	}
	set := scanJSON(t, exitOK, "--max-depth", "77", "--skip-quoted-replies", "--pdf-timeout", "5s", "--file-timeout", "90s", demo)
	if r := set.Settings.Read; r == nil || r.MaxDepth != 77 || !r.SkipQuotedReplies || r.PDFTimeoutSeconds != 5 || r.FileTimeoutSeconds != 90 {
		t.Errorf("reading settings %+v, want max_depth 77, skip_quoted_replies, pdf_timeout_seconds 5, file_timeout_seconds 90", r)
	}
}

// TestReadAgainKeepsIncludeForMembers: --include also chooses a ZIP
// archive's members, so reading a quoted member again must apply it as
// the first read did; otherwise the members left out the first time use
// up --max-container-size and the quoted one is refused.
func TestReadAgainKeepsIncludeForMembers(t *testing.T) {
	dir := t.TempDir()
	essay := strings.Join(masterSentences, " ") + "\n"
	var buf bytes.Buffer
	zw := zip.NewWriter(&buf)
	for _, m := range []struct {
		name string
		data []byte
	}{
		{"a.dat", bytes.Repeat([]byte("0123456789abcdef"), 1<<16-4)}, // 64 bytes under 1 MiB, not a file the scan wants
		{"b.txt", []byte(essay)},
	} {
		w, err := zw.CreateHeader(&zip.FileHeader{Name: m.name, Method: zip.Store})
		if err != nil {
			t.Fatal(err)
		}
		if _, err := w.Write(m.data); err != nil {
			t.Fatal(err)
		}
	}
	if err := zw.Close(); err != nil {
		t.Fatal(err)
	}
	writeFile(t, filepath.Join(dir, "a.zip"), buf.String())
	writeFile(t, filepath.Join(dir, "c.txt"), essay)
	res := scanJSON(t, exitOK, "--include", "*.txt", "--include", "*.zip", "--max-container-size", "1MiB", dir)
	if len(res.Pairs) != 1 || !strings.HasSuffix(res.Pairs[0].A, "a.zip!/b.txt") {
		t.Fatalf("pairs %+v, want the member and its copy", res.Pairs)
	}
}
