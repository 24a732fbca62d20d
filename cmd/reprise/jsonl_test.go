package main

import (
	"encoding/json"
	"os"
	"path/filepath"
	"slices"
	"strings"
	"testing"
)

// TestScanJSONLSameAsFiles: the demo corpus's plain-text files, shipped as
// one JSON Lines file (id = file name, text = file contents), give the same
// pairs with the same numbers as the files themselves, named FILE.jsonl#ID;
// a bad line is listed in skipped with its line number.
func TestScanJSONLSameAsFiles(t *testing.T) {
	files, err := filepath.Glob(filepath.Join("..", "..", "testdata", "demo", "*.txt"))
	if err != nil || len(files) < 5 {
		t.Fatalf("demo corpus: %d .txt files, %v", len(files), err)
	}
	dir := t.TempDir()
	var lines []string
	for _, f := range files {
		b, err := os.ReadFile(f)
		if err != nil {
			t.Fatal(err)
		}
		name := filepath.Base(f)
		writeFile(t, filepath.Join(dir, "files", name), string(b))
		line, _ := json.Marshal(map[string]string{"name": name, "body": string(b), "extra": "x"})
		lines = append(lines, string(line))
	}
	lines = append(lines, `{"name": "broken"`)
	jsonl := filepath.Join(dir, "corpus.jsonl")
	writeFile(t, jsonl, strings.Join(lines, "\n")+"\n")

	fromFiles := scanJSON(t, 0, filepath.Join(dir, "files"))
	fromJSONL := scanJSON(t, 0, "--jsonl-id", "name", "--jsonl-text", "body", jsonl)
	if len(fromFiles.Pairs) == 0 {
		t.Fatal("the demo files give no pairs: nothing to compare")
	}
	rename := func(p string) string { return strings.TrimPrefix(p, jsonl+"#") }
	base := func(p string) string { return filepath.Base(p) }
	type key struct {
		a, b   string
		shared int
		score  float64
	}
	var want, got []key
	for _, p := range fromFiles.Pairs {
		want = append(want, key{base(p.A), base(p.B), p.Shared, p.Score})
	}
	for _, p := range fromJSONL.Pairs {
		got = append(got, key{rename(p.A), rename(p.B), p.Shared, p.Score})
	}
	if !slices.Equal(got, want) {
		t.Errorf("pairs from JSONL %v\nwant (from files) %v", got, want)
	}
	if len(fromJSONL.Skipped) != 1 || fromJSONL.Skipped[0].Path != jsonl+":"+itoa(len(lines)) {
		t.Errorf("skipped %+v, want the broken last line %d", fromJSONL.Skipped, len(lines))
	}
}

func itoa(n int) string {
	b, _ := json.Marshal(n)
	return string(b)
}
