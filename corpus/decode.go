package corpus

import (
	"bytes"
	"encoding/binary"
	"math/bits"
	"unicode"
	"unicode/utf16"
	"unicode/utf8"

	"golang.org/x/text/encoding/charmap"
)

// Plain-words reasons for files that give no text. They are the Reason of
// a Skipped entry, so they are written for the person reading the list.
const (
	reasonEmpty       = "empty file"
	reasonBlank       = "no text (white space only)"
	reasonMarkupOnly  = "no text (markup only)"
	reasonBinary      = "binary file (not text)"
	reasonUnsupported = "unsupported format"
)

// Encodings, as stored in Document.Encoding.
const (
	encUTF8        = "utf-8"
	encUTF8BOM     = "utf-8-bom"
	encUTF16LE     = "utf-16le"
	encUTF16BE     = "utf-16be"
	encWindows1252 = "windows-1252"
)

const (
	noteUTF16LE = "decoded from UTF-16LE: offsets refer to the decoded UTF-8 text"
	noteUTF16BE = "decoded from UTF-16BE: offsets refer to the decoded UTF-8 text"
	noteCP1252  = "not valid UTF-8: decoded as Windows-1252 (offsets refer to the decoded text)"
	noteBOMBad  = "not valid UTF-8 despite its UTF-8 byte-order mark: mark dropped, decoded as Windows-1252 (offsets refer to the decoded text)"
)

// Byte-order marks.
const (
	bomUTF8    = "\xEF\xBB\xBF"
	bomUTF16LE = "\xFF\xFE"
	bomUTF16BE = "\xFE\xFF"
)

// decoded is a file's content as valid UTF-8.
type decoded struct {
	text     []byte // valid UTF-8; the file's own bytes for "utf-8" and "utf-8-bom"
	encoding string
	note     string // "" when offsets are file offsets
}

func (d decoded) notes() []string {
	if d.note == "" {
		return nil
	}
	return []string{d.note}
}

// decode detects the encoding of raw and returns its text as UTF-8, or a
// refusal. The order of the tests matters:
//
//  1. no bytes: "empty file";
//  2. a UTF-16 byte-order mark (FF FE little-endian, FE FF big-endian):
//     decoded (decodeUTF16), mark dropped, unpaired surrogates become U+FFFD;
//     the binary test then runs on the decoded text;
//  3. the binary test on the raw bytes (looksBinary);
//  4. a UTF-8 byte-order mark followed by valid UTF-8: "utf-8-bom", bytes
//     kept as they are, mark included, so offsets stay file offsets;
//  5. valid UTF-8: "utf-8", bytes kept;
//  6. anything else is taken as Windows-1252, the usual encoding of older
//     Western text files; every byte decodes (the five bytes it leaves
//     undefined become U+FFFD), so the result is always valid UTF-8.
//
// Text that is empty or only white space once decoded is refused. A text
// that decoding makes is written into sc's decoding buffer
// (scratch.decodeBuffer), so a worker decoding a batch of files of one
// size allocates once; nil sc allocates one per call.
func decode(raw []byte, sc *scratch) (decoded, error) {
	if len(raw) == 0 {
		return decoded{}, refuse(reasonEmpty)
	}
	var d decoded
	switch {
	case bytes.HasPrefix(raw, []byte(bomUTF16LE)) || bytes.HasPrefix(raw, []byte(bomUTF16BE)):
		big, enc, note := false, encUTF16LE, noteUTF16LE
		if raw[0] == 0xFE {
			big, enc, note = true, encUTF16BE, noteUTF16BE
		}
		src := raw[len(bomUTF16LE):]
		text := decodeUTF16(sc.decodeBuffer(utf16Len(src, big)), src, big)
		if len(text) == 0 {
			return decoded{}, refuse(reasonEmpty)
		}
		if looksBinary(text) {
			return decoded{}, refuse(reasonBinary)
		}
		d = decoded{text: text, encoding: enc, note: note}
	case looksBinary(raw):
		return decoded{}, refuse(reasonBinary)
	case bytes.HasPrefix(raw, []byte(bomUTF8)):
		if len(raw) == len(bomUTF8) {
			return decoded{}, refuse(reasonEmpty)
		}
		if utf8.Valid(raw) {
			d = decoded{text: raw, encoding: encUTF8BOM}
		} else {
			d = decoded{text: fromWindows1252(sc, raw[len(bomUTF8):]), encoding: encWindows1252, note: noteBOMBad}
		}
	case utf8.Valid(raw):
		d = decoded{text: raw, encoding: encUTF8}
	default:
		d = decoded{text: fromWindows1252(sc, raw), encoding: encWindows1252, note: noteCP1252}
	}
	if onlySpace(d.text) {
		return decoded{}, refuse(reasonBlank)
	}
	return d, nil
}

// fromWindows1252 decodes raw, which need not be valid in any encoding:
// Windows-1252 maps every byte (x/text's table, charmap.Windows1252, maps
// the five bytes the code page leaves undefined to U+FFFD). The text is
// measured first, so it is written into a buffer of its exact size.
func fromWindows1252(sc *scratch, raw []byte) []byte {
	m := charmap.Windows1252
	n := len(raw)
	for _, c := range raw {
		if c >= utf8.RuneSelf {
			n += utf8.RuneLen(m.DecodeByte(c)) - 1
		}
	}
	text := sc.decodeBuffer(n)
	for _, c := range raw {
		if c < utf8.RuneSelf {
			text = append(text, c)
		} else {
			text = utf8.AppendRune(text, m.DecodeByte(c))
		}
	}
	return text
}

// utf16Len is the length in UTF-8 of the UTF-16 text src (big-endian when
// big) as decodeUTF16 decodes it.
func utf16Len(src []byte, big bool) int {
	lo, hi := 0, 1
	if big {
		lo, hi = 1, 0
	}
	n := 0
	for i := 0; i+1 < len(src); i += 2 {
		switch u := rune(src[i+hi])<<8 | rune(src[i+lo]); {
		case u < 0x80:
			n++
		case u < 0x800:
			n += 2
		case utf16.IsSurrogate(u) && i+3 < len(src):
			n += 3 // U+FFFD, unless a pair
			if v := rune(src[i+2+hi])<<8 | rune(src[i+2+lo]); v >= 0xDC00 && v < 0xE000 {
				if u < 0xDC00 {
					n++ // a pair: one character of four bytes
				}
				i += 2
			}
		default: // the rest of the BMP, and a surrogate last as U+FFFD
			n += 3
		}
	}
	if len(src)%2 == 1 {
		n += 3 // a lone last byte: U+FFFD
	}
	return n
}

// decodeUTF16 appends to dst the UTF-8 of the UTF-16 text src (big-endian
// when big, no byte-order mark), as x/text's UTF-16 decoder does (the
// differential test, TestUTF16MatchesXText): a surrogate pair is one
// character (RFC 2781, 2.2), an unpaired surrogate and a lone last byte
// are U+FFFD, and a U+FEFF after the first is kept. As in x/text, any
// surrogate followed by a low surrogate takes both units, so two low
// surrogates in a row are one U+FFFD: the texts read before this decoder
// replaced x/text's stay the same. By hand rather than
// with x/text so that the text goes into the worker's buffer: x/text's
// Bytes allocates its own and grows it as it goes.
func decodeUTF16(dst, src []byte, big bool) []byte {
	lo, hi := 0, 1
	if big {
		lo, hi = 1, 0
	}
	for i := 0; i+1 < len(src); i += 2 {
		u := rune(src[i+hi])<<8 | rune(src[i+lo])
		switch {
		case u < utf8.RuneSelf:
			dst = append(dst, byte(u))
			continue
		case !utf16.IsSurrogate(u):
		case i+3 < len(src):
			if v := rune(src[i+2+hi])<<8 | rune(src[i+2+lo]); v >= 0xDC00 && v < 0xE000 {
				u = utf16.DecodeRune(u, v) // U+FFFD for two low surrogates
				i += 2
			} else {
				u = utf8.RuneError
			}
		default:
			u = utf8.RuneError
		}
		dst = utf8.AppendRune(dst, u)
	}
	if len(src)%2 == 1 {
		dst = utf8.AppendRune(dst, utf8.RuneError)
	}
	return dst
}

// Binary test. A file is binary when it contains a NUL byte anywhere
// (after UTF-16 decoding, for UTF-16 files) or when more than
// binaryControlShare of the bytes in its first sniffLen (8 KiB) are C0
// control characters other than tab, line feed, form feed and carriage
// return (DEL counts as a control). Text in any single-byte or UTF-8
// encoding almost never has either; executables, images and archives
// almost always have NUL bytes early. The share (1 in 10) leaves room for
// terminal colour escapes in logs, about 1 byte in 25 (threshold chosen
// here; the NUL rule is common practice).
const binaryControlShare = 10 // more than 1 in binaryControlShare

// looksBinary applies the binary test. bytes.IndexByte (vectorised in the
// runtime) looks for a NUL. The share of controls is first bounded from
// above by lowBytes, a branch-free count of a superset of them (tabs and
// line ends too); only when that bound is over the threshold, which text
// reaches only when one byte in ten is a tab or a line end (lines of under
// ten bytes), are the controls counted one by one.
func looksBinary(b []byte) bool {
	if bytes.IndexByte(b, 0) >= 0 {
		return true
	}
	head := b[:min(len(b), sniffLen)]
	if lowBytes(head)*binaryControlShare <= len(head) {
		return false
	}
	controls := 0
	for _, c := range head {
		if isControl(c) {
			controls++
		}
	}
	return controls*binaryControlShare > len(head)
}

// isControl: the bytes the binary test counts.
func isControl(c byte) bool {
	return (c < 0x20 && c != '\t' && c != '\n' && c != '\f' && c != '\r') || c == 0x7F
}

// Constants of the word-at-a-time byte test: every byte 0x01, every byte
// 0x80.
const (
	byteOnes  = 0x0101010101010101
	byteHighs = 0x8080808080808080
)

// lowBytes counts the bytes of b below 0x20 or equal to 0x7F: the
// controls isControl counts, and tab, line feed, form feed and carriage
// return. It reads eight bytes at a time with no branch. For a byte c
// below 0x80, c is counted exactly when (c+1)&0x7F is below 0x21 (0x7F
// wraps to 0); with the high bit of each byte cleared before adding 1 and
// set before subtracting 0x21, no carry or borrow leaves its byte, so the
// high bit of each byte of t is clear exactly for those bytes; bytes of
// 0x80 and above are masked out by their own high bit in x (the
// technique of Hacker's Delight, 6-1, from memory). TestLowBytes compares
// it with a byte-by-byte count.
func lowBytes(b []byte) int {
	n := 0
	for len(b) >= 8 {
		x := binary.LittleEndian.Uint64(b)
		y := (x &^ byteHighs) + byteOnes
		t := (y | byteHighs) - 0x21*byteOnes
		n += bits.OnesCount64(^(t | x) & byteHighs)
		b = b[8:]
	}
	for _, c := range b {
		if c < 0x20 || c == 0x7F {
			n++
		}
	}
	return n
}

// onlySpace reports whether valid UTF-8 text holds nothing but white space
// and byte-order marks.
func onlySpace(text []byte) bool {
	for len(text) > 0 {
		c := text[0]
		if c < utf8.RuneSelf {
			if c != ' ' && c != '\t' && c != '\n' && c != '\r' && c != '\f' && c != '\v' {
				return false
			}
			text = text[1:]
			continue
		}
		r, n := utf8.DecodeRune(text)
		if r != '\uFEFF' && !unicode.IsSpace(r) {
			return false
		}
		text = text[n:]
	}
	return true
}
