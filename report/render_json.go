package report

import (
	"encoding/json"
	"fmt"
	"io"
	"math"
	"math/bits"
	"strconv"
	"strings"
	"unicode/utf8"
)

// jsonEncoder writes the JSON and NDJSON renderings of a Result without
// reflection: hand-written appenders for the large, flat types (Document,
// Skipped, Common, Pair, Passage, Group, Cluster) append straight into buf,
// which goes to w in chunks of about jsonChunk bytes.
//
// # Why by hand
//
// encoding/json with SetIndent first marshals the whole Result by reflection
// and then re-scans every byte of it with its JSON state machine to indent
// it (appendIndent); with 10^5 documents that was most of a run's time. Here
// the indentation is written as the value is, once, and the encoder never
// holds more than one chunk of output.
//
// # The contract: the bytes encoding/json gives
//
// The output must stay byte for byte what json.Encoder (SetIndent("", "  "),
// HTML escaping on) and json.Marshal give, so the appenders follow those
// rules exactly: struct fields in declaration order under their json tag
// names; a nil slice is null and an empty one []; "[]" and "{}" stay on one
// line; strings are escaped as encoding/json's appendString does (see
// jsonString); float64 is formatted as its floatEncoder does (see jsonFloat);
// a NaN or infinite float is an error, and then nothing at all is written,
// as json.Encoder writes nothing for a value it cannot marshal.
//
// Settings and Summary are small, written once, and the structs most likely
// to gain fields; they go through encoding/json (MarshalIndent with the
// prefix of their depth), so a new field there cannot be forgotten. For the
// hand-written types, render_json_test.go compares each struct's json field
// names (by reflection) with the keys the appenders write, and compares the
// whole output with encoding/json's on generated and fuzzed Results.
//
// The trade-off is that a change to one of those structs (a new field, a tag
// option such as omitempty) needs a matching change here; the tests fail
// until it is made.
type jsonEncoder struct {
	w      io.Writer
	buf    []byte // pending output; written to w once it passes jsonChunk
	indent bool   // two-space indentation as json.Encoder.SetIndent("", "  "); compact otherwise
	err    error  // first error from w
	keys   jsonKeys
}

// jsonKeys holds what precedes each member's value, for every hand-written
// type at the depth where the contract puts it: a comma (all but the first
// member), a newline and the indentation (indented mode), the quoted name,
// the colon and (indented mode) a space. Made once per encoder, they are
// appended with one copy each: writing them piece by piece was a fifth of
// the encoder's time.
type jsonKeys struct {
	result   struct{ format, caution, settings, summary, nearCopies, documents, skipped, common, pairs, groups, clusters string }
	document struct{ path, format, encoding, words, units, reused, notes string }
	skipped  struct{ path, reason string }
	common   struct{ text, documents, countedIn string }
	pair     struct{ a, b, shared, coverageA, coverageB, jaccard, score, identical, passages string }
	passage  struct{ aStart, aEnd, bStart, bEnd, aLine, bLine, aWhere, bWhere, units, words, text, textCut, explained string }
	group    struct{ documents, shared string }
	cluster  struct{ documents string }
}

// The depths of the contract's objects when indented: the Result's members
// are at depth 1, the members of a record in one of its arrays at 3, and
// those of a passage, in a pair's "passages", at 5.
const (
	jsonResultDepth  = 1
	jsonRecordDepth  = jsonResultDepth + 2
	jsonPassageDepth = jsonRecordDepth + 2
)

// jsonChunk is the size at which pending output is written; large enough
// that the write calls cost nothing next to the appending.
const jsonChunk = 64 << 10

// jsonNewline serves a newline and the indentation of up to 16 levels.
const jsonNewline = "\n                                "

func newJSONEncoder(w io.Writer, indent bool) *jsonEncoder {
	e := &jsonEncoder{w: w, indent: indent, buf: make([]byte, 0, jsonChunk+jsonChunk/4)}
	first := func(depth int, name string) string {
		k := `"` + name + `":`
		if indent {
			k = "\n" + strings.Repeat("  ", depth) + k + " "
		}
		return k
	}
	next := func(depth int, name string) string { return "," + first(depth, name) }

	k := &e.keys
	d := jsonResultDepth
	k.result.format, k.result.caution = first(d, "format"), next(d, "caution")
	k.result.settings, k.result.summary = next(d, "settings"), next(d, "summary")
	k.result.nearCopies = next(d, "near_copies")
	k.result.documents, k.result.skipped = next(d, "documents"), next(d, "skipped")
	k.result.common, k.result.pairs = next(d, "common"), next(d, "pairs")
	k.result.groups, k.result.clusters = next(d, "groups"), next(d, "clusters")

	d = jsonRecordDepth
	k.document.path, k.document.format, k.document.encoding = first(d, "path"), next(d, "format"), next(d, "encoding")
	k.document.words, k.document.units = next(d, "words"), next(d, "units")
	k.document.reused, k.document.notes = next(d, "reused"), next(d, "notes")
	k.skipped.path, k.skipped.reason = first(d, "path"), next(d, "reason")
	k.common.text, k.common.documents, k.common.countedIn = first(d, "text"), next(d, "documents"), next(d, "counted_in")
	k.pair.a, k.pair.b, k.pair.shared = first(d, "a"), next(d, "b"), next(d, "shared")
	k.pair.coverageA, k.pair.coverageB = next(d, "coverage_a"), next(d, "coverage_b")
	k.pair.jaccard, k.pair.score, k.pair.identical = next(d, "jaccard"), next(d, "score"), next(d, "identical")
	k.pair.passages = next(d, "passages")
	k.group.documents, k.group.shared = first(d, "documents"), next(d, "shared")
	k.cluster.documents = first(d, "documents")

	d = jsonPassageDepth
	k.passage.aStart, k.passage.aEnd = first(d, "a_start"), next(d, "a_end")
	k.passage.bStart, k.passage.bEnd = next(d, "b_start"), next(d, "b_end")
	k.passage.aLine, k.passage.bLine = next(d, "a_line"), next(d, "b_line")
	k.passage.aWhere, k.passage.bWhere = next(d, "a_where"), next(d, "b_where")
	k.passage.units, k.passage.words, k.passage.text = next(d, "units"), next(d, "words"), next(d, "text")
	k.passage.textCut = next(d, "text_cut")
	k.passage.explained = next(d, "explained")
	return e
}

// writeResultJSON writes r as json.Encoder with SetIndent("", "  ") would,
// final newline included.
func (e *jsonEncoder) writeResultJSON(r *Result) error {
	if r == nil {
		e.buf = append(e.buf, "null\n"...)
		return e.flush()
	}
	// Everything that can fail is checked before the first byte is written,
	// in encoding/json's order (field order), so that an error leaves the
	// output empty and names the value encoding/json would name.
	settings, err := json.MarshalIndent(r.Settings, "  ", "  ")
	if err != nil {
		return err
	}
	summary, err := json.MarshalIndent(r.Summary, "  ", "  ")
	if err != nil {
		return err
	}
	nearCopies, err := json.MarshalIndent(r.NearCopies, "  ", "  ")
	if err != nil {
		return err
	}
	if _, err := checkJSONFloats(r); err != nil {
		return err
	}
	var sources, masters []byte
	if len(r.Sources) > 0 {
		if sources, err = json.MarshalIndent(r.Sources, "  ", "  "); err != nil {
			return err
		}
	}
	if len(r.Masters) > 0 {
		if masters, err = json.MarshalIndent(r.Masters, "  ", "  "); err != nil {
			return err
		}
	}

	k := &e.keys.result
	d := jsonResultDepth
	e.buf = append(e.buf, '{')
	e.put(k.format)
	e.int(r.Format)
	e.put(k.caution)
	e.str(r.Caution)
	e.put(k.settings)
	e.buf = append(e.buf, settings...)
	e.put(k.summary)
	e.buf = append(e.buf, summary...)
	e.put(k.nearCopies)
	e.buf = append(e.buf, nearCopies...)
	e.put(k.documents)
	jsonObjects(e, d, r.Documents, (*jsonEncoder).documentFields)
	e.put(k.skipped)
	jsonObjects(e, d, r.Skipped, (*jsonEncoder).skippedFields)
	e.put(k.common)
	jsonObjects(e, d, r.Common, (*jsonEncoder).commonFields)
	e.put(k.pairs)
	jsonObjects(e, d, r.Pairs, (*jsonEncoder).pairFields)
	e.put(k.groups)
	jsonObjects(e, d, r.Groups, (*jsonEncoder).groupFields)
	e.put(k.clusters)
	jsonObjects(e, d, r.Clusters, (*jsonEncoder).clusterFields)
	if sources != nil {
		e.buf = append(e.buf, ",\n  \"sources\": "...)
		e.buf = append(e.buf, sources...)
	}
	if masters != nil {
		e.buf = append(e.buf, ",\n  \"masters\": "...)
		e.buf = append(e.buf, masters...)
	}
	e.newline(0)
	e.buf = append(e.buf, '}', '\n')
	return e.flush()
}

// checkJSONFloats returns, for the first NaN or infinite float among the
// hand-written types in encoding/json's order, the kind of record holding
// it and the error encoding/json gives for it.
func checkJSONFloats(r *Result) (string, error) {
	for i := range r.Documents {
		if err := jsonFloatError(r.Documents[i].Reused); err != nil {
			return "document", err
		}
	}
	for i := range r.Pairs {
		p := &r.Pairs[i]
		for _, f := range [...]float64{p.CoverageA, p.CoverageB, p.Jaccard, p.Score} {
			if err := jsonFloatError(f); err != nil {
				return "pair", err
			}
		}
	}
	return "", nil
}

// jsonFloatError is encoding/json's own error for a float it cannot encode
// (NaN, ±Inf), or nil.
func jsonFloatError(f float64) error {
	if !math.IsNaN(f) && !math.IsInf(f, 0) {
		return nil
	}
	if _, err := json.Marshal(f); err != nil {
		return err
	}
	return fmt.Errorf("json: unsupported value: %v", f)
}

// typedLine appends one NDJSON line {"type":kind,...fields...}.
func typedLine[T any](e *jsonEncoder, kind string, v *T, fields func(*jsonEncoder, *T)) {
	e.buf = append(e.buf, `{"type":`...)
	e.str(kind)
	e.buf = append(e.buf, ',')
	fields(e, v)
	e.buf = append(e.buf, '}', '\n')
	e.maybeFlush()
}

// jsonObjects appends xs as an array of objects whose members fields
// appends; depth is the depth of the line holding the array's key, and the
// members' keys must have been made for depth+2.
func jsonObjects[T any](e *jsonEncoder, depth int, xs []T, fields func(*jsonEncoder, *T)) {
	if xs == nil {
		e.buf = append(e.buf, "null"...)
		return
	}
	e.buf = append(e.buf, '[')
	for i := range xs {
		if i > 0 {
			e.buf = append(e.buf, ',')
		}
		e.newline(depth + 1)
		e.buf = append(e.buf, '{')
		fields(e, &xs[i])
		e.newline(depth + 1)
		e.buf = append(e.buf, '}')
		e.maybeFlush()
	}
	if len(xs) > 0 {
		e.newline(depth)
	}
	e.buf = append(e.buf, ']')
}

// strs appends a []string; depth as for jsonObjects.
func (e *jsonEncoder) strs(depth int, ss []string) {
	if ss == nil {
		e.buf = append(e.buf, "null"...)
		return
	}
	e.buf = append(e.buf, '[')
	for i, s := range ss {
		if i > 0 {
			e.buf = append(e.buf, ',')
		}
		e.newline(depth + 1)
		e.str(s)
	}
	if len(ss) > 0 {
		e.newline(depth)
	}
	e.buf = append(e.buf, ']')
}

// The field appenders write an object's members, without its braces, with
// the keys of e.keys. Their order and names are those of the struct's json
// tags (TestJSONAppendersWriteEveryField holds them to it).

func (e *jsonEncoder) documentFields(v *Document) {
	k := &e.keys.document
	e.put(k.path)
	e.str(v.Path)
	e.put(k.format)
	e.str(v.Format)
	e.put(k.encoding)
	e.str(v.Encoding)
	e.put(k.words)
	e.int(v.Words)
	e.put(k.units)
	e.int(v.Units)
	e.put(k.reused)
	e.float(v.Reused)
	e.put(k.notes)
	e.strs(jsonRecordDepth, v.Notes)
}

func (e *jsonEncoder) skippedFields(v *Skipped) {
	k := &e.keys.skipped
	e.put(k.path)
	e.str(v.Path)
	e.put(k.reason)
	e.str(v.Reason)
}

func (e *jsonEncoder) commonFields(v *Common) {
	k := &e.keys.common
	e.put(k.text)
	e.str(v.Text)
	e.put(k.documents)
	e.int(v.Documents)
	e.put(k.countedIn)
	e.int(v.CountedIn)
}

func (e *jsonEncoder) pairFields(v *Pair) {
	k := &e.keys.pair
	e.put(k.a)
	e.str(v.A)
	e.put(k.b)
	e.str(v.B)
	e.put(k.shared)
	e.int(v.Shared)
	e.put(k.coverageA)
	e.float(v.CoverageA)
	e.put(k.coverageB)
	e.float(v.CoverageB)
	e.put(k.jaccard)
	e.float(v.Jaccard)
	e.put(k.score)
	e.float(v.Score)
	e.put(k.identical)
	e.bool(v.Identical)
	e.put(k.passages)
	jsonObjects(e, jsonRecordDepth, v.Passages, (*jsonEncoder).passageFields)
}

func (e *jsonEncoder) passageFields(v *Passage) {
	k := &e.keys.passage
	e.put(k.aStart)
	e.int(v.AStart)
	e.put(k.aEnd)
	e.int(v.AEnd)
	e.put(k.bStart)
	e.int(v.BStart)
	e.put(k.bEnd)
	e.int(v.BEnd)
	e.put(k.aLine)
	e.int(v.ALine)
	e.put(k.bLine)
	e.int(v.BLine)
	e.put(k.aWhere)
	e.str(v.AWhere)
	e.put(k.bWhere)
	e.str(v.BWhere)
	e.put(k.units)
	e.int(v.Units)
	e.put(k.words)
	e.int(v.Words)
	e.put(k.text)
	e.str(v.Text)
	e.put(k.textCut)
	e.bool(v.TextCut)
	if v.Explained != nil { // omitempty: only reworded passages have one
		e.put(k.explained)
		e.explained(v.Explained)
	}
}

// explained writes a reworded passage's explanation as encoding/json
// would at its depth (its members are not hand-written: few passages
// have one).
func (e *jsonEncoder) explained(x *Explained) {
	var b []byte
	var err error
	if e.indent {
		b, err = json.MarshalIndent(x, strings.Repeat("  ", jsonPassageDepth), "  ")
	} else {
		b, err = json.Marshal(x)
	}
	if err != nil && e.err == nil {
		e.err = err
	}
	e.buf = append(e.buf, b...)
}

func (e *jsonEncoder) groupFields(v *Group) {
	k := &e.keys.group
	e.put(k.documents)
	e.strs(jsonRecordDepth, v.Documents)
	e.put(k.shared)
	e.int(v.Shared)
}

func (e *jsonEncoder) clusterFields(v *Cluster) {
	k := &e.keys.cluster
	e.put(k.documents)
	e.strs(jsonRecordDepth, v.Documents)
}

// newline starts a line at the given depth (indented mode only), as
// encoding/json's appendIndent does before a member or element.
func (e *jsonEncoder) newline(depth int) {
	if !e.indent {
		return
	}
	if n := 1 + 2*depth; n <= len(jsonNewline) {
		e.buf = append(e.buf, jsonNewline[:n]...)
		return
	}
	e.buf = append(e.buf, '\n')
	for range depth {
		e.buf = append(e.buf, ' ', ' ')
	}
}

// put appends a key of e.keys (or any text that needs no escaping).
func (e *jsonEncoder) put(key string) { e.buf = append(e.buf, key...) }

func (e *jsonEncoder) int(n int) { e.buf = strconv.AppendInt(e.buf, int64(n), 10) }

func (e *jsonEncoder) float(f float64) { e.buf = jsonFloat(e.buf, f) }

func (e *jsonEncoder) str(s string) { e.buf = jsonString(e.buf, s) }

func (e *jsonEncoder) bool(b bool) { e.buf = strconv.AppendBool(e.buf, b) }

func (e *jsonEncoder) maybeFlush() {
	if len(e.buf) >= jsonChunk {
		e.flush()
	}
}

// flush writes the pending output and returns the first write error.
func (e *jsonEncoder) flush() error {
	if e.err == nil && len(e.buf) > 0 {
		_, e.err = e.w.Write(e.buf)
	}
	e.buf = e.buf[:0]
	return e.err
}

// jsonFloat appends a finite f as encoding/json's floatEncoder (64 bits)
// does: like ES6 number-to-string, the 'f' format with the shortest digits
// unless |f| < 1e-6 or |f| >= 1e21, then 'e' with a two-digit negative
// exponent's leading zero dropped (1e-07 becomes 1e-7).
//
// Nearly every float in a Result is a fraction rounded to four decimals
// (fraction in report.go), and those take a shortcut: when f is exactly the
// float nearest n/10⁴ for an integer n ≠ 0 and |f| < 2²⁰, the shortest
// digits that read back as f are those of n/10⁴ itself. (Any other decimal
// reading back as f lies within half an ulp, under 6e-11, of it; one with
// no more significant digits would sit on the same 10⁻⁴ grid, at least 10⁻⁴
// away.) TestJSONFloatMatchesEncodingJSON checks every such n up to ±10⁵
// and random ones beyond against encoding/json.
func jsonFloat(b []byte, f float64) []byte {
	if k := math.Round(f * 1e4); k != 0 && math.Abs(f) < 1<<20 && k/1e4 == f {
		n := int64(k)
		if n < 0 {
			b = append(b, '-')
			n = -n
		}
		b = strconv.AppendInt(b, n/1e4, 10)
		if frac := n % 1e4; frac != 0 {
			digits := [5]byte{'.', byte('0' + frac/1000), byte('0' + frac/100%10), byte('0' + frac/10%10), byte('0' + frac%10)}
			end := len(digits)
			for digits[end-1] == '0' {
				end--
			}
			b = append(b, digits[:end]...)
		}
		return b
	}
	abs := math.Abs(f)
	format := byte('f')
	if abs != 0 && (abs < 1e-6 || abs >= 1e21) {
		format = 'e'
	}
	b = strconv.AppendFloat(b, f, format, -1, 64)
	if format == 'e' {
		n := len(b)
		if n >= 4 && b[n-4] == 'e' && b[n-3] == '-' && b[n-2] == '0' {
			b[n-2] = b[n-1]
			b = b[:n-1]
		}
	}
	return b
}

// jsonPlain reports whether c stands for itself in a JSON string under
// encoding/json's HTML-safe escaping: printable ASCII except " \ < > &.
// Bytes from 0x80 up are not plain: they take the UTF-8 path.
func jsonPlain(c byte) bool {
	return c >= 0x20 && c < utf8.RuneSelf && c != '"' && c != '\\' && c != '<' && c != '>' && c != '&'
}

// jsonPlainPrefix is the length of the longest prefix of s whose bytes
// are all plain (jsonPlain). It tests eight bytes at a time with the
// word-at-a-time tests of common practice (as recalled from Sean Anderson's
// "Bit Twiddling Hacks", from memory; TestJSONStringMatchesEncodingJSON
// checks the result at every offset): the word v has a byte below n, for
// n up to 128, exactly when (v - n·0x01…01) &^ v & 0x80…80 is not zero; v
// has a byte equal to c exactly when v ^ c·0x01…01 has a byte below 1.
// Setting bit 2 folds '"' (0x22) and '&' (0x26) into one test, and bit 1
// '<' (0x3c) and '>' (0x3e) into another; the high bits of v flag non-ASCII.
// It is a leaf function so that its loop keeps everything in registers.
func jsonPlainPrefix(s string) int {
	const ones, highs = 0x0101010101010101, 0x8080808080808080
	n := 0
	for len(s) >= 8 {
		v := uint64(s[0]) | uint64(s[1])<<8 | uint64(s[2])<<16 | uint64(s[3])<<24 |
			uint64(s[4])<<32 | uint64(s[5])<<40 | uint64(s[6])<<48 | uint64(s[7])<<56
		quoteAmp := (v | 0x04*ones) ^ '&'*ones // zero byte: '"' or '&'
		angle := (v | 0x02*ones) ^ '>'*ones    // zero byte: '<' or '>'
		backslash := v ^ '\\'*ones
		special := ((v-0x20*ones)&^v |
			(quoteAmp-ones)&^quoteAmp |
			(angle-ones)&^angle |
			(backslash-ones)&^backslash |
			v) & highs
		if special != 0 {
			// The lowest flagged byte is a true one: a borrow only
			// flags bytes above the one that caused it.
			return n + bits.TrailingZeros64(special)/8
		}
		s = s[8:]
		n += 8
	}
	for len(s) > 0 && jsonPlain(s[0]) {
		s = s[1:]
		n++
	}
	return n
}

const jsonHex = "0123456789abcdef"

// jsonString appends s quoted and escaped as encoding/json's appendString
// does with HTML escaping on (json.Marshal, json.Encoder by default): " and
// \ get a backslash; \b \f \n \r \t their short forms; other bytes below
// 0x20 and < > & become \u00XX; U+2028 and U+2029 become \u2028 and
// \u2029; each byte that is not part of valid UTF-8 becomes \ufffd.
func jsonString(dst []byte, s string) []byte {
	dst = append(dst, '"')
	start := 0
	for i := 0; i < len(s); {
		i += jsonPlainPrefix(s[i:])
		if i == len(s) {
			break
		}
		c := s[i]
		if c < utf8.RuneSelf {
			dst = append(dst, s[start:i]...)
			switch c {
			case '\\', '"':
				dst = append(dst, '\\', c)
			case '\b':
				dst = append(dst, '\\', 'b')
			case '\f':
				dst = append(dst, '\\', 'f')
			case '\n':
				dst = append(dst, '\\', 'n')
			case '\r':
				dst = append(dst, '\\', 'r')
			case '\t':
				dst = append(dst, '\\', 't')
			default:
				dst = append(dst, '\\', 'u', '0', '0', jsonHex[c>>4], jsonHex[c&0xF])
			}
			i++
			start = i
			continue
		}
		r, size := utf8.DecodeRuneInString(s[i:])
		switch {
		case r == utf8.RuneError && size == 1:
			dst = append(dst, s[start:i]...)
			dst = append(dst, `\ufffd`...)
		case r == '\u2028' || r == '\u2029':
			dst = append(dst, s[start:i]...)
			dst = append(dst, '\\', 'u', '2', '0', '2', jsonHex[r&0xF])
		default:
			i += size
			continue
		}
		i += size
		start = i
	}
	dst = append(dst, s[start:]...)
	return append(dst, '"')
}
