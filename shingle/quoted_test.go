package shingle

import (
	"strings"
	"testing"
)

func TestSkippedSpans(t *testing.T) {
	tests := []struct {
		name string
		text string
		opt  Options
		want []string // the text of each skipped span
	}{
		{"English double quotes", `He said “we are late” and left.`, Options{SkipQuoted: true}, []string{"“we are late”"}},
		{"straight double quotes pair in order", `A "b c" d "e" f.`, Options{SkipQuoted: true}, []string{`"b c"`, `"e"`}},
		{"German low-high quotes", "Er sagte „wir kommen“ heute.", Options{SkipQuoted: true}, []string{"„wir kommen“"}},
		{"Polish low-high quotes", "Powiedział „idziemy” teraz.", Options{SkipQuoted: true}, []string{"„idziemy”"}},
		{"French guillemets", "Il a dit « nous partons » hier.", Options{SkipQuoted: true}, []string{"« nous partons »"}},
		{"reversed guillemets", "Er sagte »wir gehen« gestern.", Options{SkipQuoted: true}, []string{"»wir gehen«"}},
		{"German single quotes", "Er sagte ‚ja‘ sofort.", Options{SkipQuoted: true}, []string{"‚ja‘"}},
		{"English single quotes", "She called it ‘the long way’ today.", Options{SkipQuoted: true}, []string{"‘the long way’"}},
		{"straight single quotes where unambiguous", "a 'quoted phrase' here", Options{SkipQuoted: true}, []string{"'quoted phrase'"}},
		{"an apostrophe inside a word is no quote", "Don't stop, it's fine.", Options{SkipQuoted: true}, nil},
		{"an unclosed quote leaves nothing out", "He said “we are late and left.", Options{SkipQuoted: true}, nil},
		{"a blank line ends an open quote", "“one two\n\nthree” four.", Options{SkipQuoted: true}, nil},
		{"nested quotes lie inside the outer one", "x “a ‘b’ c” y", Options{SkipQuoted: true}, []string{"“a ‘b’ c”"}},
		{"off by default", `He said “we are late”.`, Options{}, nil},
		{"a references heading starts a trailing section", "Body text here.\n\nReferences\nSmith, J. (1999). A book.\n",
			Options{SkipReferences: true}, []string{"References\nSmith, J. (1999). A book.\n"}},
		{"numbered Markdown heading with colon", "Body.\n\n## 7. Works Cited:\nA. B. C.\n",
			Options{SkipReferences: true}, []string{"## 7. Works Cited:\nA. B. C.\n"}},
		{"the last heading counts", "Intro.\nBibliography\nmore body.\nBibliography\nlist\n",
			Options{SkipReferences: true}, []string{"Bibliography\nlist\n"}},
		{"a heading on the first line is a title", "References\nall of it\n", Options{SkipReferences: true}, nil},
		{"a sentence mentioning references is no heading", "Body.\nThe references are below.\nx\n", Options{SkipReferences: true}, nil},
		{"quotes inside the references are part of it", "Body “q” x.\nSources\n“Title” 1999\n",
			Options{SkipQuoted: true, SkipReferences: true}, []string{"“q”", "Sources\n“Title” 1999\n"}},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			var got []string
			for _, s := range SkippedSpans(tc.text, tc.opt) {
				got = append(got, tc.text[s[0]:s[1]])
			}
			if strings.Join(got, "|") != strings.Join(tc.want, "|") {
				t.Errorf("skipped %q, want %q", got, tc.want)
			}
		})
	}
}

func TestSkipsGiveNoUnits(t *testing.T) {
	quote := "“the river rose every spring and flooded the low fields”"
	text := "Farmers in the valley said " + quote + " and then they moved the barns.\n\nReferences\nHill, A. The valley and its river rose every spring. 1950.\n"
	for _, unit := range []UnitKind{UnitSentence, UnitWords} {
		sp := New(Options{Unit: unit, ShingleWords: 3, MinWords: 3, SkipQuoted: true, SkipReferences: true})
		units, st := sp.Units(text, nil)
		qStart := strings.Index(text, quote)
		refStart := strings.Index(text, "References")
		for _, u := range units {
			if unit == UnitWords && int(u.End) > qStart && int(u.Start) < qStart+len(quote) {
				t.Errorf("%v: shingle %q overlaps the quotation", unit, text[u.Start:u.End])
			}
			if int(u.End) > refStart {
				t.Errorf("%v: unit %q inside the references", unit, text[u.Start:u.End])
			}
		}
		if len(units) == 0 {
			t.Errorf("%v: no unit left at all", unit)
		}
		if st.QuotedWords != CountWords(quote) || !st.References || st.ReferencesStart != refStart ||
			st.ReferencesWords != CountWords(text[refStart:]) || st.Words != CountWords(text) {
			t.Errorf("%v: stats %+v", unit, st)
		}
	}
}

func FuzzSkippedSpans(f *testing.F) {
	for _, s := range []string{"", "“a” b", `"x`, "‚y‘ „z“ «w» »v«", "'a' b's c'", "x\nReferences\ny", "\xff“\xfe”"} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, text string) {
		prev := 0
		for _, s := range SkippedSpans(text, Options{SkipQuoted: true, SkipReferences: true}) {
			if s[0] < prev || s[1] <= s[0] || s[1] > len(text) {
				t.Fatalf("span %v after %d in %d bytes", s, prev, len(text))
			}
			prev = s[1]
		}
		sp := New(Options{Unit: UnitWords, ShingleWords: 2, SkipQuoted: true, SkipReferences: true})
		units, _ := sp.Units(text, nil)
		for _, u := range units {
			if u.Start >= u.End || int(u.End) > len(text) {
				t.Fatalf("bad unit %+v in %d bytes", u, len(text))
			}
		}
	})
}
