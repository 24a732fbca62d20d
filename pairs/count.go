package pairs

import (
	"context"
	"errors"
	"fmt"
	"math"
	"os"
	"slices"
)

// Errors wrapped by Count for invalid input; test with errors.Is.
var (
	ErrUnsorted  = errors.New("fingerprints not sorted ascending")
	ErrDuplicate = errors.New("duplicate fingerprint")
	ErrOption    = errors.New("invalid option")
)

const (
	defaultMinShared     = 3
	defaultMaxGroupSteps = 20000000
	defaultNearCopy      = 0.7
)

// DefaultMaxDocs is the common-text cap used when Options.MaxDocs is 0: a
// unit found in more than DefaultMaxDocs(n) of n documents is common text.
//
// The rule is min(1000, max(5, n/2)) with integer n/2:
//   - in a small batch a sentence shared by up to half of the documents is
//     still reported: 12 of 30 essays copying one source stay under the cap
//     of 15;
//   - a sentence in more than half of the documents is treated as common
//     text, such as a prompt every essay repeats;
//   - the floor of 5 keeps a handful of documents from calling every
//     shared sentence common;
//   - on a large corpus the cap of 1000 bounds the work of one basket to
//     C(1000, 2) = 499500 pair increments.
func DefaultMaxDocs(n int) int {
	return min(1000, max(5, n/2))
}

// config is Options with the defaults applied and checked.
type config struct {
	s         int
	maxDocs   int
	auto      bool    // maxDocs is the automatic cap: the mostly-common rule applies
	nearCopy  float64 // Options.NearCopy
	maxSteps  int
	counter   CounterKind
	documents int
	budget    int64  // Options.MemoryBudget; 0: no bound
	tempDir   string // where spilled runs go
	jobs      int
	stopped   func() error // the caller's context's Err: checked between steps
}

func resolve(in Input, opt Options) (config, error) {
	c := config{
		s:         opt.MinShared,
		maxDocs:   opt.MaxDocs,
		maxSteps:  opt.MaxGroupSteps,
		counter:   opt.Counter,
		documents: len(in.Docs),
		budget:    opt.MemoryBudget,
		tempDir:   opt.TempDir,
		jobs:      max(opt.Jobs, 1),
		stopped:   func() error { return nil },
	}
	if c.budget < 0 {
		return c, fmt.Errorf("pairs: MemoryBudget %d < 0: %w", opt.MemoryBudget, ErrOption)
	}
	if c.tempDir == "" {
		c.tempDir = os.TempDir()
	}
	if c.s == 0 {
		c.s = defaultMinShared
	}
	if c.s < 1 {
		return c, fmt.Errorf("pairs: MinShared %d < 1: %w", opt.MinShared, ErrOption)
	}
	if c.maxDocs == 0 {
		c.maxDocs = DefaultMaxDocs(len(in.Docs))
		c.auto = true
	}
	c.nearCopy = opt.NearCopy
	if c.nearCopy == 0 {
		c.nearCopy = defaultNearCopy
	}
	if !(c.nearCopy > 0 && c.nearCopy <= 1) {
		return c, fmt.Errorf("pairs: NearCopy %v outside (0, 1]: %w", opt.NearCopy, ErrOption)
	}
	if c.maxDocs < 1 {
		return c, fmt.Errorf("pairs: MaxDocs %d < 1: %w", opt.MaxDocs, ErrOption)
	}
	if c.maxSteps == 0 {
		c.maxSteps = defaultMaxGroupSteps
	}
	if c.maxSteps < 1 {
		return c, fmt.Errorf("pairs: MaxGroupSteps %d < 1: %w", opt.MaxGroupSteps, ErrOption)
	}
	switch c.counter {
	case CounterAuto, CounterTriangular, CounterSparse:
	default:
		return c, fmt.Errorf("pairs: Counter %v unknown: %w", opt.Counter, ErrOption)
	}
	if uint64(len(in.Docs)) > math.MaxUint32 {
		return c, fmt.Errorf("pairs: %d documents exceed the 32-bit document IDs: %w", len(in.Docs), ErrOption)
	}
	for d, fps := range in.Docs {
		if err := checkAscending(fps); err != nil {
			return c, fmt.Errorf("pairs: document %d: %w", d, err)
		}
	}
	if err := checkAscending(in.Excluded); err != nil {
		return c, fmt.Errorf("pairs: excluded fingerprints: %w", err)
	}
	return c, nil
}

func checkAscending(fps []uint64) error {
	for i := 1; i < len(fps); i++ {
		switch {
		case fps[i] == fps[i-1]:
			return fmt.Errorf("index %d: %#x: %w", i, fps[i], ErrDuplicate)
		case fps[i] < fps[i-1]:
			return fmt.Errorf("index %d: %#x after %#x: %w", i, fps[i], fps[i-1], ErrUnsorted)
		}
	}
	return nil
}

// Count finds the document pairs sharing at least MinShared counted units,
// the groups of three or more documents that all do, and the clusters the
// pairs connect. It returns an error only for invalid input: fingerprints
// of a document or of Excluded not strictly ascending, or an option out of
// range. The steps are described in the package documentation.
func Count(in Input, opt Options) (*Result, error) {
	return CountContext(context.Background(), in, opt)
}

// CountContext is Count under ctx: once ctx is done, the count stops at
// its next step, sorted run, merge or range of pairs, removes its
// temporary files and returns ctx's error.
func CountContext(ctx context.Context, in Input, opt Options) (*Result, error) {
	cfg, err := resolve(in, opt)
	if err != nil {
		return nil, err
	}
	cfg.stopped = ctx.Err
	res := &Result{MaxDocs: cfg.maxDocs, MinShared: cfg.s, GroupStepLimit: cfg.maxSteps}
	var entries int64
	for _, fps := range in.Docs {
		entries += int64(len(fps))
	}
	if cfg.budget > 0 && inMemoryBytes(entries, cfg.documents) > cfg.budget {
		if err := countSpilled(in, cfg, res); err != nil {
			return nil, err
		}
	} else if err := countInMemory(in, cfg, res, entries); err != nil {
		return nil, err
	}
	res.NearCopies = nearCopies(in, res, cfg.nearCopy)
	return res, nil
}

// countInMemory is Count's path when the entries fit the budget.
func countInMemory(in Input, cfg config, res *Result, entries int64) error {
	// Step 1: baskets.
	ents := gather(in.Docs, cfg.jobs)
	bk, common, shares, hits := formBaskets(ents, in.Excluded, cfg.maxDocs, in.Docs, cfg.auto)
	res.CommonShares = shares
	res.Common = common
	res.Stats.ExcludedHits = hits
	res.Stats.Baskets = bk.len()
	if err := cfg.stopped(); err != nil {
		return err
	}

	// Step 2: A-Priori pruning, then compact the surviving document IDs.
	res.Stats.Pruned = bk.prune(cfg.documents, cfg.s)
	orig := bk.compact(cfg.documents)
	m := len(orig)

	// Step 3: count pairs.
	incr := bk.increments()
	res.Stats.Increments = incr
	kind := chooseKind(cfg.counter, m, incr)
	res.Counter = kind
	var found []countedPair
	var err2 error
	if cfg.jobs == 1 && (cfg.budget == 0 || countBytes(kind, m, incr) <= cfg.budget-inMemoryBytes(entries, cfg.documents)) {
		// One pass, one counter: the whole pair space at once.
		switch kind {
		case CounterTriangular:
			found, err2 = countTriangular(&bk, m, uint32(cfg.s))
		default:
			found = countSparse(&bk, incr, uint32(cfg.s))
		}
		res.Spill.Ranges = 1
	} else {
		if kind == CounterTriangular && possiblePairs(m) > maxTriangularCells {
			return fmt.Errorf("pairs: triangular counter for %d documents needs %d cells, more than %d: %w", m, possiblePairs(m), maxTriangularCells, ErrOption)
		}
		src := memoryRows{&bk}
		var weights []int64
		weights, _, err2 = startWeights(src, m)
		if err2 == nil {
			var budget int64
			if cfg.budget > 0 {
				budget = max(cfg.budget-inMemoryBytes(entries, cfg.documents), 1)
			}
			found, res.Spill.Ranges, err2 = countRanges(src, m, weights, countPlan{kind: kind, s: uint32(cfg.s), jobs: cfg.jobs, budget: budget, stopped: cfg.stopped})
		}
	}
	if err2 == nil {
		err2 = cfg.stopped()
	}
	if err2 != nil {
		return err2
	}
	finish(res, &bk, m, orig, found, cfg)
	return cfg.stopped() // the group search stops early when cancelled
}

// chooseKind resolves CounterAuto by the one-third rule, falling back to
// the sparse table past the triangular array's cap.
func chooseKind(forced CounterKind, m int, incr int64) CounterKind {
	if forced != CounterAuto {
		return forced
	}
	kind := ChooseCounter(m, min(incr, possiblePairs(m)))
	if kind == CounterTriangular && possiblePairs(m) > maxTriangularCells {
		kind = CounterSparse
	}
	return kind
}

// countBytes bounds what one counter over the whole pair space holds.
func countBytes(kind CounterKind, m int, incr int64) int64 {
	if kind == CounterTriangular {
		return 4 * possiblePairs(m)
	}
	return sparseBytesPerIncrement * incr
}

// finish runs steps 4 to 6 on the counted pairs: original IDs, groups and
// clusters.
func finish(res *Result, bk *baskets, m int, orig []uint32, found []countedPair, cfg config) {
	// Step 4: frequent pairs, in original IDs (compaction keeps order).
	if len(found) > 0 {
		res.Pairs = make([]Pair, len(found))
		for i, p := range found {
			res.Pairs[i] = Pair{A: orig[p.a], B: orig[p.b], Shared: p.n}
		}
	}

	// Step 5: groups.
	g := searchGroups(makeGroupItems(bk, m, found, cfg.s), cfg.s, cfg.maxSteps, cfg.stopped)
	res.GroupsTruncated = g.truncated
	res.Stats.GroupSteps = g.steps
	res.Stats.GroupItems = len(g.tids)
	res.Groups = g.groups(orig)

	// Step 6: clusters.
	res.Clusters = clusters(found, m, orig)
}

// entry is one (fingerprint, document) occurrence; sorting entries by
// fingerprint turns them into baskets.
type entry struct {
	fp  uint64
	doc uint32
}

// gather lists every occurrence, documents in ascending order, and sorts
// the list by fingerprint. The sort is stable, so the documents of each
// basket stay ascending.
func gather(docs [][]uint64, jobs int) []entry {
	total := 0
	for _, fps := range docs {
		total += len(fps)
	}
	ents := make([]entry, 0, total)
	for d, fps := range docs {
		for _, fp := range fps {
			ents = append(ents, entry{fp: fp, doc: uint32(d)})
		}
	}
	return radixSortEntries(ents, make([]entry, len(ents)), jobs)
}

// baskets holds baskets in compressed rows: basket b has fingerprint fps[b]
// and documents docs[start[b]:start[b+1]], ascending and distinct.
type baskets struct {
	fps   []uint64
	start []int
	docs  []uint32
}

func (b *baskets) len() int { return len(b.fps) }

func (b *baskets) row(i int) []uint32 { return b.docs[b.start[i]:b.start[i+1]] }

// formBaskets walks the runs of sorted entries. A run whose fingerprint is
// excluded is skipped and counted in hits (whatever its size: exclusion
// comes first, so an excluded unit is never listed as common either); a run
// of one document is dropped; a run of more than maxDocs documents is common
// text and listed; every other run becomes a basket. The walk also counts
// each document's common units (shares); under the automatic cap (auto)
// the mostly-common documents of each common run then form a basket of
// their own, added after the others, and a common unit that counts in all
// its holders is not listed.
func formBaskets(ents []entry, excluded []uint64, maxDocs int, docs [][]uint64, auto bool) (b baskets, common []CommonUnit, shares []CommonShare, hits int) {
	b.start = append(b.start, 0)
	var freq []uint32  // common units of each document
	var commonAt []int // where each common run starts in ents
	xi := 0
	for i := 0; i < len(ents); {
		fp := ents[i].fp
		j := i + 1
		for j < len(ents) && ents[j].fp == fp {
			j++
		}
		d := j - i
		for xi < len(excluded) && excluded[xi] < fp {
			xi++
		}
		switch {
		case xi < len(excluded) && excluded[xi] == fp:
			hits++
		case d < 2:
		case d > maxDocs:
			common = append(common, CommonUnit{Hash: fp, Docs: uint32(d), First: ents[i].doc})
			commonAt = append(commonAt, i)
			if freq == nil {
				freq = make([]uint32, len(docs))
			}
			for _, e := range ents[i:j] {
				freq[e.doc]++
			}
		default:
			b.fps = append(b.fps, fp)
			for _, e := range ents[i:j] {
				b.docs = append(b.docs, e.doc)
			}
			b.start = append(b.start, len(b.docs))
		}
		i = j
	}
	shares, mostly := commonShares(freq, docs, auto)
	if mostly != nil {
		for k := range common {
			c := &common[k]
			from := len(b.docs)
			for _, e := range ents[commonAt[k] : commonAt[k]+int(c.Docs)] {
				if mostly[e.doc] {
					b.docs = append(b.docs, e.doc)
				}
			}
			c.Kept = uint32(len(b.docs) - from)
			if c.Kept < 2 {
				b.docs = b.docs[:from]
				continue
			}
			b.fps = append(b.fps, c.Hash)
			b.start = append(b.start, len(b.docs))
		}
		common = slices.DeleteFunc(common, func(c CommonUnit) bool { return c.Kept == c.Docs })
		if len(common) == 0 {
			common = nil
		}
	}
	sortCommon(common)
	return b, common, shares, hits
}

// prune removes, pass after pass, every document found in fewer than s
// baskets, and every basket left with fewer than two documents, until a
// pass removes nothing. It returns the number of documents that were in a
// basket before pruning and are in none after.
func (b *baskets) prune(n, s int) int {
	deg := make([]uint32, n)
	b.degrees(deg)
	before := 0
	for _, d := range deg {
		if d > 0 {
			before++
		}
	}
	for {
		changed := false
		for _, d := range deg {
			if d > 0 && int(d) < s {
				changed = true
				break
			}
		}
		if !changed {
			break
		}
		// Rewrite the rows in place without the weak documents; deg
		// still holds the degrees of the previous pass.
		w, kept := 0, 0
		for i := range b.fps {
			rowStart := w
			for _, d := range b.row(i) {
				if int(deg[d]) >= s {
					b.docs[w] = d
					w++
				}
			}
			if w-rowStart < 2 {
				w = rowStart
				continue
			}
			b.fps[kept] = b.fps[i]
			b.start[kept] = rowStart
			kept++
		}
		b.fps = b.fps[:kept]
		b.start = append(b.start[:kept], w)
		b.docs = b.docs[:w]
		b.degrees(deg)
	}
	after := 0
	for _, d := range deg {
		if d > 0 {
			after++
		}
	}
	return before - after
}

// degrees fills deg[d] with the number of baskets containing document d.
func (b *baskets) degrees(deg []uint32) {
	clear(deg)
	for _, d := range b.docs {
		deg[d]++
	}
}

// compact renumbers the documents still in a basket 0..m-1 in ascending
// order of their original IDs, rewrites the rows, and returns the original
// ID of each compact one.
func (b *baskets) compact(n int) []uint32 {
	const none = math.MaxUint32
	rank := make([]uint32, n)
	for i := range rank {
		rank[i] = none
	}
	for _, d := range b.docs {
		rank[d] = 0
	}
	var orig []uint32
	for d, r := range rank {
		if r != none {
			rank[d] = uint32(len(orig))
			orig = append(orig, uint32(d))
		}
	}
	for i, d := range b.docs {
		b.docs[i] = rank[d]
	}
	return orig
}

// increments is the sum over baskets of C(d, 2): the pair increments the
// counting step performs.
func (b *baskets) increments() int64 {
	var sum int64
	for i := range b.fps {
		d := int64(b.start[i+1] - b.start[i])
		sum += d * (d - 1) / 2
	}
	return sum
}
