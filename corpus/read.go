package corpus

import (
	"fmt"
	"path"
	"slices"
	"strings"
	"sync"
	"sync/atomic"
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
	docs, _, skipped, err := ReadEach(paths, opt, func(*Document) struct{} { return struct{}{} })
	return docs, skipped, err
}

// ReadEach is Read for corpora larger than memory: it hands every document
// to digest, in the worker that extracted it, the moment its text is
// ready, and keeps of the document only what digest leaves in it. A digest
// that computes what it needs from d.Text and then sets d.Text to "" makes
// the run hold the texts being digested (about one per worker, or one ZIP
// archive's members) instead of every text. The values digest returns come
// back parallel to the documents, in the same order (sorted by Path, ID
// equal to the index). digest runs on up to opt.Jobs goroutines at once
// and must be safe for that; it may change only the Document it is given.
func ReadEach[T any](paths []string, opt Options, digest func(d *Document) T) ([]Document, []T, []Skipped, error) {
	opt, err := opt.withDefaults()
	if err != nil {
		return nil, nil, nil, err
	}
	w := walker{opt: opt}
	for _, p := range paths {
		w.arg(p)
	}
	w.sortAndDedupe()

	var todo []*entry
	var skipped []Skipped
	for i := range w.entries {
		e := &w.entries[i]
		switch {
		case e.dup:
		case e.reason != "":
			skipped = append(skipped, Skipped{Path: e.display, Reason: e.reason})
		default:
			todo = append(todo, e)
		}
	}

	type read struct {
		docs    []Document
		digests []T
		skipped []Skipped
	}
	results := make([]read, len(todo))
	var next atomic.Int64
	var wg sync.WaitGroup
	for range min(opt.Jobs, len(todo)) {
		wg.Go(func() {
			for {
				i := int(next.Add(1) - 1)
				if i >= len(todo) {
					return
				}
				r := &results[i]
				readEntry(todo[i], &opt, func(p *part) {
					name := todo[i].display + p.sub
					if p.reason != "" {
						r.skipped = append(r.skipped, Skipped{Path: name, Reason: p.reason})
						return
					}
					d := Document{
						Path:     name,
						Format:   p.format,
						Encoding: p.Encoding,
						Size:     p.size,
						File:     name[:len(todo[i].display)],
						Text:     p.Text,
						Notes:    p.Notes,
						Marks:    p.Marks,
					}
					*p = part{} // the text is the digest's from here on
					r.digests = append(r.digests, digest(&d))
					r.docs = append(r.docs, d)
				})
			}
		})
	}
	wg.Wait()
	w.entries, todo = nil, nil // the walk's names and identities are not needed any more

	total := 0
	for i := range results {
		total += len(results[i].docs)
	}
	docs := make([]Document, 0, total)
	digests := make([]T, 0, total)
	for i := range results {
		r := &results[i]
		docs = append(docs, r.docs...)
		digests = append(digests, r.digests...)
		skipped = append(skipped, r.skipped...)
		results[i] = read{} // held once, not twice, for a large corpus
	}
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

// readEntry reads one file and hands emit its documents (one, or one per
// member of a ZIP archive or line of a JSON Lines file), or the reason
// there is none.
func readEntry(e *entry, opt *Options, emit func(*part)) {
	if isJSONL(e.display) { // streamed, one document per line (jsonl.go)
		readJSONLEach(e.osPath, opt, emit)
		return
	}
	limit := opt.MaxFileSize
	if e.size > limit { // stat says so: the file is not opened
		emit(&part{reason: tooLarge(limit)})
		return
	}
	raw, err := readFile(e.osPath, e.size, limit)
	if err != nil {
		emit(&part{reason: osReason(err)})
		return
	}
	if int64(len(raw)) > limit { // it grew since the walk
		emit(&part{reason: tooLarge(limit)})
		return
	}
	budget := opt.MaxContainerBytes
	parts := extractFile(path.Base(e.display), &input{raw: raw, osPath: e.osPath, opt: opt, budget: &budget, owned: true})
	for k := range parts {
		emit(&parts[k])
	}
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
