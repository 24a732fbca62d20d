package archive

import (
	"bytes"
	"cmp"
	"compress/flate"
	"context"
	"crypto/sha256"
	"encoding/binary"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"runtime"
	"slices"
	"sync"
	"time"

	"github.com/cockroachdb/pebble/v2/objstorage/objstorageprovider"
	"github.com/cockroachdb/pebble/v2/sstable"
	"github.com/cockroachdb/pebble/v2/vfs"
)

// Chunks of AddAll: a chunk is ingested once it holds chunkTextBytes of
// text or its number of documents, whichever comes first. The first chunk
// holds firstChunkDocs documents, and each next one half as many again as
// the one before, up to chunkDocs: a small add is not held back for a large chunk,
// the first documents are durable early, and the number of ingestions still
// grows only with the logarithm of a large add (each costs a few fsyncs).
const (
	chunkTextBytes = 32 << 20
	firstChunkDocs = 8
	chunkDocs      = 8192
)

// ingestDir is the folder, inside the archive's, where AddAll writes a
// chunk's table files before they are ingested. What a killed add leaves
// there is deleted by the next writable Open.
const ingestDir = "ingest.tmp"

// prepared is one document of AddAll with everything that does not depend
// on the store computed: hash, compressed text, units, fingerprints.
type prepared struct {
	hash     [32]byte
	pathHash [32]byte
	text     []byte // compressed
	units    []byte // encoded
	fps      []uint64
	err      error
}

// AddAll adds docs in order, with the outcome of calling Add on each in
// turn, and tells each (when set) the outcome of every document, in order.
// It is the fast path of a large add: the texts are compressed on every
// core, and runs of new documents (content and path not archived yet, nor
// earlier in the same run) are written as sorted table files and ingested
// into the store in chunks of up to 32 MB of text or 8192 documents. A
// chunk is the unit of atomicity: after a crash the archive holds each
// chunk wholly or not at all, and it is durable once each has been told of
// its documents. A document that replaces an archived version, or whose
// content is archived already, goes through Add. Once ctx is done, AddAll
// syncs what was added and returns ctx's error.
func (a *Archive) AddAll(ctx context.Context, docs []Doc, now time.Time, each func(i int, r AddResult)) error {
	if a.readOnly {
		return errors.New("archive: opened read-only")
	}
	if each == nil {
		each = func(int, AddResult) {}
	}
	now = now.UTC().Truncate(time.Second)
	b := &bulk{a: a, now: now, each: each, maxText: chunkTextBytes, maxDocs: firstChunkDocs, capDocs: chunkDocs}
	if a.chunkDocs > 0 {
		b.maxDocs, b.capDocs = a.chunkDocs, a.chunkDocs
	}
	// Windows of documents are prepared on every core, the next window
	// while the current one is written.
	const window = 2048
	prep := func(lo, hi int) chan []prepared {
		ch := make(chan []prepared, 1)
		go func() { ch <- prepareAll(docs[lo:hi]) }()
		return ch
	}
	var next chan []prepared
	if len(docs) > 0 {
		next = prep(0, min(window, len(docs)))
	}
	for lo := 0; lo < len(docs); lo += window {
		hi := min(lo+window, len(docs))
		ps := <-next
		if hi < len(docs) {
			next = prep(hi, min(hi+window, len(docs)))
		}
		for k := range ps {
			if err := ctx.Err(); err != nil {
				b.pending = nil // not ingested: the documents are not added
				return cmp.Or(a.Sync(), err)
			}
			if ps[k].err != nil {
				return fmt.Errorf("archive: %s: %w", docs[lo+k].Path, ps[k].err)
			}
			if err := b.add(lo+k, &docs[lo+k], &ps[k]); err != nil {
				return err
			}
		}
	}
	if err := b.flush(); err != nil {
		return err
	}
	return a.Sync()
}

// prepareAll prepares docs on every core.
func prepareAll(docs []Doc) []prepared {
	out := make([]prepared, len(docs))
	workers := min(runtime.GOMAXPROCS(0), len(docs))
	var wg sync.WaitGroup
	for w := range workers {
		wg.Go(func() {
			var zw *flate.Writer
			for i := w; i < len(docs); i += workers {
				d, p := &docs[i], &out[i]
				p.hash = ContentHash(d.Text)
				p.pathHash = sha256.Sum256([]byte(d.Path))
				var buf bytes.Buffer
				if zw == nil {
					zw, p.err = flate.NewWriter(&buf, textLevel)
					if p.err != nil {
						continue
					}
				} else {
					zw.Reset(&buf)
				}
				if _, p.err = io.WriteString(zw, d.Text); p.err == nil {
					p.err = zw.Close()
				}
				p.text = buf.Bytes()
				p.units = encodeUnits(d.UnitList)
				p.fps = distinct(d.UnitList)
			}
		})
	}
	wg.Wait()
	return out
}

// bulk is the state of one AddAll: the chunk being gathered.
type bulk struct {
	a       *Archive
	now     time.Time
	each    func(int, AddResult)
	pending []pendingDoc
	hashes  map[[32]byte]bool // content of the pending documents
	paths   map[[32]byte]bool // paths of the pending documents
	text    int
	maxText int    // a chunk is ingested at this much text
	maxDocs int    // or at this many documents
	capDocs int    // the most maxDocs grows to
	next    uint64 // the next ID, once read
	count   uint64
	known   bool // next and count are read
}

type pendingDoc struct {
	i    int
	id   uint64
	meta []byte
	p    *prepared
}

// add takes document i: into the pending chunk when it is new, else
// through Add once the chunk is ingested.
func (b *bulk) add(i int, d *Doc, p *prepared) error {
	a := b.a
	fast := !b.hashes[p.hash] && !b.paths[p.pathHash]
	if fast {
		if _, ok, err := a.lookup(hashKey('h', p.hash)); err != nil {
			return err
		} else if ok {
			fast = false
		}
	}
	if fast {
		if _, ok, err := a.lookup(hashKey('n', p.pathHash)); err != nil {
			return err
		} else if ok {
			fast = false
		}
	}
	if !fast {
		if err := b.flush(); err != nil {
			return err
		}
		r, err := a.Add(*d, b.now)
		if err != nil {
			return err
		}
		b.known = false // Add moved the counters
		b.each(i, r)
		return nil
	}
	if !b.known {
		var err error
		if b.next, err = a.counter(keyNext); err != nil {
			return err
		}
		if b.count, err = a.counter(keyCount); err != nil {
			return err
		}
		b.known = true
	}
	id := b.next
	b.next++
	b.count++
	doc := *d
	doc.Hash, doc.ID, doc.Units, doc.Added = p.hash, id, len(d.UnitList), b.now
	doc.Text, doc.UnitList = "", nil
	doc.Notes, doc.Marks = nonNil(doc.Notes), nonNil(doc.Marks)
	m, err := json.Marshal(meta{Doc: doc, HashHex: fmt.Sprintf("%x", p.hash), Text: len(d.Text)})
	if err != nil {
		return fmt.Errorf("archive: %s: %w", d.Path, err)
	}
	if b.hashes == nil {
		b.hashes, b.paths = map[[32]byte]bool{}, map[[32]byte]bool{}
	}
	b.hashes[p.hash], b.paths[p.pathHash] = true, true
	b.pending = append(b.pending, pendingDoc{i: i, id: id, meta: m, p: p})
	b.text += len(d.Text)
	if b.text >= b.maxText || len(b.pending) >= b.maxDocs {
		return b.flush()
	}
	return nil
}

// flush ingests the pending chunk: one table file per key prefix (the
// files of one ingestion may not overlap), all ingested at once.
func (b *bulk) flush() error {
	if len(b.pending) == 0 {
		return nil
	}
	a := b.a
	tmp := filepath.Join(a.dir, ingestDir)
	if err := os.MkdirAll(tmp, 0o700); err != nil {
		return fmt.Errorf("archive: %w", err)
	}
	defer os.RemoveAll(tmp)
	var files []string
	var werr error
	write := func(name string, keys bool, fill func(w *sstable.Writer) error) {
		if werr != nil || !keys {
			return
		}
		path := filepath.Join(tmp, name)
		f, err := privateFS{a.fs}.Create(path, vfs.WriteCategoryUnspecified)
		if err != nil {
			werr = err
			return
		}
		w := sstable.NewWriter(objstorageprovider.NewFileWritable(f), a.opts.MakeWriterOptions(0, a.db.TableFormat()))
		err = fill(w)
		if cerr := w.Close(); err == nil {
			err = cerr
		}
		if err != nil {
			werr = err
			return
		}
		files = append(files, path)
	}
	ps := b.pending
	idv := func(id uint64) []byte { return binary.BigEndian.AppendUint64(nil, id) }
	byID := func(prefix byte, val func(p *pendingDoc) []byte) func(w *sstable.Writer) error {
		return func(w *sstable.Writer) error {
			for k := range ps {
				if err := w.Set(idKey(prefix, ps[k].id), val(&ps[k])); err != nil {
					return err
				}
			}
			return nil
		}
	}
	byHash := func(prefix byte, h func(p *pendingDoc) [32]byte) func(w *sstable.Writer) error {
		return func(w *sstable.Writer) error {
			order := make([]int, len(ps))
			for k := range order {
				order[k] = k
			}
			slices.SortFunc(order, func(x, y int) int {
				hx, hy := h(&ps[x]), h(&ps[y])
				return bytes.Compare(hx[:], hy[:])
			})
			for _, k := range order {
				if err := w.Set(hashKey(prefix, h(&ps[k])), idv(ps[k].id)); err != nil {
					return err
				}
			}
			return nil
		}
	}
	// Keys in byte order: d/, h/, m/, n/, p/, t/, u/.
	write("d.sst", true, byID('d', func(p *pendingDoc) []byte { return p.meta }))
	write("h.sst", true, byHash('h', func(p *pendingDoc) [32]byte { return p.p.hash }))
	write("m.sst", true, func(w *sstable.Writer) error {
		// m/count sorts before m/next; m/settings is never rewritten.
		if err := w.Set(keyCount, idv(b.count)); err != nil {
			return err
		}
		return w.Set(keyNext, idv(b.next))
	})
	write("n.sst", true, byHash('n', func(p *pendingDoc) [32]byte { return p.p.pathHash }))
	type op struct{ fp, id uint64 }
	var ops []op
	for k := range ps {
		for _, fp := range ps[k].p.fps {
			ops = append(ops, op{fp, ps[k].id})
		}
	}
	write("p.sst", len(ops) > 0, func(w *sstable.Writer) error {
		slices.SortFunc(ops, func(x, y op) int { return cmp.Or(cmp.Compare(x.fp, y.fp), cmp.Compare(x.id, y.id)) })
		var key, val []byte
		for j := 0; j < len(ops); {
			val = val[:0]
			fp := ops[j].fp
			for ; j < len(ops) && ops[j].fp == fp; j++ {
				val = binary.AppendUvarint(val, ops[j].id)
			}
			key = postingKey(key, fp)
			if err := w.Merge(key, val); err != nil {
				return err
			}
		}
		return nil
	})
	write("t.sst", true, byID('t', func(p *pendingDoc) []byte { return p.p.text }))
	write("u.sst", true, byID('u', func(p *pendingDoc) []byte { return p.p.units }))
	if werr != nil {
		return fmt.Errorf("archive: write a chunk of %d documents: %w", len(ps), werr)
	}
	// Not under the add's context: an ingestion is whole or absent, and
	// once begun it is let finish.
	if err := a.db.Ingest(context.Background(), files); err != nil {
		return fmt.Errorf("archive: ingest a chunk of %d documents: %w", len(ps), err)
	}
	for k := range ps {
		b.each(ps[k].i, AddResult{Outcome: Added, ID: ps[k].id})
	}
	b.pending = b.pending[:0]
	b.maxDocs = min(b.maxDocs+b.maxDocs/2, b.capDocs)
	clear(b.hashes)
	clear(b.paths)
	b.text = 0
	return nil
}
