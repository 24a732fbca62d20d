package corpus

import "unsafe"

// A scratch is the memory one worker reuses from file to file: the buffer
// files are read into and the Markdown blanker's tables (its lines,
// delimiter runs and brackets, sized from the file). A fresh allocation of
// a file's size for every file costs its pages from the kernel again each
// time the runtime has handed the last one back, and the runtime hands
// large freed memory back soon after a collection; for a batch of large
// files that cost was up to half of a read, and it grew faster than the
// files. Reused, a batch of files of one size takes no fresh pages after
// the first.
//
// What is kept is bounded as the read buffer is (readBuffer, reuse): a
// table of at most smallBuffer bytes serves any later need it has room
// for, a larger one only a need of at least a quarter of it, so that one
// large file does not make its worker hold that much for the small files
// that follow. A nil *scratch is valid and reuses nothing (a fresh blanker
// per call): for callers outside a worker, such as tests and fuzz targets.
// A scratch is used by one goroutine.
type scratch struct {
	raw []byte    // the read buffer, while no document keeps it (Loan)
	md  mdBlanker // its dl is set per file; its slices are kept
	// dec is the buffer a text that is not UTF-8 is decoded into
	// (decode), while no document keeps it; lent is the one the current
	// file's text was decoded into, back in dec after the file (done)
	// when no document of the file kept its text.
	dec, lent []byte
}

// decodeBuffer returns an empty buffer with room for need bytes for the
// current file's decoded text: the worker's, taken out of the scratch
// until done gives it back, or a new one (a nil scratch, or one whose
// buffer does not serve: see reuse). A second text of the same file (a
// ZIP member) gets a new buffer, as the first may still be read.
func (sc *scratch) decodeBuffer(need int) []byte {
	if sc == nil {
		return make([]byte, 0, need)
	}
	b := reuse(sc.dec, need)
	sc.dec, sc.lent = nil, b
	return b
}

// done ends a file whose bytes were read into read: its buffers serve
// the next file when no document kept its text (Loan.Keep), and are left
// to the documents otherwise.
func (sc *scratch) done(read []byte, kept bool) {
	sc.raw = nil
	if !kept {
		sc.raw = read
		if sc.lent != nil {
			sc.dec = sc.lent
		}
	}
	sc.lent = nil
}

// blanker returns the Markdown blanker for one text under the deadline
// dl: the worker's, its tables kept, or a new one for a nil scratch.
func (sc *scratch) blanker(dl *deadline) *mdBlanker {
	if sc == nil {
		return &mdBlanker{dl: dl}
	}
	// As new, but for the tables' memory: no answer cached for one
	// text (a failed rule test, a closer found ahead) reaches the next.
	m := &sc.md
	clear(m.ticks)
	*m = mdBlanker{dl: dl, lines: m.lines[:0], delims: m.delims[:0], brackets: m.brackets[:0], jump: m.jump[:0], ticks: m.ticks}
	return m
}

// reuse returns s emptied when it has room for need elements and is not
// much larger than needed (the rule of readBuffer, in bytes), else a new
// slice of capacity need: the one allocation of its final size that
// growing by append would have made several times over.
func reuse[E any](s []E, need int) []E {
	var e E
	c := cap(s)
	if c >= need && (c*int(unsafe.Sizeof(e)) <= smallBuffer || need >= c/4) {
		return s[:0]
	}
	return make([]E, 0, need)
}
