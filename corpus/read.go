package corpus

import (
	"fmt"
	"io"
	"os"
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
	opt, err := opt.withDefaults()
	if err != nil {
		return nil, nil, err
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

	results := make([][]part, len(todo))
	var next atomic.Int64
	var wg sync.WaitGroup
	for range min(opt.Jobs, len(todo)) {
		wg.Go(func() {
			for {
				i := int(next.Add(1) - 1)
				if i >= len(todo) {
					return
				}
				results[i] = readEntry(todo[i], &opt)
			}
		})
	}
	wg.Wait()

	var docs []Document
	for i, parts := range results {
		for _, r := range parts {
			p := todo[i].display + r.sub
			if r.reason != "" {
				skipped = append(skipped, Skipped{Path: p, Reason: r.reason})
				continue
			}
			docs = append(docs, Document{
				Path:     p,
				Format:   r.format,
				Encoding: r.Encoding,
				Size:     r.size,
				Text:     r.Text,
				Notes:    r.Notes,
				Marks:    r.Marks,
			})
		}
	}
	// ZIP members ("a.zip!/x") sort among the other paths, not after their
	// archive's siblings: sort again, then number.
	slices.SortStableFunc(docs, func(a, b Document) int { return strings.Compare(a.Path, b.Path) })
	for i := range docs {
		docs[i].ID = i
	}
	slices.SortStableFunc(skipped, func(a, b Skipped) int { return strings.Compare(a.Path, b.Path) })
	return docs, skipped, nil
}

// readEntry reads one file and extracts its documents (one, or one per
// member of a ZIP archive), or the reason there is none.
func readEntry(e *entry, opt *Options) []part {
	if isJSONL(e.display) { // streamed, one document per line (jsonl.go)
		return readJSONL(e.osPath, opt)
	}
	limit := opt.MaxFileSize
	if e.size > limit { // stat says so: the file is not opened
		return []part{{reason: tooLarge(limit)}}
	}
	raw, err := readFile(e.osPath, e.size, limit)
	if err != nil {
		return []part{{reason: osReason(err)}}
	}
	if int64(len(raw)) > limit { // it grew since the walk
		return []part{{reason: tooLarge(limit)}}
	}
	budget := opt.MaxContainerBytes
	return extractFile(path.Base(e.display), &input{raw: raw, osPath: e.osPath, opt: opt, budget: &budget})
}

// readFile reads at most limit+1 bytes of the file (one more than allowed,
// to notice a file that outgrew the limit), into a buffer sized from the
// size the walk saw.
func readFile(name string, size, limit int64) ([]byte, error) {
	f, err := os.Open(name)
	if err != nil {
		return nil, err
	}
	defer f.Close()
	buf := make([]byte, 0, min(size, limit)+1)
	for int64(len(buf)) <= limit {
		if len(buf) == cap(buf) {
			buf = slices.Grow(buf, max(512, min(len(buf), 1<<20)))
		}
		n, err := f.Read(buf[len(buf):cap(buf)])
		buf = buf[:len(buf)+n]
		if err == io.EOF {
			break
		}
		if err != nil {
			return nil, err
		}
	}
	return buf, nil
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
