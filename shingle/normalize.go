package shingle

import (
	"unicode"
	"unicode/utf8"

	"golang.org/x/text/cases"
	"golang.org/x/text/transform"
	"golang.org/x/text/unicode/norm"
)

// Normalize appends to dst the normalized form of sentence, the form whose
// fingerprint decides whether two sentences are the same (see the package
// comment). It allocates its scratch space on every call; a Splitter reuses
// its own.
func Normalize(dst []byte, sentence string) []byte {
	n := newNormalizer()
	return n.append(dst, sentence)
}

// A normalizer holds the case folder and the scratch buffers of Normalize.
type normalizer struct {
	fold cases.Caser
	a, b []byte
}

func newNormalizer() normalizer {
	return normalizer{fold: cases.Fold()}
}

// append appends the normalized form of s to dst, in four steps:
//
//  1. drop format characters (Cf: soft hyphen, BOM, zero-width space, ...),
//     join words hyphenated across a line break, replace invalid UTF-8 by
//     U+FFFD;
//  2. NFKC;
//  3. full case folding, then NFKC again if folding left the text
//     unnormalized (as for U+0130, whose folding adds a combining mark);
//  4. punctuation (P*), white space, control characters and the grave
//     accent used as a quote become separators; runs of separators become
//     one space; none at either end.
//
// Text that is ASCII after step 1 skips steps 2 and 3: for ASCII, NFKC is the
// identity and folding is lowering A-Z.
func (n *normalizer) append(dst []byte, s string) []byte {
	return n.appendPath(dst, s, false)
}

// appendPath is append; full forces steps 2 and 3 on ASCII text too, so
// that tests can check the shortcut against them.
func (n *normalizer) appendPath(dst []byte, s string, full bool) []byte {
	if !full {
		// Every rune known to the script table: steps 1-4 in one pass
		// (scripts.go).
		if out, ok := scriptNormal(dst, s); ok {
			return out
		}
	}
	var ascii bool
	n.a, ascii = prepare(n.a[:0], s)
	src := n.a
	if !ascii && !full && isLatinNormal(src) {
		// Latin text: steps 2-4 fused, exact on latinNormal's set (fast.go).
		return separateLatin(dst, src)
	}
	if !ascii || full {
		n.b = norm.NFKC.Append(n.b[:0], n.a...)
		n.a = transformAppend(n.fold, n.a[:0], n.b)
		src = n.a
		if !norm.NFKC.IsNormal(src) {
			n.b = norm.NFKC.Append(n.b[:0], n.a...)
			src = n.b
		}
	}
	return separate(dst, src)
}

// prepare is step 1 of normalizer.append. It reports whether the result is
// all ASCII.
func prepare(dst []byte, s string) ([]byte, bool) {
	ascii := true
	prevLetter := false
	for i := 0; i < len(s); {
		c := s[i]
		if c < utf8.RuneSelf {
			if (c == '-') && prevLetter {
				if k := lineBreakJoin(s[i+1:]); k > 0 {
					i += 1 + k
					continue
				}
			}
			dst = append(dst, c)
			prevLetter = 'a' <= c && c <= 'z' || 'A' <= c && c <= 'Z'
			i++
			continue
		}
		r, size := utf8.DecodeRuneInString(s[i:])
		switch {
		case r == utf8.RuneError && size == 1:
			dst = utf8.AppendRune(dst, utf8.RuneError)
			prevLetter = false
		case unicode.Is(unicode.Cf, r):
			// dropped; the letter before it still counts for a hyphen after
		case (r == 0x2010) && prevLetter && lineBreakJoin(s[i+size:]) > 0:
			i += size + lineBreakJoin(s[i+size:])
			continue
		default:
			dst = append(dst, s[i:i+size]...)
			prevLetter = unicode.IsLetter(r)
		}
		ascii = false
		i += size
	}
	return dst, ascii
}

// separate is step 4 of normalizer.append: it copies runes of src to dst,
// turning runs of separators into one space and lowering ASCII A-Z (a no-op
// after case folding, needed on the ASCII path).
func separate(dst []byte, src []byte) []byte {
	start := len(dst)
	space := false
	for i := 0; i < len(src); {
		c := src[i]
		if c < utf8.RuneSelf {
			i++
			switch {
			case 'A' <= c && c <= 'Z':
				c += 'a' - 'A'
			case 'a' <= c && c <= 'z' || '0' <= c && c <= '9':
			case isASCIISeparator(c):
				space = true
				continue
			}
			if space && len(dst) > start {
				dst = append(dst, ' ')
			}
			space = false
			dst = append(dst, c)
			continue
		}
		r, size := utf8.DecodeRune(src[i:])
		switch {
		case unicode.Is(unicode.Cf, r):
		case unicode.IsPunct(r) || unicode.IsSpace(r) || unicode.IsControl(r):
			space = true
		default:
			if space && len(dst) > start {
				dst = append(dst, ' ')
			}
			space = false
			dst = append(dst, src[i:i+size]...)
		}
		i += size
	}
	return dst
}

// isASCIISeparator: ASCII punctuation (P*), white space, control characters,
// and the grave accent (Sk, but used as an opening quote). The other ASCII
// symbols ($ + < = > ^ | ~) are kept.
func isASCIISeparator(c byte) bool {
	switch c {
	case '$', '+', '<', '=', '>', '^', '|', '~':
		return false
	}
	return c <= ' ' || c == 0x7f || c >= '!' && c <= '/' || c >= ':' && c <= '@' ||
		c >= '[' && c <= '`' || c >= '{' && c <= '~'
}

// transformAppend appends t's transformation of src to dst.
func transformAppend(t transform.Transformer, dst, src []byte) []byte {
	t.Reset()
	for {
		if cap(dst)-len(dst) < len(src)+utf8.UTFMax {
			grown := make([]byte, len(dst), 2*cap(dst)+len(src)+16)
			copy(grown, dst)
			dst = grown
		}
		nDst, nSrc, err := t.Transform(dst[len(dst):cap(dst)], src, true)
		dst = dst[:len(dst)+nDst]
		src = src[nSrc:]
		switch err {
		case nil:
			return dst
		case transform.ErrShortDst:
			grown := make([]byte, len(dst), 2*cap(dst)+16)
			copy(grown, dst)
			dst = grown
		default:
			// The case folder reports no other error with atEOF set;
			// should one appear, keep the rest unfolded rather than lose it.
			return append(dst, src...)
		}
	}
}
