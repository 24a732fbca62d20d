package scan

import (
	"context"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"reprise/corpus"
	"reprise/pairs"
)

// demoCopy copies the demo essays into a fresh folder a test may change.
func demoCopy(t *testing.T) string {
	t.Helper()
	dir := t.TempDir()
	entries, err := os.ReadDir("../testdata/demo")
	if err != nil {
		t.Fatal(err)
	}
	for _, e := range entries {
		if e.IsDir() {
			continue
		}
		b, err := os.ReadFile(filepath.Join("../testdata/demo", e.Name()))
		if err != nil {
			t.Fatal(err)
		}
		writeFile(t, filepath.Join(dir, e.Name()), string(b))
	}
	return dir
}

// demoConfig is a run over dir at the defaults, with its temporary folder
// in a test folder of its own.
func demoConfig(t *testing.T, dir string) Config {
	t.Helper()
	return Config{Paths: []string{dir}, Jobs: 2, TempDir: t.TempDir()}
}

func writeFile(t *testing.T, path, text string) {
	t.Helper()
	if err := os.MkdirAll(filepath.Dir(path), 0o755); err != nil {
		t.Fatal(err)
	}
	if err := os.WriteFile(path, []byte(text), 0o644); err != nil {
		t.Fatal(err)
	}
}

// TestScanHoldsNoTextWhileCounting: once split, a document keeps no text;
// only the documents the report quotes are read again, and the report
// still quotes their passages.
func TestScanHoldsNoTextWhileCounting(t *testing.T) {
	dir := demoCopy(t)
	cfg := demoConfig(t, dir)
	var seen, withText int
	cfg.keepPairs = func(docs []corpus.Document, eng *pairs.Result) {
		seen = len(docs)
		for _, d := range docs {
			if d.Text != "" {
				withText++
			}
		}
	}
	res, err := Run(context.Background(), cfg)
	if err != nil {
		t.Fatal(err)
	}
	if seen != 24 || withText != 0 {
		t.Errorf("while counting: %d of %d documents held their text, want 0 of 24", withText, seen)
	}
	if len(res.Pairs) == 0 {
		t.Fatal("the demo gave no pair")
	}
	for _, p := range res.Pairs {
		for _, g := range p.Passages {
			if g.Text == "" || g.Words == 0 {
				t.Errorf("%s ~ %s: passage without text", p.A, p.B)
			}
		}
	}
	// With TextPairs, the texts of those pairs' documents are given to the
	// renderers (HTML), and only those.
	cfg = demoConfig(t, dir)
	cfg.TextPairs = 2
	res, err = Run(context.Background(), cfg)
	if err != nil {
		t.Fatal(err)
	}
	shown := map[string]bool{}
	for _, p := range res.Pairs[:2] {
		shown[p.A], shown[p.B] = true, true
	}
	for i, d := range res.Documents {
		text := res.Texts[i].Text
		switch {
		case shown[d.Path] && text == "":
			t.Errorf("%s is in a pair shown side by side but its text was not given", d.Path)
		case !shown[d.Path] && (text != "" || res.Texts[i].Missing == ""):
			t.Errorf("%s is not shown side by side but its text was given (missing %q)", d.Path, res.Texts[i].Missing)
		}
	}
	texts := map[string]string{}
	for i, d := range res.Documents {
		texts[d.Path] = res.Texts[i].Text
	}
	for _, p := range res.Pairs[:2] {
		for _, g := range p.Passages {
			if a, b := texts[p.A], texts[p.B]; g.AEnd > len(a) || a[g.AStart:g.AEnd] != g.Text || g.BEnd > len(b) {
				t.Errorf("%s ~ %s: a passage is not at its offsets in the texts given", p.A, p.B)
			}
		}
	}
	if left, _ := os.ReadDir(cfg.TempDir); len(left) != 0 {
		t.Errorf("temporary files left behind: %v", left)
	}
}

// TestScanRefusesATextChangedMidRun: a paired document that changes after
// it was split and before it is read again stops the run with an error
// naming it, instead of showing passages at offsets into another text.
func TestScanRefusesATextChangedMidRun(t *testing.T) {
	dir := demoCopy(t)
	cfg := demoConfig(t, dir)
	var victim string
	cfg.keepPairs = func(docs []corpus.Document, eng *pairs.Result) {
		if len(eng.Pairs) == 0 {
			t.Fatal("the demo gave no pair")
		}
		victim = docs[eng.Pairs[0].A].Path
		b, err := os.ReadFile(victim)
		if err != nil {
			t.Fatal(err)
		}
		writeFile(t, victim, "A new first line.\n"+string(b))
	}
	_, err := Run(context.Background(), cfg)
	if err == nil || !strings.Contains(err.Error(), victim) || !strings.Contains(err.Error(), "not the one first read") {
		t.Fatalf("scan after %s changed: error %v, want one naming it as changed", victim, err)
	}

	// A paired document removed mid-run is refused the same way.
	dir = demoCopy(t)
	cfg = demoConfig(t, dir)
	cfg.keepPairs = func(docs []corpus.Document, eng *pairs.Result) {
		victim = docs[eng.Pairs[0].B].Path
		if err := os.Remove(victim); err != nil {
			t.Fatal(err)
		}
	}
	if _, err := Run(context.Background(), cfg); err == nil || !strings.Contains(err.Error(), victim) || !strings.Contains(err.Error(), "reading it again: no such file") {
		t.Fatalf("scan after %s was removed: error %v, want one naming it", victim, err)
	}
}
