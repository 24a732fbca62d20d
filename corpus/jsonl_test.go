package corpus

import (
	"bytes"
	"fmt"
	"path/filepath"
	"slices"
	"strings"
	"testing"
	"unicode/utf8"
)

// The JSON Lines rules (jsonl.go); the format is https://jsonlines.org
// (UTF-8, one JSON value per line, LF or CRLF), values per RFC 8259.

func TestJSONLLines(t *testing.T) {
	dir := t.TempDir()
	writeTree(t, dir, map[string]string{
		"essays.jsonl": "\uFEFF" + `{"id": "b7", "text": "Second essay text here.", "author": "ignored"}` + "\r\n" +
			`{"id": 12, "text": "An essay with a numeric id."}` + "\n" +
			"\n" + // blank line: nothing
			`["not", "an", "object"]` + "\n" +
			`{"id": "a1"}` + "\n" +
			`{"text": "no id at all"}` + "\n" +
			`{"id": "b7", "text": "duplicate of line one"}` + "\n" +
			`{"id": null, "text": "null id"}` + "\n" +
			`{"id": "", "text": "empty id"}` + "\n" +
			`{"id": "e", "text": "   "}` + "\n" +
			`{"id": "t", "text": 5}` + "\n" +
			`{"id": "x", "text": "broken` + "\n" +
			`{"id": "a1", "text": "First essay, with \"escapes\" and \u00e9 and a\nline break."}`, // no final LF
		"plain.txt": text,
	})
	docs, skipped := mustRead(t, []string{dir}, Options{})
	got := docPaths(docs)
	want := []string{
		filepath.Join(dir, "essays.jsonl#12"), filepath.Join(dir, "essays.jsonl#a1"),
		filepath.Join(dir, "essays.jsonl#b7"), filepath.Join(dir, "plain.txt"),
	}
	if !slices.Equal(got, want) {
		t.Fatalf("documents %q, want %q", got, want)
	}
	if d := docs[1]; d.Text != "First essay, with \"escapes\" and é and a\nline break." || d.Format != "jsonl" || d.Encoding != "utf-8" {
		t.Errorf("a1: text %q format %q encoding %q", d.Text, d.Format, d.Encoding)
	}
	if d := docs[2]; d.Text != "Second essay text here." {
		t.Errorf("b7 (after a BOM, CRLF line end): text %q", d.Text)
	}
	wantSkipped := map[int]string{
		4:  "not a JSON object",
		5:  `no "text" field`,
		6:  `no "id" field`,
		7:  `id "b7" already used on line 1`,
		8:  `the "id" field is not a string or a number`,
		9:  `the "id" field is empty`,
		10: `the "text" field is empty`,
		11: `the "text" field is not a string`,
		12: "not a JSON object",
	}
	if len(skipped) != len(wantSkipped) {
		t.Fatalf("skipped %v, want %d entries", skipped, len(wantSkipped))
	}
	for _, s := range skipped {
		var n int
		if _, err := fmt.Sscanf(s.Path[len(filepath.Join(dir, "essays.jsonl:")):], "%d", &n); err != nil {
			t.Fatalf("skipped path %q has no line number", s.Path)
		}
		if w, ok := wantSkipped[n]; !ok || !strings.HasPrefix(s.Reason, fmt.Sprintf("line %d: ", n)) || !strings.Contains(s.Reason, w) {
			t.Errorf("line %d: reason %q, want it to say %q", n, s.Reason, w)
		}
	}
}

func TestJSONLFieldNamesAndLimits(t *testing.T) {
	dir := t.TempDir()
	long := strings.Repeat("word ", 300)
	writeTree(t, dir, map[string]string{
		"c.JSONL": `{"doc": "one", "body": "Short text here."}` + "\n" +
			`{"doc": "two", "body": "` + long + `"}` + "\n" +
			`{"doc": "three", "body": "After the long line."}` + "\n",
		"empty.jsonl": "\n\n",
	})
	// The file is larger than MaxFileSize, which does not apply to it; one
	// line is larger than MaxJSONLLine, which does.
	docs, skipped := mustRead(t, []string{dir}, Options{JSONLID: "doc", JSONLText: "body", MaxFileSize: 100, MaxJSONLLine: 200})
	if got := docPaths(docs); len(got) != 2 || !strings.HasSuffix(got[0], "c.JSONL#one") || !strings.HasSuffix(got[1], "c.JSONL#three") {
		t.Fatalf("documents %q", got)
	}
	if len(skipped) != 2 || !strings.HasSuffix(skipped[0].Path, "c.JSONL:2") ||
		!strings.Contains(skipped[0].Reason, "longer than the 200 bytes limit") ||
		!strings.HasSuffix(skipped[1].Path, "empty.jsonl") || skipped[1].Reason != reasonEmpty {
		t.Fatalf("skipped %v", skipped)
	}
	if _, _, err := Read([]string{dir}, Options{MaxJSONLLine: -1}); err == nil {
		t.Error("a negative line limit is accepted")
	}
}

// TestJSONLLongLinesStream: lines longer than the reader's buffer are put
// together, and many lines come out in order.
func TestJSONLLongLinesStream(t *testing.T) {
	var b bytes.Buffer
	long := strings.Repeat("x", 200<<10)
	for i := range 1000 {
		body := "text number " + fmt.Sprint(i)
		if i%250 == 0 {
			body = long
		}
		fmt.Fprintf(&b, `{"id":"d%04d","text":%q}`+"\n", i, body)
	}
	o := testOptions(t)
	parts, lines, err := scanJSONL(&b, o)
	if err != nil || lines != 1001 || len(parts) != 1000 {
		t.Fatalf("%d parts from %d lines, %v", len(parts), lines, err)
	}
	for i, p := range parts {
		if p.reason != "" || p.sub != fmt.Sprintf("#d%04d", i) {
			t.Fatalf("part %d: %q %q", i, p.sub, p.reason)
		}
		if i%250 == 0 && p.Text != long {
			t.Fatalf("part %d: long text of %d bytes, want %d", i, len(p.Text), len(long))
		}
	}
}

// FuzzJSONL: arbitrary bytes as a JSON Lines file never panic, every part is
// a document with valid UTF-8 text and a "#id" name or a reason with a
// ":N" line, and ids are unique.
func FuzzJSONL(f *testing.F) {
	f.Add([]byte(`{"id":"a","text":"One."}` + "\n" + `{"id":2,"text":"Two \ud83d"}`))
	f.Add([]byte("\uFEFF{\"id\":\"x\",\"text\":\"\\u0000\"}\r\n\n[1]\n{\"id\":\"x\",\"text\":\"dup\"}"))
	f.Add([]byte("{\"id\":\"\xff\",\"text\":\"bad \xfe bytes\"}\n{\"id\":1e3,\"text\":\"n\"}"))
	seedHostile(f, "jsonl")
	f.Fuzz(func(t *testing.T, raw []byte) {
		o := testOptions(t)
		o.MaxJSONLLine = 1 << 10
		parts, _, err := scanJSONL(bytes.NewReader(raw), o)
		if err != nil {
			t.Fatal(err)
		}
		ids := map[string]bool{}
		for _, p := range parts {
			switch {
			case p.reason != "":
				if !strings.HasPrefix(p.sub, ":") || !strings.HasPrefix(p.reason, "line ") {
					t.Fatalf("skipped part %q %q", p.sub, p.reason)
				}
			case !strings.HasPrefix(p.sub, "#") || ids[p.sub] || !utf8.ValidString(p.Text) || p.Text == "":
				t.Fatalf("document part %q (%d bytes of text, valid %v)", p.sub, len(p.Text), utf8.ValidString(p.Text))
			default:
				ids[p.sub] = true
			}
		}
	})
}

// TestJSONLUnreadable: a .jsonl that cannot be opened gives one reason.
func TestJSONLUnreadable(t *testing.T) {
	parts := readJSONL(filepath.Join(t.TempDir(), "missing.jsonl"), testOptions(t))
	if len(parts) != 1 || parts[0].reason != reasonMissing {
		t.Fatalf("parts %+v", parts)
	}
}
