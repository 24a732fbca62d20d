package archive

import (
	"bytes"
	"compress/flate"
	"context"
	"crypto/sha256"
	"encoding/binary"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"slices"
	"time"
	"unsafe"

	"github.com/cockroachdb/pebble/v2"
	kflate "github.com/klauspost/compress/flate"

	"reprise/corpus"
	"reprise/shingle"
)

// Doc is one document as the archive stores it.
type Doc struct {
	ID       uint64        `json:"id"`
	Path     string        `json:"path"`
	Hash     [32]byte      `json:"-"` // SHA-256 of the extracted text
	Format   string        `json:"format"`
	Encoding string        `json:"encoding"`
	Size     int64         `json:"size"`  // bytes on disk when added
	Added    time.Time     `json:"added"` // UTC
	Words    int           `json:"words"`
	Units    int           `json:"units"` // len(UnitList)
	Notes    []string      `json:"notes"`
	Marks    []corpus.Mark `json:"marks"`

	Text     string         `json:"-"` // filled by Load
	UnitList []shingle.Unit `json:"-"` // filled by Load; in text order
}

// meta is Doc's stored JSON form: Doc's fields plus the hash in hex.
type meta struct {
	Doc
	HashHex string `json:"sha256"`
	Text    int    `json:"text_bytes"`
}

// ContentHash is the SHA-256 of a document's extracted text: the identity
// Add is idempotent by. Extracted text, not file bytes, so that it is the
// same for a file and for the same file inside a ZIP, and so that re-saving
// a file without changing its words is no change.
//
// The text is hashed in place, not copied into a byte slice first: the copy
// (an allocation, its clearing and a move of every byte) cost three times
// the hashing in a profile of an add of 10^5 documents (BENCHMARKS.md).
func ContentHash(text string) [32]byte {
	return sha256.Sum256(unsafe.Slice(unsafe.StringData(text), len(text)))
}

// Outcome says what Add did.
type Outcome int

const (
	Added     Outcome = iota // a new document
	Unchanged                // the same content at the same path: nothing done
	Replaced                 // new content at a path already archived: the old version was removed
	Duplicate                // the same content is archived under another path: nothing done
)

func (o Outcome) String() string {
	return [...]string{"added", "unchanged", "replaced", "duplicate"}[o]
}

// AddResult reports one Add.
type AddResult struct {
	Outcome Outcome
	ID      uint64 // the document's ID (the existing one for Unchanged and Duplicate)
	Old     uint64 // the replaced version's ID (Replaced only)
	Other   string // the path the content is archived under (Duplicate only)
}

// Add stores d (Path, Format, Encoding, Size, Words, Notes, Marks, Text and
// UnitList; ID, Hash, Units and Added are set here) in one atomic batch.
// The units must have been cut by the archive's settings.
func (a *Archive) Add(d Doc, now time.Time) (AddResult, error) {
	if a.readOnly {
		return AddResult{}, errors.New("archive: opened read-only")
	}
	d.Hash = ContentHash(d.Text)
	if id, ok, err := a.lookup(hashKey('h', d.Hash)); err != nil {
		return AddResult{}, err
	} else if ok {
		old, err := a.Meta(id)
		if err != nil {
			return AddResult{}, err
		}
		if old.Path == d.Path {
			return AddResult{Outcome: Unchanged, ID: id}, nil
		}
		return AddResult{Outcome: Duplicate, ID: id, Other: old.Path}, nil
	}
	b := a.db.NewBatch()
	defer b.Close()

	res := AddResult{Outcome: Added}
	count, err := a.counter(keyCount)
	if err != nil {
		return res, err
	}
	pathKey := hashKey('n', sha256.Sum256([]byte(d.Path)))
	if oldID, ok, err := a.lookup(pathKey); err != nil {
		return res, err
	} else if ok {
		if err := a.removeInto(b, oldID); err != nil {
			return res, err
		}
		res.Outcome, res.Old = Replaced, oldID
		count--
	}
	next, err := a.counter(keyNext)
	if err != nil {
		return res, err
	}
	id := next
	res.ID = id
	d.ID, d.Units, d.Added = id, len(d.UnitList), now.UTC().Truncate(time.Second)
	d.Notes = nonNil(d.Notes)
	d.Marks = nonNil(d.Marks)

	m, err := json.Marshal(meta{Doc: d, HashHex: fmt.Sprintf("%x", d.Hash), Text: len(d.Text)})
	if err != nil {
		return res, fmt.Errorf("archive: %s: %w", d.Path, err)
	}
	text, err := a.compress(d.Text)
	if err != nil {
		return res, fmt.Errorf("archive: %s: %w", d.Path, err)
	}
	idv := binary.BigEndian.AppendUint64(nil, id)
	set := func(k, v []byte) {
		if err == nil {
			err = b.Set(k, v, nil)
		}
	}
	set(idKey('d', id), m)
	set(idKey('t', id), text)
	set(idKey('u', id), encodeUnits(d.UnitList))
	set(hashKey('h', d.Hash), idv)
	set(pathKey, idv)
	set(keyNext, binary.BigEndian.AppendUint64(nil, next+1))
	set(keyCount, binary.BigEndian.AppendUint64(nil, count+1))
	if err != nil {
		return res, fmt.Errorf("archive: %s: %w", d.Path, err)
	}
	op := binary.AppendUvarint(nil, id)
	for _, fp := range distinct(d.UnitList) {
		a.scratch = postingKey(a.scratch, fp)
		if err := b.Merge(a.scratch, op, nil); err != nil {
			return res, fmt.Errorf("archive: %s: %w", d.Path, err)
		}
	}
	if err := b.Commit(pebble.NoSync); err != nil {
		return res, fmt.Errorf("archive: %s: %w", d.Path, err)
	}
	return res, nil
}

// Remove deletes document id and every key that refers to it, in one
// atomic batch. Call Erase afterwards to push the deletion through to the
// files on disk.
func (a *Archive) Remove(id uint64) error {
	if a.readOnly {
		return errors.New("archive: opened read-only")
	}
	b := a.db.NewBatch()
	defer b.Close()
	if err := a.removeInto(b, id); err != nil {
		return err
	}
	count, err := a.counter(keyCount)
	if err != nil {
		return err
	}
	if err := b.Set(keyCount, binary.BigEndian.AppendUint64(nil, count-1), nil); err != nil {
		return err
	}
	if err := b.Commit(pebble.Sync); err != nil {
		return fmt.Errorf("archive: remove %d: %w", id, err)
	}
	return nil
}

// removeInto adds to b the deletion of document id: its records, its index
// entries, and its ID in every posting (rewritten, or deleted when empty).
func (a *Archive) removeInto(b *pebble.Batch, id uint64) error {
	d, err := a.Load(id)
	if err != nil {
		return err
	}
	for _, fp := range distinct(d.UnitList) {
		key := postingKey(nil, fp)
		ids, err := a.Postings(fp, nil)
		if err != nil {
			return err
		}
		kept := slices.DeleteFunc(ids, func(x uint64) bool { return x == id })
		if len(kept) == 0 {
			err = b.Delete(key, nil)
		} else {
			err = b.Set(key, encodeIDs(kept), nil)
		}
		if err != nil {
			return fmt.Errorf("archive: remove %d: %w", id, err)
		}
	}
	for _, k := range [][]byte{idKey('d', id), idKey('t', id), idKey('u', id),
		hashKey('h', d.Hash), hashKey('n', sha256.Sum256([]byte(d.Path)))} {
		if err := b.Delete(k, nil); err != nil {
			return fmt.Errorf("archive: remove %d: %w", id, err)
		}
	}
	return nil
}

// Erase compacts the whole key range, so that removed values are rewritten
// out of the table files and the logs that held them are retired.
func (a *Archive) Erase(ctx context.Context) error {
	if err := a.db.Flush(); err != nil {
		return fmt.Errorf("archive: flush: %w", err)
	}
	if err := a.db.Compact(ctx, []byte{0}, []byte{0xff, 0xff}, false); err != nil {
		return fmt.Errorf("archive: compact: %w", err)
	}
	return nil
}

// FindPath returns the ID of the document archived under path.
func (a *Archive) FindPath(path string) (uint64, bool, error) {
	return a.lookup(hashKey('n', sha256.Sum256([]byte(path))))
}

// FindHash returns the ID of the document whose extracted text has hash h.
func (a *Archive) FindHash(h [32]byte) (uint64, bool, error) {
	return a.lookup(hashKey('h', h))
}

// Count returns the number of documents in the archive.
func (a *Archive) Count() (int, error) {
	n, err := a.counter(keyCount)
	return int(n), err
}

// Postings appends to dst the IDs of the documents holding fingerprint fp,
// ascending; its length is the unit's document frequency.
func (a *Archive) Postings(fp uint64, dst []uint64) ([]uint64, error) {
	a.scratch = postingKey(a.scratch, fp)
	v, closer, err := a.db.Get(a.scratch)
	if errors.Is(err, pebble.ErrNotFound) {
		return dst, nil
	}
	if err != nil {
		return dst, fmt.Errorf("archive: posting %016x: %w", fp, err)
	}
	defer closer.Close()
	start := len(dst)
	dst, err = decodeIDs(dst, v)
	if err != nil {
		return dst, fmt.Errorf("archive: posting %016x: %w", fp, err)
	}
	slices.Sort(dst[start:])
	return dst, nil
}

// Meta reads a document's metadata (no text, no units).
func (a *Archive) Meta(id uint64) (Doc, error) {
	raw, err := a.get(idKey('d', id))
	if err != nil {
		return Doc{}, fmt.Errorf("archive: document %d: %w", id, err)
	}
	return decodeMeta(raw)
}

func decodeMeta(raw []byte) (Doc, error) {
	var m meta
	if err := json.Unmarshal(raw, &m); err != nil {
		return Doc{}, fmt.Errorf("archive: metadata: %w", err)
	}
	h, err := parseHash(m.HashHex)
	if err != nil {
		return Doc{}, fmt.Errorf("archive: document %d: %w", m.ID, err)
	}
	m.Doc.Hash = h
	return m.Doc, nil
}

// Load reads a document with its text and units.
func (a *Archive) Load(id uint64) (Doc, error) {
	d, err := a.Meta(id)
	if err != nil {
		return d, err
	}
	zt, err := a.get(idKey('t', id))
	if err != nil {
		return d, fmt.Errorf("archive: document %d text: %w", id, err)
	}
	if d.Text, err = decompress(zt); err != nil {
		return d, fmt.Errorf("archive: document %d text: %w", id, err)
	}
	raw, err := a.get(idKey('u', id))
	if err != nil {
		return d, fmt.Errorf("archive: document %d units: %w", id, err)
	}
	if d.UnitList, err = decodeUnits(raw); err != nil {
		return d, fmt.Errorf("archive: document %d units: %w", id, err)
	}
	return d, nil
}

// List returns every document's metadata, by ID.
func (a *Archive) List() ([]Doc, error) {
	it, err := a.db.NewIter(&pebble.IterOptions{LowerBound: []byte("d/"), UpperBound: prefixEnd([]byte("d/"))})
	if err != nil {
		return nil, fmt.Errorf("archive: %w", err)
	}
	defer it.Close()
	var out []Doc
	for it.First(); it.Valid(); it.Next() {
		d, err := decodeMeta(it.Value())
		if err != nil {
			return nil, err
		}
		out = append(out, d)
	}
	return out, it.Error()
}

// Stats describe the archive's contents and size.
type Stats struct {
	Documents int   `json:"documents"`
	Units     int   `json:"units"`      // units over all documents
	Postings  int   `json:"postings"`   // distinct fingerprints
	TextBytes int64 `json:"text_bytes"` // extracted text, uncompressed
	DiskBytes int64 `json:"disk_bytes"` // every file in the folder
}

// Stats counts the archive's documents, units and postings and sums its files.
func (a *Archive) Stats() (Stats, error) {
	var s Stats
	docs, err := a.List()
	if err != nil {
		return s, err
	}
	s.Documents = len(docs)
	for _, d := range docs {
		s.Units += d.Units
	}
	for _, d := range docs {
		raw, err := a.get(idKey('d', d.ID))
		if err != nil {
			return s, err
		}
		var m meta
		if json.Unmarshal(raw, &m) == nil {
			s.TextBytes += int64(m.Text)
		}
	}
	pit, err := a.db.NewIter(&pebble.IterOptions{LowerBound: []byte("p/"), UpperBound: prefixEnd([]byte("p/"))})
	if err != nil {
		return s, err
	}
	for pit.First(); pit.Valid(); pit.Next() {
		s.Postings++
	}
	if err := pit.Close(); err != nil {
		return s, err
	}
	s.DiskBytes, err = DiskUsage(a.dir)
	return s, err
}

func (a *Archive) lookup(key []byte) (uint64, bool, error) {
	v, err := a.get(key)
	if errors.Is(err, pebble.ErrNotFound) {
		return 0, false, nil
	}
	if err != nil {
		return 0, false, fmt.Errorf("archive: %w", err)
	}
	if len(v) != 8 {
		return 0, false, fmt.Errorf("archive: index entry of %d bytes, want 8", len(v))
	}
	return binary.BigEndian.Uint64(v), true, nil
}

func (a *Archive) counter(key []byte) (uint64, error) {
	id, ok, err := a.lookup(key)
	if !ok || err != nil {
		return 0, err
	}
	return id, nil
}

// distinct returns the sorted distinct fingerprints of units.
func distinct(units []shingle.Unit) []uint64 {
	fps := make([]uint64, len(units))
	for i, u := range units {
		fps[i] = u.Hash
	}
	slices.Sort(fps)
	return slices.Compact(fps)
}

// encodeUnits is a document's u/ record: shingle's unit encoding, whose
// first byte is its layout.
func encodeUnits(units []shingle.Unit) []byte { return shingle.AppendUnits(nil, units) }

func decodeUnits(b []byte) ([]shingle.Unit, error) { return shingle.DecodeUnits(b, nil) }

func encodeIDs(ids []uint64) []byte {
	var out []byte
	for _, id := range ids {
		out = binary.AppendUvarint(out, id)
	}
	return out
}

func decodeIDs(dst []uint64, b []byte) ([]uint64, error) {
	for len(b) > 0 {
		id, n := binary.Uvarint(b)
		if n <= 0 {
			return dst, errors.New("bad uvarint in posting")
		}
		dst = append(dst, id)
		b = b[n:]
	}
	return dst, nil
}

// textLevel is the deflate level of stored texts: Huffman coding only,
// no search for repeated strings. The stream is written by
// github.com/klauspost/compress/flate (already in the build: pebble needs
// the module) and is a plain DEFLATE stream (RFC 1951) of the kind the
// standard library writes, so the t/ records keep their format: the
// standard library's inflater reads them, old and new alike.
//
// Huffman only ran at about twice the speed of klauspost's level 1 and
// four times the standard library's BestSpeed (the archive's before), for
// texts of 0.575 of their size against 0.552 and 0.542 on the bench
// corpus, but 0.568 against 0.460 and 0.463 on the Brown samples, prose
// that repeats words and phrases (BenchmarkTextCompression; BENCHMARKS.md).
// It saved about 4 s of the 20-25 s of CPU of an add of 10^5 documents;
// the add's speed was the goal. kflate.BestSpeed here brings the smaller
// archive back, in the same format.
const textLevel = kflate.HuffmanOnly

// textCompressor deflates texts with one reused writer (a writer holds
// several hundred kilobytes of tables: one per goroutine, not one per
// document). Its zero value is ready; it is not safe for concurrent use.
type textCompressor struct{ w *kflate.Writer }

// compress returns the deflated text in a new slice (sized for the usual
// ratio, about a half, so that it rarely grows).
func (c *textCompressor) compress(text string) ([]byte, error) {
	buf := bytes.NewBuffer(make([]byte, 0, len(text)*5/8+64))
	if c.w == nil {
		w, err := kflate.NewWriter(buf, textLevel)
		if err != nil {
			return nil, err
		}
		c.w = w
	} else {
		c.w.Reset(buf)
	}
	// The writer reads the text in place (a Writer may not modify or keep
	// what it is given), not a copy of it.
	if _, err := c.w.Write(unsafe.Slice(unsafe.StringData(text), len(text))); err != nil {
		return nil, err
	}
	if err := c.w.Close(); err != nil {
		return nil, err
	}
	return buf.Bytes(), nil
}

// compress deflates text with the archive's compressor.
func (a *Archive) compress(text string) ([]byte, error) { return a.flate.compress(text) }

func decompress(b []byte) (string, error) {
	r := flate.NewReader(bytes.NewReader(b))
	defer r.Close()
	out, err := io.ReadAll(r)
	return string(out), err
}

func parseHash(s string) ([32]byte, error) {
	var h [32]byte
	if len(s) != 64 {
		return h, fmt.Errorf("sha256 %q: want 64 hex digits", s)
	}
	for i := range h {
		var v byte
		for _, c := range []byte(s[2*i : 2*i+2]) {
			switch {
			case c >= '0' && c <= '9':
				v = v<<4 | (c - '0')
			case c >= 'a' && c <= 'f':
				v = v<<4 | (c - 'a' + 10)
			default:
				return h, fmt.Errorf("sha256 %q: not hexadecimal", s)
			}
		}
		h[i] = v
	}
	return h, nil
}

func nonNil[T any](s []T) []T {
	if s == nil {
		return []T{}
	}
	return s
}

func sha256sum(s string) [32]byte { return sha256.Sum256([]byte(s)) }
