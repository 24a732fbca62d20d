package shingle

import (
	"bytes"
	"encoding/binary"
	"slices"
	"testing"
	"unicode/utf8"
)

// FuzzSentences feeds arbitrary bytes, invalid UTF-8 included, to Sentences
// with the default options and with small ones (so that cutting happens),
// and checks the span invariants.
func FuzzSentences(f *testing.F) {
	for _, seed := range []string{
		"", " ", "\n\n", "One two three four five. Six seven eight nine ten!",
		"wrapped line one\nline two.\r\n\r\nNext paragraph here now.",
		"\uFEFFno punctuation\nat all\rhere", "exam-\n  ple words go here.",
		"\xff\xfe bad bytes. \xe2\x80 half a rune. \xf0\x9f\x98",
		"今日は晴れ。明日は雨。", "a.b.c.d.e.f. ... !!! ???", "“Quoted,” she said. ‘Yes.’",
	} {
		f.Add(seed)
	}
	splitters := []*Splitter{New(Options{}), New(Options{MinWords: 1, MaxUnitBytes: 7})}
	f.Fuzz(func(t *testing.T, text string) {
		for _, sp := range splitters {
			units, st := sp.Sentences(text, nil)
			checkUnits(t, sp, text, units, st)
		}
	})
}

// checkUnits asserts what Sentences promises for any input.
func checkUnits(t *testing.T, sp *Splitter, text string, units []Unit, st Stats) {
	t.Helper()
	// Positions where forward UTF-8 decoding starts a rune (or lone byte).
	boundary := make([]bool, len(text)+1)
	for i := 0; i < len(text); {
		boundary[i] = true
		_, size := utf8.DecodeRuneInString(text[i:])
		i += size
	}
	boundary[len(text)] = true
	opt := sp.Options()
	prevEnd := uint32(0)
	for i, u := range units {
		if u.Start >= u.End || int(u.End) > len(text) {
			t.Fatalf("unit %d: span [%d,%d) empty or out of %d bytes", i, u.Start, u.End, len(text))
		}
		if u.Start < prevEnd {
			t.Fatalf("unit %d: starts at %d, before the previous end %d", i, u.Start, prevEnd)
		}
		prevEnd = u.End
		if !boundary[u.Start] || !boundary[u.End] {
			t.Fatalf("unit %d: span [%d,%d) not on UTF-8 boundaries", i, u.Start, u.End)
		}
		s := text[u.Start:u.End]
		if r, _ := utf8.DecodeRuneInString(s); r != utf8.RuneError && isTrimmable(r) {
			t.Fatalf("unit %d: %q starts with white space", i, s)
		}
		if r, _ := utf8.DecodeLastRuneInString(s); r != utf8.RuneError && isTrimmable(r) {
			t.Fatalf("unit %d: %q ends with white space", i, s)
		}
		if len(s) > opt.MaxUnitBytes && utf8.RuneCountInString(s) > 1 {
			t.Fatalf("unit %d: %d bytes, over MaxUnitBytes %d", i, len(s), opt.MaxUnitBytes)
		}
		if int(u.Words) < opt.MinWords || int(u.Words) != CountWords(s) {
			t.Fatalf("unit %d: Words %d, CountWords %d, MinWords %d", i, u.Words, CountWords(s), opt.MinWords)
		}
		if u.Hash != Fingerprint(Normalize(nil, s)) {
			t.Fatalf("unit %d: hash is not the fingerprint of the normalized span", i)
		}
	}
	if len(units) != st.Sentences-st.Short || st.Short < 0 || st.Cut > st.Sentences {
		t.Fatalf("%d units but stats %+v", len(units), st)
	}
}

// FuzzDecodeUnits: DecodeUnits never panics on any bytes (a damaged archive
// or spool feeds it), and what it accepts is exactly what AppendUnits
// writes for the units it returns.
func FuzzDecodeUnits(f *testing.F) {
	units, _ := New(Options{}).Sentences(benchText(2<<10), nil)
	f.Add(AppendUnits(nil, units))
	f.Add(AppendUnits(nil, nil))
	f.Add(AppendUnits(nil, []Unit{{Hash: 1, Start: 4294967295, End: 0, Words: 7, Pos: 3}, {Start: 2}}))
	f.Add(AppendUnits(nil, []Unit{{Start: 1<<32 - 10, End: 1<<32 - 5}, {Start: 1<<32 - 5, End: 1<<32 - 5}})) // spans at the top of uint32
	f.Add([]byte{UnitLayout, 0x80, 0x00})
	f.Add(make([]byte, 20))
	f.Fuzz(func(t *testing.T, src []byte) {
		got, err := DecodeUnits(src, nil)
		if err != nil {
			if len(got) != 0 {
				t.Fatalf("error %v, but %d units returned", err, len(got))
			}
			return
		}
		if again := AppendUnits(nil, got); !bytes.Equal(again, src) {
			t.Fatalf("% x decodes to %d units that encode to % x", src, len(got), again)
		}
	})
}

// FuzzUnitsRoundTrip: any units, read from the fuzzer's bytes 24 at a time
// (any field values, in any order), decode to themselves.
func FuzzUnitsRoundTrip(f *testing.F) {
	f.Add([]byte{})
	f.Add(bytes.Repeat([]byte{0xff}, 48))
	f.Add([]byte("The committee met on a grey morning to weigh the proposal, which"))
	f.Fuzz(func(t *testing.T, raw []byte) {
		var units []Unit
		for ; len(raw) >= 24; raw = raw[24:] {
			units = append(units, Unit{
				Hash:  binary.LittleEndian.Uint64(raw),
				Start: binary.LittleEndian.Uint32(raw[8:]),
				End:   binary.LittleEndian.Uint32(raw[12:]),
				Words: binary.LittleEndian.Uint32(raw[16:]),
				Pos:   binary.LittleEndian.Uint32(raw[20:]),
			})
		}
		prefix := []Unit{{Hash: 99}}
		got, err := DecodeUnits(AppendUnits([]byte{}, units), prefix)
		if err != nil {
			t.Fatal(err)
		}
		if !slices.Equal(got[1:], units) || got[0] != prefix[0] {
			t.Fatalf("%d units came back as %d, differing", len(units), len(got)-1)
		}
	})
}
