package shingle

import (
	"bytes"
	"unicode"
	"unicode/utf8"
)

// isBlankByte reports whether c is white space within a line: space, tab,
// vertical tab or form feed.
func isBlankByte(c byte) bool {
	return c == ' ' || c == '\t' || c == '\v' || c == '\f'
}

// unwrap appends text to dst with every single line break inside a paragraph
// replaced by spaces, byte for byte, so that offsets into the result are
// offsets into text. A line break is LF, CR or CRLF. A run of blanks and line
// breaks holding two or more line breaks (a blank line) is kept as it is: it
// stays a paragraph break for UAX #29 (rule SB4). Other separators (NEL,
// U+2028, U+2029) are left alone.
//
// The line breaks are found with bytes.IndexByte (vector instructions on
// amd64, several bytes at a time), one search for LF and one for CR: a text
// without CR costs one such scan for it. The byte loop it replaced took
// 11 instructions a byte (cachegrind, BenchmarkSentencesBrown).
func unwrap(dst []byte, text string) []byte {
	base := len(dst)
	dst = append(dst, text...)
	b := dst[base:]
	nextLF, nextCR := indexByteFrom(b, 0, '\n'), indexByteFrom(b, 0, '\r')
	for {
		i := min(nextLF, nextCR)
		if i >= len(b) {
			break
		}
		// b[i] starts a run of line breaks and blanks; count its breaks.
		j, breaks := i, 0
	scan:
		for j < len(b) {
			switch {
			case b[j] == '\r':
				breaks++
				if j+1 < len(b) && b[j+1] == '\n' {
					j++
				}
			case b[j] == '\n':
				breaks++
			case isBlankByte(b[j]):
			default:
				break scan
			}
			j++
		}
		if breaks == 1 {
			for k := i; k < j; k++ {
				if b[k] == '\n' || b[k] == '\r' {
					b[k] = ' '
				}
			}
		}
		// Both searches go on from the end of the run; b[j:] is untouched.
		if nextLF < j {
			nextLF = indexByteFrom(b, j, '\n')
		}
		if nextCR < j {
			nextCR = indexByteFrom(b, j, '\r')
		}
	}
	return dst
}

// indexByteFrom returns the index of the first c in b at or after from, or
// len(b) if there is none.
func indexByteFrom(b []byte, from int, c byte) int {
	if k := bytes.IndexByte(b[from:], c); k >= 0 {
		return from + k
	}
	return len(b)
}

// hasTerminator reports whether text holds a character with the UAX #29
// Sentence_Break property STerm or ATerm. STerm is Sentence_Terminal=Yes minus
// the ATerm characters, and ATerm is U+002E, U+2024, U+FE52 and U+FF0E
// (UAX #29, table 4), so the union is Sentence_Terminal plus those four.
func hasTerminator(text string) bool {
	for i := 0; i < len(text); {
		c := text[i]
		if c < utf8.RuneSelf {
			if c == '.' || c == '!' || c == '?' {
				return true
			}
			i++
			continue
		}
		if c-0xC2 < 0xE0-0xC2 && i+1 < len(text) && text[i+1]&0xC0 == 0x80 {
			// A two-byte rune (the alphabetic scripts), decoded inline:
			// isTerminatorRune's test (TestScriptTableMatchesReference
			// checks the table's terminators against isTerminator).
			p := scriptEntry(rune(c&0x1F)<<6|rune(text[i+1]&0x3F)) & entSB
			if p == sbpATerm || p == sbpSTerm || p == sbpSlow && isTerminator(runeOf(text, i, 2)) {
				return true
			}
			i += 2
			continue
		}
		if c-0xE0 < 0x10 && i+2 < len(text) && text[i+1]&0xC0 == 0x80 && text[i+2]&0xC0 == 0x80 {
			// Three bytes (Indic, Thai, Han, kana, Hangul): the same, but
			// for the forms that are not runes (overlong, surrogates).
			if r := runeOf(text, i, 3); r >= 0x800 && (r < 0xD800 || r > 0xDFFF) {
				if isTerminatorRune(r) {
					return true
				}
				i += 3
				continue
			}
		}
		r, size := utf8.DecodeRuneInString(text[i:])
		if isTerminatorRune(r) {
			return true
		}
		i += size
	}
	return false
}

// isTerminator reports whether r has Sentence_Break STerm or ATerm.
func isTerminator(r rune) bool {
	switch r {
	case '.', 0x2024, 0xFE52, 0xFF0E:
		return true
	}
	return unicode.Is(unicode.Sentence_Terminal, r)
}

// isTrimmable reports whether r may be dropped from either end of a span:
// white space and format characters (Cf, such as a byte order mark or a zero
// width space).
func isTrimmable(r rune) bool {
	if r < utf8.RuneSelf {
		return r == ' ' || r == '\t' || r == '\n' || r == '\r' || r == '\v' || r == '\f'
	}
	return unicode.IsSpace(r) || unicode.Is(unicode.Cf, r)
}

// trimmableRune is isTrimmable by the script table where it answers: a
// format character is what the table drops (normDrop: Cf), and white space
// outside ASCII is Sentence_Break Sp, Sep, CR or LF (UAX #29 defines Sp as
// White_Space but Sep, CR and LF). TestTrimmableRuneMatches checks every
// code point of the table against isTrimmable.
func trimmableRune(r rune) bool {
	if r < utf8.RuneSelf {
		return r == ' ' || r == '\t' || r == '\n' || r == '\r' || r == '\v' || r == '\f'
	}
	if r <= 0xFFFF {
		if e := scriptEntry(r); e&entSB != sbpSlow {
			const spaces = 1<<sbpSp | 1<<sbpSep | 1<<sbpCR | 1<<sbpLF
			return e>>entNormShift&3 == normDrop || spaces>>(e&entSB)&1 != 0
		}
	}
	return isTrimmable(r)
}

// trimSpan narrows [start, end) of text past trimmable runes at both ends.
// Invalid bytes are never trimmed.
func trimSpan(text string, start, end int) (int, int) {
	for start < end {
		r, size := utf8.DecodeRuneInString(text[start:end])
		if r == utf8.RuneError || !trimmableRune(r) {
			break
		}
		start += size
	}
	for end > start {
		r, size := utf8.DecodeLastRuneInString(text[start:end])
		if r == utf8.RuneError || !trimmableRune(r) {
			break
		}
		end -= size
	}
	return start, end
}
