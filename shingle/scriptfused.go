package shingle

import (
	"slices"
	"unicode/utf8"

	"golang.org/x/text/unicode/norm"
)

// The fused pass over the script table. For a sentence outside the Latin
// fused set (fused.go), emit used to walk it twice more after the sentence
// segmenter: countWords (tableFirstWord segment by segment) and the
// normalizer (scriptNormal), each decoding every rune and looking it up.
// fuseScript does both in one walk: one decode (decodeEntry, inline for the
// one-, two- and three-byte forms) and one table look-up per rune feed the
// word segmenter, the hyphen joins of countWordsSegments and the
// normalization of scriptNormal, each run as it runs there.
//
// The two walks it replaces skip text in two places, each on its own
// terms: the counter skips a hyphen (and a line break after it) that joins
// two words, and the normalizer skips a hyphen and line break after a
// letter (prepare's rule). Here each keeps its own skip mark (wskip,
// nskip), so that either may skip bytes the other reads.
//
// Anything either walk would hand to the reference (a rune the table
// marks slow for the word rules or for normalization, a composition or a
// reordering of marks, 20 marks in a row, invalid UTF-8, a rune above
// U+FFFF) makes fuseScript give up, and the sentence goes the two-walk way,
// which stays as it was. TestFuseScriptCases, TestFuseScriptRandom and
// TestFuseScriptUDHR check it against the two walks and the reference, by
// hand, on random texts and on the UDHR declarations.

// decodeEntry returns the table entry of the rune at s[i:] and its size,
// or size 0 when the rune is not in the table: invalid UTF-8, U+FFFD, a
// rune above U+FFFF (what entryAt calls slowEntry). It serves strings
// (fuseScript) and byte slices (fastFirstSentence).
func decodeEntry[T string | []byte](s T, i int) (uint32, int) {
	c := s[i]
	if c < utf8.RuneSelf {
		return scriptEntry(rune(c)), 1
	}
	if c < 0xE0 {
		if c >= 0xC2 && i+1 < len(s) && s[i+1]&0xC0 == 0x80 {
			return scriptEntry(rune(c&0x1F)<<6 | rune(s[i+1]&0x3F)), 2
		}
		return 0, 0
	}
	if c < 0xF0 && i+2 < len(s) {
		d, f := s[i+1], s[i+2]
		if d&0xC0 == 0x80 && f&0xC0 == 0x80 && (c != 0xE0 || d >= 0xA0) && (c != 0xED || d < 0xA0) {
			if r := rune(c&0x0F)<<12 | rune(d&0x3F)<<6 | rune(f&0x3F); r != utf8.RuneError {
				return scriptEntry(r), 3
			}
		}
	}
	return 0, 0
}

// fuseScript appends the normalized form of s to dst (what
// normalizer.append gives) and returns it with the number of words of s
// (what countWords gives), in one walk, when the table decides every rune
// of s for both. Otherwise ok is false and dst is returned as it was.
func fuseScript(dst []byte, s string) (out []byte, words int, ok bool) {
	base := len(dst)
	dst = slices.Grow(dst, len(s))

	// The counter (countWordsSegments over tableFirstWord).
	state := -1     // word segmenter state; -1: the next rune starts a text
	wordy := false  // the current segment holds a word rune
	joined := false // the previous word ended in a joining hyphen
	n := 0
	wskip := 0 // the counter ignores the runes before this offset

	// The normalizer (scriptNormal).
	space := false      // a separator since the last written rune
	prevLetter := false // the last rune kept was a letter
	prevCCC := -1       // combining class of the last rune kept if a mark, else -1
	var prev rune       // the last rune kept
	marks := 0          // marks and composing runes in a row
	nskip := 0          // the normalizer ignores the runes before this offset

	for i := 0; i < len(s); {
		// decodeEntry inline, but for invalid UTF-8 and four-byte forms.
		c := s[i]
		r := rune(c)
		size := 1
		switch {
		case c < utf8.RuneSelf:
		case c-0xC2 < 0xE0-0xC2 && i+1 < len(s) && s[i+1]&0xC0 == 0x80:
			r, size = rune(c&0x1F)<<6|rune(s[i+1]&0x3F), 2
		case c-0xE0 < 0x10 && i+2 < len(s) && threeByteOK(c, s[i+1], s[i+2]):
			r, size = rune(c&0x0F)<<12|rune(s[i+1]&0x3F)<<6|rune(s[i+2]&0x3F), 3
			if r == utf8.RuneError {
				return dst[:base], 0, false
			}
		default:
			if _, size = decodeEntry(s, i); size == 0 {
				return dst[:base], 0, false
			}
			r = runeOf(s, i, size)
		}
		e := scriptEntry(r)
		if state >= 0 && !space && i >= wskip && i >= nskip && quickTakes(e, state, wordy) {
			// The common case inside a word, and from word to word where
			// nothing but a space or a break lies between (see quickRun).
			from, lastAt, crossed := i, 0, 0
			if dst, i, lastAt, wordy, crossed = quickRun(dst, s, i, state, wordy); i == from {
				// quickRun stopped at once, which it does not on the runes
				// let in here; should the two tests ever disagree, this
				// keeps the loop from running in place.
				return dst[:base], 0, false
			}
			if crossed > 0 {
				// Each word boundary crossed ended a word; the first one
				// ends the word a hyphen may have joined to the one before.
				if joined {
					crossed--
				}
				n += crossed
				joined = false
			}
			prev = runeOf(s, lastAt, i-lastAt)
			le := scriptEntry(prev)
			prevLetter, prevCCC, marks = le&entLetter != 0, -1, 0
			if le&entMark != 0 {
				prevCCC = int(le >> entCCC)
			}
			if le&(entMark|entCompose) != 0 {
				marks = 1 // after a rune that is neither (quickRun)
			}
			continue
		}
		if i >= wskip {
			p := int(e & entWB >> entWBShift)
			if state < 0 {
				// The first rune of a text (or after a join): tableFirstWord
				// with state -1.
				if p == wpSlow {
					return dst[:base], 0, false
				}
				wordy = e&entWordy != 0
				if i+size < len(s) {
					if state, _, ok = wordStep(-1, p, s[i+size:]); !ok {
						return dst[:base], 0, false
					}
				}
			} else {
				var brk bool
				if t := wordTab[state&15<<5|p&31]; t&wtCall == 0 {
					state, brk = int(t&15), t&wtBreak != 0
				} else if state, brk, ok = wordStep(state, p, s[i+size:]); !ok {
					return dst[:base], 0, false
				}
				switch {
				case !brk:
					wordy = wordy || e&entWordy != 0
				case !wordy:
					// A segment without a word rune ended before i.
					joined = false
					wordy = e&entWordy != 0
				default:
					// A word ended before i.
					if !joined {
						n++
					}
					joined = false
					if k := hyphenJoin(s, i, size); k > 0 {
						wskip, state, joined = k, -1, true
					} else {
						wordy = e&entWordy != 0
					}
				}
			}
		}
		if i < nskip {
			i += size
			continue
		}
		if size == 1 {
			c := s[i]
			if c == '-' && prevLetter {
				if k := lineBreakJoin(s[i+1:]); k > 0 {
					nskip = i + 1 + k
					i++
					continue
				}
			}
			i++
			prevCCC, prev, marks = -1, rune(c), 0
			if 'A' <= c && c <= 'Z' {
				c += 'a' - 'A'
			}
			prevLetter = 'a' <= c && c <= 'z'
			if isASCIISeparator(c) {
				space = true
				continue
			}
			if space && len(dst) > base {
				dst = append(dst, ' ')
			}
			space = false
			dst = append(dst, c)
			continue
		}
		if e&entNSlow != 0 {
			return dst[:base], 0, false
		}
		kind := e >> entNormShift & 3
		if kind == normDrop {
			i += size
			continue
		}
		if r == 0x2010 && prevLetter {
			if k := lineBreakJoin(s[i+size:]); k > 0 {
				nskip = i + size + k
				i += size
				continue
			}
		}
		if e&entCompose != 0 && (e&entMark != 0 && prevCCC >= 0 || scriptEntry(prev)&entFirst != 0) {
			return dst[:base], 0, false
		}
		prev = r
		prevLetter = e&entLetter != 0
		if e&(entMark|entCompose) == 0 {
			marks = 0
		} else if marks++; marks >= maxMarkRun {
			return dst[:base], 0, false // NFKC may insert U+034F (see maxMarkRun)
		}
		if e&entMark != 0 {
			ccc := int(e >> entCCC)
			if ccc < prevCCC {
				return dst[:base], 0, false
			}
			prevCCC = ccc
		} else {
			prevCCC = -1
		}
		if kind == normSep {
			space = true
			i += size
			continue
		}
		if space && len(dst) > base {
			dst = append(dst, ' ')
		}
		space = false
		switch d := rune(int32(e) >> entDelta); {
		case kind == normKeep && size == 2:
			dst = append(dst, s[i], s[i+1]) // no call, as a copy of s[i:i+2] makes
		case kind == normKeep:
			dst = append(dst, s[i], s[i+1], s[i+2])
		case d != 0:
			dst = utf8.AppendRune(dst, r+d)
		default:
			k := inRuneList(scriptFormRunes, r)
			from := 0
			if k > 0 {
				from = runeListAt(scriptFormEnds, k-1)
			}
			form := scriptForms[from:runeListAt(scriptFormEnds, k)]
			dst = append(dst, form...)
			last, _ := utf8.DecodeLastRuneInString(form)
			if ccc := int(norm.NFC.PropertiesString(string(last)).CCC()); ccc != 0 {
				prevCCC = ccc
			}
		}
		i += size
	}
	if wordy && !joined {
		n++
	}
	return dst, n, true
}

// quickRun is fuseScript's quick step, in a loop of its own (so that its
// few variables stay in registers). From s[i:], in word-segmenter state
// state, it takes each rune that is its own normalized form and not a mark
// (fuseQuick) and that either
//
//   - continues the word segment in the same state (a letter after a
//     letter: wordTab gives state, no break), or
//   - starts a new segment in the same state after a wordy one, being wordy
//     itself (an ideograph after an ideograph: wordTab gives a break and
//     state), or does so after one ASCII space (a letter after "letter "),
//
// and, as an exception to "not a mark", a combining mark or composing rune
// continuing the segment right after a taken rune that is neither, and
// that does not compose with it (a virama or a vowel sign after a letter),
//
// and appends its form, the rune (and the space as a space), to dst. In
// the second case the segment before was a word (it was wordy; a space or
// a wordy rune is no joining hyphen): crossed counts them. It returns dst,
// where it stopped, where the last rune taken starts, whether the segment
// it ends in is wordy (as wordy is for the segment at i) and crossed. The
// rune at i must qualify (quickTakes).
//
// The loop is written for the two- and three-byte letters of the
// alphabetic scripts and of Han and Hangul: the room for the run is made
// once (a taken rune's form is the rune and a space a space, so the run's
// form is as long as the run), and U+FFFD and the surrogates, which decode
// here, stop the run by their slow entries (fuseQuick); an overlong
// three-byte form stops it by r < 0x800.
func quickRun(dst []byte, s string, i, state int, wordy bool) (out []byte, end, lastAt int, segWordy bool, crossed int) {
	if room := len(s) - i; cap(dst)-len(dst) < room {
		dst = slices.Grow(dst, room)
	}
	j0 := len(dst)
	j := j0
	buf := dst[:cap(dst)]
	lastAt = i
	prevE := uint32(entMark) // the entry of the last rune taken; none yet, taken as a mark
	for uint(i) < uint(len(s)) {
		at := i // where the rune starts: after a space, the byte after it
		if s[i] == ' ' {
			// A space ends a wordy segment before a rune that starts one
			// in the same state; the form of the space is a space, written
			// after some rune of this run (so the form is not empty).
			if !wordy || j == j0 {
				break
			}
			at++
		}
		if at >= len(s) {
			break
		}
		c := s[at]
		var e uint32
		size := 2
		switch {
		case c-0xC2 < 0xE0-0xC2:
			if at+1 >= len(s) || s[at+1]&0xC0 != 0x80 {
				return buf[:j], i, lastAt, wordy, crossed
			}
			e = scriptEntry(rune(c&0x1F)<<6 | rune(s[at+1]&0x3F))
		case c-0xE0 < 0x10:
			if at+2 >= len(s) {
				return buf[:j], i, lastAt, wordy, crossed
			}
			d, f := s[at+1], s[at+2]
			r := rune(c&0x0F)<<12 | rune(d&0x3F)<<6 | rune(f&0x3F)
			if d&0xC0 != 0x80 || f&0xC0 != 0x80 || r < 0x800 {
				return buf[:j], i, lastAt, wordy, crossed
			}
			e, size = scriptEntry(r), 3
		case c < utf8.RuneSelf:
			e, size = scriptEntry(rune(c)), 1
		default:
			return buf[:j], i, lastAt, wordy, crossed
		}
		if at > i {
			// After the space: the state is WSegSpace, and the rune must
			// break into state, be wordy and be its own form.
			if e&fuseQuick != 0 || e&entWordy == 0 ||
				int(wordTab[wsWSegSpace<<5|int(e>>entWBShift&31)]) != wtBreak|state {
				break
			}
			crossed++
			buf[j] = ' '
			j++
		} else {
			t := int(wordTab[state&15<<5|int(e>>entWBShift&31)])
			switch {
			case e&fuseQuick&^(entMark|entCompose) != 0:
				return buf[:j], i, lastAt, wordy, crossed
			case e&(entMark|entCompose) != 0:
				// A mark or composing rune kept as it is (a virama, a
				// vowel sign), after a rune of this run that is neither:
				// fuseScript's normalizer checks then come down to "it
				// does not compose with that rune" (bit entFirst of it);
				// it cannot be out of order, nor the 20th in a row. It
				// must continue the segment.
				if prevE&(entMark|entCompose) != 0 || e&entCompose != 0 && prevE&entFirst != 0 || t != state {
					return buf[:j], i, lastAt, wordy, crossed
				}
			case t == state:
				wordy = wordy || e&entWordy != 0
			case t == wtBreak|state && wordy && e&entWordy != 0:
				crossed++
			default:
				return buf[:j], i, lastAt, wordy, crossed
			}
		}
		switch size {
		case 1:
			buf[j] = c
		case 2:
			buf[j], buf[j+1] = c, s[at+1]
		default:
			buf[j], buf[j+1], buf[j+2] = c, s[at+1], s[at+2]
		}
		lastAt, prevE = at, e
		i = at + size
		j += size
	}
	return buf[:j], i, lastAt, wordy, crossed
}

// quickTakes reports whether quickRun takes a rune of entry e first, in
// state state after a segment that is wordy or not: the test of its loop
// for a rune not after a space.
func quickTakes(e uint32, state int, wordy bool) bool {
	if e&fuseQuick != 0 {
		return false
	}
	t := int(wordTab[state&15<<5|int(e>>entWBShift&31)])
	return t == state || t == wtBreak|state && wordy && e&entWordy != 0
}

// fuseQuick masks the entry bits that keep a rune off fuseScript's quick
// step: a normalized form other than the rune itself, normalization by
// the reference, a combining mark, a rune that may compose.
const fuseQuick = 3<<entNormShift | entNSlow | entMark | entCompose

// threeByteOK reports whether c d f, c in 0xE0-0xEF, is valid UTF-8: both
// continuation bytes, not overlong (0xE0 needs d >= 0xA0), not a surrogate
// (0xED needs d < 0xA0).
func threeByteOK(c, d, f byte) bool {
	lo, hi := byte(0x80), byte(0xBF)
	switch c {
	case 0xE0:
		lo = 0xA0
	case 0xED:
		hi = 0x9F
	}
	return lo <= d && d <= hi && f&0xC0 == 0x80
}

// runeOf returns the rune of the valid size-byte sequence at s[i:] (one,
// two or three bytes, as decodeEntry accepted it).
func runeOf(s string, i, size int) rune {
	switch size {
	case 1:
		return rune(s[i])
	case 2:
		return rune(s[i]&0x1F)<<6 | rune(s[i+1]&0x3F)
	}
	return rune(s[i]&0x0F)<<12 | rune(s[i+1]&0x3F)<<6 | rune(s[i+2]&0x3F)
}

// hyphenJoin is countWordsSegments' rule after a word: if the rune at
// s[i:] (of size bytes) is a joining hyphen followed by a word rune, or by a
// line break and a lower-case letter, it returns where the next word
// starts; else 0.
func hyphenJoin(s string, i, size int) int {
	if c := s[i]; c != '-' && c != 0xE2 || !isHyphen(s[i:]) {
		return 0
	}
	after := i + size
	if r, _ := utf8.DecodeRuneInString(s[after:]); isWordRune(r) {
		return after
	}
	if k := lineBreakJoin(s[after:]); k > 0 {
		return after + k
	}
	return 0
}

// wordTab is wordStep as a table, for the steps that need no look-ahead:
// entry state<<5 | p (state below 16, Word_Break property p below 32) holds
// the new state in its low four bits and wtBreak when a boundary comes
// before the rune, or is wtCall where wordStep must be asked (it looks
// ahead, or gives up). TestWordTabMatches derives it from wordStep; 512
// bytes, so that an index masked to nine bits needs no bounds check.
const (
	wtBreak = 1 << 4
	wtCall  = 1 << 5
)
const wordTab = "" +
	"\x10\x11\x12\x13\x14\x15\x16\x19\x1b\x1c\x10\x10\x10\x10\x10\x00\x00\x20\x20\x20\x20\x20\x20\x20\x20\x20\x20\x20\x20\x20\x20\x20" + // Any
	"\x10\x11\x02\x13\x14\x15\x16\x19\x1b\x1c\x10\x10\x10\x10\x10\x10\x10\x20\x20\x20\x20\x20\x20\x20\x20\x20\x20\x20\x20\x20\x20\x20" + // CR
	"\x10\x11\x12\x13\x14\x15\x16\x19\x1b\x1c\x10\x10\x10\x10\x10\x10\x10\x20\x20\x20\x20\x20\x20\x20\x20\x20\x20\x20\x20\x20\x20\x20" + // LF
	"\x10\x11\x12\x13\x14\x15\x16\x19\x1b\x1c\x10\x10\x10\x10\x10\x10\x10\x20\x20\x20\x20\x20\x20\x20\x20\x20\x20\x20\x20\x20\x20\x20" + // Newline
	"\x10\x11\x12\x13\x04\x15\x16\x19\x1b\x1c\x10\x10\x10\x10\x10\x00\x00\x20\x20\x20\x20\x20\x20\x20\x20\x20\x20\x20\x20\x20\x20\x20" + // WSegSpace
	"\x10\x11\x12\x13\x14\x05\x06\x09\x1b\x0c\x20\x20\x20\x20\x20\x05\x05\x20\x20\x20\x20\x20\x20\x20\x20\x20\x20\x20\x20\x20\x20\x20" + // HebrewLetter
	"\x10\x11\x12\x13\x14\x05\x06\x09\x1b\x0c\x20\x20\x20\x20\x20\x06\x06\x20\x20\x20\x20\x20\x20\x20\x20\x20\x20\x20\x20\x20\x20\x20" + // ALetter
	"\x10\x11\x12\x13\x14\x05\x06\x19\x1b\x1c\x10\x10\x10\x10\x10\x07\x07\x20\x20\x20\x20\x20\x20\x20\x20\x20\x20\x20\x20\x20\x20\x20" + // WB7
	"\x10\x11\x12\x13\x14\x05\x16\x19\x1b\x1c\x10\x10\x10\x10\x10\x08\x08\x20\x20\x20\x20\x20\x20\x20\x20\x20\x20\x20\x20\x20\x20\x20" + // WB7c
	"\x10\x11\x12\x13\x14\x05\x06\x09\x1b\x0c\x20\x20\x20\x20\x20\x09\x09\x20\x20\x20\x20\x20\x20\x20\x20\x20\x20\x20\x20\x20\x20\x20" + // Numeric
	"\x10\x11\x12\x13\x14\x15\x16\x09\x1b\x1c\x10\x10\x10\x10\x10\x0a\x0a\x20\x20\x20\x20\x20\x20\x20\x20\x20\x20\x20\x20\x20\x20\x20" + // WB11
	"\x10\x11\x12\x13\x14\x15\x16\x19\x0b\x0c\x10\x10\x10\x10\x10\x0b\x0b\x20\x20\x20\x20\x20\x20\x20\x20\x20\x20\x20\x20\x20\x20\x20" + // Katakana
	"\x10\x11\x12\x13\x14\x05\x06\x09\x0b\x0c\x10\x10\x10\x10\x10\x0c\x0c\x20\x20\x20\x20\x20\x20\x20\x20\x20\x20\x20\x20\x20\x20\x20" + // ExtendNumLet
	"\x20\x20\x20\x20\x20\x20\x20\x20\x20\x20\x20\x20\x20\x20\x20\x20\x20\x20\x20\x20\x20\x20\x20\x20\x20\x20\x20\x20\x20\x20\x20\x20" + // OddRI
	"\x20\x20\x20\x20\x20\x20\x20\x20\x20\x20\x20\x20\x20\x20\x20\x20\x20\x20\x20\x20\x20\x20\x20\x20\x20\x20\x20\x20\x20\x20\x20\x20" + // EvenRI
	"\x20\x20\x20\x20\x20\x20\x20\x20\x20\x20\x20\x20\x20\x20\x20\x20\x20\x20\x20\x20\x20\x20\x20\x20\x20\x20\x20\x20\x20\x20\x20\x20" // unused
