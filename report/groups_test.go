package report

import (
	"bytes"
	"fmt"
	"strings"
	"testing"

	"reprise/pairs"
)

// TestGroupsLimitedByTop: the text and the page list at most --top groups
// and say how many more the JSON holds; the JSON lists them all.
func TestGroupsLimitedByTop(t *testing.T) {
	r := &Result{Format: FormatVersion, Caution: Caution, Settings: Settings{Unit: "sentence"}}
	for k := range 5 {
		r.Groups = append(r.Groups, Group{Documents: []string{fmt.Sprintf("g%d-a", k), fmt.Sprintf("g%d-b", k), fmt.Sprintf("g%d-c", k)}, Shared: 3})
	}
	r.Summary.Groups = len(r.Groups)
	for _, format := range []string{"text", "html", "json"} {
		var buf bytes.Buffer
		if err := Write(&buf, r, format, TextOptions{Top: 2}); err != nil {
			t.Fatal(err)
		}
		out := buf.String()
		listed := 0
		for k := range 5 {
			if strings.Contains(out, fmt.Sprintf("g%d-a", k)) {
				listed++
			}
		}
		want, more := 2, "and 3 more groups"
		if format == "json" {
			want, more = 5, ""
		}
		if listed != want || !strings.Contains(out, more) {
			t.Errorf("%s: %d groups listed, want %d, and %q", format, listed, want, more)
		}
	}
}

// TestPassageTextCut: a passage longer than PassageText quotes its first
// bytes, cut at a word, and keeps the whole passage's offsets and words;
// -1 quotes it whole.
func TestPassageTextCut(t *testing.T) {
	var sentences []string
	for k := range 40 {
		sentences = append(sentences, fmt.Sprintf("s%d:Sentence number %d of the long shared passage here.", k, k))
	}
	a, b := doc("a.txt", sentences...), doc("b.txt", sentences...)
	eng := &pairs.Result{Pairs: []pairs.Pair{{A: 0, B: 1, Shared: 40}}}
	for _, limit := range []int{100, -1} {
		res, err := Build(Input{Docs: []Doc{a, b}, Engine: eng, PassageText: limit})
		if err != nil {
			t.Fatal(err)
		}
		g := res.Pairs[0].Passages[0]
		whole := a.Text[g.AStart:g.AEnd]
		if g.AEnd-g.AStart != len(a.Text) || g.Words != a.Words {
			t.Fatalf("limit %d: offsets %d-%d, %d words; want the whole text", limit, g.AStart, g.AEnd, g.Words)
		}
		switch {
		case limit > 0 && (!g.TextCut || len(g.Text) > limit || !strings.HasPrefix(whole, g.Text) || strings.HasSuffix(g.Text, " ")):
			t.Fatalf("limit %d: text %q (cut %v)", limit, g.Text, g.TextCut)
		case limit < 0 && (g.TextCut || g.Text != whole):
			t.Fatalf("limit -1: text cut %v, %d bytes of %d", g.TextCut, len(g.Text), len(whole))
		}
	}
}

// TestTextNamesAtMostTwelveMembersOfAGroup: a large group lists its first
// twelve documents and counts the rest, so that a few groups of hundreds
// of copies (license files) do not fill the terminal; JSON lists all.
func TestTextNamesAtMostTwelveMembersOfAGroup(t *testing.T) {
	var docs []string
	for i := range 20 {
		docs = append(docs, fmt.Sprintf("member-%02d.txt", i))
	}
	r := &Result{Caution: Caution, Settings: Settings{Unit: "sentence"}, Groups: []Group{{Documents: docs, Shared: 4}, {Documents: docs[:13], Shared: 5}}}
	var out bytes.Buffer
	if err := WriteText(&out, r, TextOptions{Top: 20}); err != nil {
		t.Fatal(err)
	}
	text := out.String()
	if !strings.Contains(text, "member-11.txt") || strings.Contains(text, "member-14.txt") || !strings.Contains(text, "… and 8 more (--format json lists all).") {
		t.Errorf("the group of 20 is not cut after 12 members:\n%s", text)
	}
	if !strings.Contains(text, "member-12.txt") {
		t.Errorf("the group of 13 should list all 13 (one more line is not worth a count):\n%s", text)
	}
	var js bytes.Buffer
	if err := WriteJSON(&js, r); err != nil {
		t.Fatal(err)
	}
	if !strings.Contains(js.String(), "member-19.txt") {
		t.Error("JSON does not list every member")
	}
}
