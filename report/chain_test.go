package report

import (
	"fmt"
	"strings"
	"testing"

	"reprise/pairs"
	"reprise/shingle"
)

// wordDoc makes a document of word shingles of k words.
func wordDoc(path, text string, k int) Doc {
	units, st := shingle.New(shingle.Options{Unit: shingle.UnitWords, ShingleWords: k}).Units(text, nil)
	return Doc{Path: path, Format: "text", Encoding: "utf-8", Text: text, Words: st.Words, Units: units}
}

// Invented prose for the fixtures.
const (
	copied = "The harbor master kept a ledger of every ship that entered the bay, with its cargo, " +
		"its crew and the weather on the day it arrived. Over forty years the ledger grew to eleven " +
		"volumes, and historians now read it as the best record of the town's trade."
	fillerA = "Nothing in this opening paragraph is shared with the other document at all, it speaks " +
		"of gardens, of orchards and of a bridge that was never finished."
	fillerB = "Quite different words open the second text: a recipe for bread, a note about the oven, " +
		"and a list of things to buy on Monday morning."
)

func buildWords(t *testing.T, a, b Doc, gap, minWords int) []Passage {
	t.Helper()
	res, err := Build(Input{Docs: []Doc{a, b}, Engine: &pairs.Result{Pairs: []pairs.Pair{{A: 0, B: 1, Shared: 1}}},
		Chaining: &Chaining{Gap: gap, MinWords: minWords}})
	if err != nil {
		t.Fatal(err)
	}
	return res.Pairs[0].Passages
}

func TestChainPassages(t *testing.T) {
	edited := strings.Replace(strings.Replace(copied, "every ship", "each vessel", 1), "best record", "fullest account", 1)
	half := strings.Index(copied, " Over forty")
	between := "Meanwhile a storm closed the port for a week, and nobody wrote anything down while the boats sat idle in the inner basin."
	reordered := copied[half+1:] + " " + between + " " + copied[:half]
	whole := strings.TrimSuffix(copied, ".") // a passage ends at its last word
	tests := []struct {
		name     string
		a, b     string // B's copy of copied (or of its variant) sits between fillers
		gap      int
		minWords int
		want     int    // passages
		wantA    string // text of A's first passage, when want is 1
	}{
		{"a verbatim copy is one passage", copied, copied, 0, 0, 1, whole},
		{"an edited copy is one passage across gaps", copied, edited, 10, 0, 1, whole},
		{"an edited copy with no gap allowed falls into shards", copied, edited, 0, 0, 3, ""},
		{"reordered halves within the gap are one passage (crossing matches merge)", copied, reordered, 30, 0, 1, whole},
		{"reordered halves with no gap allowed stay two passages", copied, reordered, 0, 0, 2, ""},
		{"short passages are dropped, the largest stays", copied, edited, 0, 20, 1, ""},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			a := wordDoc("a.txt", fillerA+"\n\n"+tc.a+"\n\nSo ends the first text.", 4)
			b := wordDoc("b.txt", fillerB+"\n\n"+tc.b+"\n\nAnd so the second text ends.", 4)
			got := buildWords(t, a, b, tc.gap, tc.minWords)
			if len(got) != tc.want {
				var texts []string
				for _, g := range got {
					texts = append(texts, g.Text)
				}
				t.Fatalf("%d passages, want %d: %q", len(got), tc.want, texts)
			}
			if tc.wantA != "" && got[0].Text != tc.wantA {
				t.Errorf("passage in A is %q, want %q", got[0].Text, tc.wantA)
			}
			for _, g := range got {
				if g.AStart >= g.AEnd || g.BStart >= g.BEnd || g.Units < 1 {
					t.Errorf("bad passage %+v", g)
				}
			}
		})
	}
}

func TestChainDropsEchoesOfRepeatedPhrases(t *testing.T) {
	// A's phrase "the old mill road" appears again in B, far from the copy:
	// the stray match lies inside A's passage and is dropped as an echo.
	a := wordDoc("a.txt", fillerA+" "+copied+" the old mill road", 4)
	b := wordDoc("b.txt", "the old mill road "+fillerB+" "+copied+" the old mill road", 4)
	got := buildWords(t, a, b, 5, 0)
	for _, g := range got {
		if g.Units == 1 && strings.Contains(a.Text[g.AStart:g.AEnd], "mill") && g.BStart < 30 {
			t.Errorf("echo passage kept: A %q, B %q", a.Text[g.AStart:g.AEnd], b.Text[g.BStart:g.BEnd])
		}
	}
	if len(got) == 0 || !strings.Contains(got[0].Text, "harbor master") {
		t.Errorf("copy not found: %+v", got)
	}
}

func TestSentencePassagesUnchangedWithoutChaining(t *testing.T) {
	// With Chaining nil, word units are aligned as runs of consecutive
	// equal units, as for sentences: a single edit splits the copy.
	edited := strings.Replace(copied, "every ship", "each vessel", 1)
	a := wordDoc("a.txt", copied, 4)
	b := wordDoc("b.txt", edited, 4)
	res, err := Build(Input{Docs: []Doc{a, b}, Engine: &pairs.Result{Pairs: []pairs.Pair{{A: 0, B: 1, Shared: 1}}}})
	if err != nil {
		t.Fatal(err)
	}
	if n := len(res.Pairs[0].Passages); n != 2 {
		t.Errorf("%d runs, want 2 (before and after the edit)", n)
	}
}

// BenchmarkChainPassages aligns two documents of about 6,000 words that
// share an edited third (every tenth word changed), the shape of an edited
// copy between long documents.
func BenchmarkChainPassages(b *testing.B) {
	var ta, tb strings.Builder
	for i := range 200 {
		fmt.Fprintf(&ta, "Plain sentence number %d of the first text speaks of item %d today. ", i, i*7)
		fmt.Fprintf(&tb, "Another line %d in the second text mentions thing %d instead. ", i, i*11)
		if i%3 == 0 {
			words := strings.Fields(copied)
			for k := range words {
				words[k] += fmt.Sprint(i) // each copy its own text
			}
			ta.WriteString(strings.Join(words, " ") + " ")
			for k := range words {
				if (k+i)%10 == 0 {
					words[k] = "changed"
				}
			}
			tb.WriteString(strings.Join(words, " ") + " ")
		}
	}
	a, d := wordDoc("a.txt", ta.String(), 5), wordDoc("b.txt", tb.String(), 5)
	sa, sb := newSequence(a.Units, nil), newSequence(d.Units, nil)
	b.ReportAllocs()
	for b.Loop() {
		if len(chainPassages(&sa, &sb, a.Units, d.Units, 50, 24)) == 0 {
			b.Fatal("no passage")
		}
	}
}
