package pairs

import (
	"bufio"
	"encoding/binary"
	"errors"
	"fmt"
	"io"
	"math"
	"os"
	"path/filepath"
	"slices"
)

// The spilling engine runs the same six steps as Count's in-memory path
// when the entries do not fit Options.MemoryBudget, holding per document
// only a few small arrays (about 20 bytes) and otherwise a bounded buffer:
//
//  1. Baskets by external sort (the shuffle by fingerprint): the entries
//     are gathered in chunks that fit the budget, each chunk radix-sorted
//     and written as a sorted run of 12-byte (fingerprint, document)
//     records. Runs are cut in document order, so merging them k ways
//     with ties broken by run index yields every basket's documents
//     ascending, exactly as the in-memory stable sort does. More runs than
//     the fan-in are first merged in consecutive groups into longer runs.
//     The final merge forms the baskets on the fly (exclusion, common text
//     and the one-document rule as in formBaskets) and writes them to a
//     basket file: per basket its size and its documents as varint deltas.
//  2. Pruning streams the basket file once per pass, keeping only the
//     documents still strong enough; it reaches the same fixed point as
//     the in-memory rewrite (see "Why pruning is exact": removing a
//     document never changes another's membership).
//  3. Counting is partitioned by pair key (partition.go): each range of
//     first documents is counted in one more pass over the basket file,
//     ranges sized so that the counters of all workers fit the budget.
//  4. Groups need the baskets; only the documents in frequent pairs are
//     loaded, and only rows with three or more of them (a row with fewer
//     supports no set of three), which leaves every group's support, and
//     the order of the support lists, as they were.
//
// The alternative of partitioning the entries by fingerprint range up
// front (one file per range, each sorted in memory) was rejected: it needs
// a guess of the fingerprint distribution or a sampling pass to keep every
// partition under the budget, while sorted runs are sized exactly.

// errTemp wraps temporary-file errors so that a disk problem reads as one.
var errTemp = errors.New("temporary file")

// spillConfig sizes the buffers of the spilling path from the budget.
type spillConfig struct {
	dir       string // this run's private folder, removed by countSpilled
	runLen    int    // entries per sorted run
	fanIn     int    // runs merged at once
	bufSize   int    // bytes of each file buffer
	countMem  int64  // bytes for all counters at once
	perDocRAM int64  // bytes held per document (deg, rank, orig, weights)
	jobs      int    // goroutines sorting a run
}

const (
	entryRecord      = 12 // bytes of one (fingerprint, document) record on disk
	entryInRAM       = 32 // bytes of one entry while sorting: the entry and its radix scratch
	perDocInRAM      = 24 // deg, rank (4 each), orig (4), weights (8), alive (1), rounded up
	perEntryInMemory = 36 // in-memory path: entries, scratch, and the basket rows
)

// inMemoryBytes estimates what the in-memory path holds for entries
// (document, fingerprint) occurrences among n documents, before counting.
func inMemoryBytes(entries int64, n int) int64 {
	return perEntryInMemory*entries + perDocInRAM*int64(n)
}

func newSpillConfig(budget int64, n int, dir string) spillConfig {
	c := spillConfig{dir: dir, perDocRAM: perDocInRAM * int64(n)}
	// The per-document arrays come first; when they take most of the
	// budget, the buffers still get half of it rather than collapsing to
	// runs of a few entries (the run then holds more than the budget).
	free := max(budget-c.perDocRAM, budget/2)
	c.bufSize = int(min(max(free/256, 512), 1<<16))
	c.fanIn = int(min(max(free/int64(2*c.bufSize), 2), 128))
	c.runLen = int(max(free/entryInRAM, 2))
	c.countMem = max(free, 1)
	return c
}

// countSpilled is Count's path when the entries do not fit the budget.
func countSpilled(in Input, cfg config, res *Result) error {
	dir, err := os.MkdirTemp(cfg.tempDir, "reprise-pairs-")
	if err != nil {
		return fmt.Errorf("pairs: %w: %w", errTemp, err)
	}
	defer os.RemoveAll(dir)
	sc := newSpillConfig(cfg.budget, cfg.documents, dir)
	sc.jobs = cfg.jobs
	sp := &spiller{cfg: sc, stop: cfg.stopped}

	// Step 1: sorted runs, merged into the basket file.
	runs, err := sp.writeRuns(in.Docs)
	if err != nil {
		return err
	}
	for len(runs) > sc.fanIn {
		if runs, err = sp.mergeLevel(runs); err != nil {
			return err
		}
	}
	if err := cfg.stopped(); err != nil {
		return err
	}
	deg := make([]uint32, cfg.documents)
	basketPath := filepath.Join(dir, "baskets")
	common, hits, nb, err := sp.formBaskets(runs, basketPath, in.Excluded, cfg, deg, res, in.Docs)
	if err != nil {
		return err
	}
	for _, r := range runs {
		os.Remove(r)
	}
	res.Common, res.Stats.ExcludedHits, res.Stats.Baskets = common, hits, nb

	// Step 2: pruning passes over the basket file.
	file := &basketFile{path: basketPath, bufSize: sc.bufSize}
	pruned, err := file.prune(deg, cfg.s)
	if err != nil {
		return err
	}
	res.Stats.Pruned = pruned
	if err := cfg.stopped(); err != nil {
		return err
	}
	const none = math.MaxUint32
	rank := make([]uint32, cfg.documents)
	var orig []uint32
	for d, k := range deg {
		rank[d] = none
		if k > 0 {
			rank[d] = uint32(len(orig))
			orig = append(orig, uint32(d))
		}
	}
	m := len(orig)
	file.rank = rank

	// Step 3: partitioned counting.
	weights, incr, err := startWeights(file, m)
	if err != nil {
		return err
	}
	res.Stats.Increments = incr
	kind := chooseKind(cfg.counter, m, incr)
	res.Counter = kind
	if kind == CounterTriangular && possiblePairs(m) > maxTriangularCells {
		return fmt.Errorf("pairs: triangular counter for %d documents needs %d cells, more than %d: %w", m, possiblePairs(m), maxTriangularCells, ErrOption)
	}
	found, ranges, err := countRanges(file, m, weights, countPlan{kind: kind, s: uint32(cfg.s), jobs: cfg.jobs, budget: sc.countMem, stopped: cfg.stopped})
	if err == nil {
		err = cfg.stopped()
	}
	if err != nil {
		return err
	}
	res.Spill.Ranges = ranges
	res.Spill.Runs, res.Spill.BytesWritten = sp.runs, sp.written

	// Steps 4 to 6 as in memory, with the group baskets loaded.
	var bk baskets
	if len(found) >= 2 {
		if bk, err = file.groupBaskets(found, m); err != nil {
			return err
		}
	}
	finish(res, &bk, m, orig, found, cfg)
	return cfg.stopped() // the group search stops early when cancelled
}

// spiller writes and merges the sorted runs of step 1.
type spiller struct {
	cfg     spillConfig
	files   int          // names handed out
	runs    int          // sorted runs written, intermediate merges included
	written int64        // bytes written to temporary files
	stop    func() error // nil: never stopped
}

// stopped reports why the spiller must stop, or nil.
func (sp *spiller) stopped() error {
	if sp.stop == nil {
		return nil
	}
	return sp.stop()
}

func (sp *spiller) create() (*os.File, error) {
	sp.files++
	f, err := os.Create(filepath.Join(sp.cfg.dir, fmt.Sprintf("run-%06d", sp.files)))
	if err != nil {
		return nil, fmt.Errorf("pairs: %w: %w", errTemp, err)
	}
	return f, nil
}

// writeRuns gathers the entries chunk by chunk in document order, sorts
// each chunk by fingerprint (stably) and writes it as a run.
func (sp *spiller) writeRuns(docs [][]uint64) ([]string, error) {
	chunk := make([]entry, 0, sp.cfg.runLen)
	scratch := make([]entry, sp.cfg.runLen)
	var paths []string
	flush := func() error {
		if len(chunk) == 0 {
			return nil
		}
		if err := sp.stopped(); err != nil {
			return err
		}
		radixSortEntries(chunk, scratch[:len(chunk)], sp.cfg.jobs)
		p, err := sp.writeRun(func(emit func(entry) error) error {
			for _, e := range chunk {
				if err := emit(e); err != nil {
					return err
				}
			}
			return nil
		})
		if err != nil {
			return err
		}
		paths = append(paths, p)
		chunk = chunk[:0]
		return nil
	}
	for d, fps := range docs {
		for _, fp := range fps {
			if len(chunk) == cap(chunk) {
				if err := flush(); err != nil {
					return nil, err
				}
			}
			chunk = append(chunk, entry{fp: fp, doc: uint32(d)})
		}
	}
	return paths, flush()
}

// writeRun writes the entries produce emits to a new run file.
func (sp *spiller) writeRun(produce func(emit func(entry) error) error) (string, error) {
	f, err := sp.create()
	if err != nil {
		return "", err
	}
	w := bufio.NewWriterSize(f, sp.cfg.bufSize)
	var rec [entryRecord]byte
	err = produce(func(e entry) error {
		binary.LittleEndian.PutUint64(rec[:8], e.fp)
		binary.LittleEndian.PutUint32(rec[8:], e.doc)
		sp.written += entryRecord
		_, err := w.Write(rec[:])
		return err
	})
	if err == nil {
		err = w.Flush()
	}
	if cerr := f.Close(); err == nil {
		err = cerr
	}
	sp.runs++
	if err != nil {
		return "", fmt.Errorf("pairs: %w: %s: %w", errTemp, f.Name(), err)
	}
	return f.Name(), nil
}

// mergeLevel merges consecutive groups of fanIn runs into one run each,
// keeping their order, and removes the merged runs.
func (sp *spiller) mergeLevel(runs []string) ([]string, error) {
	var out []string
	for lo := 0; lo < len(runs); lo += sp.cfg.fanIn {
		group := runs[lo:min(lo+sp.cfg.fanIn, len(runs))]
		if err := sp.stopped(); err != nil {
			return nil, err
		}
		p, err := sp.writeRun(func(emit func(entry) error) error {
			return sp.merge(group, emit)
		})
		if err != nil {
			return nil, err
		}
		for _, r := range group {
			os.Remove(r)
		}
		out = append(out, p)
	}
	return out, nil
}

// runReader reads one run's records.
type runReader struct {
	f   *os.File
	r   *bufio.Reader
	cur entry
	rec [entryRecord]byte
}

func (rr *runReader) next() (bool, error) {
	if _, err := io.ReadFull(rr.r, rr.rec[:]); err != nil {
		if err == io.EOF {
			return false, nil
		}
		return false, fmt.Errorf("pairs: %w: %s: %w", errTemp, rr.f.Name(), err)
	}
	rr.cur = entry{fp: binary.LittleEndian.Uint64(rr.rec[:8]), doc: binary.LittleEndian.Uint32(rr.rec[8:])}
	return true, nil
}

// merge emits the entries of the runs in fingerprint order, ties in run
// order (a binary heap of the runs' current records).
func (sp *spiller) merge(paths []string, emit func(entry) error) error {
	readers := make([]*runReader, 0, len(paths))
	defer func() {
		for _, rr := range readers {
			rr.f.Close()
		}
	}()
	var heap []int // indices into readers
	less := func(i, j int) bool {
		a, b := readers[heap[i]], readers[heap[j]]
		if a.cur.fp != b.cur.fp {
			return a.cur.fp < b.cur.fp
		}
		return heap[i] < heap[j]
	}
	down := func(i int) {
		for {
			l := 2*i + 1
			if l >= len(heap) {
				return
			}
			c := l
			if r := l + 1; r < len(heap) && less(r, l) {
				c = r
			}
			if !less(c, i) {
				return
			}
			heap[i], heap[c] = heap[c], heap[i]
			i = c
		}
	}
	for _, p := range paths {
		f, err := os.Open(p)
		if err != nil {
			return fmt.Errorf("pairs: %w: %w", errTemp, err)
		}
		rr := &runReader{f: f, r: bufio.NewReaderSize(f, sp.cfg.bufSize)}
		readers = append(readers, rr)
		ok, err := rr.next()
		if err != nil {
			return err
		}
		if ok {
			heap = append(heap, len(readers)-1)
		}
	}
	for i := len(heap)/2 - 1; i >= 0; i-- {
		down(i)
	}
	for len(heap) > 0 {
		rr := readers[heap[0]]
		if err := emit(rr.cur); err != nil {
			return err
		}
		ok, err := rr.next()
		if err != nil {
			return err
		}
		if !ok {
			heap[0] = heap[len(heap)-1]
			heap = heap[:len(heap)-1]
		}
		down(0)
	}
	return nil
}

// formBaskets merges the runs and writes each basket (see formBaskets in
// count.go for the rules, applied in the same order) to path, counting
// every document's baskets in deg. It returns the common units, sorted,
// the excluded hits and the number of baskets.
//
// The documents of a common run are counted in every document's number of
// common units, and written to a side file (varint deltas plus one, ended
// by a zero), so that, once the merge has found which documents are mostly
// common text, the rows of those documents can be added to the basket file
// (automatic cap only: the common runs cost one more sequential read, and
// nothing when there are none).
func (sp *spiller) formBaskets(runs []string, path string, excluded []uint64, cfg config, deg []uint32, res *Result, all [][]uint64) ([]CommonUnit, int, int, error) {
	maxDocs := cfg.maxDocs
	f, err := os.Create(path)
	if err != nil {
		return nil, 0, 0, fmt.Errorf("pairs: %w: %w", errTemp, err)
	}
	defer f.Close()
	w := bufio.NewWriterSize(f, sp.cfg.bufSize)
	sidePath := path + "-common"
	var side *bufio.Writer
	var sideFile *os.File
	defer func() {
		if sideFile != nil {
			sideFile.Close()
		}
	}()
	var (
		common []CommonUnit
		freq   []uint32 // common units of each document
		hits   int
		nb     int
		xi     int
		fp     uint64
		first  uint32
		size   int
		docs   []uint32 // the current run of one fingerprint, up to maxDocs+1
		vbuf   []byte
		prevW  uint32 // last document written to the side file
	)
	sideWrite := func(d uint32) error {
		if freq == nil {
			freq = make([]uint32, len(deg))
		}
		freq[d]++
		vbuf = binary.AppendUvarint(vbuf[:0], uint64(d-prevW)+1)
		prevW = d
		sp.written += int64(len(vbuf))
		_, err := side.Write(vbuf)
		return err
	}
	// openCommon starts the side row of a run that has just grown past
	// maxDocs, with the documents seen so far.
	openCommon := func() error {
		if side == nil {
			var err error
			if sideFile, err = os.Create(sidePath); err != nil {
				return err
			}
			side = bufio.NewWriterSize(sideFile, sp.cfg.bufSize)
		}
		prevW = 0
		for _, d := range docs {
			if err := sideWrite(d); err != nil {
				return err
			}
		}
		return nil
	}
	closeRun := func() error {
		if size == 0 {
			return nil
		}
		for xi < len(excluded) && excluded[xi] < fp {
			xi++
		}
		switch {
		case xi < len(excluded) && excluded[xi] == fp:
			hits++
		case size < 2:
		case size > maxDocs:
			common = append(common, CommonUnit{Hash: fp, Docs: uint32(size), First: first})
			sp.written++
			return side.WriteByte(0)
		default:
			nb++
			vbuf = binary.AppendUvarint(vbuf[:0], uint64(len(docs)))
			prev := uint32(0)
			for _, d := range docs {
				vbuf = binary.AppendUvarint(vbuf, uint64(d-prev))
				prev = d
				deg[d]++
			}
			sp.written += int64(len(vbuf))
			if _, err := w.Write(vbuf); err != nil {
				return err
			}
		}
		return nil
	}
	isExcluded := func(fp uint64) bool {
		_, ok := slices.BinarySearch(excluded, fp)
		return ok
	}
	err = sp.merge(runs, func(e entry) error {
		if size > 0 && e.fp == fp {
			size++
			switch {
			case size <= maxDocs+1:
				docs = append(docs, e.doc)
				if size == maxDocs+1 && !isExcluded(fp) {
					return openCommon()
				}
			case !isExcluded(fp):
				return sideWrite(e.doc)
			}
			return nil
		}
		if err := closeRun(); err != nil {
			return err
		}
		fp, first, size, docs = e.fp, e.doc, 1, append(docs[:0], e.doc)
		return nil
	})
	if err == nil {
		err = closeRun()
	}
	if err == nil && side != nil {
		err = side.Flush()
	}
	if err == nil {
		var mostly []bool
		res.CommonShares, mostly = commonShares(freq, all, cfg.auto)
		if mostly != nil {
			var added int
			added, err = sp.addMostlyCommon(sidePath, w, common, mostly, deg)
			nb += added
		}
	}
	if err == nil {
		err = w.Flush()
	}
	if cerr := f.Close(); err == nil {
		err = cerr
	}
	if err != nil {
		return nil, 0, 0, fmt.Errorf("pairs: %w: %s: %w", errTemp, path, err)
	}
	common = slices.DeleteFunc(common, func(c CommonUnit) bool { return c.Kept == c.Docs })
	if len(common) == 0 {
		common = nil // as the in-memory path gives it
	}
	sortCommon(common)
	return common, hits, nb, nil
}

// addMostlyCommon reads the side file of common runs (in the order of
// common) and writes, for each, the row of its mostly-common documents to
// w as a basket when there are two or more, setting each unit's Kept. It
// returns the baskets added.
func (sp *spiller) addMostlyCommon(sidePath string, w *bufio.Writer, common []CommonUnit, mostly []bool, deg []uint32) (int, error) {
	sf, err := os.Open(sidePath)
	if err != nil {
		return 0, err
	}
	defer sf.Close()
	r := bufio.NewReaderSize(sf, sp.cfg.bufSize)
	var kept []uint32
	var vbuf []byte
	added := 0
	for k := range common {
		kept = kept[:0]
		prev := uint32(0)
		for {
			v, err := binary.ReadUvarint(r)
			if err != nil {
				return added, fmt.Errorf("side file: %w", err)
			}
			if v == 0 {
				break
			}
			d := prev + uint32(v-1)
			prev = d
			if mostly[d] {
				kept = append(kept, d)
			}
		}
		common[k].Kept = uint32(len(kept))
		if len(kept) < 2 {
			continue
		}
		added++
		vbuf = binary.AppendUvarint(vbuf[:0], uint64(len(kept)))
		prev = 0
		for _, d := range kept {
			vbuf = binary.AppendUvarint(vbuf, uint64(d-prev))
			prev = d
			deg[d]++
		}
		sp.written += int64(len(vbuf))
		if _, err := w.Write(vbuf); err != nil {
			return added, err
		}
	}
	return added, nil
}

// basketFile reads the basket file of step 1. With rank set it serves
// counting rows: each basket's documents that survived pruning, in compact
// IDs, rows of two or more only (a rowSource).
type basketFile struct {
	path    string
	bufSize int
	rank    []uint32 // original ID -> compact ID, MaxUint32 if pruned
}

// scan calls fn with every basket's documents (original IDs); the slice is
// reused between calls.
func (bf *basketFile) scan(fn func(docs []uint32)) error {
	f, err := os.Open(bf.path)
	if err != nil {
		return fmt.Errorf("pairs: %w: %w", errTemp, err)
	}
	defer f.Close()
	r := bufio.NewReaderSize(f, bf.bufSize)
	var docs []uint32
	bad := func(err error) error {
		return fmt.Errorf("pairs: %w: %s: %w", errTemp, bf.path, err)
	}
	for {
		n, err := binary.ReadUvarint(r)
		if err == io.EOF {
			return nil
		}
		if err != nil {
			return bad(err)
		}
		docs = docs[:0]
		prev := uint64(0)
		for range n {
			v, err := binary.ReadUvarint(r)
			if err != nil {
				return bad(err)
			}
			prev += v
			docs = append(docs, uint32(prev))
		}
		fn(docs)
	}
}

// prune runs the pruning passes of step 2 over the file: deg holds every
// document's basket count and is left holding the counts after pruning (0
// for every pruned document). It returns the documents pruned.
func (bf *basketFile) prune(deg []uint32, s int) (int, error) {
	before := 0
	for _, d := range deg {
		if d > 0 {
			before++
		}
	}
	alive := make([]bool, len(deg))
	var row []uint32
	for {
		weak := false
		for d, k := range deg {
			alive[d] = int(k) >= s
			weak = weak || (k > 0 && int(k) < s)
		}
		if !weak {
			break
		}
		clear(deg)
		err := bf.scan(func(docs []uint32) {
			row = row[:0]
			for _, d := range docs {
				if alive[d] {
					row = append(row, d)
				}
			}
			if len(row) >= 2 {
				for _, d := range row {
					deg[d]++
				}
			}
		})
		if err != nil {
			return 0, err
		}
	}
	after := 0
	for _, d := range deg {
		if d > 0 {
			after++
		}
	}
	return before - after, nil
}

func (bf *basketFile) forEach(fn func(row []uint32)) error {
	var row []uint32
	return bf.scan(func(docs []uint32) {
		row = row[:0]
		for _, d := range docs {
			if r := bf.rank[d]; r != math.MaxUint32 {
				row = append(row, r)
			}
		}
		if len(row) >= 2 {
			fn(row)
		}
	})
}

// groupBaskets loads the rows groups can use: the documents in frequent
// pairs, rows with three or more of them.
func (bf *basketFile) groupBaskets(found []countedPair, m int) (baskets, error) {
	in := make([]bool, m)
	for _, p := range found {
		in[p.a], in[p.b] = true, true
	}
	b := baskets{start: []int{0}}
	err := bf.forEach(func(row []uint32) {
		start := len(b.docs)
		for _, d := range row {
			if in[d] {
				b.docs = append(b.docs, d)
			}
		}
		if len(b.docs)-start < 3 {
			b.docs = b.docs[:start]
			return
		}
		b.fps = append(b.fps, 0) // the fingerprint is not needed past step 1
		b.start = append(b.start, len(b.docs))
	})
	return b, err
}

// sortCommon orders common units by documents descending, then hash.
func sortCommon(common []CommonUnit) {
	slices.SortFunc(common, func(x, y CommonUnit) int {
		if x.Docs != y.Docs {
			if x.Docs > y.Docs {
				return -1
			}
			return 1
		}
		if x.Hash < y.Hash {
			return -1
		}
		if x.Hash > y.Hash {
			return 1
		}
		return 0
	})
}
