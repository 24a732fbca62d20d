package scan

import (
	"bufio"
	"fmt"
	"os"
	"slices"
	"strings"
	"sync"
	"unsafe"

	"reprise/shingle"
)

// quotedStore keeps, in one temporary file, the texts and units of the
// documents a report quotes, once they are read again: on a large corpus
// those are a fifth of the documents or more (a million documents with one
// in ten copied give some 200,000 of them, about 1.3 GB with their units),
// which memory must not hold at once. The report loads each one back
// (ReadAt, so from the page cache when there is room) while it aligns its
// pairs. Writing is sequential; the file lives in the run's temporary
// folder, so an interrupt removes it with the rest.
//
// When the documents fit in the room --memory leaves (quotedFit), the
// store holds them in memory instead, and a load gives the same text and
// units each time: on 10^5 documents that saved writing 110 MB and
// reading it back once per pair and per document.
type quotedStore struct {
	mu  sync.Mutex
	f   *tempFile          // nil when the store is in memory
	at  map[int]quotedSpot // document index -> where it is
	buf []byte             // encoding scratch, under mu
	mem map[int]quotedDoc  // the documents, when in memory
}

// quotedDoc is a document held by a store in memory.
type quotedDoc struct {
	text  string
	units []shingle.Unit
}

// quotedSpot is where one document lies in the file: its text, then its
// units in shingle's encoding.
type quotedSpot struct {
	off   int64
	text  int64 // bytes of text
	units int64 // bytes of encoded units
}

// unitBytes is what one unit is charged, in memory (a shingle.Unit) and,
// as an upper bound for units in text order, on disk (shingle's encoding
// takes about 12 bytes a unit).
const unitBytes = int64(unsafe.Sizeof(shingle.Unit{}))

// newQuotedStore makes a store in a temporary file in dir, or in memory
// when inMemory is set.
func newQuotedStore(dir string, inMemory bool) (*quotedStore, error) {
	if inMemory {
		return &quotedStore{mem: make(map[int]quotedDoc)}, nil
	}
	f, err := newTempFile(dir, "quoted-*.bin", "the quoted documents")
	if err != nil {
		return nil, err
	}
	return &quotedStore{f: f, at: make(map[int]quotedSpot)}, nil
}

// quotedBytes is what a store holds of a document of the given text bytes
// and units, in memory or on disk.
func quotedBytes(text, units int) int64 { return int64(text) + int64(units)*unitBytes }

// put adds document id; it is safe for concurrent use. text and units
// are copied (text may share a buffer the reading goes on with).
func (s *quotedStore) put(id int, text string, units []shingle.Unit) error {
	s.mu.Lock()
	defer s.mu.Unlock()
	if s.f == nil {
		s.mem[id] = quotedDoc{strings.Clone(text), slices.Clone(units)}
		return nil
	}
	b := shingle.AppendUnits(s.buf[:0], units)
	s.buf = b
	off, err := s.f.write(text, b)
	if err != nil {
		return err
	}
	s.at[id] = quotedSpot{off: off, text: int64(len(text)), units: int64(len(b))}
	return nil
}

// done ends the writing; load may be called from then on.
func (s *quotedStore) done() error {
	if s.f == nil {
		return nil
	}
	return s.f.flush()
}

// has reports whether document id was put.
func (s *quotedStore) has(id int) bool {
	if s.f == nil {
		_, ok := s.mem[id]
		return ok
	}
	_, ok := s.at[id]
	return ok
}

// load reads document id back; it is safe for concurrent use after done.
// The units are the caller's to read, not to change: in memory, every
// load gives the same.
func (s *quotedStore) load(id int) (string, []shingle.Unit, error) {
	if s.f == nil {
		d, ok := s.mem[id]
		if !ok {
			return "", nil, fmt.Errorf("not among the documents read again")
		}
		return d.text, d.units, nil
	}
	spot, ok := s.at[id]
	if !ok {
		return "", nil, fmt.Errorf("not among the documents read again")
	}
	raw, err := s.f.read(spot.off, spot.text+spot.units)
	if err != nil {
		return "", nil, err
	}
	// The text is the buffer's first bytes, not a copy: the buffer is this
	// call's own and nothing writes to it again (a report loads a
	// document once per pair it is in, so copies added up to a fifth of
	// building the report).
	text := ""
	if spot.text > 0 {
		text = unsafe.String(&raw[0], spot.text)
	}
	units, err := shingle.DecodeUnits(raw[spot.text:], nil)
	if err != nil {
		return "", nil, fmt.Errorf("reading back the quoted documents: %w", err)
	}
	return text, units, nil
}

// close removes the file.
func (s *quotedStore) close() error {
	if s.f == nil {
		return nil
	}
	return s.f.remove()
}

// unitSpool keeps, in one temporary file, the units of every document as
// the first reading splits them, so that the documents a report quotes
// are read again for their text only, not split again: splitting was two
// thirds of the second reading's work. Units are in shingle's encoding,
// about 12 bytes a unit on disk (some 600 bytes for a document of 50
// sentences: 60 MB for 10^5 of them)
// and memory for a write buffer; the file lives in the run's temporary
// folder, so an interrupt removes it with the rest.
type unitSpool struct {
	mu  sync.Mutex
	f   *tempFile
	err error // the first write error, reported by done
}

func newUnitSpool(dir string) (*unitSpool, error) {
	f, err := newTempFile(dir, "units-*.bin", "the documents' units")
	if err != nil {
		return nil, err
	}
	return &unitSpool{f: f}, nil
}

// add writes units, encoded into *scratch first (outside the lock), and
// returns where they start and how many bytes they take; it is safe for
// concurrent use. A write error is kept for done.
func (s *unitSpool) add(units []shingle.Unit, scratch *[]byte) (off int64, n uint32) {
	b := shingle.AppendUnits((*scratch)[:0], units)
	*scratch = b
	s.mu.Lock()
	defer s.mu.Unlock()
	off, err := s.f.write("", b)
	if err != nil && s.err == nil {
		s.err = err
	}
	return off, uint32(len(b))
}

// done ends the writing and reports the first write error; read may be
// called from then on.
func (s *unitSpool) done() error {
	if s.err != nil {
		return s.err
	}
	return s.f.flush()
}

// read returns the units add wrote at off in n bytes; it is safe for
// concurrent use after done.
func (s *unitSpool) read(off int64, n uint32) ([]shingle.Unit, error) {
	raw, err := s.f.read(off, int64(n))
	if err != nil {
		return nil, err
	}
	units, err := shingle.DecodeUnits(raw, nil)
	if err != nil {
		return nil, fmt.Errorf("reading back the documents' units: %w", err)
	}
	return units, nil
}

// close removes the file.
func (s *unitSpool) close() error { return s.f.remove() }

// tempFile is an append-only temporary file written through a buffer and
// read back at offsets, the storage of quotedStore and unitSpool; what
// names its contents in errors. Writes are not safe for concurrent use
// (its owners hold a lock); reads are, once flushed.
type tempFile struct {
	f    *os.File
	w    *bufio.Writer
	end  int64 // bytes written so far, failed writes included
	what string
}

func newTempFile(dir, pattern, what string) (*tempFile, error) {
	f, err := os.CreateTemp(dir, pattern)
	if err != nil {
		return nil, fmt.Errorf("temporary file for %s: %w", what, err)
	}
	return &tempFile{f: f, w: bufio.NewWriterSize(f, 1<<20), what: what}, nil
}

// write appends text, then b, and returns where they start. After an
// error the offsets go on as if both had been written; the owner reports
// the error.
func (t *tempFile) write(text string, b []byte) (int64, error) {
	off := t.end
	t.end += int64(len(text) + len(b))
	if _, err := t.w.WriteString(text); err != nil {
		return off, fmt.Errorf("writing %s: %w", t.what, err)
	}
	if _, err := t.w.Write(b); err != nil {
		return off, fmt.Errorf("writing %s: %w", t.what, err)
	}
	return off, nil
}

// flush ends the writing.
func (t *tempFile) flush() error {
	if err := t.w.Flush(); err != nil {
		return fmt.Errorf("writing %s: %w", t.what, err)
	}
	return nil
}

// read returns the n bytes at off, in a buffer of the caller's own.
func (t *tempFile) read(off, n int64) ([]byte, error) {
	raw := make([]byte, n)
	if _, err := t.f.ReadAt(raw, off); err != nil {
		return nil, fmt.Errorf("reading back %s: %w", t.what, err)
	}
	return raw, nil
}

// remove closes and removes the file.
func (t *tempFile) remove() error {
	err := t.f.Close()
	if rerr := os.Remove(t.f.Name()); err == nil {
		err = rerr
	}
	return err
}
