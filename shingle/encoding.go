package shingle

// The binary encoding of a list of units, shared by everything that stores
// units or sends them between processes (the archive, the scan's unit spool,
// the Beam pipeline), so that one layout is written and read in one place.
//
// The simple layout is fixed width: the five fields of Unit, 24 bytes a
// unit. It decodes at memory speed but spends most of its bytes on zeros:
// within one document the spans ascend and the word positions ascend, so
// the differences between neighbours are small. The fingerprint is random
// and takes its 8 bytes whatever one does. So layout 1 keeps the
// fingerprint fixed and writes the other four fields as unsigned varints of
// differences:
//
//	byte     the layout, UnitLayout (1)
//	uvarint  n, the number of units
//	n times:
//	  8 bytes  Hash, little-endian
//	  uvarint  zigzag(Start − the previous unit's End)   (0 before the first unit)
//	  uvarint  End − Start, modulo 2^32
//	  uvarint  Words
//	  uvarint  Pos − the previous unit's Pos, modulo 2^32 (0 before the first unit)
//
// Start is coded against the previous End, signed, because sentences leave
// a gap of a byte or two after the previous one while word shingles overlap
// it by a few words: both give a one-byte difference. A unit of a text is
// then 12 bytes when its span is under 128 bytes and 13 or 14 for a longer
// sentence, against 20 to 24 (the benchmarks in encoding_test.go measure
// it). The differences are taken in integers wide enough for any uint32
// values, so any list of units, in text order or not, encodes exactly.
//
// Decoding accepts exactly the bytes AppendUnits writes: a varint written
// longer than needed, a value out of range, a count that the bytes cannot
// hold, or bytes after the last unit are errors. A reader thus never
// allocates more than its input justifies, and what it accepts re-encodes to
// the same bytes. A layout byte other than UnitLayout is a *LayoutError, so
// a program refuses units written by a newer one instead of misreading them.
//
// The alternative of a general-purpose codec (JSON, gob, protocol buffers)
// was rejected: JSON spends 40 to 60 bytes a unit and gob or protobuf
// bring a schema and a dependency for five integers.

import (
	"encoding/binary"
	"errors"
	"fmt"
	"math"
	"slices"
)

// UnitLayout is the version of the unit encoding AppendUnits writes, its
// first byte. A change of layout takes a new number; DecodeUnits reads this
// one only.
const UnitLayout = 1

// minUnitBytes is the fewest bytes one unit takes in layout 1: the
// fingerprint and four one-byte varints.
const minUnitBytes = 8 + 4

// A LayoutError means encoded units start with a layout byte this program
// does not read: written by a newer (or an unknown) program.
type LayoutError struct {
	Layout byte // the layout byte found
}

func (e *LayoutError) Error() string {
	if e.Layout > UnitLayout {
		return fmt.Sprintf("shingle: units encoded in layout %d, by a newer program; this one reads layout %d only", e.Layout, UnitLayout)
	}
	return fmt.Sprintf("shingle: units encoded in unknown layout %d; this program reads layout %d only", e.Layout, UnitLayout)
}

// AppendUnits appends the encoding of units (layout UnitLayout, described
// in encoding.go) to dst and returns the extended slice. Any units encode;
// units in text order encode compactly.
func AppendUnits(dst []byte, units []Unit) []byte {
	dst = slices.Grow(dst, 1+binary.MaxVarintLen64+len(units)*14)
	dst = append(dst, UnitLayout)
	dst = binary.AppendUvarint(dst, uint64(len(units)))
	var prevEnd, prevPos uint32
	for _, u := range units {
		dst = binary.LittleEndian.AppendUint64(dst, u.Hash)
		d := int64(u.Start) - int64(prevEnd)
		gap, length, pos := uint64(d<<1)^uint64(d>>63), uint64(u.End-u.Start), uint64(u.Pos-prevPos)
		if gap|length|uint64(u.Words)|pos < 0x80 {
			// The common case: four one-byte varints.
			dst = append(dst, byte(gap), byte(length), byte(u.Words), byte(pos))
		} else {
			dst = binary.AppendUvarint(dst, gap)
			dst = binary.AppendUvarint(dst, length)
			dst = binary.AppendUvarint(dst, uint64(u.Words))
			dst = binary.AppendUvarint(dst, pos)
		}
		prevEnd, prevPos = u.End, u.Pos
	}
	return dst
}

// errUnits is wrapped by every error DecodeUnits returns for damaged bytes.
var errUnits = errors.New("damaged unit encoding")

// DecodeUnits appends to dst the units AppendUnits encoded in src, which
// must hold exactly one encoding, and returns the extended slice. A layout
// other than UnitLayout is a *LayoutError; damaged bytes are another error.
// On error dst is returned with the length it was given.
func DecodeUnits(src []byte, dst []Unit) ([]Unit, error) {
	if len(src) == 0 {
		return dst, fmt.Errorf("shingle: no bytes: %w", errUnits)
	}
	if src[0] != UnitLayout {
		return dst, &LayoutError{Layout: src[0]}
	}
	n, k := binary.Uvarint(src[1:])
	if k <= 0 || (k > 1 && src[k] == 0) {
		return dst, fmt.Errorf("shingle: unit count: %w", errUnits)
	}
	src = src[1+k:]
	if n > uint64(len(src)/minUnitBytes) {
		return dst, fmt.Errorf("shingle: %d units cannot fit in %d bytes: %w", n, len(src), errUnits)
	}
	start := len(dst)
	dst = slices.Grow(dst, int(n))
	out := dst[start : start+int(n)]
	var prevEnd, prevPos uint32
	p := 0
	for i := range out {
		if len(src)-p < minUnitBytes {
			return dst[:start], fmt.Errorf("shingle: unit %d of %d: truncated: %w", i, n, errUnits)
		}
		u := &out[i]
		u.Hash = binary.LittleEndian.Uint64(src[p:])
		p += 8
		if f := binary.LittleEndian.Uint32(src[p:]); f&0x80808080 == 0 {
			// The common case: four one-byte varints.
			gap := int64(f & 0xff)
			s := int64(prevEnd) + (gap>>1 ^ -(gap & 1))
			if s < 0 || s > math.MaxUint32 {
				return dst[:start], fmt.Errorf("shingle: unit %d of %d: start: %w", i, n, errUnits)
			}
			u.Start = uint32(s)
			u.End = u.Start + (f >> 8 & 0xff)
			u.Words = f >> 16 & 0xff
			u.Pos = prevPos + f>>24
			p += 4
			prevEnd, prevPos = u.End, u.Pos
			continue
		}
		gap, ok := uvarint(src, &p)
		s := int64(prevEnd) + (int64(gap>>1) ^ -int64(gap&1))
		if !ok || s < 0 || s > math.MaxUint32 {
			return dst[:start], fmt.Errorf("shingle: unit %d of %d: start: %w", i, n, errUnits)
		}
		length, ok1 := uvarint(src, &p)
		words, ok2 := uvarint(src, &p)
		pos, ok3 := uvarint(src, &p)
		if !ok1 || !ok2 || !ok3 || length > math.MaxUint32 || words > math.MaxUint32 || pos > math.MaxUint32 {
			return dst[:start], fmt.Errorf("shingle: unit %d of %d: %w", i, n, errUnits)
		}
		u.Start = uint32(s)
		u.End = u.Start + uint32(length)
		u.Words = uint32(words)
		u.Pos = prevPos + uint32(pos)
		prevEnd, prevPos = u.End, u.Pos
	}
	if p != len(src) {
		return dst[:start], fmt.Errorf("shingle: %d bytes after the last unit: %w", len(src)-p, errUnits)
	}
	return dst[:start+int(n)], nil
}

// uvarint reads the canonical (shortest) unsigned varint of at most 35 bits
// at src[*p], advancing *p; a one-byte value, the common case, takes one
// comparison.
func uvarint(src []byte, p *int) (uint64, bool) {
	i := *p
	if i < len(src) && src[i] < 0x80 {
		*p = i + 1
		return uint64(src[i]), true
	}
	var x uint64
	var shift uint
	for k := 0; k < 5 && i+k < len(src); k++ {
		b := src[i+k]
		if b < 0x80 {
			if b == 0 { // a longer form than needed
				return 0, false
			}
			*p = i + k + 1
			return x | uint64(b)<<shift, true
		}
		x |= uint64(b&0x7f) << shift
		shift += 7
	}
	return 0, false
}
