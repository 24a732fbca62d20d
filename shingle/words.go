package shingle

import (
	"unicode"
	"unicode/utf8"
)

// CountWords returns the number of words in text, by the rule Stats.Words
// and Unit.Words use: a word is a UAX #29 word segment holding a letter, a
// digit or an ideograph; segments joined by a single hyphen with nothing
// between ("term-end", "1-1/2") count as one word, as does a word hyphenated
// across a line break ("exam-\n ple"). Apostrophe forms ("don't", "Atlanta's")
// are one segment under UAX #29 already.
//
// Text of ASCII and – — “ ” is counted by the fused pass (fused.go), which
// gives countWords' count (TestFusedSentenceMatchesTwoPass) three to four
// times faster, into a scratch copy of the text's length.
func CountWords(text string) int {
	if _, n, ok := fusePlain(make([]byte, len(text)), text); ok {
		return n
	}
	return countWords(text, true)
}

// countWords counts words; joinHyphens chooses whether hyphen compounds are
// one word (the rule CountWords uses) or one per part (kept for the
// measurement in the tests).
func countWords(text string, joinHyphens bool) int {
	if n, ok := countWordsFast(text, joinHyphens); ok {
		return n
	}
	return countWordsSegments(text, joinHyphens, true)
}

// countWordsUAX is countWords on the uniseg word segmenter, for any text:
// the reference the fast paths are checked against.
func countWordsUAX(text string, joinHyphens bool) int {
	return countWordsSegments(text, joinHyphens, false)
}

// countWordsSegments counts words segment by segment, each found by
// firstWord: by the script table where it can when fast is set (scripts.go),
// else by uniseg.
func countWordsSegments(text string, joinHyphens, fast bool) int {
	n := 0
	state := -1
	joined := false // the previous word ended in a joining hyphen
	for len(text) > 0 {
		size, st, wordy := firstWord(text, state, fast)
		text, state = text[size:], st
		if !wordy {
			joined = false
			continue
		}
		if !joined {
			n++
		}
		joined = false
		if !joinHyphens || len(text) == 0 || !isHyphen(text) {
			continue
		}
		// seg is followed by a hyphen: does a word follow directly, or
		// after a line break and a lower-case letter?
		_, hsize := utf8.DecodeRuneInString(text)
		after := text[hsize:]
		if r, _ := utf8.DecodeRuneInString(after); isWordRune(r) {
			text, state, joined = after, -1, true
		} else if k := lineBreakJoin(after); k > 0 {
			text, state, joined = after[k:], -1, true
		}
	}
	return n
}

// isHyphen reports whether s starts with a hyphen that joins compounds:
// HYPHEN-MINUS, HYPHEN (U+2010) or NON-BREAKING HYPHEN (U+2011).
func isHyphen(s string) bool {
	if s[0] == '-' {
		return true
	}
	r, _ := utf8.DecodeRuneInString(s)
	return r == 0x2010 || r == 0x2011
}

// lineBreakJoin reports, for the text after a hyphen, whether it is
// optional blanks, one line break (LF, CR or CRLF), optional blanks and then
// a lower-case letter: the shape of a word hyphenated at the end of a line.
// It returns the length up to the letter, or 0.
func lineBreakJoin(s string) int {
	i := 0
	for i < len(s) && (s[i] == ' ' || s[i] == '\t') {
		i++
	}
	switch {
	case i+1 < len(s) && s[i] == '\r' && s[i+1] == '\n':
		i += 2
	case i < len(s) && (s[i] == '\n' || s[i] == '\r'):
		i++
	default:
		return 0
	}
	for i < len(s) && (s[i] == ' ' || s[i] == '\t') {
		i++
	}
	if r, _ := utf8.DecodeRuneInString(s[i:]); unicode.IsLower(r) {
		return i
	}
	return 0
}

// isWordy reports whether a word segment holds a letter, digit or ideograph.
func isWordy(seg string) bool {
	for i := 0; i < len(seg); i++ {
		c := seg[i]
		if c < utf8.RuneSelf {
			if 'a' <= c && c <= 'z' || 'A' <= c && c <= 'Z' || '0' <= c && c <= '9' {
				return true
			}
			continue
		}
		r, size := utf8.DecodeRuneInString(seg[i:])
		if isWordRune(r) {
			return true
		}
		i += size - 1
	}
	return false
}

// isWordRune: a letter (ideographs are letters, category Lo), a decimal
// digit, or another ideograph (such as U+3007, a number).
func isWordRune(r rune) bool {
	if r < utf8.RuneSelf {
		return 'a' <= r && r <= 'z' || 'A' <= r && r <= 'Z' || '0' <= r && r <= '9'
	}
	return unicode.IsLetter(r) || unicode.IsDigit(r) || unicode.Is(unicode.Ideographic, r)
}

// Word-break classes of the characters the fast counter knows (Unicode UAX
// #29, WordBreakProperty-15.0.0: ALetter, Numeric, ExtendNumLet, MidLetter,
// MidNumLet and Single_Quote, MidNum; everything else it knows is Other).
const (
	wbOther  = iota
	wbLetter // A-Z a-z
	wbNum    // 0-9
	wbExt    // _
	wbMidL   // :
	wbMidNL  // . ' U+2018 U+2019
	wbMidN   // , ;
	wbSpace  // space, tab, line breaks: like Other here
	wbHyphen // - (Other for UAX #29; joins compounds for counting)
	wbSlow   // anything else: count with uniseg
)

// fastClass returns the class of the rune at the start of s and its size.
func fastClass(s string) (int, int) {
	c := s[0]
	if c < utf8.RuneSelf {
		switch {
		case 'a' <= c && c <= 'z' || 'A' <= c && c <= 'Z':
			return wbLetter, 1
		case '0' <= c && c <= '9':
			return wbNum, 1
		}
		switch c {
		case '_':
			return wbExt, 1
		case ':':
			return wbMidL, 1
		case '.', '\'':
			return wbMidNL, 1
		case ',', ';':
			return wbMidN, 1
		case ' ', '\t', '\n', '\r', '\v', '\f':
			return wbSpace, 1
		case '-':
			return wbHyphen, 1
		}
		if c < ' ' || c == 0x7f {
			// Controls other than the white space above: CR/LF/Newline
			// classes interact with WB3*, leave them to uniseg.
			return wbSlow, 1
		}
		return wbOther, 1
	}
	// Latin-1 (WordBreakProperty-15.0.0: ALetter ª µ º À-Ö Ø-ö ø-ÿ,
	// MidLetter ·; © and ® are Extended_Pictographic, U+00AD is Format and
	// U+0085 is Newline, all left to uniseg; the rest is Other).
	if len(s) >= 2 && s[1]&0xC0 == 0x80 {
		switch d := s[1]; s[0] {
		case 0xC3:
			if d == 0x97 || d == 0xB7 { // × ÷
				return wbOther, 2
			}
			return wbLetter, 2
		case 0xC2:
			switch {
			case d < 0xA0 || d == 0xA9 || d == 0xAD || d == 0xAE:
				return wbSlow, 0
			case d == 0xAA || d == 0xB5 || d == 0xBA:
				return wbLetter, 2
			case d == 0xB7:
				return wbMidL, 2
			}
			return wbOther, 2
		}
	}
	// Common typographic punctuation.
	if len(s) >= 3 && s[0] == 0xE2 && s[1] == 0x80 {
		switch s[2] {
		case 0x98, 0x99: // ‘ ’
			return wbMidNL, 3
		case 0x93, 0x94, 0x9C, 0x9D, // – — “ ”
			0x92, 0x95, 0x9A, 0x9B, 0x9E, 0x9F, 0xA0, 0xA1, 0xA2, 0xA6: // ‒ ― ‚ ‛ „ ‟ † ‡ • …
			return wbOther, 3
		}
	}
	return wbSlow, 0
}

// countWordsFast counts words as countWords does for text made only of the
// characters fastClass knows, following the UAX #29 word rules that can
// apply to them (WB5-WB13b). It reports false, having counted nothing
// usable, when text holds anything else.
func countWordsFast(text string, joinHyphens bool) (int, bool) {
	n, _, ok := scanWordsFast(text, joinHyphens, nil, false)
	return n, ok
}

// scanWordsFast is countWordsFast; with record set it also appends each
// word's span to spans, as appendWordSpans would (a joined compound is one
// span). On false, spans holds partial results and must be discarded.
func scanWordsFast(text string, joinHyphens bool, spans []wordSpan, record bool) (int, []wordSpan, bool) {
	n := 0
	joined := false
	for i := 0; i < len(text); {
		cl, size := fastClass(text[i:])
		if cl == wbSlow {
			return 0, spans, false
		}
		if cl != wbLetter && cl != wbNum && cl != wbExt {
			i += size
			joined = false
			continue
		}
		// A segment starts at i: extend it by WB5-WB13b.
		segStart := i
		prev := cl
		wordy := cl != wbExt
		i += size
		for i < len(text) {
			c, size := fastClass(text[i:])
			if c == wbLetter || c == wbNum || c == wbExt {
				wordy = wordy || c != wbExt
				prev, i = c, i+size
				continue
			}
			if (c == wbMidL || c == wbMidNL || c == wbMidN) && i+size < len(text) {
				next, nsize := fastClass(text[i+size:])
				if prev == wbLetter && next == wbLetter && (c == wbMidL || c == wbMidNL) ||
					prev == wbNum && next == wbNum && (c == wbMidN || c == wbMidNL) {
					prev, i = next, i+size+nsize
					continue
				}
			}
			break
		}
		if !wordy {
			joined = false
			continue
		}
		if !joined {
			n++
			if record {
				spans = append(spans, wordSpan{segStart, i})
			}
		} else if record {
			spans[len(spans)-1].end = i
		}
		joined = false
		if !joinHyphens || i >= len(text) || text[i] != '-' {
			continue
		}
		after := text[i+1:]
		if len(after) > 0 {
			if c, _ := fastClass(after); c == wbLetter || c == wbNum {
				i, joined = i+1, true
			} else if k := lineBreakJoin(after); k > 0 {
				i, joined = i+1+k, true
			}
		}
	}
	return n, spans, true
}
