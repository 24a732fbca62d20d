package shingle

import (
	"strings"
	"testing"

	"pgregory.net/rapid"
)

// unwrapBytewise is unwrap as it was before it searched with
// bytes.IndexByte: one byte at a time. It is the reference of TestUnwrap.
func unwrapBytewise(dst []byte, text string) []byte {
	base := len(dst)
	dst = append(dst, text...)
	b := dst[base:]
	for i := 0; i < len(b); {
		if c := b[i]; c != '\n' && c != '\r' {
			i++
			continue
		}
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
		i = j
	}
	return dst
}

// TestUnwrap compares unwrap with the byte-at-a-time version on short lines
// (a break right after the last run), CR, CRLF and blank lines, by hand and
// on random texts.
func TestUnwrap(t *testing.T) {
	check := func(t fataler, text string) {
		t.Helper()
		got := unwrap([]byte("prefix"), text)
		want := unwrapBytewise([]byte("prefix"), text)
		if string(got) != string(want) {
			t.Fatalf("unwrap(%q) = %q, want %q", text, got[6:], want[6:])
		}
	}
	for _, s := range []string{
		"", "\n", "\r", "\r\n", "a\nb\nc\nd", "a\rb\rc", "a\r\nb\r\nc", "a\n\nb\nc", "a\n \t\nb",
		"x\n\ry", "x\r\r\ny", " \n \n ", "one line\nanother\r\n\r\nnew para\rlast",
	} {
		check(t, s)
	}
	rapid.Check(t, func(rt *rapid.T) {
		check(rt, rapid.StringOf(rapid.SampledFrom([]rune("ab \t\n\r\n\r\v\f"))).Draw(rt, "text"))
	})
}

// TestTrimmableRuneMatches checks the table's answer to isTrimmable (Go's
// unicode tables: White_Space and General_Category Cf) on every code point.
func TestTrimmableRuneMatches(t *testing.T) {
	for r := rune(0); r <= 0x10FFFF; r++ {
		if got, want := trimmableRune(r), isTrimmable(r); got != want {
			t.Fatalf("U+%04X: trimmableRune %v, isTrimmable %v", r, got, want)
		}
	}
}

// TestHasTerminatorMatches checks hasTerminator against isTerminator (Go's
// unicode tables: Sentence_Terminal, and the four ATerm code points of UAX
// #29 table 4) for every code point between two-byte letters, and on
// invalid UTF-8.
func TestHasTerminatorMatches(t *testing.T) {
	for r := rune(0); r <= 0x10FFFF; r++ {
		if 0xD800 <= r && r <= 0xDFFF {
			continue
		}
		if got, want := hasTerminator("\u0436"+string(r)+"\u0436"), isTerminator(r); got != want {
			t.Fatalf("U+%04X: hasTerminator %v, isTerminator %v", r, got, want)
		}
	}
	for _, s := range []string{"\xd0", "\xd0.", "\xd0\xd0", "a\xe0\x80\x80", "\xc2\x85", "\xe0\x80\xae",
		"\xed\xa0\x80", "\xe3\x80", "\xe3\x80\x82", "\xe3\x80\x82"[:2]} {
		want := strings.ContainsAny(s, ".!?") || strings.Contains(s, "\u3002")
		if got := hasTerminator(s); got != want {
			t.Errorf("%q: hasTerminator %v, want %v", s, got, want)
		}
	}
}
