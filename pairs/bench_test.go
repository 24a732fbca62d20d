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
