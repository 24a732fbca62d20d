package shingle

import (
	"slices"
	"strings"
	"testing"
	"unicode/utf8"
)

// spans returns text[Start:End] of every unit.
func spans(text string, units []Unit) []string {
	var out []string
	for _, u := range units {
		out = append(out, text[u.Start:u.End])
	}
	return out
}

func TestSentences(t *testing.T) {
	tests := []struct {
		name     string
		minWords int
		text     string
		want     []string
	}{
		{
			name:     "a single line break inside a paragraph does not end a sentence",
			minWords: 1,
			text:     "This sentence is hard-wrapped\nacross two lines. The next\r\n  one is wrapped too.",
			want:     []string{"This sentence is hard-wrapped\nacross two lines.", "The next\r\n  one is wrapped too."},
		},
		{
			name:     "a blank line ends a sentence even without punctuation",
			minWords: 1,
			text:     "A heading without a stop\n\nThe body starts here. It goes on.",
			want:     []string{"A heading without a stop", "The body starts here.", "It goes on."},
		},
		{
			name:     "a blank line holding blanks is still a paragraph break",
			minWords: 1,
			text:     "First part ends here\n \t \nsecond part. Done now.",
			want:     []string{"First part ends here", "second part.", "Done now."},
		},
		{
			name:     "spans leave out surrounding white space",
			minWords: 1,
			text:     "  \t Leading space here.   Trailing too.  \n\n ",
			want:     []string{"Leading space here.", "Trailing too."},
		},
		{
			name:     "a lower-case word after a full stop continues the sentence (UAX #29 SB8)",
			minWords: 1,
			text:     "See fig. two for it. Then go on.",
			want:     []string{"See fig. two for it.", "Then go on."},
		},
		{
			name:     "question and exclamation marks end sentences",
			minWords: 1,
			text:     "Is it so? Yes! It is.",
			want:     []string{"Is it so?", "Yes!", "It is."},
		},
		{
			name:     "ideographic full stop ends sentences",
			minWords: 1,
			text:     "今日は晴れ。明日は雨。",
			want:     []string{"今日は晴れ。", "明日は雨。"},
		},
		{
			name:     "sentences under MinWords are not units",
			minWords: 3,
			text:     "Too short. This one is long enough. No. Also three words.",
			want:     []string{"This one is long enough.", "Also three words."},
		},
		{
			name:     "text without sentence punctuation splits at every line",
			minWords: 1,
			text:     "first line of a list\nsecond line\r\nthird line\rfourth\n\nfifth",
			want:     []string{"first line of a list", "second line", "third line", "fourth", "fifth"},
		},
		{
			name:     "empty text gives no units",
			minWords: 1,
			text:     "",
			want:     nil,
		},
		{
			name:     "white space only gives no units",
			minWords: 1,
			text:     " \n\t\r\n \u3000 \uFEFF",
			want:     nil,
		},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			sp := New(Options{MinWords: tc.minWords})
			units, _ := sp.Sentences(tc.text, nil)
			if got := spans(tc.text, units); !slices.Equal(got, tc.want) {
				t.Errorf("Sentences(%q):\n got %q\nwant %q", tc.text, got, tc.want)
			}
			for _, u := range units {
				s := tc.text[u.Start:u.End]
				if u.Hash != Fingerprint(Normalize(nil, s)) {
					t.Errorf("%q: hash is not the fingerprint of its normalized span", s)
				}
				if int(u.Words) != CountWords(s) {
					t.Errorf("%q: Words = %d, CountWords = %d", s, u.Words, CountWords(s))
				}
			}
		})
	}
}

func TestSentencesStats(t *testing.T) {
	sp := New(Options{MinWords: 3})
	text := "Too short. This one is long enough. No. Also three words."
	_, st := sp.Sentences(text, nil)
	want := Stats{Words: 2 + 5 + 1 + 3, Sentences: 4, Short: 2}
	if st != want {
		t.Errorf("Stats = %+v, want %+v", st, want)
	}
	_, st = sp.Sentences("one line here\nanother line here", nil)
	if !st.LineBreaks {
		t.Errorf("text without punctuation: LineBreaks = false")
	}
	_, st = sp.Sentences("one line here\nanother line here.", nil)
	if st.LineBreaks {
		t.Errorf("text with a full stop: LineBreaks = true")
	}
	_, st = sp.Sentences("just one line without a stop\n", nil)
	if st.LineBreaks {
		t.Errorf("a single line: LineBreaks = true")
	}
	_, st = New(Options{}).Sentences("", nil)
	if st != (Stats{}) {
		t.Errorf("empty text: Stats = %+v, want zero", st)
	}
}

// The same prose with CRLF line ends or a byte order mark gives the same
// fingerprints, with offsets shifted by the bytes added before each unit.
func TestLineEndsAndBOMDoNotChangeHashes(t *testing.T) {
	lf := "The first sentence is wrapped\nover two lines here. A second one\nfollows it closely.\n\nA new paragraph starts\nright here and now.\n"
	crlf := strings.ReplaceAll(lf, "\n", "\r\n")
	cr := strings.ReplaceAll(lf, "\n", "\r")
	bom := "\uFEFF" + lf
	sp := New(Options{})
	base, _ := sp.Sentences(lf, nil)
	if len(base) != 3 {
		t.Fatalf("LF text: %d units, want 3: %q", len(base), spans(lf, base))
	}
	for _, tc := range []struct {
		name  string
		text  string
		shift func(off uint32) uint32 // LF offset to offset in the variant
	}{
		{"CRLF adds one byte per preceding line break", crlf, func(off uint32) uint32 {
			return off + uint32(strings.Count(lf[:off], "\n"))
		}},
		{"CR keeps every offset", cr, func(off uint32) uint32 { return off }},
		{"a BOM shifts every offset by three bytes", bom, func(off uint32) uint32 { return off + 3 }},
	} {
		t.Run(tc.name, func(t *testing.T) {
			got, _ := New(Options{}).Sentences(tc.text, nil)
			if len(got) != len(base) {
				t.Fatalf("%d units, want %d: %q", len(got), len(base), spans(tc.text, got))
			}
			for i, u := range got {
				b := base[i]
				if u.Hash != b.Hash || u.Words != b.Words {
					t.Errorf("unit %d %q: hash/words differ from LF unit %q", i, tc.text[u.Start:u.End], lf[b.Start:b.End])
				}
				if u.Start != tc.shift(b.Start) || u.End != tc.shift(b.End) {
					t.Errorf("unit %d: span [%d,%d), want [%d,%d)", i, u.Start, u.End, tc.shift(b.Start), tc.shift(b.End))
				}
			}
		})
	}
}

func TestLongSentencesAreCut(t *testing.T) {
	tests := []struct {
		name   string
		text   string
		pieces int
	}{
		// 10,000 bytes with no space: no word boundary, cut at the limit.
		{"a 10,000-byte word is cut at the byte limit", strings.Repeat("a", 10000), 5},
		// 5,000 two-byte runes: cuts must fall between runes.
		{"a 10,000-byte word of two-byte runes is cut between runes", strings.Repeat("é", 5000), 5},
		{"a 10,000-byte word of three-byte runes is cut between runes", strings.Repeat("語", 3333) + "x", 6},
		{"a long sentence of words is cut at a space", strings.Repeat("word ", 2000) + "end.", 6},
	}
	sp := New(Options{MinWords: 1})
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			units, st := sp.Sentences(tc.text, nil)
			if st.Cut != 1 {
				t.Errorf("Stats.Cut = %d, want 1", st.Cut)
			}
			if len(units) != tc.pieces || st.Sentences != tc.pieces {
				t.Errorf("%d units, %d sentences, want %d pieces", len(units), st.Sentences, tc.pieces)
			}
			var rebuilt strings.Builder
			for _, u := range units {
				s := tc.text[u.Start:u.End]
				if len(s) > sp.Options().MaxUnitBytes {
					t.Errorf("piece of %d bytes, over the limit", len(s))
				}
				if !utf8.ValidString(s) {
					t.Errorf("piece [%d,%d) splits a UTF-8 sequence", u.Start, u.End)
				}
				if strings.HasPrefix(s, " ") || strings.HasSuffix(s, " ") || strings.HasPrefix(s, "ord") {
					t.Errorf("piece [%d,%d) not cut at a space: %.20q...", u.Start, u.End, s)
				}
				rebuilt.WriteString(s)
			}
			if want := strings.ReplaceAll(tc.text, " ", ""); strings.ReplaceAll(rebuilt.String(), " ", "") != want {
				t.Error("the pieces do not cover the sentence")
			}
		})
	}
}

func TestOptionsDefaults(t *testing.T) {
	for _, tc := range []struct {
		name string
		in   Options
		want Options
	}{
		{"zero options take the defaults", Options{}, Options{MinWords: 5, MaxUnitBytes: 2000, ShingleWords: 5}},
		{"negative values take the defaults", Options{MinWords: -1, MaxUnitBytes: -7, ShingleWords: -2, Winnow: -3}, Options{MinWords: 5, MaxUnitBytes: 2000, ShingleWords: 5}},
		{"set values are kept", Options{MinWords: 2, MaxUnitBytes: 100, ShingleWords: 7, Winnow: 4}, Options{MinWords: 2, MaxUnitBytes: 100, ShingleWords: 7, Winnow: 4}},
		{"a window of one is no winnowing", Options{Winnow: 1}, Options{MinWords: 5, MaxUnitBytes: 2000, ShingleWords: 5}},
	} {
		if got := New(tc.in).Options(); got != tc.want {
			t.Errorf("%s: Options() = %+v, want %+v", tc.name, got, tc.want)
		}
	}
}

// After warming up, splitting allocates nothing: scratch buffers live in the
// Splitter and units go into the caller's slice.
func TestSentencesDoNotAllocate(t *testing.T) {
	text := benchText(20000) + " Ünïcödé “quotes”, ﬁne ＦＵＬＬ. "
	sp := New(Options{})
	units, _ := sp.Sentences(text, nil)
	if len(units) == 0 {
		t.Fatal("no units")
	}
	allocs := testing.AllocsPerRun(20, func() {
		units, _ = sp.Sentences(text, units)
	})
	if allocs != 0 {
		t.Errorf("Sentences allocated %.1f times per call, want 0", allocs)
	}
}
