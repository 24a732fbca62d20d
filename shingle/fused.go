package shingle

import (
	"encoding/binary"
	"math/bits"
	"slices"
)

// The fused sentence pass (see "Fast path" in the package comment). For a
// sentence made only of runes of the fused set below, fuseSentence counts
// its words and writes its normalized form in one walk over its bytes,
// where the two-pass path walks it three times (countWords, then prepare's
// copy, then separate or separateLatin) and calls a function per rune. The
// set is the intersection of what the fast word counter knows (fastClass,
// words.go) and of what the Latin normalizer knows (latinNormal, fast.go),
// minus what prepare drops (format characters, none of which is in
// fastClass's set anyway):
//
//   - ASCII, but the control characters other than white space;
//   - U+00C0-U+00FF: the Latin-1 letters (lowered by +0x20 on À-Þ, ß to
//     "ss") and × ÷, kept;
//   - the Latin-1 symbols ¢ £ ¤ ¥ ¦ ¬ ° ±, kept, and NBSP ¡ § « ¶ · » ¿,
//     separators;
//   - the punctuation U+2012-U+2015, U+2018-U+2022 and U+2026 (dashes,
//     typographic quotes, dagger, bullet, ellipsis), separators.
//
// On this set the normalized form of a rune depends on the rune alone
// (letters and digits lowered, symbols kept, the rest a separator), except
// that prepare drops a hyphen, line break and blanks between a letter and a
// lower-case letter; and the word count is scanWordsFast's: a segment of
// letters, digits and '_', continued over a MidLetter between letters or a
// MidNum between digits (UAX #29 WB6-WB12), a wordy segment a word, and a
// hyphen after one joining it to the next. So the pass walks the sentence
// one word segment at a time, as scanWordsFast does, and writes each rune's
// form as it goes; it counts wordy segments and subtracts one per hyphen
// join, which gives scanWordsFast's count because a join is always followed
// by a wordy segment.
//
// Two versions share that logic. fusePlain takes ASCII and – — “ ” (what
// English prose is made of: every line of the Brown corpus, as
// TestFusedPathTakenBrown counts) with table look-ups only, so that its
// loops make no call and keep their state in registers, and it copies
// runs of letters and single spaces eight bytes at a time
// (lettersAndSpaces), the rest with one look-up and one store a byte; fuseLatin
// takes the whole set, decoding runes outside ASCII with fusedRune. A
// sentence fusePlain gives up is run again by fuseLatin, and one fuseLatin
// gives up (a rune outside the set, invalid UTF-8 included) goes the
// two-pass way, which stays as it was.
//
// Checked, not argued: TestFusedSentenceCases (every branch by hand) and
// TestFusedSentenceMatchesTwoPass (random texts) compare both versions with
// the two-pass fast path and with uniseg plus NFKC and folding;
// TestFusedTablesMatch derives every class from fastClass and latinNormal;
// TestFusedPathTakenBrown checks that the pass runs on the Brown corpus; and
// FuzzFastPathSameUnits and TestFastPathSameUnitsBrown compare whole
// Splitters with the full Unicode path.

// Classes of the fused pass: the rune's word-break class for the counter
// (UAX #29 WordBreakProperty, as fastClass has it) and its fate in the
// normalized form. Letters and digits are written (letters lowered), fcKeep
// is written as it is, every other class is a separator there. The order
// matters: classes up to fcMidN separate words outside a word segment, and
// fcLetter and fcNum are next to each other, so that each test is one
// comparison in the hot loops.
const (
	fcSep    = iota // separator, no part in a word: white space, punctuation
	fcHyphen        // '-': a separator, and it joins compounds for counting
	fcMidL          // MidLetter: : ·
	fcMidNL         // MidNumLet and Single_Quote: . ' ‘ ’
	fcMidN          // MidNum: , ;
	fcLetter        // ALetter: A-Z, a-z, À-ÿ but × ÷
	fcNum           // Numeric: 0-9
	fcExt           // ExtendNumLet: _ (a separator in the normalized form)
	fcKeep          // kept, no part in a word: symbols such as $ + < = > ^ | ~ × ¢
	fcMulti         // in fusedTab: a byte >= 0x80; fusedRune gives the class
	fcOut           // outside the fused set
)

// fusedTab holds the fused class of each ASCII byte, and fcMulti for the
// others (TestFusedTablesMatch derives every entry from fastClass and
// isASCIISeparator). A constant string of 256 bytes indexed by a byte needs
// no bounds check.
const fusedTab = "" +
	"\x0a\x0a\x0a\x0a\x0a\x0a\x0a\x0a\x0a\x00\x00\x00\x00\x00\x0a\x0a" + // 00-0F: TAB LF VT FF CR
	"\x0a\x0a\x0a\x0a\x0a\x0a\x0a\x0a\x0a\x0a\x0a\x0a\x0a\x0a\x0a\x0a" + // 10-1F
	"\x00\x00\x00\x00\x08\x00\x00\x03\x00\x00\x00\x08\x04\x01\x03\x00" + // space ! " # $ % & ' ( ) * + , - . /
	"\x06\x06\x06\x06\x06\x06\x06\x06\x06\x06\x02\x04\x08\x08\x08\x00" + // 0-9 : ; < = > ?
	"\x00\x05\x05\x05\x05\x05\x05\x05\x05\x05\x05\x05\x05\x05\x05\x05" + // @ A-O
	"\x05\x05\x05\x05\x05\x05\x05\x05\x05\x05\x05\x00\x00\x00\x08\x07" + // P-Z [ \ ] ^ _
	"\x00\x05\x05\x05\x05\x05\x05\x05\x05\x05\x05\x05\x05\x05\x05\x05" + // ` a-o
	"\x05\x05\x05\x05\x05\x05\x05\x05\x05\x05\x05\x00\x08\x00\x08\x0a" + // p-z { | } ~ DEL
	"\x09\x09\x09\x09\x09\x09\x09\x09\x09\x09\x09\x09\x09\x09\x09\x09" + // 80-FF: the first byte of a longer rune, or invalid
	"\x09\x09\x09\x09\x09\x09\x09\x09\x09\x09\x09\x09\x09\x09\x09\x09" +
	"\x09\x09\x09\x09\x09\x09\x09\x09\x09\x09\x09\x09\x09\x09\x09\x09" +
	"\x09\x09\x09\x09\x09\x09\x09\x09\x09\x09\x09\x09\x09\x09\x09\x09" +
	"\x09\x09\x09\x09\x09\x09\x09\x09\x09\x09\x09\x09\x09\x09\x09\x09" +
	"\x09\x09\x09\x09\x09\x09\x09\x09\x09\x09\x09\x09\x09\x09\x09\x09" +
	"\x09\x09\x09\x09\x09\x09\x09\x09\x09\x09\x09\x09\x09\x09\x09\x09" +
	"\x09\x09\x09\x09\x09\x09\x09\x09\x09\x09\x09\x09\x09\x09\x09\x09"

// alnumLower holds, for each ASCII letter and digit, its normalized form (A-Z
// lowered), and 0 for every other byte: the inner loop of fusePlain
// (TestFusedTablesMatch checks it against fusedTab).
const alnumLower = "" +
	"\x00\x00\x00\x00\x00\x00\x00\x00\x00\x00\x00\x00\x00\x00\x00\x00" +
	"\x00\x00\x00\x00\x00\x00\x00\x00\x00\x00\x00\x00\x00\x00\x00\x00" +
	"\x00\x00\x00\x00\x00\x00\x00\x00\x00\x00\x00\x00\x00\x00\x00\x00" +
	"\x30\x31\x32\x33\x34\x35\x36\x37\x38\x39\x00\x00\x00\x00\x00\x00" + // 0-9
	"\x00\x61\x62\x63\x64\x65\x66\x67\x68\x69\x6a\x6b\x6c\x6d\x6e\x6f" + // A-O
	"\x70\x71\x72\x73\x74\x75\x76\x77\x78\x79\x7a\x00\x00\x00\x00\x00" + // P-Z
	"\x00\x61\x62\x63\x64\x65\x66\x67\x68\x69\x6a\x6b\x6c\x6d\x6e\x6f" + // a-o
	"\x70\x71\x72\x73\x74\x75\x76\x77\x78\x79\x7a\x00\x00\x00\x00\x00" + // p-z
	"\x00\x00\x00\x00\x00\x00\x00\x00\x00\x00\x00\x00\x00\x00\x00\x00" +
	"\x00\x00\x00\x00\x00\x00\x00\x00\x00\x00\x00\x00\x00\x00\x00\x00" +
	"\x00\x00\x00\x00\x00\x00\x00\x00\x00\x00\x00\x00\x00\x00\x00\x00" +
	"\x00\x00\x00\x00\x00\x00\x00\x00\x00\x00\x00\x00\x00\x00\x00\x00" +
	"\x00\x00\x00\x00\x00\x00\x00\x00\x00\x00\x00\x00\x00\x00\x00\x00" +
	"\x00\x00\x00\x00\x00\x00\x00\x00\x00\x00\x00\x00\x00\x00\x00\x00" +
	"\x00\x00\x00\x00\x00\x00\x00\x00\x00\x00\x00\x00\x00\x00\x00\x00" +
	"\x00\x00\x00\x00\x00\x00\x00\x00\x00\x00\x00\x00\x00\x00\x00\x00"

// fusedRune returns the fused class of the rune at the start of s, whose
// first byte is not ASCII, and its size; the class is fcOut outside the set.
// Every letter and kept symbol of the set is two bytes, and so is its form
// (putForm); the three-byte runes are all punctuation.
func fusedRune(s string) (cl uint8, size int) {
	if len(s) < 2 || s[1]&0xC0 != 0x80 {
		return fcOut, 0
	}
	switch d := s[1]; s[0] {
	case 0xC3: // U+00C0-U+00FF
		if d == 0x97 || d == 0xB7 { // × ÷
			return fcKeep, 2
		}
		return fcLetter, 2
	case 0xC2: // U+0080-U+00BF
		switch d {
		case 0xA2, 0xA3, 0xA4, 0xA5, 0xA6, 0xAC, 0xB0, 0xB1: // ¢ £ ¤ ¥ ¦ ¬ ° ±
			return fcKeep, 2
		case 0xA0, 0xA1, 0xA7, 0xAB, 0xB6, 0xBB, 0xBF: // NBSP ¡ § « ¶ » ¿
			return fcSep, 2
		case 0xB7: // ·
			return fcMidL, 2
		}
	case 0xE2: // U+2000-U+203F
		if len(s) < 3 || d != 0x80 || s[2]&0xC0 != 0x80 {
			return fcOut, 0
		}
		switch s[2] {
		case 0x98, 0x99: // ‘ ’
			return fcMidNL, 3
		case 0x92, 0x93, 0x94, 0x95, 0x9A, 0x9B, 0x9C, 0x9D, 0x9E, 0x9F, 0xA0, 0xA1, 0xA2, 0xA6:
			return fcSep, 3 // ‒ – — ― ‚ ‛ “ ” „ ‟ † ‡ • …
		}
	}
	return fcOut, 0
}

// putForm writes at buf[j:j+2] the normalized form of the two-byte letter
// or kept symbol c d: À-Þ (not ×) lowered by +0x20, ß folded to "ss"
// (CaseFolding.txt: 00DF; F; 0073 0073), the rest as it is (as
// separateLatin does).
func putForm(buf []byte, j int, c, d byte) {
	switch {
	case c == 0xC3 && d == 0x9F:
		c, d = 's', 's'
	case c == 0xC3 && d < 0x9F && d != 0x97:
		d += 0x20
	}
	buf[j], buf[j+1] = c, d
}

// fusedClassAt is the fused class of the rune at s[i:], fcOut past the end.
func fusedClassAt(s string, i int) uint8 {
	if i >= len(s) {
		return fcOut
	}
	cl := fusedTab[s[i]]
	if cl == fcMulti {
		cl, _ = fusedRune(s[i:])
	}
	return cl
}

// midJoins reports whether the mid of class cl at s[i:i+size], after a
// letter or digit of class prev, stays inside the word segment: UAX #29
// WB6/WB7 (letter, MidLetter or MidNumLet, letter) and WB11/WB12 (digit,
// MidNum or MidNumLet, digit), as scanWordsFast applies them.
func midJoins(prev, cl uint8, s string, i, size int) bool {
	switch {
	case prev == fcLetter && cl != fcMidN, prev == fcNum && cl != fcMidL:
		return fusedClassAt(s, i+size) == prev
	}
	return false
}

// fuseSentence appends the normalized form of s to dst (what
// normalizer.append gives) and returns it with the number of words of s
// (what countWords gives), in one pass, when every rune of s is in the
// fused set. Otherwise ok is false and dst is returned as it was.
func fuseSentence(dst []byte, s string) (out []byte, words int, ok bool) {
	base := len(dst)
	// The form is never longer than s: a written rune is as long as its
	// form, and a space stands for at least one separator byte.
	dst = slices.Grow(dst, len(s))
	if j, n, ok := fusePlain(dst[base:base+len(s)], s); ok {
		return dst[:base+j], n, true
	}
	return fuseLatin(dst, s)
}

// fusePlain is fuseLatin for a sentence made only of ASCII and the four
// commonest typographic separators – — “ ” (the English case), into buf
// (as long as s): it returns the length of the form and the word count, or
// ok false at the first byte outside that set. It makes the same decisions
// as fuseLatin, but reads only fusedTab, so that its loops hold no call
// and keep their state in registers. Where a decision would look at a rune
// outside ASCII (the rune after a mid or a hyphen) it takes the answer for
// a rune that is neither letter nor digit, which is right for the four
// separators; for any other rune the sentence is given up when the loop
// reaches it, which it does, since neither answer skips it.
func fusePlain(buf []byte, s string) (j, n int, ok bool) {
	space := false // a separator since the last written byte
	for i := 0; uint(i) < uint(len(s)); {
		// Between word segments.
		cl := fusedTab[s[i]]
		if cl <= fcMidN {
			space = true
			i++
			continue
		}
		if cl >= fcMulti {
			if cl == fcMulti && i+2 < len(s) && s[i] == 0xE2 && s[i+1] == 0x80 {
				if d := s[i+2]; d-0x93 < 2 || d-0x9C < 2 { // – — “ ”
					space = true
					i += 3
					continue
				}
			}
			return 0, 0, false
		}
		if cl == fcKeep {
			if space && j > 0 {
				buf[j] = ' '
				j++
			}
			space = false
			buf[j] = s[i]
			j++
			i++
			continue
		}
		// A word segment starts at i (as in fuseLatin). Every rune of it is
		// one byte, so the class of its last letter, digit or '_' (prev in
		// fuseLatin) is always that of s[i-1].
		wordy := false
		for {
			if cl == fcExt {
				space = true
				i++
			} else {
				if !wordy {
					wordy = true
					n++
				}
				if space {
					if j > 0 {
						buf[j] = ' '
						j++
					}
					space = false
				}
				// The run of letters and digits from i, lowered. As j <= i,
				// w has room for all of r; with len(w) == len(r) the loop
				// needs no bounds check.
				r := s[i:]
				w := buf[j:][:len(r)]
				k := 0
				// Eight bytes at a time while they are letters and single
				// spaces (most of English prose): the form is the bytes
				// lowered, and every space starts a word.
				for k+8 <= len(r) {
					x := load64(r[k:])
					p, spaces := lettersAndSpaces(x)
					// The bytes past p are written too, and overwritten
					// later: j stays at or before i.
					binary.LittleEndian.PutUint64(w[k:k+8], x|swarCase)
					n += spaces
					if p < 8 {
						k += p
						break
					}
					// A constant step: the next load need not wait for p.
					k += 8
				}
				for k < len(r) {
					o := alnumLower[r[k]]
					if o == 0 {
						break
					}
					w[k] = o
					k++
				}
				i += k
				j += k
			}
			if uint(i) >= uint(len(s)) {
				break
			}
			cl = fusedTab[s[i]]
			if fcLetter <= cl && cl <= fcExt {
				continue
			}
			if fcMidL <= cl && cl <= fcMidN && i+1 < len(s) {
				prev, next := fusedTab[s[i-1]], fusedTab[s[i+1]]
				if next == prev && (prev == fcLetter && cl != fcMidN || prev == fcNum && cl != fcMidL) {
					space = true
					i++
					cl = next
					continue
				}
			}
			break
		}
		if cl == fcHyphen && wordy && i+1 < len(s) {
			if next := fusedTab[s[i+1]]; next == fcLetter || next == fcNum {
				n--
			} else if k := lineBreakJoin(s[i+1:]); k > 0 {
				n--
				if fusedTab[s[i-1]] != fcLetter {
					space = true
				}
				i += 1 + k
			}
		}
	}
	return j, n, true
}

// Eight bytes at a time ("SWAR": SIMD within a register). A block is the
// eight bytes from some position read as a little-endian uint64; the tests
// below look at every byte at once with masks whose every byte is the same
// (common practice; the carry-free forms hold because no byte of x has its
// high bit set by then, so no byte sum reaches the next byte).
const (
	swarOnes = 0x0101010101010101
	swarHigh = 0x8080808080808080 // the high bit of every byte
	swarLow7 = 0x7f7f7f7f7f7f7f7f
	swarCase = 0x2020202020202020 // the A-Z lowering bit, and the space
)

// load64 reads s[:8] as a little-endian uint64 (one load: the compiler
// combines the byte reads).
func load64(s string) uint64 {
	_ = s[7]
	return uint64(s[0]) | uint64(s[1])<<8 | uint64(s[2])<<16 | uint64(s[3])<<24 |
		uint64(s[4])<<32 | uint64(s[5])<<40 | uint64(s[6])<<48 | uint64(s[7])<<56
}

// lettersAndSpaces returns the length p of the longest prefix of the block
// x made of ASCII letters and spaces, no two spaces side by side and the
// last byte a letter, and the number of spaces in it. After a letter (or
// at a letter), fusePlain's form of such a prefix is the prefix with A-Z
// lowered (x | swarCase: a space has the bit already), and each space
// starts a word: between two letters a space is a separator written as one
// space, and the letter after it opens a new word segment (UAX #29
// WB3d-WB999: a space is never inside a word).
//
// A byte with the high bit set is neither a letter nor a space below (its
// sp byte has the high bit; b|0x20 plus 0x1f has it or wraps past 0xff),
// so it ends the prefix; the sums may carry out of such a byte, but only
// into the bytes after it, which are not in the prefix.
func lettersAndSpaces(x uint64) (p int, spaces int) {
	y := x | swarCase // A-Z lowered; other bytes may move, but not into a-z
	// A byte b is in 'a'..'z' when b+(0x80-'a') has its high bit set and
	// b+(0x80-'z'-1) has not.
	letters := (y + (0x80-'a')*swarOnes) &^ (y + (0x80-'z'-1)*swarOnes)
	// A byte of sp is zero, a space in x, when neither its low seven bits
	// plus 0x7f nor sp itself reach the high bit.
	sp := x ^ swarCase
	space := ^((sp&swarLow7 + swarLow7) | sp) & swarHigh
	// The prefix ends at the first byte that is neither, or the second of
	// two spaces...
	bad := (^(letters | space) | space<<8&space) & swarHigh
	// ...and at a space before such a byte, or before the block's end.
	// (Of these spaces only the one before the first bad byte can come
	// first.)
	bad |= space & (bad>>8 | 1<<63)
	// bad&-bad is the lowest flag: the prefix is the bytes below it.
	return bits.TrailingZeros64(bad) >> 3, bits.OnesCount64(space & (bad&-bad - 1))
}

// fuseLatin is fuseSentence for any text of the fused set. It follows
// scanWordsFast one word segment at a time, writing each rune's form as it
// goes.
func fuseLatin(dst []byte, s string) (out []byte, words int, ok bool) {
	base := len(dst)
	dst = slices.Grow(dst, len(s))
	buf := dst[base : base+len(s)]
	j := 0         // bytes written to buf
	n := 0         // wordy segments, less the hyphen joins
	space := false // a separator since the last written byte
	for i := 0; i < len(s); {
		// Between word segments.
		cl := fusedTab[s[i]]
		if cl <= fcMidN {
			space = true
			i++
			continue
		}
		size := 1
		if cl == fcMulti {
			cl, size = fusedRune(s[i:])
			if cl <= fcMidN {
				space = true
				i += size
				continue
			}
		}
		if cl == fcOut {
			return dst[:base], 0, false
		}
		if cl == fcKeep {
			if space && j > 0 {
				buf[j] = ' '
				j++
			}
			space = false
			if size == 1 {
				buf[j] = s[i]
			} else {
				putForm(buf, j, s[i], s[i+1])
			}
			j += size
			i += size
			continue
		}
		// A word segment starts at i: extend it by WB5-WB13b. At the top
		// of this loop the rune at i is a letter, digit or '_' of class cl
		// and size size.
		wordy := false // the segment holds a letter or digit
		prev := cl     // class of its last letter, digit or '_'
		for {
			prev = cl
			if cl == fcExt {
				space = true // '_' is punctuation (Pc)
				i += size
			} else {
				if !wordy {
					wordy = true
					n++
				}
				if space {
					if j > 0 {
						buf[j] = ' '
						j++
					}
					space = false
				}
				if size == 1 {
					buf[j] = s[i] | 0x20 // A-Z lowered; a-z and 0-9 have the bit
				} else {
					putForm(buf, j, s[i], s[i+1])
				}
				j += size
				i += size
				for i < len(s) {
					c := s[i]
					k := fusedTab[c]
					if k-fcLetter > fcNum-fcLetter {
						break
					}
					buf[j] = c | 0x20
					j++
					i++
					prev = k
				}
			}
			if i >= len(s) {
				break
			}
			cl, size = fusedTab[s[i]], 1
			if cl == fcMulti {
				cl, size = fusedRune(s[i:])
			}
			if fcLetter <= cl && cl <= fcExt {
				continue
			}
			if fcMidL <= cl && cl <= fcMidN && midJoins(prev, cl, s, i, size) {
				// The mid is a separator in the normalized form; the rune
				// after it is a letter or digit, like prev.
				space = true
				i += size
				cl, size = fusedTab[s[i]], 1
				if cl == fcMulti {
					cl, size = fusedRune(s[i:])
				}
				continue
			}
			break
		}
		// The segment ended before i. A hyphen after it may join the next
		// segment into the same word.
		if cl == fcHyphen && wordy && i < len(s) {
			if next := fusedClassAt(s, i+1); next == fcLetter || next == fcNum {
				n-- // "term-end": the next segment starts the same word
			} else if k := lineBreakJoin(s[i+1:]); k > 0 {
				// "exam-\n ple": one word; prepare drops the hyphen and
				// the break after a letter, else they separate.
				n--
				if prev != fcLetter {
					space = true
				}
				i += 1 + k
			}
		}
	}
	return dst[:base+j], n, true
}
