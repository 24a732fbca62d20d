package pairs

import (
	"cmp"
	"math/rand/v2"
	"slices"
	"testing"
)

// benchCorpus builds n documents of per fingerprints each, deterministic:
//   - 1 in 10 documents belongs to a circle of 5 copying 15 units each from
//     a shared source of 40 (so circle members share about 5.6 units);
//   - every document draws 2 units from a pool of 50000 phrases (chance
//     sharing, mostly pruned at s = 3);
//   - 30% of the documents repeat 3 prompt units (common text);
//   - 300 documents quote one popular passage of 2 units;
//   - the rest are the document's own units.
func benchCorpus(n, per int) Input {
	r := rand.New(rand.NewPCG(42, 7))
	docs := make([][]uint64, n)
	sources := map[int][]uint64{}
	for d := range docs {
		fps := make([]uint64, 0, per)
		if d%10 == 0 {
			circle := d / 50
			src, ok := sources[circle]
			if !ok {
				src = make([]uint64, 40)
				for i := range src {
					src[i] = r.Uint64()
				}
				sources[circle] = src
			}
			for _, i := range r.Perm(40)[:15] {
				fps = append(fps, src[i])
			}
		}
		for range 2 {
			fps = append(fps, uint64(r.IntN(50000))*0x9e3779b97f4a7c15+1)
		}
		if r.IntN(10) < 3 {
			fps = append(fps, 0xaaaa0001, 0xaaaa0002, 0xaaaa0003)
		}
		if d%(n/300+1) == 0 {
			fps = append(fps, 0xbbbb0001, 0xbbbb0002)
		}
		for len(fps) < per {
			fps = append(fps, r.Uint64())
		}
		slices.Sort(fps)
		docs[d] = slices.Compact(fps)
	}
	return Input{Docs: docs}
}

func BenchmarkCount(b *testing.B) {
	in := benchCorpus(20000, 60)
	for _, kind := range allCounters {
		b.Run(kind.String(), func(b *testing.B) {
			b.ReportAllocs()
			var res *Result
			for b.Loop() {
				var err error
				res, err = Count(in, Options{Counter: kind})
				if err != nil {
					b.Fatal(err)
				}
			}
			b.ReportMetric(float64(len(res.Pairs)), "pairs")
			b.ReportMetric(float64(len(res.Groups)), "groups")
			b.ReportMetric(float64(res.Stats.Increments), "increments")
			b.ReportMetric(float64(res.Stats.Pruned), "pruned")
		})
	}
}

// BenchmarkCountBudget runs the same corpus through the spilling path
// (sorted runs on disk, a k-way merge, pruning and counting passes over
// the basket file) at two budgets, and in memory with two workers.
func BenchmarkCountBudget(b *testing.B) {
	in := benchCorpus(20000, 60)
	for _, c := range []struct {
		name   string
		budget int64
		jobs   int
	}{{"8MiB", 8 << 20, 1}, {"2MiB", 2 << 20, 1}, {"memory-2jobs", 0, 2}} {
		b.Run(c.name, func(b *testing.B) {
			dir := b.TempDir()
			b.ReportAllocs()
			for b.Loop() {
				if _, err := Count(in, Options{MemoryBudget: c.budget, Jobs: c.jobs, TempDir: dir}); err != nil {
					b.Fatal(err)
				}
			}
		})
	}
}

// BenchmarkSortEntries compares the radix sort used in step 1 with
// slices.SortFunc on the same 1.2 million entries.
func BenchmarkSortEntries(b *testing.B) {
	ents := gatherUnsorted(benchCorpus(20000, 60).Docs)
	work := make([]entry, len(ents))
	buf := make([]entry, len(ents))
	b.Run("radix", func(b *testing.B) {
		for b.Loop() {
			copy(work, ents)
			radixSortEntries(work, buf, 1)
		}
	})
	b.Run("radix-jobs2", func(b *testing.B) {
		for b.Loop() {
			copy(work, ents)
			radixSortEntries(work, buf, 2)
		}
	})
	b.Run("slices.SortFunc", func(b *testing.B) {
		for b.Loop() {
			copy(work, ents)
			slices.SortFunc(work, func(x, y entry) int {
				if c := cmp.Compare(x.fp, y.fp); c != 0 {
					return c
				}
				return cmp.Compare(x.doc, y.doc)
			})
		}
	})
}

func gatherUnsorted(docs [][]uint64) []entry {
	var ents []entry
	for d, fps := range docs {
		for _, fp := range fps {
			ents = append(ents, entry{fp: fp, doc: uint32(d)})
		}
	}
	return ents
}

// templateCorpus builds n documents from a few shared texts, as a folder of
// package copyright files is made of a few license texts: there are
// templates texts of units units each; each document holds one to three of
// them (the first template far more often than the others), keeps each of
// their units with probability keep (edits drop the rest), and has own
// units of its own. Deterministic from seed.
func templateCorpus(n, templates, units, own int, keep float64, seed uint64) Input {
	r := rand.New(rand.NewPCG(seed, 99))
	texts := make([][]uint64, templates)
	for t := range texts {
		texts[t] = make([]uint64, units)
		for u := range texts[t] {
			texts[t][u] = r.Uint64()
		}
	}
	docs := make([][]uint64, n)
	for d := range docs {
		var fps []uint64
		held := 1 + r.IntN(3)
		for range held {
			t := 0
			if r.IntN(2) == 0 {
				t = r.IntN(templates)
			}
			for _, fp := range texts[t] {
				if r.Float64() < keep {
					fps = append(fps, fp)
				}
			}
		}
		for range own {
			fps = append(fps, r.Uint64())
		}
		slices.Sort(fps)
		docs[d] = slices.Compact(fps)
	}
	return Input{Docs: docs}
}

// groupBaskets runs Count's steps up to the group search and returns what
// the search starts from, so that a benchmark can time the search alone.
func groupBaskets(b *testing.B, in Input, opt Options) (baskets, int, []countedPair, int) {
	b.Helper()
	cfg, err := resolve(in, opt)
	if err != nil {
		b.Fatal(err)
	}
	ents := gather(in.Docs, 1)
	bk, _, _, _ := formBaskets(ents, in.Excluded, cfg.maxDocs, in.Docs, cfg.auto)
	bk.prune(cfg.documents, cfg.s)
	orig := bk.compact(cfg.documents)
	m := len(orig)
	found := countSparse(&bk, bk.increments(), uint32(cfg.s))
	return bk, m, found, cfg.s
}

// BenchmarkGroups times the group step alone on corpora of near-identical
// documents (templateCorpus), the level-wise search this package used
// before (bounded by 200,000 candidates, its default) against the
// maximal-set search, on the same baskets in the same run. Metrics: groups
// listed, steps (candidates for the level-wise search), and 1 when the
// search stopped at its bound.
func BenchmarkGroups(b *testing.B) {
	for _, c := range []struct {
		name string
		in   Input
	}{
		{"copies-200", templateCorpus(200, 4, 30, 5, 0.97, 1)},
		{"copies-700", templateCorpus(700, 8, 40, 5, 0.97, 2)},
		{"identical-300", templateCorpus(300, 3, 30, 0, 1, 3)},
	} {
		bk, m, found, s := groupBaskets(b, c.in, Options{})
		orig := make([]uint32, m)
		for i := range orig {
			orig[i] = uint32(i)
		}
		b.Run(c.name+"/levelwise", func(b *testing.B) {
			var g lwGrowth
			var groups []Group
			for b.Loop() {
				g = levelwiseGroups(&bk, m, found, s, 200000)
				groups = g.groups(orig)
			}
			b.ReportMetric(float64(len(groups)), "groups")
			b.ReportMetric(float64(g.examined), "steps")
			b.ReportMetric(float64(b2i(g.truncated)), "truncated")
		})
		b.Run(c.name+"/maximal", func(b *testing.B) {
			var g *groupSearch
			var groups []Group
			for b.Loop() {
				g = searchGroups(makeGroupItems(&bk, m, found, s), s, defaultMaxGroupSteps, nil)
				groups = g.groups(orig)
			}
			b.ReportMetric(float64(len(groups)), "groups")
			b.ReportMetric(float64(g.steps), "steps")
			b.ReportMetric(float64(b2i(g.truncated)), "truncated")
		})
	}
}

func b2i(v bool) int {
	if v {
		return 1
	}
	return 0
}
