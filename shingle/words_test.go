package shingle

import (
	"math"
	"os"
	"testing"

	"pgregory.net/rapid"
	"reprise/internal/brown"
)

func TestCountWords(t *testing.T) {
	tests := []struct {
		name string
		text string
		want int
	}{
		{"empty text has no words", "", 0},
		{"punctuation and dashes are not words", "— -- ... “ ” !?", 0},
		{"words are split at spaces and punctuation", "Hello, world! How are you?", 5},
		{"a hyphenated compound is one word", "a term-end report", 3},
		{"a chain of hyphens joins all parts", "a state-of-the-art tool", 3},
		{"Unicode HYPHEN joins like hyphen-minus", "term\u2010end", 1},
		{"a double hyphen is a dash, not a join", "end--start", 2},
		{"a hyphen after a space does not join", "minus -five", 2},
		{"an apostrophe form is one word (UAX #29 WB6/WB7)", "don't stop Atlanta's", 3},
		{"a curly apostrophe also joins (UAX #29 MidNumLet)", "don’t", 1},
		{"numbers with separators are one word (UAX #29 WB11/WB12)", "3.14 and 1,000", 3},
		{"a word hyphenated across a line break is one word", "exam-\n  ple text", 2},
		{"the join needs a lower-case letter after the break", "Exam-\nPle", 2},
		{"each ideograph is a word (UAX #29 WB999)", "日本語", 3},
		{"symbols alone are not words", "$ + € ©", 0},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			if got := CountWords(tc.text); got != tc.want {
				t.Errorf("CountWords(%q) = %d, want %d", tc.text, got, tc.want)
			}
		})
	}
}

// TestBrownWordCount counts the words of the untagged Brown corpus. The
// corpus manual gives 1,014,312 words (Francis & Kučera, Brown Corpus Manual;
// from memory); CountWords must land within 1%. The test also reports what
// the other hyphen rule (one word per part) would give, the measurement that
// decided the rule.
func TestBrownWordCount(t *testing.T) {
	samples, err := brown.Load(brownDir(t))
	if err != nil {
		t.Fatal(err)
	}
	const manual = 1014312 // Brown Corpus Manual (from memory)
	joined, split := 0, 0
	for _, s := range samples {
		joined += CountWords(s.Text)
		split += countWords(s.Text, false)
	}
	off := func(n int) float64 { return 100 * float64(n-manual) / manual }
	t.Logf("Brown corpus, %d samples: %d words with hyphen compounds joined (%+.2f%%), %d with parts counted apart (%+.2f%%)",
		len(samples), joined, off(joined), split, off(split))
	if math.Abs(off(joined)) > 1 {
		t.Errorf("CountWords over Brown = %d, more than 1%% from %d", joined, manual)
	}
}

// TestStatsWordsMatchCountWords: Stats.Words of a whole text follows the
// same rule as CountWords, so on real prose (where no sentence boundary falls
// inside a word) the two agree.
func TestStatsWordsMatchCountWords(t *testing.T) {
	samples, err := brown.Load(brownDir(t))
	if err != nil {
		t.Fatal(err)
	}
	sp := New(Options{})
	var units []Unit
	for _, s := range samples {
		var st Stats
		units, st = sp.Sentences(s.Text, units)
		if want := CountWords(s.Text); st.Words != want {
			t.Errorf("%s: Stats.Words = %d, CountWords = %d", s.Name, st.Words, want)
		}
		sum := 0
		for _, u := range units {
			sum += int(u.Words)
		}
		if sum > st.Words || len(units) != st.Sentences-st.Short {
			t.Errorf("%s: units hold %d words in %d units; stats %+v", s.Name, sum, len(units), st)
		}
	}
}

func brownDir(t *testing.T) string {
	t.Helper()
	dir, err := brown.Dir()
	if err != nil {
		if os.Getenv("CI") != "" {
			t.Fatal(err)
		}
		t.Skip(err)
	}
	return dir
}

// TestFastWordCountAgrees checks the fast counter against the uniseg word
// segmenter on random strings over the characters it knows, mixed with a few
// it must hand on.
func TestFastWordCountAgrees(t *testing.T) {
	alphabet := []rune("aZ09_:.',;-  \t\n\r\u2018\u2019\u2013\u2014\u201c\u201d!?$()\"" +
		"éÀßÿ×÷ªµº·«»\u00a0¿\u2026\u2022")
	rapid.Check(t, func(t *rapid.T) {
		s := rapid.StringOf(rapid.SampledFrom(alphabet)).Draw(t, "text")
		for _, join := range []bool{true, false} {
			fast, ok := countWordsFast(s, join)
			if !ok {
				t.Fatalf("%q: fast counter refused a text over its own characters", s)
			}
			if slow := countWordsUAX(s, join); fast != slow {
				t.Fatalf("%q (join hyphens %v): fast %d, uniseg %d", s, join, fast, slow)
			}
		}
		// CountWords takes the fused pass where it can: the same count.
		// Prose-like runs of letters and single spaces, which it reads
		// eight bytes at a time, are added.
		p := s + rapid.StringOf(rapid.SampledFrom([]rune("abcXYZ     -.,'\n"))).Draw(t, "prose")
		if got, want := CountWords(p), countWordsUAX(p, true); got != want {
			t.Fatalf("%q: CountWords %d, uniseg %d", p, got, want)
		}
	})
	for _, s := range []string{"a\u00adb", "©", "a\u0301", "\x00", "日本", "a\u200bb", "\u0101"} {
		if _, ok := countWordsFast(s, true); ok {
			t.Errorf("%q: fast counter accepted a character it does not know", s)
		}
	}
}
