package report

import (
	"bufio"
	"bytes"
	"encoding/binary"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"math"
	"math/rand/v2"
	"reflect"
	"slices"
	"strings"
	"testing"
)

// The reference for every test here is Go's encoding/json: referenceJSON and
// referenceNDJSON are WriteJSON and WriteNDJSON as they were before the
// hand-written appenders (render_json.go), kept only to compare against.

// referenceWriteJSON is the former WriteJSON: json.Encoder, SetIndent("", "  ").
func referenceWriteJSON(w io.Writer, r *Result) error {
	enc := json.NewEncoder(w)
	enc.SetIndent("", "  ")
	if err := enc.Encode(r); err != nil {
		return fmt.Errorf("report: json: %w", err)
	}
	return nil
}

func referenceJSON(r *Result) ([]byte, error) {
	var b bytes.Buffer
	err := referenceWriteJSON(&b, r)
	return b.Bytes(), err
}

func referenceNDJSON(r *Result) ([]byte, error) {
	var b bytes.Buffer
	err := referenceWriteNDJSON(&b, r)
	return b.Bytes(), err
}

// referenceWriteNDJSON is the former WriteNDJSON: json.Encoder for the head
// line, json.Marshal for every record with "type" spliced in front.
func referenceWriteNDJSON(w io.Writer, r *Result) error {
	bw := bufio.NewWriter(w)
	enc := json.NewEncoder(bw)
	head := struct {
		Type     string   `json:"type"`
		Format   int      `json:"format"`
		Caution  string   `json:"caution"`
		Settings Settings `json:"settings"`
		Summary  Summary  `json:"summary"`
	}{"report", r.Format, r.Caution, r.Settings, r.Summary}
	if err := enc.Encode(head); err != nil {
		return fmt.Errorf("report: ndjson: %w", err)
	}
	put := func(kind string, v any) error {
		b, err := json.Marshal(v)
		if err != nil || len(b) < 2 || b[0] != '{' {
			return fmt.Errorf("report: ndjson: %s: cannot encode as an object: %v", kind, err)
		}
		fmt.Fprintf(bw, "{\"type\":%q", kind)
		if len(b) > 2 {
			bw.WriteByte(',')
		}
		bw.Write(b[1:])
		return bw.WriteByte('\n')
	}
	var err error
	each := func(kind string, n int, v func(int) any) {
		for i := 0; i < n && err == nil; i++ {
			err = put(kind, v(i))
		}
	}
	each("document", len(r.Documents), func(i int) any { return &r.Documents[i] })
	each("skipped", len(r.Skipped), func(i int) any { return &r.Skipped[i] })
	each("common", len(r.Common), func(i int) any { return &r.Common[i] })
	each("pair", len(r.Pairs), func(i int) any { return &r.Pairs[i] })
	each("group", len(r.Groups), func(i int) any { return &r.Groups[i] })
	each("cluster", len(r.Clusters), func(i int) any { return &r.Clusters[i] })
	if err != nil {
		return err
	}
	if err := bw.Flush(); err != nil {
		return fmt.Errorf("report: ndjson: %w", err)
	}
	return nil
}

// sameAsReference checks that WriteJSON and WriteNDJSON give encoding/json's
// bytes for r (reference: Go's encoding/json, via referenceJSON and
// referenceNDJSON), or the same error and no output at all.
func sameAsReference(t testing.TB, r *Result) {
	t.Helper()
	for _, c := range []struct {
		name  string
		write func(*bytes.Buffer, *Result) error
		ref   func(*Result) ([]byte, error)
	}{
		{"json", func(b *bytes.Buffer, r *Result) error { return WriteJSON(b, r) }, referenceJSON},
		{"ndjson", func(b *bytes.Buffer, r *Result) error { return WriteNDJSON(b, r) }, referenceNDJSON},
	} {
		want, wantErr := c.ref(r)
		var got bytes.Buffer
		gotErr := c.write(&got, r)
		if (gotErr == nil) != (wantErr == nil) || (gotErr != nil && gotErr.Error() != wantErr.Error()) {
			t.Fatalf("%s: error %v, encoding/json gives %v", c.name, gotErr, wantErr)
		}
		if wantErr != nil {
			// encoding/json's WriteJSON wrote nothing on an error; the old
			// WriteNDJSON could leave part of a stream. Neither writes now.
			if got.Len() > 0 {
				t.Fatalf("%s: %d bytes written before the error %v", c.name, got.Len(), gotErr)
			}
			continue
		}
		if !bytes.Equal(got.Bytes(), want) {
			t.Fatalf("%s: differs from encoding/json:\n%s", c.name, firstDifference(got.Bytes(), want))
		}
	}
}

// firstDifference shows where got and want part, with some context.
func firstDifference(got, want []byte) string {
	i := 0
	for i < len(got) && i < len(want) && got[i] == want[i] {
		i++
	}
	from := max(0, i-60)
	return fmt.Sprintf("at byte %d of %d (want %d)\n got: %q\nwant: %q", i, len(got), len(want),
		got[from:min(len(got), i+40)], want[from:min(len(want), i+40)])
}

// jsonPieces are the fragments generated strings are made of: everything
// encoding/json treats specially (quotes, backslashes, control characters,
// <>&, U+2028/U+2029, DEL, invalid and truncated UTF-8, a UTF-8 encoded
// surrogate, the replacement character itself) and ordinary text.
var jsonPieces = []string{
	`"`, `\`, "\x00", "\x01", "\b", "\f", "\n", "\r", "\t", "\x1b", "\x1f", "\x7f",
	"<", ">", "&", "<script>", "\u2028", "\u2029", "\u2027", "\u202a",
	"\xff", "\xc3", "\xe2\x80", "\xed\xa0\x80", "\xf4\x90\x80\x80", "\ufffd", "\x80",
	"é", "ß", "日本語", "😀", "“quoted”", "—", "\u00a0", "\u200b",
	"a", "the ", "word ", " ", "0", "/", "'", "{}", "[]", ":", ",",
}

// jsonFloats are the floats generated values are drawn from before
// falling back to fractions and random bits: the switch points of
// encoding/json's 'f'/'e' choice (1e-6, 1e21) and their neighbours, zeros
// of both signs, and the magnitudes at the ends of float64.
var jsonFloats = []float64{
	0, math.Copysign(0, -1), 1, -1, 0.5, 0.3333, 1.0 / 3, 2.0 / 3, 0.1, 0.0001, 1e-7, -1e-7, 1e-6,
	math.Nextafter(1e-6, 0), 9.999e-7, 1e-9, 1e-10, 1e-100, 1e-300, 1e20, 1e21, -1e21,
	math.Nextafter(1e21, 0), 1.5e21, 1e22, 1e100, 123456789.125, math.MaxFloat64,
	math.SmallestNonzeroFloat64, 5e-324, math.MaxInt64, 1e15, 1e16,
}

// byteSource turns bytes (from a fuzzer or a seeded generator) into the
// choices resultFromBytes makes; it gives zeros once they run out.
type byteSource struct{ b []byte }

func (s *byteSource) byte() byte {
	if len(s.b) == 0 {
		return 0
	}
	c := s.b[0]
	s.b = s.b[1:]
	return c
}

func (s *byteSource) uint64() uint64 {
	var x [8]byte
	n := copy(x[:], s.b)
	s.b = s.b[n:]
	return binary.LittleEndian.Uint64(x[:])
}

func (s *byteSource) str() string {
	switch k := s.byte(); {
	case k < 32: // raw bytes: any byte string, most of it not UTF-8
		n := min(int(k), len(s.b))
		out := string(s.b[:n])
		s.b = s.b[n:]
		return out
	case k < 40:
		return ""
	default:
		var b strings.Builder
		for n := int(k % 12); n > 0; n-- {
			b.WriteString(jsonPieces[int(s.byte())%len(jsonPieces)])
		}
		return b.String()
	}
}

func (s *byteSource) float() float64 {
	switch k := s.byte(); {
	case k < 128:
		return jsonFloats[int(k)%len(jsonFloats)]
	case k < 240: // a rounded fraction, as Build makes them
		return math.Round(float64(s.uint64()%10001)) / 10000
	default: // any float64, NaN and ±Inf included
		return math.Float64frombits(s.uint64())
	}
}

func (s *byteSource) int() int {
	switch k := s.byte(); {
	case k < 200:
		return int(k)
	case k < 250:
		return int(int32(s.uint64()))
	default:
		return int(s.uint64())
	}
}

// count is the length of a slice, or -1 for a nil slice.
func (s *byteSource) count(most int) int {
	k := int(s.byte()) % (most + 2)
	return k - 1
}

func sliceOf[T any](s *byteSource, most int, item func() T) []T {
	n := s.count(most)
	if n < 0 {
		return nil
	}
	out := make([]T, n)
	for i := range out {
		out[i] = item()
	}
	return out
}

// resultFromBytes builds a Result whose every field comes from b.
func resultFromBytes(b []byte) *Result {
	s := &byteSource{b: b}
	strs := func() []string { return sliceOf(s, 3, s.str) }
	r := &Result{
		Format:  s.int(),
		Caution: s.str(),
		Settings: Settings{
			Version: s.str(), Unit: s.str(), MinShared: s.int(), MinWords: s.int(), MaxDocs: s.int(),
			MaxDocsRule: s.str(), MaxUnitBytes: s.int(), Exclude: strs(), Include: strs(), Skip: strs(),
			MaxFileSize: int64(s.int()), SkipQuoted: s.byte()%2 == 0, SkipReferences: s.byte()%2 == 0,
		},
		Summary: Summary{
			Documents: s.int(), Skipped: s.int(), Words: s.int(), Units: s.int(), Templates: s.int(),
			TemplateUnits: s.int(), CommonUnits: s.int(), Pruned: s.int(), Counter: s.str(), Pairs: s.int(),
			Groups: s.int(), GroupsTruncated: s.byte()%2 == 0,
		},
	}
	if s.byte()%2 == 0 {
		r.Settings.Read = &ReadSettings{MaxContainerSize: int64(s.int()), PDFTimeoutSeconds: s.float(), JSONLID: s.str()}
	}
	if s.byte()%2 == 0 {
		r.Settings.Shingles = &ShingleSettings{Words: s.int(), Winnow: s.int(), Gap: s.int(), MinPassage: s.int()}
	}
	r.Documents = sliceOf(s, 4, func() Document {
		return Document{Path: s.str(), Format: s.str(), Encoding: s.str(), Words: s.int(), Units: s.int(),
			Reused: s.float(), Notes: strs()}
	})
	r.Skipped = sliceOf(s, 3, func() Skipped { return Skipped{Path: s.str(), Reason: s.str()} })
	r.Common = sliceOf(s, 3, func() Common { return Common{Text: s.str(), Documents: s.int()} })
	r.Pairs = sliceOf(s, 3, func() Pair {
		return Pair{A: s.str(), B: s.str(), Shared: s.int(), CoverageA: s.float(), CoverageB: s.float(),
			Jaccard: s.float(), Score: s.float(), Passages: sliceOf(s, 3, func() Passage {
				return Passage{AStart: s.int(), AEnd: s.int(), BStart: s.int(), BEnd: s.int(), ALine: s.int(),
					BLine: s.int(), AWhere: s.str(), BWhere: s.str(), Units: s.int(), Words: s.int(), Text: s.str()}
			})}
	})
	r.Groups = sliceOf(s, 3, func() Group { return Group{Documents: strs(), Shared: s.int()} })
	r.Clusters = sliceOf(s, 3, func() Cluster { return Cluster{Documents: strs()} })
	return r
}

// TestWriteJSONMatchesEncodingJSON compares the JSON and NDJSON renderings
// of generated Results with Go's encoding/json (the reference library).
func TestWriteJSONMatchesEncodingJSON(t *testing.T) {
	rng := rand.New(rand.NewPCG(1, 2))
	b := make([]byte, 4096)
	for i := range 2000 {
		for k := range b {
			b[k] = byte(rng.Uint32())
		}
		r := resultFromBytes(b)
		t.Run(fmt.Sprint(i), func(t *testing.T) { sameAsReference(t, r) })
		if t.Failed() {
			return
		}
	}
}

// TestWriteJSONEscapesAndFloats puts each special string and float in every
// place of a Result, alone, and compares with encoding/json (reference).
func TestWriteJSONEscapesAndFloats(t *testing.T) {
	strs := append([]string{""}, jsonPieces...)
	for c := range 256 {
		strs = append(strs, string([]byte{byte(c)}), "x"+string([]byte{byte(c)})+"y")
	}
	for _, s := range strs {
		r := &Result{Caution: s, Settings: Settings{Unit: s, Exclude: []string{s}},
			Documents: []Document{{Path: s, Format: s, Encoding: s, Notes: []string{s, s}}},
			Skipped:   []Skipped{{Path: s, Reason: s}}, Common: []Common{{Text: s}},
			Pairs:  []Pair{{A: s, B: s, Passages: []Passage{{AWhere: s, BWhere: s, Text: s}}}},
			Groups: []Group{{Documents: []string{s}}}, Clusters: []Cluster{{Documents: []string{s}}}}
		sameAsReference(t, r)
	}
	for _, f := range jsonFloats {
		for _, f := range []float64{f, -f, f * 3, f / 7} {
			r := &Result{Documents: []Document{{Reused: f}},
				Pairs: []Pair{{CoverageA: f, CoverageB: -f, Jaccard: f, Score: f}}}
			sameAsReference(t, r)
		}
	}
}

// TestJSONStringMatchesEncodingJSON puts every byte value and every special
// piece at every offset of strings long enough for the eight-byte scan of
// jsonPlainPrefix, and compares jsonString with json.Marshal (reference:
// Go's encoding/json).
func TestJSONStringMatchesEncodingJSON(t *testing.T) {
	var specials []string
	for c := range 256 {
		specials = append(specials, string([]byte{byte(c)}))
	}
	specials = append(specials, jsonPieces...)
	for _, sp := range specials {
		for before := range 18 {
			for _, after := range []int{0, 1, 7, 8, 9} {
				s := strings.Repeat("a", before) + sp + strings.Repeat("z", after)
				want, err := json.Marshal(s)
				if err != nil {
					t.Fatal(err)
				}
				if got := jsonString(nil, s); !bytes.Equal(got, want) {
					t.Fatalf("%q: got %s, encoding/json gives %s", s, got, want)
				}
			}
		}
	}
}

// TestJSONFloatMatchesEncodingJSON: every fraction n/10⁴ with |n| ≤ 10⁵
// (the shortcut of jsonFloat), random ones up to its bound and past it,
// their neighbouring floats (which must not take the shortcut) and the
// special values give json.Marshal's bytes (reference: Go's encoding/json).
func TestJSONFloatMatchesEncodingJSON(t *testing.T) {
	check := func(f float64) {
		t.Helper()
		want, err := json.Marshal(f)
		if err != nil {
			t.Fatalf("%v: %v", f, err)
		}
		if got := jsonFloat(nil, f); !bytes.Equal(got, want) {
			t.Fatalf("%v (bits %#x): got %s, encoding/json gives %s", f, math.Float64bits(f), got, want)
		}
	}
	for n := -100_000; n <= 100_000; n++ {
		f := float64(n) / 1e4
		check(f)
		check(math.Nextafter(f, math.Inf(1)))
		check(math.Nextafter(f, math.Inf(-1)))
	}
	rng := rand.New(rand.NewPCG(8, 9))
	for range 200_000 {
		f := float64(rng.Int64N(1<<35)-1<<34) / 1e4 // up to ±1.7e6, past the shortcut's 2^20
		check(f)
		check(math.Nextafter(f, 0))
		if g := math.Float64frombits(rng.Uint64()); !math.IsNaN(g) && !math.IsInf(g, 0) {
			check(g)
		}
	}
	for _, f := range jsonFloats {
		check(f)
		check(-f)
	}
}

// TestWriteJSONNilAndEmptySlices: nil slices are null and empty ones [],
// at every level, as encoding/json writes them (reference).
func TestWriteJSONNilAndEmptySlices(t *testing.T) {
	sameAsReference(t, &Result{})
	sameAsReference(t, &Result{Documents: []Document{}, Skipped: []Skipped{}, Common: []Common{}, Pairs: []Pair{},
		Groups: []Group{}, Clusters: []Cluster{}, Settings: Settings{Exclude: []string{}}})
	sameAsReference(t, &Result{Documents: []Document{{}, {Notes: []string{}}}, Pairs: []Pair{{}, {Passages: []Passage{}}},
		Groups: []Group{{}, {Documents: []string{}}}, Clusters: []Cluster{{}, {Documents: []string{}}}})

	want, _ := referenceJSON(nil)
	var got bytes.Buffer
	if err := WriteJSON(&got, nil); err != nil || !bytes.Equal(got.Bytes(), want) {
		t.Errorf("nil result: %q, %v; encoding/json gives %q", got.Bytes(), err, want)
	}
}

// TestWriteJSONNonFiniteFloats: a NaN or infinite float anywhere gives
// encoding/json's error (reference) and no output; with several, the one
// encoding/json meets first (in field order) is named.
func TestWriteJSONNonFiniteFloats(t *testing.T) {
	for _, bad := range []float64{math.NaN(), math.Inf(1), math.Inf(-1)} {
		for place := range 6 {
			r := &Result{Documents: []Document{{}, {}}, Pairs: []Pair{{}, {}}}
			switch place {
			case 0:
				r.Settings.Read = &ReadSettings{PDFTimeoutSeconds: bad}
			case 1:
				r.Documents[1].Reused = bad
			case 2:
				r.Pairs[1].CoverageA = bad
			case 3:
				r.Pairs[0].CoverageB = bad
			case 4:
				r.Pairs[1].Jaccard = bad
			case 5:
				r.Pairs[1].Score = bad
			}
			sameAsReference(t, r)
			if err := WriteJSON(&bytes.Buffer{}, r); err == nil {
				t.Errorf("%v at place %d: no error", bad, place)
			}
		}
	}
	r := &Result{Documents: []Document{{}, {Reused: math.Inf(-1)}}, Pairs: []Pair{{Score: math.NaN()}}}
	sameAsReference(t, r)
	r.Settings.Read = &ReadSettings{PDFTimeoutSeconds: math.Inf(1)}
	sameAsReference(t, r)
	r.Settings.Read = nil
	r.Documents[1].Reused = 0
	r.Pairs = append([]Pair{{Jaccard: math.Inf(1)}}, r.Pairs...)
	sameAsReference(t, r)
}

// TestWriteJSONLargeResult crosses many output chunks and still gives
// encoding/json's bytes (reference: Go's encoding/json).
func TestWriteJSONLargeResult(t *testing.T) {
	r := benchResult(3000, 500)
	sameAsReference(t, r)
	var b bytes.Buffer
	if err := WriteJSON(&b, r); err != nil || b.Len() < 4*jsonChunk {
		t.Fatalf("%d bytes, %v: want several chunks", b.Len(), err)
	}
}

type failingWriter struct{ after int }

var errWriteFailed = errors.New("disk full")

func (w *failingWriter) Write(p []byte) (int, error) {
	if w.after <= 0 {
		return 0, errWriteFailed
	}
	w.after--
	return len(p), nil
}

// TestWriteJSONReportsWriteErrors: a failing writer's error comes back,
// wrapped with the format's name, whether the first or a later write fails.
func TestWriteJSONReportsWriteErrors(t *testing.T) {
	r := benchResult(2000, 200)
	for _, after := range []int{0, 1, 3} {
		err := WriteJSON(&failingWriter{after: after}, r)
		if !errors.Is(err, errWriteFailed) || !strings.HasPrefix(err.Error(), "report: json: ") {
			t.Errorf("json, failing after %d writes: %v", after, err)
		}
		err = WriteNDJSON(&failingWriter{after: after}, r)
		if !errors.Is(err, errWriteFailed) || !strings.HasPrefix(err.Error(), "report: ndjson: ") {
			t.Errorf("ndjson, failing after %d writes: %v", after, err)
		}
	}
}

// jsonTagNames lists the names encoding/json gives t's fields, in order, and
// flags what the appenders do not implement (tag options, embedded fields).
func jsonTagNames(t *testing.T, typ reflect.Type) []string {
	t.Helper()
	var names []string
	for f := range typ.Fields() {
		tag := f.Tag.Get("json")
		if tag == "-" || !f.IsExported() {
			continue
		}
		if f.Anonymous {
			t.Errorf("%s.%s is embedded: the JSON appenders do not flatten embedded fields", typ.Name(), f.Name)
		}
		name, opts, _ := strings.Cut(tag, ",")
		// The Result's reference-set sections are left out when empty,
		// as encoding/json does (writeResultJSON implements that).
		omitted := opts == "omitempty" && typ == reflect.TypeFor[Result]() && (f.Name == "Sources" || f.Name == "Masters") ||
			opts == "omitempty" && typ == reflect.TypeFor[Passage]() && f.Name == "Explained" // written only when set (passageFields)
		if opts != "" && !omitted {
			t.Errorf("%s.%s has json option %q: the JSON appenders do not implement it", typ.Name(), f.Name, opts)
		}
		if name == "" {
			name = f.Name
		}
		names = append(names, name)
	}
	return names
}

// objectKeys lists the member names of the JSON object in data, in order.
func objectKeys(t *testing.T, data []byte) []string {
	t.Helper()
	dec := json.NewDecoder(bytes.NewReader(data))
	if tok, err := dec.Token(); err != nil || tok != json.Delim('{') {
		t.Fatalf("not an object: %q (%v)", data, err)
	}
	var keys []string
	for dec.More() {
		tok, err := dec.Token()
		if err != nil {
			t.Fatalf("%q: %v", data, err)
		}
		keys = append(keys, tok.(string))
		var skip json.RawMessage
		if err := dec.Decode(&skip); err != nil {
			t.Fatalf("%q: %v", data, err)
		}
	}
	return keys
}

// TestJSONAppendersWriteEveryField guards the hand-written appenders
// against a field added to a struct later: the keys each one writes must be
// the struct's json names (read by reflection), in declaration order.
func TestJSONAppendersWriteEveryField(t *testing.T) {
	fields := func(write func(e *jsonEncoder)) []byte {
		var b bytes.Buffer
		e := newJSONEncoder(&b, false)
		e.buf = append(e.buf, '{')
		write(e)
		e.buf = append(e.buf, '}')
		if err := e.flush(); err != nil {
			t.Fatal(err)
		}
		return b.Bytes()
	}
	var whole bytes.Buffer
	if err := WriteJSON(&whole, &Result{Sources: []Sources{{}}, Masters: []MasterCoverage{{}}}); err != nil {
		t.Fatal(err)
	}
	for _, c := range []struct {
		typ  reflect.Type
		data []byte
	}{
		{reflect.TypeFor[Result](), whole.Bytes()},
		{reflect.TypeFor[Document](), fields(func(e *jsonEncoder) { e.documentFields(&Document{}) })},
		{reflect.TypeFor[Skipped](), fields(func(e *jsonEncoder) { e.skippedFields(&Skipped{}) })},
		{reflect.TypeFor[Common](), fields(func(e *jsonEncoder) { e.commonFields(&Common{}) })},
		{reflect.TypeFor[Pair](), fields(func(e *jsonEncoder) { e.pairFields(&Pair{}) })},
		{reflect.TypeFor[Passage](), fields(func(e *jsonEncoder) { e.passageFields(&Passage{Explained: &Explained{}}) })},
		{reflect.TypeFor[Group](), fields(func(e *jsonEncoder) { e.groupFields(&Group{}) })},
		{reflect.TypeFor[Cluster](), fields(func(e *jsonEncoder) { e.clusterFields(&Cluster{}) })},
	} {
		want := jsonTagNames(t, c.typ)
		if got := objectKeys(t, c.data); !slices.Equal(got, want) {
			t.Errorf("%s: appender writes %q, struct has %q", c.typ.Name(), got, want)
		}
	}
}

// FuzzWriteJSONSameBytes builds a Result from the fuzzer's bytes and
// compares both renderings with encoding/json's (the reference library).
func FuzzWriteJSONSameBytes(f *testing.F) {
	f.Add([]byte{})
	f.Add([]byte("\x05\x30<a>&\"\\\x00\xff\xe2\x80\xa8 \x01\x02\x03\x04\x05\x06\x07\x08\x09"))
	f.Add(bytes.Repeat([]byte{0xf5, 0x41, 0x01, 0x02, 0xff, 0x80, 0xfe, 0x7f}, 64))
	rng := rand.New(rand.NewPCG(3, 4))
	for range 8 {
		b := make([]byte, 512)
		for k := range b {
			b[k] = byte(rng.Uint32())
		}
		f.Add(b)
	}
	f.Fuzz(func(t *testing.T, b []byte) {
		sameAsReference(t, resultFromBytes(b))
	})
}

// benchWords is the vocabulary of the benchmark's passages, with a few
// characters that need escaping or are not ASCII, as real text has.
var benchWords = strings.Fields(`the of and to in a is that for it as was with be by on not he this are or his
from at which but have an they you were her she there been one all we their has would when if so no more
bridge river town library “quoted” café naïve — & <b> "said" it's 1903 p. 12 résumé`)

// benchResult is a Result shaped like a large run's: docs documents (a few
// with notes), pairs pairs of one to six passages of 20 to 80 words, and
// some skipped inputs, common units, groups and clusters.
func benchResult(docs, pairs int) *Result {
	rng := rand.New(rand.NewPCG(5, 6))
	frac := func() float64 { return math.Round(rng.Float64()*10000) / 10000 }
	text := func(lo, hi int) string {
		var b strings.Builder
		for n := lo + rng.IntN(hi-lo+1); n > 0; n-- {
			b.WriteString(benchWords[rng.IntN(len(benchWords))])
			if rng.IntN(15) == 0 {
				b.WriteString(".\n")
			} else {
				b.WriteByte(' ')
			}
		}
		return b.String()
	}
	r := &Result{Format: FormatVersion, Caution: Caution,
		Settings: Settings{Version: "bench", Unit: "word", MinShared: 3, MinWords: 8, MaxDocs: 50,
			Exclude: []string{}, Include: []string{}, Skip: []string{}, Shingles: &ShingleSettings{Words: 5, Winnow: 4, Gap: 8}},
		Documents: make([]Document, docs), Skipped: []Skipped{}, Common: []Common{}, Pairs: make([]Pair, pairs)}
	for i := range r.Documents {
		d := Document{Path: fmt.Sprintf("submissions/2024/group-%03d/student-%06d/essay.docx", i%997, i),
			Format: "docx", Encoding: "utf-8", Words: 300 + rng.IntN(3000), Reused: frac(), Notes: []string{}}
		d.Units = d.Words - 4
		if rng.IntN(20) == 0 {
			d.Notes = []string{fmt.Sprintf("%d images without text", 1+rng.IntN(5))}
		}
		r.Documents[i] = d
	}
	for i := range r.Pairs {
		p := Pair{A: r.Documents[rng.IntN(docs)].Path, B: r.Documents[rng.IntN(docs)].Path, Shared: 3 + rng.IntN(300),
			CoverageA: frac(), CoverageB: frac(), Jaccard: frac()}
		p.Score = max(p.CoverageA, p.CoverageB)
		for k := 1 + rng.IntN(6); k > 0; k-- {
			start := rng.IntN(20000)
			g := Passage{AStart: start, AEnd: start + 400, BStart: start + 17, BEnd: start + 417, ALine: 1 + start/80,
				BLine: 3 + start/80, AWhere: fmt.Sprintf("page %d, paragraph %d", 1+start/3000, 1+rng.IntN(9)),
				BWhere: fmt.Sprintf("line %d", 3+start/80), Units: 20, Words: 24, Text: text(20, 80)}
			p.Passages = append(p.Passages, g)
		}
		r.Pairs[i] = p
	}
	for i := 0; i < docs/200; i++ {
		r.Skipped = append(r.Skipped, Skipped{Path: fmt.Sprintf("submissions/2024/broken-%04d.pdf", i), Reason: "no text layer"})
		r.Common = append(r.Common, Common{Text: text(5, 8), Documents: 50 + rng.IntN(500)})
	}
	for i := 0; i < docs/500; i++ {
		g := Group{Shared: 3 + rng.IntN(50)}
		for k := 3 + rng.IntN(3); k > 0; k-- {
			g.Documents = append(g.Documents, r.Documents[rng.IntN(docs)].Path)
		}
		r.Groups = append(r.Groups, g)
	}
	for i := 0; i < docs/50; i++ {
		var c Cluster
		for k := 2 + rng.IntN(8); k > 0; k-- {
			c.Documents = append(c.Documents, r.Documents[rng.IntN(docs)].Path)
		}
		r.Clusters = append(r.Clusters, c)
	}
	r.Summary = Summary{Documents: docs, Pairs: pairs, Groups: len(r.Groups), Skipped: len(r.Skipped), Counter: "triangular"}
	return r
}

// BenchmarkWriteJSON renders a Result of 10^5 documents and 10^4 pairs with
// the appenders ("appenders") and with encoding/json as WriteJSON did before
// ("encoding_json"); likewise for NDJSON.
func BenchmarkWriteJSON(b *testing.B) {
	r := benchResult(100_000, 10_000)
	for _, c := range []struct {
		name  string
		write func(io.Writer, *Result) error
	}{
		{"format=json/impl=appenders", WriteJSON},
		{"format=json/impl=encoding_json", referenceWriteJSON},
		{"format=ndjson/impl=appenders", WriteNDJSON},
		{"format=ndjson/impl=encoding_json", referenceWriteNDJSON},
	} {
		b.Run(c.name, func(b *testing.B) {
			var size bytes.Buffer
			if err := c.write(&size, r); err != nil {
				b.Fatal(err)
			}
			b.SetBytes(int64(size.Len()))
			b.ReportAllocs()
			for b.Loop() {
				if err := c.write(io.Discard, r); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}
