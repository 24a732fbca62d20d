package archive

import (
	"bytes"
	"cmp"
	"context"
	"crypto/sha256"
	"encoding/binary"
	"encoding/json"
	"errors"
	"fmt"
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
	b := &bulk{ctx: ctx, a: a, now: now, each: each, maxText: chunkTextBytes, maxDocs: firstChunkDocs, capDocs: chunkDocs}
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
				// The chunk being ingested is let finish (and told of).
				return cmp.Or(b.wait(), a.Sync(), err)
			}
			if ps[k].err != nil {
				return cmp.Or(b.wait(), fmt.Errorf("archive: %s: %w", docs[lo+k].Path, ps[k].err))
			}
			if err := b.add(lo+k, &docs[lo+k], &ps[k]); err != nil {
				if cerr := ctx.Err(); cerr != nil && errors.Is(err, cerr) {
					return cmp.Or(b.wait(), a.Sync(), err)
				}
				return cmp.Or(b.wait(), err)
			}
		}
	}
	if err := b.flush(); err != nil {
		if cerr := ctx.Err(); cerr != nil && errors.Is(err, cerr) {
			return cmp.Or(a.Sync(), err)
		}
		return err
	}
	if err := b.wait(); err != nil {
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
			var zw textCompressor
			for i := w; i < len(docs); i += workers {
				d, p := &docs[i], &out[i]
				p.hash = ContentHash(d.Text)
				p.pathHash = sha256.Sum256([]byte(d.Path))
				p.text, p.err = zw.compress(d.Text)
				p.units = encodeUnits(d.UnitList)
				p.fps = distinct(d.UnitList)
			}
		})
	}
	wg.Wait()
	return out
}

// bulk is the state of one AddAll: the chunk being gathered, and the one
// being ingested meanwhile.
//
// A chunk is written and ingested in the background (ingest) while the
// next one is gathered: the writing of its table files and the fsyncs of
// its ingestion overlap with the preparing and the lookups of the
// documents after it, instead of holding them up. One chunk at most is in
// flight, so chunks are ingested in order and each is told of in order;
// a document that goes through Add waits for it first (flush, then wait),
// so that Add sees every document before it.
type bulk struct {
	ctx     context.Context // once done, no chunk is started
	a       *Archive
	now     time.Time
	each    func(int, AddResult)
	pending []pendingDoc
	done    chan error // the ingestion in flight, or nil
	// Content and path of every document this AddAll archived (ingested,
	// in flight or pending, or added by Add): a document found in them is
	// not new. An entry may outlive its document (replaced by Add): that
	// only sends a new document through Add, which finds it new. Only
	// what these miss is looked up in the store, and in an archive that
	// held no documents when AddAll began (fresh) they miss nothing.
	hashes  map[[32]byte]bool
	paths   map[[32]byte]bool
	fresh   bool
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
	if b.hashes == nil {
		b.hashes, b.paths = map[[32]byte]bool{}, map[[32]byte]bool{}
		n, err := a.counter(keyCount)
		if err != nil {
			return err
		}
		b.fresh = n == 0
	}
	fast := !b.hashes[p.hash] && !b.paths[p.pathHash]
	if fast && !b.fresh {
		if _, ok, err := a.lookup(hashKey('h', p.hash)); err != nil {
			return err
		} else if ok {
			fast = false
		}
	}
	if fast && !b.fresh {
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
		if err := b.wait(); err != nil {
			return err
		}
		r, err := a.Add(*d, b.now)
		if err != nil {
			return err
		}
		if r.Outcome == Added || r.Outcome == Replaced {
			b.hashes[p.hash], b.paths[p.pathHash] = true, true
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
	b.hashes[p.hash], b.paths[p.pathHash] = true, true
	b.pending = append(b.pending, pendingDoc{i: i, id: id, meta: m, p: p})
	b.text += len(d.Text)
	if b.text >= b.maxText || len(b.pending) >= b.maxDocs {
		return b.flush()
	}
	return nil
}

// flush starts the ingestion of the pending chunk in the background, once
// the one before it is ingested.
func (b *bulk) flush() error {
	if len(b.pending) == 0 {
		return nil
	}
	if err := b.wait(); err != nil {
		return err
	}
	if err := b.ctx.Err(); err != nil {
		b.pending = nil // not ingested: the documents are not added
		return err
	}
	c := chunk{docs: b.pending, next: b.next, count: b.count}
	b.pending = nil // the chunk's from here on
	b.maxDocs = min(b.maxDocs+b.maxDocs/2, b.capDocs)
	b.text = 0
	done := make(chan error, 1)
	b.done = done
	a, each := b.a, b.each
	go func() { done <- a.ingest(&c, each) }()
	return nil
}

// wait waits for the ingestion in flight, if any, and returns its error.
func (b *bulk) wait() error {
	if b.done == nil {
		return nil
	}
	err := <-b.done
	b.done = nil
	return err
}

// chunk is a run of new documents, with the counters as they stand after it.
type chunk struct {
	docs        []pendingDoc
	next, count uint64
}

// ingest writes the chunk as table files, one per key prefix (the files
// of one ingestion may not overlap), all written at once on every core
// and then ingested in one step; each is then told of every document.
func (a *Archive) ingest(c *chunk, each func(int, AddResult)) error {
	ps := c.docs
	tmp := filepath.Join(a.dir, ingestDir)
	if err := os.MkdirAll(tmp, 0o700); err != nil {
		return fmt.Errorf("archive: %w", err)
	}
	defer os.RemoveAll(tmp)
	type table struct {
		name string
		fill func(w *sstable.Writer) error
	}
	var tables []table
	add := func(name string, fill func(w *sstable.Writer) error) { tables = append(tables, table{name, fill}) }
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
	// Keys in byte order: d/, h/, m/, n/, p/, t/, u/. The largest first,
	// so that the small ones fill in beside them.
	add("t.sst", byID('t', func(p *pendingDoc) []byte { return p.p.text }))
	units := 0
	for k := range ps {
		units += len(ps[k].p.fps)
	}
	if units > 0 {
		add("p.sst", func(w *sstable.Writer) error {
			type op struct{ fp, id uint64 }
			ops := make([]op, 0, units)
			for k := range ps {
				for _, fp := range ps[k].p.fps {
					ops = append(ops, op{fp, ps[k].id})
				}
			}
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
	}
	add("u.sst", byID('u', func(p *pendingDoc) []byte { return p.p.units }))
	add("d.sst", byID('d', func(p *pendingDoc) []byte { return p.meta }))
	add("h.sst", byHash('h', func(p *pendingDoc) [32]byte { return p.p.hash }))
	add("n.sst", byHash('n', func(p *pendingDoc) [32]byte { return p.p.pathHash }))
	add("m.sst", func(w *sstable.Writer) error {
		// m/count sorts before m/next; m/settings is never rewritten.
		if err := w.Set(keyCount, idv(c.count)); err != nil {
			return err
		}
		return w.Set(keyNext, idv(c.next))
	})
	files := make([]string, len(tables))
	errs := make([]error, len(tables))
	work := make(chan int, len(tables))
	for k := range tables {
		work <- k
	}
	close(work)
	var wg sync.WaitGroup
	for range min(runtime.GOMAXPROCS(0), len(tables)) {
		wg.Go(func() {
			for k := range work {
				files[k] = filepath.Join(tmp, tables[k].name)
				errs[k] = a.writeTable(files[k], tables[k].name == "t.sst", tables[k].fill)
			}
		})
	}
	wg.Wait()
	if err := errors.Join(errs...); err != nil {
		return fmt.Errorf("archive: write a chunk of %d documents: %w", len(ps), err)
	}
	// Not under the add's context: an ingestion is whole or absent, and
	// once begun it is let finish.
	if err := a.db.Ingest(context.Background(), files); err != nil {
		return fmt.Errorf("archive: ingest a chunk of %d documents: %w", len(ps), err)
	}
	for k := range ps {
		each(ps[k].i, AddResult{Outcome: Added, ID: ps[k].id})
	}
	return nil
}

// writeTable writes one table file of a chunk with the store's options;
// precompressed (the t/ records, deflated already) means without block
// compression, which would spend its time finding nothing to gain.
func (a *Archive) writeTable(path string, precompressed bool, fill func(w *sstable.Writer) error) error {
	wo := a.opts.MakeWriterOptions(0, a.db.TableFormat())
	if precompressed {
		wo.Compression = sstable.NoCompression
	}
	f, err := privateFS{a.fs}.Create(path, vfs.WriteCategoryUnspecified)
	if err != nil {
		return err
	}
	w := sstable.NewWriter(objstorageprovider.NewFileWritable(f), wo)
	err = fill(w)
	if cerr := w.Close(); err == nil {
		err = cerr
	}
	return err
}
