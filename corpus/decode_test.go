package corpus

import (
	"errors"
	"math/rand/v2"
	"strings"
	"testing"
	"unicode/utf8"

	"golang.org/x/text/encoding/charmap"
	"golang.org/x/text/encoding/unicode"
)

// encodeUTF16 encodes s as UTF-16 with a byte-order mark, with x/text's
// encoder, to build the files the decoder must accept.
func encodeUTF16(t testing.TB, s string, order unicode.Endianness) []byte {
	t.Helper()
	b, err := unicode.UTF16(order, unicode.UseBOM).NewEncoder().Bytes([]byte(s))
	if err != nil {
		t.Fatal(err)
	}
	return b
}

func TestDecode(t *testing.T) {
	const sample = "Grüße, “quoted” — naïve café.\r\nSecond line.\n"
	le, be := encodeUTF16(t, sample, unicode.LittleEndian), encodeUTF16(t, sample, unicode.BigEndian)
	tests := []struct {
		name     string
		raw      []byte
		text     string
		encoding string
		note     string
	}{
		{"valid UTF-8 is kept byte for byte, CR included", []byte(sample), sample, "utf-8", ""},
		{"a UTF-8 byte-order mark is kept in the text", []byte("\xEF\xBB\xBF" + sample), "\xEF\xBB\xBF" + sample, "utf-8-bom", ""},
		// The BOM bytes FF FE / FE FF: Unicode Standard, section 23.8 (from memory).
		{"UTF-16LE with a mark is decoded and the mark dropped", le, sample, "utf-16le", noteUTF16LE},
		{"UTF-16BE with a mark is decoded and the mark dropped", be, sample, "utf-16be", noteUTF16BE},
		// Windows-1252: 0x93 = U+201C, 0x94 = U+201D, 0xE9 = U+00E9, 0x80 = U+20AC
		// (Microsoft code page 1252 table, from memory).
		{"bytes that are not UTF-8 are read as Windows-1252",
			[]byte("\x93Caf\xe9\x94 costs 5\x80.\n"), "“Café” costs 5€.\n", "windows-1252", noteCP1252},
		{"a UTF-8 mark before invalid UTF-8 is dropped and the rest read as Windows-1252",
			[]byte("\xEF\xBB\xBFcaf\xe9\n"), "café\n", "windows-1252", noteBOMBad},
		{"UTF-16 with an unpaired surrogate gets U+FFFD",
			[]byte{0xFF, 0xFE, 'a', 0, 0x00, 0xD8, 'b', 0}, "a\uFFFDb", "utf-16le", noteUTF16LE},
		{"a few control bytes do not make a file binary",
			[]byte("\x1b[31mred\x1b[0m text in a log line\n"), "\x1b[31mred\x1b[0m text in a log line\n", "utf-8", ""},
		{"form feeds are text", []byte("page one\fpage two\n"), "page one\fpage two\n", "utf-8", ""},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			d, err := decode(tc.raw, nil)
			if err != nil {
				t.Fatalf("decode: %v", err)
			}
			if string(d.text) != tc.text || d.encoding != tc.encoding || d.note != tc.note {
				t.Errorf("decode = (%q, %q, %q), want (%q, %q, %q)", d.text, d.encoding, d.note, tc.text, tc.encoding, tc.note)
			}
		})
	}
}

func TestDecodeRefuses(t *testing.T) {
	tests := []struct {
		name   string
		raw    []byte
		reason string
	}{
		{"no bytes", nil, reasonEmpty},
		{"only white space, Unicode spaces too", []byte(" \t\r\n\u00a0\u3000\n"), reasonBlank},
		{"a NUL byte late in the file", []byte(strings.Repeat("text ", 5000) + "\x00"), reasonBinary},
		// NUL bytes mark binary files: common practice.
		{"UTF-16 without a mark has NUL bytes", []byte("h\x00i\x00"), reasonBinary},
		{"more than one byte in ten a control byte", []byte(strings.Repeat("abcdefgh\x01", 10)), reasonBinary},
		{"UTF-16 that decodes to NUL", []byte{0xFF, 0xFE, 'a', 0, 0, 0}, reasonBinary},
		{"UTF-16 of only spaces", []byte{0xFE, 0xFF, 0, ' ', 0, '\n'}, reasonBlank},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			_, err := decode(tc.raw, nil)
			var r *refusal
			if !errors.As(err, &r) || r.reason != tc.reason {
				t.Errorf("decode error = %v, want refusal %q", err, tc.reason)
			}
		})
	}
}

// TestBinaryThreshold pins the documented rule: more than one control
// byte in ten is binary, one in ten exactly is not.
func TestBinaryThreshold(t *testing.T) {
	for _, tc := range []struct {
		name     string
		controls int
		want     bool
	}{
		{"10 in 100 is text", 10, false},
		{"11 in 100 is binary", 11, true},
	} {
		t.Run(tc.name, func(t *testing.T) {
			b := []byte(strings.Repeat("x", 100))
			for i := range tc.controls {
				b[i*9] = 0x07
			}
			if got := looksBinary(b); got != tc.want {
				t.Errorf("looksBinary = %v, want %v", got, tc.want)
			}
		})
	}
}

func FuzzDecode(f *testing.F) {
	f.Add([]byte("plain"))
	f.Add([]byte("\xEF\xBB\xBFbom"))
	f.Add([]byte("\xFF\xFEa\x00"))
	f.Add([]byte("\xFE\xFF\x00a\xD8\x00"))
	f.Add([]byte("caf\xe9 \x93q\x94"))
	f.Add([]byte("\x00\x01"))
	seedHostile(f, "text")
	f.Fuzz(func(t *testing.T, raw []byte) {
		d, err := decode(raw, nil)
		if err != nil {
			var r *refusal
			if !errors.As(err, &r) {
				t.Fatalf("decode returned a non-refusal error: %v", err)
			}
			return
		}
		if !utf8.Valid(d.text) {
			t.Fatalf("decoded text is not valid UTF-8: %q", d.text)
		}
		if (d.encoding == encUTF8 || d.encoding == encUTF8BOM) && string(d.text) != string(raw) {
			t.Fatalf("%s text differs from the file", d.encoding)
		}
		if onlySpace(d.text) {
			t.Fatalf("white-space-only text accepted: %q", d.text)
		}
	})
}

func BenchmarkDecode(b *testing.B) {
	para := "It was the best of times, it was the worst of times; “quoted” text, naïve café.\n"
	utf := []byte(strings.Repeat(para, 4000))
	cp := []byte(strings.Repeat("It was the best of times, \x93quoted\x94 caf\xe9.\n", 8000))
	for _, bc := range []struct {
		name string
		raw  []byte
	}{{"utf-8", utf}, {"windows-1252", cp}, {"utf-16le", encodeUTF16(b, string(utf), unicode.LittleEndian)}} {
		b.Run(bc.name, func(b *testing.B) {
			b.SetBytes(int64(len(bc.raw)))
			for b.Loop() {
				if _, err := decode(bc.raw, nil); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}

// TestUTF16MatchesXText: decodeUTF16 gives the bytes x/text's UTF-16
// decoder gives (golang.org/x/text/encoding/unicode, the reference here),
// and utf16Len their length, on both byte orders, for edge cases
// (surrogate pairs, unpaired high and low surrogates, a high surrogate
// last, a lone last byte, a U+FEFF after the mark) and for random bytes
// drawn so that surrogates are frequent.
func TestUTF16MatchesXText(t *testing.T) {
	cases := [][]byte{
		{}, {'a'}, {'a', 0}, {0x3D, 0xD8, 0x00, 0xDE}, // U+1F600 as a pair (little-endian)
		{0x00, 0xD8}, {0x00, 0xDC, 'a', 0}, {0x00, 0xD8, 'a', 0}, {0x00, 0xD8, 0x00, 0xD8, 0x00, 0xDC},
		{0x00, 0xD8, 'x'}, {0xFF, 0xFE, 'a', 0}, {0xE9, 0, 0x1C, 0x20, 0xFF, 0xFF, 0x00, 0x08},
	}
	rng := rand.New(rand.NewPCG(17, 4))
	for range 2000 {
		b := make([]byte, rng.IntN(40))
		for k := range b {
			switch rng.IntN(4) {
			case 0:
				b[k] = byte(0xD8 + rng.IntN(8)) // a surrogate's high byte
			case 1:
				b[k] = byte(rng.IntN(0x80))
			default:
				b[k] = byte(rng.IntN(256))
			}
		}
		cases = append(cases, b)
	}
	for _, order := range []unicode.Endianness{unicode.LittleEndian, unicode.BigEndian} {
		big := order == unicode.BigEndian
		for _, src := range cases {
			want, err := unicode.UTF16(order, unicode.IgnoreBOM).NewDecoder().Bytes(src)
			if err != nil {
				t.Fatalf("x/text on % x: %v", src, err)
			}
			got := decodeUTF16(nil, src, big)
			if string(got) != string(want) {
				t.Fatalf("big-endian %v, % x: got %q, x/text %q", big, src, got, want)
			}
			if n := utf16Len(src, big); n != len(want) {
				t.Fatalf("big-endian %v, % x: utf16Len %d, decoded %d bytes", big, src, n, len(want))
			}
		}
	}
}

// TestWindows1252MatchesXText: fromWindows1252 gives what x/text's
// Windows-1252 decoder gives (golang.org/x/text/encoding/charmap, the
// reference here) for every byte value and for random bytes.
func TestWindows1252MatchesXText(t *testing.T) {
	all := make([]byte, 256)
	for k := range all {
		all[k] = byte(k)
	}
	cases := [][]byte{all}
	rng := rand.New(rand.NewPCG(12, 52))
	for range 500 {
		b := make([]byte, rng.IntN(60))
		for k := range b {
			b[k] = byte(rng.IntN(256))
		}
		cases = append(cases, b)
	}
	for _, raw := range cases {
		want, err := charmap.Windows1252.NewDecoder().Bytes(raw)
		if err != nil {
			t.Fatal(err)
		}
		if got := fromWindows1252(nil, raw); string(got) != string(want) || cap(got) != len(want) {
			t.Fatalf("% x: got %q (capacity %d), x/text %q", raw, got, cap(got), want)
		}
	}
}

// TestDecodeBufferLifetime: a worker's decoding buffer is written again
// only after done says no document kept the text it holds; a kept text
// stays as it was, and a second text of one file (a ZIP member) gets a
// buffer of its own.
func TestDecodeBufferLifetime(t *testing.T) {
	first := encodeUTF16(t, "the first text of the batch\n", unicode.LittleEndian)
	second := encodeUTF16(t, "a second one, of a like size\n", unicode.LittleEndian)
	var sc scratch
	d1, err := decode(first, &sc)
	if err != nil {
		t.Fatal(err)
	}
	d2, err := decode(second, &sc) // the same file: must not share d1's buffer
	if err != nil {
		t.Fatal(err)
	}
	if overlaps(d1.text, d2.text[:cap(d2.text)]) || string(d1.text) != "the first text of the batch\n" {
		t.Fatalf("two texts of one file share a buffer: %q, %q", d1.text, d2.text)
	}
	sc.done(nil, true) // kept: neither buffer comes back
	d3, err := decode(first, &sc)
	if err != nil {
		t.Fatal(err)
	}
	if overlaps(d3.text[:cap(d3.text)], d2.text[:cap(d2.text)]) || overlaps(d3.text[:cap(d3.text)], d1.text[:cap(d1.text)]) {
		t.Fatal("a kept text's buffer was reused")
	}
	sc.done(nil, false)           // given back: the next file decodes into it
	d4, err := decode(first, &sc) // the same size: d3's buffer serves
	if err != nil {
		t.Fatal(err)
	}
	if !overlaps(d4.text, d3.text[:cap(d3.text)]) {
		t.Error("a buffer given back was not reused")
	}
	if string(d4.text) != "the first text of the batch\n" {
		t.Errorf("text %q", d4.text)
	}
}
