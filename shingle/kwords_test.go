package shingle

import (
	"math/rand/v2"
	"slices"
	"strings"
	"testing"
)

func TestWordsShingles(t *testing.T) {
	tests := []struct {
		name  string
		text  string
		k     int
		spans []string // the original text of each unit, in order
	}{
		{"every run of K words is a unit", "One two three four.", 2,
			[]string{"One two", "two three", "three four"}},
		{"shingles run across sentences and paragraphs", "Alpha beta.\n\nGamma delta.", 3,
			[]string{"Alpha beta.\n\nGamma", "beta.\n\nGamma delta"}},
		{"fewer than K words give no unit", "Only three words", 4, nil},
		{"a hyphen compound is one word", "a term-end report now", 2,
			[]string{"a term-end", "term-end report", "report now"}},
		{"a word hyphenated at a line end is one word", "big exam-\nple here", 2,
			[]string{"big exam-\nple", "exam-\nple here"}},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			sp := New(Options{Unit: UnitWords, ShingleWords: tc.k})
			units, st := sp.Units(tc.text, nil)
			var got []string
			for i, u := range units {
				got = append(got, tc.text[u.Start:u.End])
				if u.Words != uint32(tc.k) || u.Pos != uint32(i) {
					t.Errorf("unit %d: Words %d Pos %d, want %d and %d", i, u.Words, u.Pos, tc.k, i)
				}
			}
			if strings.Join(got, "|") != strings.Join(tc.spans, "|") {
				t.Errorf("units %q, want %q", got, tc.spans)
			}
			if st.Words != CountWords(tc.text) {
				t.Errorf("Stats.Words %d, CountWords %d", st.Words, CountWords(tc.text))
			}
		})
	}
}

func TestWordsIgnoreFormat(t *testing.T) {
	// The same words with other case, quotes, spacing, wrapping and
	// line-end hyphenation give the same fingerprints (the normalization
	// of the package comment, applied per word).
	a := `The committee "met" on a grey morning, to weigh the proposal.`
	b := "THE  Committee “met” on a\ngrey mor-\nning to weigh the Proposal!"
	sp := New(Options{Unit: UnitWords, ShingleWords: 3})
	ua, _ := sp.Words(a, nil)
	ha := hashList(ua)
	ub, _ := sp.Words(b, nil)
	if hb := hashList(ub); len(ha) == 0 || !slices.Equal(ha, hb) {
		t.Errorf("fingerprints differ:\n%x\n%x", ha, hb)
	}
}

func hashList(us []Unit) []uint64 {
	var out []uint64
	for _, u := range us {
		out = append(out, u.Hash)
	}
	return out
}

func TestWordsAllocateNothingWarm(t *testing.T) {
	text := benchText(20 << 10)
	for _, w := range []int{0, 4} {
		sp := New(Options{Unit: UnitWords, Winnow: w})
		units, _ := sp.Words(text, nil)
		allocs := testing.AllocsPerRun(5, func() { units, _ = sp.Words(text, units) })
		if allocs > 0 {
			t.Errorf("winnow %d: %v allocations per warm call, want 0", w, allocs)
		}
	}
}

// randomText returns n words drawn from a small vocabulary (so that words
// repeat, as in real text) with random punctuation.
func randomText(rng *rand.Rand, n int) string {
	vocab := strings.Fields("the a of river mill field spring flood barn ridge valley council levee water cellar farmer plant late build year vote raise old")
	var b strings.Builder
	for i := range n {
		if i > 0 {
			b.WriteByte(' ')
		}
		b.WriteString(vocab[rng.IntN(len(vocab))])
		if rng.IntN(12) == 0 {
			b.WriteByte('.')
		}
	}
	return b.String()
}

func BenchmarkWords(b *testing.B) {
	text := benchText(400 << 10)
	for _, w := range []int{0, 4} {
		b.Run("winnow="+string(rune('0'+w)), func(b *testing.B) {
			sp := New(Options{Unit: UnitWords, Winnow: w})
			var units []Unit
			b.SetBytes(int64(len(text)))
			b.ReportAllocs()
			for b.Loop() {
				units, _ = sp.Words(text, units)
			}
			if len(units) == 0 {
				b.Fatal("no units")
			}
		})
	}
}
