package main

import (
	"bufio"
	"encoding/binary"
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
// When the documents fit in the room --memory leaves (quotedRoom), the
// store holds them in memory instead, and a load gives the same text and
// units each time: on 10^5 documents that saved writing 110 MB and
// reading it back once per pair and per document.
type quotedStore struct {
	mu  sync.Mutex
	f   *os.File // nil when the store is in memory
	w   *bufio.Writer
	end int64              // bytes written so far
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
// units, unitBytes each.
type quotedSpot struct {
	off   int64
	text  int64 // bytes of text
	units int64
}

// unitBytes is one encoded unit: Hash, Start, End, Words, Pos.
const unitBytes = 8 + 4*4

// newQuotedStore makes a store in a temporary file in dir, or in memory
// when inMemory is set.
func newQuotedStore(dir string, inMemory bool) (*quotedStore, error) {
	if inMemory {
		return &quotedStore{mem: make(map[int]quotedDoc)}, nil
	}
	f, err := os.CreateTemp(dir, "quoted-*.bin")
	if err != nil {
		return nil, fmt.Errorf("temporary file for the quoted documents: %w", err)
	}
	return &quotedStore{f: f, w: bufio.NewWriterSize(f, 1<<20), at: make(map[int]quotedSpot)}, nil
}

// quotedBytes is what a store holds of a document of the given text bytes
// and units, in memory or on disk.
func quotedBytes(text, units int) int64 { return int64(text) + int64(units)*unitBytes }

// appendUnits appends units to b, unitBytes each.
func appendUnits(b []byte, units []shingle.Unit) []byte {
	for _, u := range units {
		b = binary.LittleEndian.AppendUint64(b, u.Hash)
		b = binary.LittleEndian.AppendUint32(b, u.Start)
		b = binary.LittleEndian.AppendUint32(b, u.End)
		b = binary.LittleEndian.AppendUint32(b, u.Words)
		b = binary.LittleEndian.AppendUint32(b, u.Pos)
	}
	return b
}

// decodeUnits decodes the len(b)/unitBytes units appendUnits wrote to b.
func decodeUnits(b []byte) []shingle.Unit {
	units := make([]shingle.Unit, len(b)/unitBytes)
	for k := range units {
		u := b[k*unitBytes:]
		units[k] = shingle.Unit{
			Hash:  binary.LittleEndian.Uint64(u),
			Start: binary.LittleEndian.Uint32(u[8:]),
			End:   binary.LittleEndian.Uint32(u[12:]),
			Words: binary.LittleEndian.Uint32(u[16:]),
			Pos:   binary.LittleEndian.Uint32(u[20:]),
		}
	}
	return units
}

// put adds document id; it is safe for concurrent use. text and units
// are copied (text may share a buffer the reading goes on with).
func (s *quotedStore) put(id int, text string, units []shingle.Unit) error {
	s.mu.Lock()
	defer s.mu.Unlock()
	if s.f == nil {
		s.mem[id] = quotedDoc{strings.Clone(text), slices.Clone(units)}
		return nil
	}
	b := appendUnits(s.buf[:0], units)
	s.buf = b
	spot := quotedSpot{off: s.end, text: int64(len(text)), units: int64(len(units))}
	if _, err := s.w.WriteString(text); err != nil {
		return fmt.Errorf("writing the quoted documents: %w", err)
	}
	if _, err := s.w.Write(b); err != nil {
		return fmt.Errorf("writing the quoted documents: %w", err)
	}
	s.end += int64(len(text) + len(b))
	s.at[id] = spot
	return nil
}

// done ends the writing; load may be called from then on.
func (s *quotedStore) done() error {
	if s.f == nil {
		return nil
	}
	if err := s.w.Flush(); err != nil {
		return fmt.Errorf("writing the quoted documents: %w", err)
	}
	return nil
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
	raw := make([]byte, spot.text+spot.units*unitBytes)
	if _, err := s.f.ReadAt(raw, spot.off); err != nil {
		return "", nil, fmt.Errorf("reading back the quoted documents: %w", err)
	}
	// The text is the buffer's first bytes, not a copy: the buffer is this
	// call's own and nothing writes to it again (a report loads a
	// document once per pair it is in, so copies added up to a fifth of
	// building the report).
	text := ""
	if spot.text > 0 {
		text = unsafe.String(&raw[0], spot.text)
	}
	return text, decodeUnits(raw[spot.text:]), nil
}

// close removes the file.
func (s *quotedStore) close() error {
	if s.f == nil {
		return nil
	}
	err := s.f.Close()
	if rerr := os.Remove(s.f.Name()); err == nil {
		err = rerr
	}
	return err
}

// unitSpool keeps, in one temporary file, the units of every document as
// the first reading splits them, so that the documents a report quotes
// are read again for their text only, not split again: splitting was two
// thirds of the second reading's work. It costs unitBytes a unit on disk
// (about 1.2 KB for a document of 50 sentences: 120 MB for 10^5 of them)
// and memory for a write buffer; the file lives in the run's temporary
// folder, so an interrupt removes it with the rest.
type unitSpool struct {
	mu  sync.Mutex
	f   *os.File
	w   *bufio.Writer
	end int64 // bytes written so far
	err error // the first write error, reported by done
}

func newUnitSpool(dir string) (*unitSpool, error) {
	f, err := os.CreateTemp(dir, "units-*.bin")
	if err != nil {
		return nil, fmt.Errorf("temporary file for the documents' units: %w", err)
	}
	return &unitSpool{f: f, w: bufio.NewWriterSize(f, 1<<20)}, nil
}

// add writes units, encoded into *scratch first (outside the lock), and
// returns where they start; it is safe for concurrent use. A write error
// is kept for done.
func (s *unitSpool) add(units []shingle.Unit, scratch *[]byte) int64 {
	b := appendUnits((*scratch)[:0], units)
	*scratch = b
	s.mu.Lock()
	defer s.mu.Unlock()
	off := s.end
	if s.err == nil {
		if _, err := s.w.Write(b); err != nil {
			s.err = fmt.Errorf("writing the documents' units: %w", err)
		}
	}
	s.end += int64(len(b))
	return off
}

// done ends the writing and reports the first write error; read may be
// called from then on.
func (s *unitSpool) done() error {
	if s.err != nil {
		return s.err
	}
	if err := s.w.Flush(); err != nil {
		return fmt.Errorf("writing the documents' units: %w", err)
	}
	return nil
}

// read returns the n units written at off; it is safe for concurrent use
// after done.
func (s *unitSpool) read(off int64, n int) ([]shingle.Unit, error) {
	raw := make([]byte, n*unitBytes)
	if _, err := s.f.ReadAt(raw, off); err != nil {
		return nil, fmt.Errorf("reading back the documents' units: %w", err)
	}
	return decodeUnits(raw), nil
}

// close removes the file.
func (s *unitSpool) close() error {
	err := s.f.Close()
	if rerr := os.Remove(s.f.Name()); err == nil {
		err = rerr
	}
	return err
}
