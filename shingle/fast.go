package shingle

import (
	"encoding/binary"
	"math/bits"
	"unicode/utf8"
)

// The fast path for ASCII and Latin text (see "Fast path" in the package
// comment). The sentence segmenter below runs the UAX #29 sentence rules as
// github.com/rivo/uniseg v0.4.7 runs them — the same twelve states, the same
// transitions, the same rule numbers deciding which transition wins, the
// same look-ahead for SB8 — so that it finds the same boundaries, quirks
// included (uniseg breaks between CR and LF after a terminator, and after
// "STerm Sp*" before a line break). What it does not do is uniseg's binary
// search over 2,800 code-point ranges for each rune: it knows the
// Sentence_Break property of a small set of code points (fastSBProp) and
// gives up, returning ok false, the moment it meets any other byte, in the
// sentence or in the SB8 look-ahead. The caller then segments that one
// sentence with uniseg. Invalid UTF-8 is never in the set, so it always goes
// to uniseg.
//
// Word counting and normalization of a sentence whose runes are in both
// fastClass's set (words.go) and latinNormal's (below) are done in one pass
// by fuseSentence (fused.go), which reads tables derived from these two;
// separateLatin and the fast counter remain for the other sentences and are
// the references it is tested against, with uniseg and x/text behind them.

// Sentence_Break property values of the fast set (UAX #29, table 4).
const (
	sbpOther = iota
	sbpCR
	sbpLF
	sbpSep
	sbpSp
	sbpLower
	sbpUpper
	sbpNumeric
	sbpATerm
	sbpSTerm
	sbpClose
	sbpSContinue
	sbpFormat
	sbpExtend
	sbpOLetter // only in the script table (scripts.go): the SB8 look-ahead stops at it
	sbpSlow    // outside the fast set: ask uniseg
)

// Segmenter states: what the text before the current position ends with, as
// far as the sentence rules care (the states of uniseg's sentencerules.go).
const (
	ssAny      = iota
	ssCR       // CR (SB3)
	ssParaSep  // LF, CR LF or Sep (SB4)
	ssATerm    // ATerm
	ssUpper    // Upper, for SB7
	ssLower    // Lower, for SB7
	ssSB7      // (Upper|Lower) ATerm
	ssSB8Close // ATerm Close+
	ssSB8Sp    // ATerm Close* Sp+
	ssSTerm    // STerm
	ssSB8aClos // STerm Close+
	ssSB8aSp   // STerm Close* Sp+
)

// asciiSB holds the Sentence_Break property of each ASCII byte, one byte per
// code point (from SentenceBreakProperty-15.0.0, as in uniseg's table; the
// test TestFastSentenceTableMatchesUniseg checks every entry by behaviour).
const asciiSB = "" +
	"\x00\x00\x00\x00\x00\x00\x00\x00\x00\x04\x02\x04\x04\x01\x00\x00" + // 00-0F: TAB LF VT FF CR
	"\x00\x00\x00\x00\x00\x00\x00\x00\x00\x00\x00\x00\x00\x00\x00\x00" + // 10-1F
	"\x04\x09\x0a\x00\x00\x00\x00\x0a\x0a\x0a\x00\x00\x0b\x0b\x08\x00" + // space ! " ' ( ) , - .
	"\x07\x07\x07\x07\x07\x07\x07\x07\x07\x07\x0b\x00\x00\x00\x00\x09" + // 0-9 : ?
	"\x00\x06\x06\x06\x06\x06\x06\x06\x06\x06\x06\x06\x06\x06\x06\x06" + // A-O
	"\x06\x06\x06\x06\x06\x06\x06\x06\x06\x06\x06\x0a\x00\x0a\x00\x00" + // P-Z [ ]
	"\x00\x05\x05\x05\x05\x05\x05\x05\x05\x05\x05\x05\x05\x05\x05\x05" + // a-o
	"\x05\x05\x05\x05\x05\x05\x05\x05\x05\x05\x05\x0a\x00\x0a\x00\x00" // p-z { }

// sbStop marks, for each byte, whether fastFirstSentence's inner loop must
// stop there: at CR, LF, an ATerm or STerm (. ! ?) and at any byte outside
// ASCII; every other ASCII byte leaves the state its own base and never
// breaks inside a sentence (TestFusedTablesMatch checks every entry against
// asciiSB). A constant string of 256 bytes indexed by a byte needs no bounds
// check. The loop it serves took 18 instructions a byte with asciiSB and
// four comparisons, 8 with it (cachegrind, BenchmarkSentencesBrown).
const sbStop = "" +
	"\x00\x00\x00\x00\x00\x00\x00\x00\x00\x00\x01\x00\x00\x01\x00\x00" + // 00-0F: LF CR
	"\x00\x00\x00\x00\x00\x00\x00\x00\x00\x00\x00\x00\x00\x00\x00\x00" + // 10-1F
	"\x00\x01\x00\x00\x00\x00\x00\x00\x00\x00\x00\x00\x00\x00\x01\x00" + // ! .
	"\x00\x00\x00\x00\x00\x00\x00\x00\x00\x00\x00\x00\x00\x00\x00\x01" + // ?
	"\x00\x00\x00\x00\x00\x00\x00\x00\x00\x00\x00\x00\x00\x00\x00\x00" + // 40-4F
	"\x00\x00\x00\x00\x00\x00\x00\x00\x00\x00\x00\x00\x00\x00\x00\x00" + // 50-5F
	"\x00\x00\x00\x00\x00\x00\x00\x00\x00\x00\x00\x00\x00\x00\x00\x00" + // 60-6F
	"\x00\x00\x00\x00\x00\x00\x00\x00\x00\x00\x00\x00\x00\x00\x00\x00" + // 70-7F
	"\x01\x01\x01\x01\x01\x01\x01\x01\x01\x01\x01\x01\x01\x01\x01\x01" + // 80-FF
	"\x01\x01\x01\x01\x01\x01\x01\x01\x01\x01\x01\x01\x01\x01\x01\x01" +
	"\x01\x01\x01\x01\x01\x01\x01\x01\x01\x01\x01\x01\x01\x01\x01\x01" +
	"\x01\x01\x01\x01\x01\x01\x01\x01\x01\x01\x01\x01\x01\x01\x01\x01" +
	"\x01\x01\x01\x01\x01\x01\x01\x01\x01\x01\x01\x01\x01\x01\x01\x01" +
	"\x01\x01\x01\x01\x01\x01\x01\x01\x01\x01\x01\x01\x01\x01\x01\x01" +
	"\x01\x01\x01\x01\x01\x01\x01\x01\x01\x01\x01\x01\x01\x01\x01\x01" +
	"\x01\x01\x01\x01\x01\x01\x01\x01\x01\x01\x01\x01\x01\x01\x01\x01"

// sbStops marks, with the high bit of its byte, the first byte of the block
// x (eight bytes, little-endian; see fused.go) that sbStop marks: one
// outside ASCII, or CR, LF, '!', '.' or '?'; 0 when there is none. A byte
// of x equals c when that byte of v = x^(c*swarOnes) is zero, which
// (v-swarOnes)&^v flags with its high bit (common practice: a borrow out of
// a zero byte may flag bytes after it, never one before, so the lowest
// flag is exact; bytes past it may be flagged wrongly).
func sbStops(x uint64) uint64 {
	return (x | zeroBytes(x^'\r'*swarOnes) | zeroBytes(x^'\n'*swarOnes) | zeroBytes(x^'!'*swarOnes) |
		zeroBytes(x^'.'*swarOnes) | zeroBytes(x^'?'*swarOnes)) & swarHigh
}

// zeroBytes flags the zero bytes of v as sbStops says.
func zeroBytes(v uint64) uint64 { return (v - swarOnes) &^ v }

// fastSBProp returns the Sentence_Break property of the rune at the start of
// b and its length, or sbpSlow for anything outside the fast set: ASCII,
// U+0080-U+00FF (Latin-1 letters, NBSP, guillemets, soft hyphen) and
// U+2000-U+203F (spaces, dashes, typographic quotes, ellipsis) by the
// switch below, the rest of the Basic Multilingual Plane by the script
// table (scriptSB, scripts.go).
func fastSBProp(b []byte) (int, int) {
	c := b[0]
	if c < utf8.RuneSelf {
		return int(asciiSB[c]), 1
	}
	if len(b) < 2 || b[1]&0xC0 != 0x80 {
		return sbpSlow, 0
	}
	switch c {
	case 0xC2:
		switch b[1] {
		case 0x85:
			return sbpSep, 2 // NEL
		case 0xA0:
			return sbpSp, 2 // NBSP
		case 0xAA, 0xB5, 0xBA:
			return sbpLower, 2 // ª µ º
		case 0xAB, 0xBB:
			return sbpClose, 2 // « »
		case 0xAD:
			return sbpFormat, 2 // soft hyphen
		}
		return sbpOther, 2
	case 0xC3:
		switch d := b[1]; {
		case d == 0x97 || d == 0xB7: // × ÷
			return sbpOther, 2
		case d <= 0x9E: // À-Þ
			return sbpUpper, 2
		}
		return sbpLower, 2 // ß-ÿ
	case 0xE2:
		if len(b) < 3 || b[1] != 0x80 || b[2]&0xC0 != 0x80 {
			return scriptSB(b)
		}
		switch d := b[2]; {
		case d <= 0x8A || d == 0xAF: // U+2000-U+200A, U+202F
			return sbpSp, 3
		case d == 0x8B || d == 0x8E || d == 0x8F || 0xAA <= d && d <= 0xAE:
			return sbpFormat, 3
		case d == 0x8C || d == 0x8D: // ZWNJ ZWJ
			return sbpExtend, 3
		case d == 0x93 || d == 0x94: // – —
			return sbpSContinue, 3
		case 0x98 <= d && d <= 0x9F || d == 0xB9 || d == 0xBA: // ‘ ’ ‚ ‛ “ ” „ ‟ ‹ ›
			return sbpClose, 3
		case d == 0xA4: // one dot leader
			return sbpATerm, 3
		case d == 0xA8 || d == 0xA9: // line and paragraph separators
			return sbpSep, 3
		case d == 0xBC || d == 0xBD: // ‼ ‽
			return sbpSTerm, 3
		}
		return sbpOther, 3
	}
	return scriptSB(b)
}

// sbBase is the state after a rune of property p when no rule looks further
// back than that rune.
func sbBase(p int) int {
	switch p {
	case sbpCR:
		return ssCR
	case sbpLF, sbpSep:
		return ssParaSep
	case sbpATerm:
		return ssATerm
	case sbpUpper:
		return ssUpper
	case sbpLower:
		return ssLower
	case sbpSTerm:
		return ssSTerm
	}
	return ssAny
}

// sbStep is the transition from state s over a rune of property p (not
// Extend or Format): the new state, whether there is a boundary before the
// rune, and the number of the rule that decided (SB3 = 30, ..., 9990 for
// "no rule, no break"), which decides whether SB8's look-ahead runs.
func sbStep(s, p int) (int, bool, int) {
	switch s {
	case ssAny:
		return sbBase(p), false, 9990
	case ssCR:
		if p == sbpLF {
			return ssParaSep, false, 30 // SB3
		}
		return sbBase(p), true, 40 // SB4
	case ssParaSep:
		return sbBase(p), true, 40 // SB4
	case ssUpper, ssLower:
		if p == sbpATerm {
			return ssSB7, false, 70
		}
		return sbBase(p), false, 9990
	}
	// s is one of the terminator states.
	switch p {
	case sbpNumeric:
		if s == ssATerm || s == ssSB7 {
			return ssAny, false, 60 // SB6
		}
	case sbpUpper:
		if s == ssSB7 {
			return ssUpper, false, 70 // SB7
		}
	case sbpSContinue:
		return ssAny, false, 81 // SB8a
	case sbpATerm:
		return ssATerm, false, 81
	case sbpSTerm:
		return ssSTerm, false, 81
	case sbpClose:
		switch s {
		case ssATerm, ssSB7, ssSB8Close:
			return ssSB8Close, false, 90 // SB9
		case ssSTerm, ssSB8aClos:
			return ssSB8aClos, false, 90
		}
	case sbpSp:
		switch s {
		case ssATerm, ssSB7, ssSB8Close:
			return ssSB8Sp, false, 90
		case ssSTerm, ssSB8aClos:
			return ssSB8aSp, false, 90
		case ssSB8Sp:
			return ssSB8Sp, false, 100 // SB10
		case ssSB8aSp:
			return ssSB8aSp, false, 100
		}
	case sbpSep, sbpCR, sbpLF:
		switch s {
		case ssATerm, ssSB7, ssSB8Close, ssSTerm, ssSB8aClos:
			return ssParaSep, false, 90
		case ssSB8Sp:
			return ssParaSep, false, 100
		}
		// ssSB8aSp before a line break: uniseg has no transition and
		// resolves to a break (rule 110), unlike SB10; kept for equality.
	}
	return sbBase(p), true, 110 // SB11
}

// sbInside has bit p set for the Sentence_Break properties p that, in the
// states ssAny, ssUpper and ssLower, never break and need no look-ahead
// (sbStep gives sbBase(p), no boundary, rule 70 or 9990; SB5 keeps the
// state over Extend and Format): all but CR, LF, Sep, ATerm, STerm and
// sbpSlow.
const sbInside = 1<<sbpOther | 1<<sbpSp | 1<<sbpLower | 1<<sbpUpper | 1<<sbpNumeric | 1<<sbpClose |
	1<<sbpSContinue | 1<<sbpFormat | 1<<sbpExtend | 1<<sbpOLetter

// fastFirstSentence returns the length of the first UAX #29 sentence of b,
// or ok false when deciding it needs a rune outside the fast set.
func fastFirstSentence(b []byte) (n int, ok bool) {
	if len(b) == 0 {
		return 0, true
	}
	p, length := fastSBProp(b)
	if p == sbpSlow {
		return 0, false
	}
	if len(b) <= length {
		return len(b), true
	}
	state := ssAny
	if p != sbpExtend && p != sbpFormat {
		state = sbBase(p)
	}
	for {
		if state == ssAny || state == ssUpper || state == ssLower {
			// Inside a sentence, a rune other than CR, LF, a paragraph
			// separator and the terminators never breaks and leaves the
			// state its own base (or, Extend and Format, as it was): skip
			// the run in one tight loop, eight bytes at a time over ASCII,
			// by the script table's stop bits (scriptSBStops) over the
			// rest; the state is that of the run's last rune, found once
			// the run ends (skippedState).
			from := length
		skip:
			for uint(length) < uint(len(b)) {
				if c := b[length]; c >= utf8.RuneSelf {
					// decodeEntry, inline but for the rarer forms (as in
					// fuseScript); those end the run.
					var r rune
					l := 2
					switch {
					case c-0xC2 < 0xE0-0xC2 && length+1 < len(b) && b[length+1]&0xC0 == 0x80:
						r = rune(c&0x1F)<<6 | rune(b[length+1]&0x3F)
					case c-0xE0 < 0x10 && length+2 < len(b) && b[length+1]&0xC0 == 0x80 && b[length+2]&0xC0 == 0x80:
						r, l = rune(c&0x0F)<<12|rune(b[length+1]&0x3F)<<6|rune(b[length+2]&0x3F), 3
						if r < 0x800 {
							break skip // overlong
						}
					default:
						break skip
					}
					if scriptSBStops[r>>3&0x1FFF]>>(r&7)&1 != 0 {
						break // U+FFFD and the surrogates are stops (their entries are slow)
					}
					length += l
					continue
				}
				start := length
				for uint(length)+8 <= uint(len(b)) {
					if stops := sbStops(binary.LittleEndian.Uint64(b[length:])); stops != 0 {
						length += bits.TrailingZeros64(stops) >> 3
						break
					}
					length += 8
				}
				for uint(length) < uint(len(b)) && sbStop[b[length]] == 0 {
					length++
				}
				if length == start {
					break // CR, LF or a terminator
				}
			}
			state = skippedState(b[from:length], state)
			if len(b) <= length {
				return len(b), true
			}
		}
		p, l := fastSBProp(b[length:])
		if p == sbpSlow {
			return 0, false
		}
		var boundary bool
		if p == sbpExtend || p == sbpFormat {
			// SB5: attached to what precedes, except after a paragraph end.
			if state == ssParaSep || state == ssCR {
				state, boundary = ssAny, true
			}
		} else {
			old := state
			var rule int
			state, boundary, rule = sbStep(old, p)
			if rule > 80 && (old == ssATerm || old == ssSB8Close || old == ssSB8Sp || old == ssSB7) {
				// SB8: ATerm Close* Sp* × (¬(OLetter|Upper|Lower|ParaSep|SATerm))* Lower
				lower, known := sb8Lower(p, b[length+l:])
				if !known {
					return 0, false
				}
				if lower {
					state, boundary = ssLower, false
				}
			}
		}
		if boundary {
			return length, true
		}
		length += l
		if len(b) <= length {
			return len(b), true
		}
	}
}

// skippedState returns the segmenter state after the run run of
// fastFirstSentence's skip loop, entered in state: sbBase of the property
// of its last rune that is not Extend or Format, or state when there is
// none. Every rune of run is ASCII or a two- or three-byte rune of the
// script table whose property is not slow.
func skippedState(run []byte, state int) int {
	for len(run) > 0 {
		if c := run[len(run)-1]; c < utf8.RuneSelf {
			// ASCII holds no Extend or Format; the mask spares a bounds
			// check.
			return sbBase(int(asciiSB[c&0x7F]))
		}
		r, size := utf8.DecodeLastRune(run)
		if p := int(scriptEntry(r&0xFFFF) & entSB); p != sbpExtend && p != sbpFormat {
			return sbBase(p)
		}
		run = run[:len(run)-size]
	}
	return state
}

// sb8Lower runs SB8's look-ahead from a rune of property p followed by rest:
// skipping runes that are not OLetter, Upper, Lower, a paragraph separator
// or a terminator, does a Lower come next? known is false when the answer
// needs a rune outside the fast set. Like uniseg, the look-ahead stops
// without a match at the end of the text.
func sb8Lower(p int, rest []byte) (lower, known bool) {
	for p != sbpUpper && p != sbpLower && p != sbpOLetter && p != sbpSep && p != sbpCR && p != sbpLF &&
		p != sbpATerm && p != sbpSTerm {
		if len(rest) == 0 {
			return false, true
		}
		var l int
		p, l = fastSBProp(rest)
		if p == sbpSlow {
			return false, false
		}
		rest = rest[l:]
	}
	return p == sbpLower, true
}

// latinNormal reports, for a rune of the fast set of the normalizer (any
// ASCII, and the two- and three-byte forms below) at the start of s, its
// length and whether it is a separator in the normalized form; size 0 means
// outside the set. The set is chosen so that NFKC, case folding and NFKC
// again leave every rune in it as one known result: Latin-1 letters other
// than ª µ º are NFKC-stable and fold to one Latin-1 letter (ß to "ss");
// the kept Latin-1 symbols (¢ £ ¤ ¥ ¦ © ¬ ® ° ± × ÷) are stable under both;
// the C1 controls, NBSP, ¡ § « ¶ · » ¿ and U+2010-U+2016, U+2018-U+2029
// are punctuation, space or control before and after NFKC (… becomes
// "...", still punctuation), so they only ever separate words. Left out,
// for the full path: ¨ ª ¯ ² ³ ´ µ ¸ ¹ º ¼ ½ ¾ (compatibility
// decompositions into letters, digits or combining marks) and the rest of
// U+2000-U+203F.
func latinNormal(s []byte) (size int, sep bool) {
	c := s[0]
	if c < utf8.RuneSelf {
		return 1, isASCIISeparator(c)
	}
	if len(s) < 2 || s[1]&0xC0 != 0x80 {
		return 0, false
	}
	switch c {
	case 0xC2:
		switch d := s[1]; {
		case d <= 0x9F: // C1 controls
			return 2, true
		case d == 0xA0 || d == 0xA1 || d == 0xA7 || d == 0xAB || d == 0xB6 || d == 0xB7 ||
			d == 0xBB || d == 0xBF:
			return 2, true
		case 0xA2 <= d && d <= 0xA6 || d == 0xA9 || d == 0xAC || d == 0xAE || d == 0xB0 || d == 0xB1:
			return 2, false
		}
		return 0, false
	case 0xC3:
		return 2, false
	case 0xE2:
		if len(s) < 3 || s[1] != 0x80 || s[2]&0xC0 != 0x80 {
			return 0, false
		}
		if d := s[2]; 0x90 <= d && d <= 0xA9 && d != 0x97 {
			return 3, true
		}
	}
	return 0, false
}

// isLatinNormal reports whether every rune of s is in latinNormal's set.
func isLatinNormal(s []byte) bool {
	for i := 0; i < len(s); {
		size, _ := latinNormal(s[i:])
		if size == 0 {
			return false
		}
		i += size
	}
	return true
}

// separateLatin is separate (step 4) fused with NFKC and case folding for
// text whose runes are all in latinNormal's set: separators become one
// space, A-Z and À-Þ (but ×) are lowered, ß becomes "ss", the rest is
// copied.
func separateLatin(dst []byte, src []byte) []byte {
	start := len(dst)
	space := false
	for i := 0; i < len(src); {
		size, sep := latinNormal(src[i:])
		if sep {
			space = true
			i += size
			continue
		}
		if space && len(dst) > start {
			dst = append(dst, ' ')
		}
		space = false
		switch c := src[i]; {
		case size == 1:
			if 'A' <= c && c <= 'Z' {
				c += 'a' - 'A'
			}
			dst = append(dst, c)
		case c == 0xC3 && src[i+1] == 0x9F: // ß
			dst = append(dst, 's', 's')
		case c == 0xC3 && src[i+1] <= 0x9E && src[i+1] != 0x97: // À-Þ but ×
			dst = append(dst, c, src[i+1]+0x20)
		default:
			dst = append(dst, src[i:i+size]...)
		}
		i += size
	}
	return dst
}
