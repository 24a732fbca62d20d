package shingle

import (
	"bufio"
	"fmt"
	"os"
	"slices"
	"strconv"
	"strings"
	"testing"
	"unicode/utf8"
)

// sentenceBoundaries returns the byte offsets of every sentence boundary of
// s found by nextSentence, the segmenter Sentences uses, 0 and len(s)
// included.
func sentenceBoundaries(s []byte) []int {
	b := []int{0}
	state := -1
	for pos := 0; pos < len(s); {
		var n int
		n, state = nextSentence(s[pos:], state)
		pos += n
		b = append(b, pos)
	}
	return b
}

// TestSentenceBreakTest15 checks the sentence segmenter against every case of
// the Unicode conformance file (Unicode UAX #29, SentenceBreakTest-15.0.0.txt,
// from Debian's unicode-data 15.0.0). Each line lists code points with ÷
// where a boundary must be and × where none may be.
func TestSentenceBreakTest15(t *testing.T) {
	f, err := os.Open(dataFile(t, "unicode/SentenceBreakTest.txt"))
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	sc := bufio.NewScanner(f)
	lineNo, cases, failed := 0, 0, 0
	for sc.Scan() {
		lineNo++
		line, _, _ := strings.Cut(sc.Text(), "#")
		line = strings.TrimSpace(line)
		if lineNo == 1 && !strings.Contains(sc.Text(), "SentenceBreakTest-15.0.0.txt") {
			t.Fatalf("first line %q: want the 15.0.0 file", sc.Text())
		}
		if line == "" {
			continue
		}
		text, want, err := parseBreakCase(line)
		if err != nil {
			t.Fatalf("line %d: %v", lineNo, err)
		}
		cases++
		if got := sentenceBoundaries(text); !slices.Equal(got, want) {
			failed++
			t.Errorf("line %d: %s: boundaries %v, want %v", lineNo, line, got, want)
		}
	}
	if err := sc.Err(); err != nil {
		t.Fatal(err)
	}
	// The 15.0.0 file holds 502 cases (counted in the file, Unicode UAX #29,
	// SentenceBreakTest-15.0.0.txt): make sure none was skipped by the parser.
	if cases != 502 {
		t.Errorf("parsed %d cases, want 502", cases)
	}
	t.Logf("SentenceBreakTest-15.0.0.txt: %d cases, %d failed", cases, failed)
}

// parseBreakCase turns "÷ 0041 × 002E ÷" into the text and the byte offsets
// of its boundaries.
func parseBreakCase(line string) ([]byte, []int, error) {
	var text []byte
	var want []int
	for _, field := range strings.Fields(line) {
		switch field {
		case "÷":
			want = append(want, len(text))
		case "×":
		default:
			cp, err := strconv.ParseUint(field, 16, 32)
			if err != nil || !utf8.ValidRune(rune(cp)) {
				return nil, nil, fmt.Errorf("bad code point %q", field)
			}
			text = utf8.AppendRune(text, rune(cp))
		}
	}
	return text, want, nil
}

// TestTerminatorsMatchTheSegmenter checks isTerminator, which decides whether
// a text falls back to line splitting, against the segmenter's own property
// tables for every code point: "a" r " B" has a boundary before B exactly
// when r is STerm or ATerm (Unicode UAX #29 rules SB11 and SB998; after a
// lower-case letter SB7 and SB8 cannot apply).
func TestTerminatorsMatchTheSegmenter(t *testing.T) {
	terms := 0
	for r := rune(0); r <= utf8.MaxRune; r++ {
		if !utf8.ValidRune(r) {
			continue
		}
		s := utf8.AppendRune([]byte("a"), r)
		s = append(s, " B"...)
		brk := slices.Contains(sentenceBoundaries(s), len(s)-1)
		if brk != isTerminator(r) {
			t.Errorf("U+%04X: segmenter breaks after it: %v, isTerminator: %v", r, brk, isTerminator(r))
		}
		if brk {
			terms++
		}
	}
	t.Logf("%d code points are STerm or ATerm", terms)
}

// TestTerminatorsMatchTheTestFileLabels checks isTerminator against the
// Sentence_Break values that the comments of SentenceBreakTest-15.0.0.txt
// (Unicode UAX #29) print beside each sample character, e.g. "(ATerm)".
func TestTerminatorsMatchTheTestFileLabels(t *testing.T) {
	f, err := os.Open(dataFile(t, "unicode/SentenceBreakTest.txt"))
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	sc := bufio.NewScanner(f)
	checked := 0
	for sc.Scan() {
		data, comment, ok := strings.Cut(sc.Text(), "#")
		if !ok || strings.TrimSpace(data) == "" {
			continue
		}
		// Code points in data line up with "(Property)" labels in comment.
		var cps []rune
		for _, field := range strings.Fields(data) {
			if cp, err := strconv.ParseUint(field, 16, 32); err == nil {
				cps = append(cps, rune(cp))
			}
		}
		var labels []string
		for rest := comment; ; {
			_, after, ok := strings.Cut(rest, ") ")
			i := strings.LastIndex(rest[:len(rest)-len(after)], "(")
			if !ok || i < 0 {
				break
			}
			labels = append(labels, rest[i+1:len(rest)-len(after)-2])
			rest = after
		}
		// A label is the last "(...)" before ") "; names may hold other
		// parentheses ("<CARRIAGE RETURN (CR)> (CR)"): keep property values.
		labels = slices.DeleteFunc(labels, func(l string) bool { return !isSBValue(l) })
		if len(labels) != len(cps) {
			t.Fatalf("%q: %d code points, %d labels %v", sc.Text(), len(cps), len(labels), labels)
		}
		for i, r := range cps {
			want := labels[i] == "STerm" || labels[i] == "ATerm"
			if isTerminator(r) != want {
				t.Errorf("U+%04X labelled %s: isTerminator = %v", r, labels[i], !want)
			}
			checked++
		}
	}
	if checked == 0 {
		t.Fatal("no labelled code points found")
	}
	t.Logf("%d labelled code points checked", checked)
}

// isSBValue reports whether s is a Sentence_Break value as the test file
// prints it (it adds _FE, _XX suffixes to a few).
func isSBValue(s string) bool {
	base, _, _ := strings.Cut(s, "_")
	switch base {
	case "Other", "CR", "LF", "Extend", "Sep", "Format", "Sp", "Lower", "Upper",
		"OLetter", "Numeric", "ATerm", "SContinue", "STerm", "Close":
		return true
	}
	return false
}
