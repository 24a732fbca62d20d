package shingle

import (
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
