package corpus

import (
	"context"
	"fmt"
	"path"
	"slices"
	"strings"
	"sync"
)

// Read walks paths (files and folders, in any mix), reads every text file
// found, and returns the documents sorted by Path with ID equal to their
// index, and the inputs that gave no document, sorted by Path, each with
// its reason. The error is only for invalid options (a malformed glob, a
// negative size or job count); a file that cannot be read is never an
// error, it is listed in Skipped.
//
// Files are read and decoded by opt.Jobs workers; the result does not
// depend on their number or timing.
func Read(paths []string, opt Options) ([]Document, []Skipped, error) {
	docs, _, skipped, err := ReadEach(paths, opt, func(_ *Document, text *Loan) struct{} {
		text.Keep()
		return struct{}{}
	})
	return docs, skipped, err
}

// ReadEach is Read for corpora larger than memory: it hands every document
// to digest, in the worker that extracted it, the moment its text is
// ready, and keeps of the document only what digest leaves in it. The
// text comes as a *Loan, apart from the Document (whose Text is empty
// while digest runs): a digest that computes what it needs from
// text.Text() and does not Keep it makes the run hold the texts being
// digested (about one per worker, or one ZIP archive's members) instead of
// every text, and the worker may read its next file into the buffer the
// text shared. A digest that calls text.Keep() leaves the text in the
// Document for good. The values digest returns come
// back parallel to the documents, in the same order (sorted by Path, ID
// equal to the index). digest runs on up to opt.Jobs goroutines at once
// and must be safe for that; it may change only the Document it is given.
//
// The workers start reading while the walk goes on: each file is read as
// soon as the walk has found it, and the result is put in order only once
// the walk and the reads are over. So a file reached twice (named twice,
// or through a hard link) is read under each name, and digest may see a
// document that is not returned: the one read under the name that does
// not sort first, whose documents, digests and skipped parts are dropped.
// That is rare, and costs one more read of the file; knowing the duplicate
// in advance would mean waiting for the whole walk.
//
// The walk runs in the calling goroutine and hands each file it finds to
// the workers through a queue of jobQueue copies of its entry; each file's
// documents, digests and skipped parts go into a slot of its own, numbered
// in walk order (a chunked store, so the slots the workers write to never
// move). Memory is what it was when the reads waited for the walk: one
// entry and one slot per file, and once the walk is over the order of the
// kept slots (one int per file, as the list of files to read was); the
// entries are dropped before the documents are gathered.
func ReadEach[T any](paths []string, opt Options, digest func(d *Document, text *Loan) T) ([]Document, []T, []Skipped, error) {
	return ReadEachContext(context.Background(), paths, opt, digest)
}

// Loan is a document's text as ReadEach lends it to a digest, the way
// bufio.Scanner lends its Bytes: Text is valid only until the digest
// returns (the worker may read its next file into the buffer it shares),
// unless the digest calls Keep, which gives the text to the Document for
// good (its buffer is then never read into again). A digest keeps no part
// of a text it did not Keep: no substring, no slice of its bytes; copy
// what it needs (strings.Clone).
type Loan struct {
	text string
	kept bool
}

// Text returns the lent text, valid until the digest returns unless Keep
// is called.
func (l *Loan) Text() string { return l.text }

// Keep makes the text the Document's: ReadEach returns it in Document.Text.
func (l *Loan) Keep() { l.kept = true }

// ReadEachContext is ReadEach under ctx: once ctx is done, the walk lists
// no more files, the workers read no more of them (a file being read is
// finished), and the call returns ctx's error and no documents.
func ReadEachContext[T any](ctx context.Context, paths []string, opt Options, digest func(d *Document, text *Loan) T) ([]Document, []T, []Skipped, error) {
	opt, err := opt.withDefaults()
	if err != nil {
		return nil, nil, nil, err
	}

	// What one candidate entry gave, stored by its seq (its rank among the
	// candidates in walk order): written by the worker that read it, read
	// here after all the workers are done.
	type read struct {
		docs    []Document
		digests []T
		skipped []Skipped
	}
	type job struct {
		e entry // a copy: the walker's slice moves as it grows
		r *read
	}
	var results chunked[read] // grown by this goroutine only, during the walk
	jobs := make(chan job, jobQueue)
	work := func() {
		var sc scratch // the worker's buffers, reused from file to file
		for j := range jobs {
			if ctx.Err() != nil {
				continue // drained, not read
			}
			r, name0 := j.r, j.e.display
			kept := false
			used := readEntry(&j.e, &opt, &sc, func(p *part) {
				name := name0 + p.sub
				if p.reason != "" {
					r.skipped = append(r.skipped, Skipped{Path: name, Reason: p.reason})
					return
				}
				d := Document{
					Path:     name,
					Format:   p.format,
					Encoding: p.Encoding,
					Size:     p.size,
					File:     name0,
					Notes:    p.Notes,
					Marks:    p.Marks,
				}
				loan := Loan{text: p.Text}
				*p = part{} // the text is the digest's from here on
				r.digests = append(r.digests, digest(&d, &loan))
				if loan.kept {
					d.Text, kept = loan.text, true
				}
				r.docs = append(r.docs, d)
			})
			// A plain text file's text may be the buffer itself (text.go)
			// or the decoding buffer: they are written again only when
			// every document of the file gave its text back.
			sc.done(used, kept)
		}
	}
	var wg sync.WaitGroup
	workers := 0
	w := walker{opt: opt, stopped: func() bool { return ctx.Err() != nil }, found: func(e *entry) {
		if workers < opt.Jobs { // started as files come, at most one per file
			workers++
			wg.Go(work)
		}
		jobs <- job{e: *e, r: results.at(e.seq)}
	}}
	for _, p := range paths {
		if w.stop() {
			break
		}
		w.arg(p)
	}
	close(jobs)
	wg.Wait()
	if err := ctx.Err(); err != nil {
		return nil, nil, nil, err
	}

	// Sorted and de-duplicated as if nothing had been read yet; the
	// readings of the entries found to be duplicates are thrown away.
	w.sortAndDedupe()
	var skipped []Skipped
	order := make([]int, 0, w.candidates) // the seq of each kept candidate, by Path
	for i := range w.entries {
		e := &w.entries[i]
		switch {
		case e.dup:
			if e.reason == "" {
				*results.at(e.seq) = read{}
			}
			if e.aliasOf != "" {
				// Another name of a file read under the name kept (a
				// symbolic or hard link): listed, never dropped silently.
				skipped = append(skipped, Skipped{Path: e.display, Reason: "same file as " + e.aliasOf + " (read under that name)"})
			}
		case e.reason != "":
			skipped = append(skipped, Skipped{Path: e.display, Reason: e.reason})
		default:
			order = append(order, e.seq)
		}
	}
	w.entries = nil // the walk's names and identities are not needed any more

	total := 0
	for _, k := range order {
		total += len(results.at(k).docs)
	}
	docs := make([]Document, 0, total)
	digests := make([]T, 0, total)
	for _, k := range order {
		r := results.at(k)
		docs = append(docs, r.docs...)
		digests = append(digests, r.digests...)
		skipped = append(skipped, r.skipped...)
		*r = read{} // held once, not twice, for a large corpus
	}
	results, order = chunked[read]{}, nil
	// The documents come in the walk's order, sorted by path, unless a ZIP
	// archive's members ("a.zip!/x") or a JSON Lines file's lines sort
	// among other paths: sort again, then number.
	byPath := func(a, b int) int { return strings.Compare(docs[a].Path, docs[b].Path) }
	if !slices.IsSortedFunc(docs, func(a, b Document) int { return strings.Compare(a.Path, b.Path) }) {
		order := make([]int, total)
		for i := range order {
			order[i] = i
		}
		slices.SortStableFunc(order, byPath)
		sortedDocs, sortedDigests := make([]Document, total), make([]T, total)
		for i, k := range order {
			sortedDocs[i], sortedDigests[i] = docs[k], digests[k]
		}
		docs, digests = sortedDocs, sortedDigests
	}
	for i := range docs {
		docs[i].ID = i
	}
	slices.SortStableFunc(skipped, func(a, b Skipped) int { return strings.Compare(a.Path, b.Path) })
	return docs, digests, skipped, nil
}

// jobQueue is how many found files may wait for a worker: enough for the
// walk to run ahead of the reads without waking up for every file, few
// enough that their copies cost nothing next to the walk's own entries.
const jobQueue = 1024

// chunkLen is the number of values in one chunk of a chunked store.
const chunkLen = 1024

// A chunked store holds values by index in chunks of chunkLen that never
// move, so a pointer to one stays valid while the store grows (a slice
// that is appended to is copied elsewhere when it outgrows its capacity).
// It costs what a slice of the same values would, plus less than one
// chunk. Growing it is not safe for concurrent use; writing through the
// pointers it gave out is, one goroutine per value.
type chunked[V any] struct {
	chunks [][]V
}

// at returns the value of index i, growing the store to hold it.
func (c *chunked[V]) at(i int) *V {
	for i/chunkLen >= len(c.chunks) {
		c.chunks = append(c.chunks, make([]V, chunkLen))
	}
	return &c.chunks[i/chunkLen][i%chunkLen]
}

// readEntry reads one file, into sc.raw when it serves (readBuffer), and hands
// emit its documents (one, or one per member of a ZIP archive or line of a
// JSON Lines file), or the reason there is none. It returns the buffer the
// file was read into (nil when none was), which a document's text may
// alias (text.go): the caller may read into it again only once no document
// keeps its text.
func readEntry(e *entry, opt *Options, sc *scratch, emit func(*part)) []byte {
	buf := sc.raw
	if isJSONL(e.display) { // streamed, one document per line (jsonl.go)
		readJSONLEach(e.osPath, opt, emit)
		return buf
	}
	limit := opt.MaxFileSize
	if e.size > limit { // stat says so: the file is not opened
		emit(&part{reason: tooLarge(limit)})
		return buf
	}
	raw, err := readFile(e.osPath, e.size, limit, buf)
	if err != nil {
		emit(&part{reason: osReason(err)})
		return raw
	}
	if int64(len(raw)) > limit { // it grew since the walk
		emit(&part{reason: tooLarge(limit)})
		return raw
	}
	budget := opt.MaxContainerBytes
	in := &input{raw: raw, osPath: e.osPath, opt: opt, budget: &budget, owned: true, dl: newDeadline(opt.FileTimeout), scratch: sc}
	parts := extractFile(path.Base(e.display), in)
	for k := range parts {
		emit(&parts[k])
	}
	return raw
}

// smallBuffer is the capacity up to which a worker's read buffer serves
// any smaller file. A larger buffer serves only files that fill at least a
// quarter of it (readBuffer): a batch of large files is read into one
// buffer per worker (a fresh buffer per file would cost its pages from the
// kernel again, and the runtime hands a large freed buffer back to the
// kernel sooner or later, so the cost per file jumped where files passed
// a fixed cap on what is kept), while one large file does not make its
// worker hold its size for the small files that follow. What a worker
// holds is never more than the largest file it is reading or has just
// read, which it held while reading it anyway.
const smallBuffer = 1 << 20

// readBuffer returns buf emptied when it has room for want bytes and is
// not much larger than needed (see smallBuffer), else a new buffer of
// capacity want.
func readBuffer(buf []byte, want int64) []byte {
	if c := int64(cap(buf)); c >= want && (c <= smallBuffer || want >= c/4) {
		return buf[:0]
	}
	return make([]byte, 0, want)
}

// tooLarge is the reason for a file over the size limit.
func tooLarge(limit int64) string {
	return fmt.Sprintf("larger than the %s limit (--max-file-size)", formatSize(limit))
}

func formatSize(n int64) string {
	switch {
	case n >= 1<<20 && n%(1<<20) == 0:
		return fmt.Sprintf("%d MiB", n>>20)
	case n >= 1<<10 && n%(1<<10) == 0:
		return fmt.Sprintf("%d KiB", n>>10)
	}
	return fmt.Sprintf("%d bytes", n)
}
