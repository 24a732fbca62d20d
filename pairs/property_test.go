package pairs

import (
	"cmp"
	"flag"
	"os"
	"slices"
	"testing"

	"pgregory.net/rapid"
)

// TestMain raises rapid's default number of checks so that the property
// test runs on thousands of corpora, unless -rapid.checks or RAPID_CHECKS
// chooses otherwise.
func TestMain(m *testing.M) {
	flag.Parse()
	set := false
	flag.Visit(func(f *flag.Flag) { set = set || f.Name == "rapid.checks" })
	if _, env := os.LookupEnv("RAPID_CHECKS"); !set && !env {
		if err := flag.Set("rapid.checks", "3000"); err != nil {
			panic(err)
		}
	}
	os.Exit(m.Run())
}

// oracleResult is what a direct comparison of document sets finds.
type oracleResult struct {
	pairs    []Pair
	groups   []Group
	clusters [][]uint32
	common   []CommonUnit
	shares   []CommonShare
	counted  []uint32 // each document's counted units
	support  func(members []uint32) int
	hits     int
	baskets  int
	inBasket int // documents in at least one counted unit
}

// oracle compares every pair and every subset of three or more documents
// directly: after setting aside excluded units and units in more than
// maxDocs documents, the support of a set of documents is the number of
// units all of them contain. Under the automatic cap (auto), a document
// more than half of whose distinct units are in more than maxDocs
// documents is mostly common text, and those units still count in it. It
// does no pruning and no counting structure.
func oracle(docs [][]uint64, excluded []uint64, s, maxDocs int, auto bool) oracleResult {
	var r oracleResult
	holders := map[uint64][]uint32{}
	for d, fps := range docs {
		for _, fp := range fps {
			holders[fp] = append(holders[fp], uint32(d))
		}
	}
	isFrequent := func(fp uint64) bool { return !slices.Contains(excluded, fp) && len(holders[fp]) > maxDocs }
	mostly := make([]bool, len(docs))
	for d, fps := range docs {
		f := 0
		for _, fp := range fps {
			if isFrequent(fp) {
				f++
			}
		}
		if f > 0 {
			r.shares = append(r.shares, CommonShare{Doc: uint32(d), Common: uint32(f), Units: uint32(len(fps)), Mostly: auto && 2*f > len(fps)})
		}
		mostly[d] = auto && 2*f > len(fps)
	}
	// countsIn says whether unit fp counts in document d.
	countsIn := map[uint64]map[uint32]bool{}
	for fp, ds := range holders {
		switch {
		case slices.Contains(excluded, fp):
			r.hits++
		case len(ds) > maxDocs:
			var kept []uint32
			for _, d := range ds {
				if mostly[d] {
					kept = append(kept, d)
				}
			}
			if len(kept) < len(ds) {
				r.common = append(r.common, CommonUnit{Hash: fp, Docs: uint32(len(ds)), First: slices.Min(ds), Kept: uint32(len(kept))})
			}
			if len(kept) >= 2 {
				r.baskets++
				countsIn[fp] = map[uint32]bool{}
				for _, d := range kept {
					countsIn[fp][d] = true
				}
			}
		case len(ds) >= 2:
			r.baskets++
			countsIn[fp] = map[uint32]bool{}
			for _, d := range ds {
				countsIn[fp][d] = true
			}
		}
	}
	slices.SortFunc(r.common, func(x, y CommonUnit) int {
		if x.Docs != y.Docs {
			return int(y.Docs) - int(x.Docs)
		}
		if x.Hash < y.Hash {
			return -1
		}
		return 1
	})
	sets := make([]map[uint64]bool, len(docs))
	r.counted = make([]uint32, len(docs))
	for d, fps := range docs {
		sets[d] = map[uint64]bool{}
		for _, fp := range fps {
			if countsIn[fp][uint32(d)] {
				sets[d][fp] = true
			}
			if !slices.Contains(excluded, fp) && (!isFrequent(fp) || mostly[d]) {
				r.counted[d]++
			}
		}
		if len(sets[d]) > 0 {
			r.inBasket++
		}
	}
	support := func(members []uint32) int {
		n := 0
		for fp := range sets[members[0]] {
			all := true
			for _, d := range members[1:] {
				all = all && sets[d][fp]
			}
			if all {
				n++
			}
		}
		return n
	}
	r.support = support
	n := len(docs)
	for a := 0; a < n; a++ {
		for b := a + 1; b < n; b++ {
			if c := support([]uint32{uint32(a), uint32(b)}); c >= s {
				r.pairs = append(r.pairs, Pair{A: uint32(a), B: uint32(b), Shared: uint32(c)})
			}
		}
	}
	// Every subset of three or more documents, as a bit mask.
	frequent := map[int]int{}
	for mask := 1; mask < 1<<n; mask++ {
		var members []uint32
		for d := range n {
			if mask&(1<<d) != 0 {
				members = append(members, uint32(d))
			}
		}
		if len(members) >= 3 {
			if c := support(members); c >= s {
				frequent[mask] = c
			}
		}
	}
	for mask, c := range frequent {
		maximal := true
		for d := range n {
			if mask&(1<<d) == 0 {
				if _, ok := frequent[mask|1<<d]; ok {
					maximal = false
				}
			}
		}
		if !maximal {
			continue
		}
		var members []uint32
		for d := range n {
			if mask&(1<<d) != 0 {
				members = append(members, uint32(d))
			}
		}
		r.groups = append(r.groups, Group{Docs: members, Shared: uint32(c)})
	}
	slices.SortFunc(r.groups, func(x, y Group) int {
		if len(x.Docs) != len(y.Docs) {
			return len(y.Docs) - len(x.Docs)
		}
		if x.Shared != y.Shared {
			return int(y.Shared) - int(x.Shared)
		}
		return slices.Compare(x.Docs, y.Docs)
	})
	// Clusters by repeated relabelling to the smallest label reachable.
	label := make([]uint32, n)
	for d := range label {
		label[d] = uint32(d)
	}
	for changed := true; changed; {
		changed = false
		for _, p := range r.pairs {
			lo := min(label[p.A], label[p.B])
			if label[p.A] != lo || label[p.B] != lo {
				label[p.A], label[p.B] = lo, lo
				changed = true
			}
		}
	}
	inPair := make([]bool, n)
	for _, p := range r.pairs {
		inPair[p.A], inPair[p.B] = true, true
	}
	for l := range n {
		var comp []uint32
		for d := range n {
			if inPair[d] && label[d] == uint32(l) {
				comp = append(comp, uint32(d))
			}
		}
		if len(comp) > 0 {
			r.clusters = append(r.clusters, comp)
		}
	}
	return r
}

func groupsEqual(x, y []Group) bool {
	return slices.EqualFunc(x, y, func(a, b Group) bool {
		return a.Shared == b.Shared && slices.Equal(a.Docs, b.Docs)
	})
}

func clustersEqual(x, y [][]uint32) bool {
	return slices.EqualFunc(x, y, func(a, b []uint32) bool { return slices.Equal(a, b) })
}

// TestCountMatchesBruteForce checks Count against the oracle on random small
// corpora drawn from a small alphabet of fingerprints, so that overlaps,
// common units and groups are frequent, with every counter kind.
func TestCountMatchesBruteForce(t *testing.T) {
	rapid.Check(t, checkAgainstOracle)
}

// FuzzCount runs the same property on inputs from the fuzzer.
func FuzzCount(f *testing.F) {
	f.Fuzz(rapid.MakeFuzz(checkAgainstOracle))
}

func checkAgainstOracle(t *rapid.T) {
	alpha := rapid.IntRange(1, 20).Draw(t, "alphabet")
	// Distinct fingerprints anywhere in 64 bits (rapid favours
	// small and edge values, which the radix sort must handle).
	fps := rapid.SliceOfNDistinct(rapid.Uint64(), alpha, alpha, func(v uint64) uint64 { return v }).Draw(t, "fingerprints")
	n := rapid.IntRange(0, 9).Draw(t, "documents")
	docs := make([][]uint64, n)
	for d := range docs {
		idx := rapid.SliceOfNDistinct(rapid.IntRange(0, alpha-1), 0, alpha, func(v int) int { return v }).Draw(t, "units")
		for _, i := range idx {
			docs[d] = append(docs[d], fps[i])
		}
		slices.Sort(docs[d])
	}
	var excluded []uint64
	for _, i := range rapid.SliceOfNDistinct(rapid.IntRange(0, alpha+2), 0, 4, func(v int) int { return v }).Draw(t, "excluded") {
		if i < alpha {
			excluded = append(excluded, fps[i])
		} else {
			excluded = append(excluded, ^uint64(i)) // may or may not occur in a document
		}
	}
	slices.Sort(excluded)
	excluded = slices.Compact(excluded)
	opt := Options{
		MinShared: rapid.IntRange(0, 5).Draw(t, "MinShared"),
		MaxDocs:   rapid.IntRange(0, 10).Draw(t, "MaxDocs"),
	}
	s, maxDocs := opt.MinShared, opt.MaxDocs
	if s == 0 {
		s = 3
	}
	if maxDocs == 0 {
		maxDocs = DefaultMaxDocs(n)
	}
	want := oracle(docs, excluded, s, maxDocs, opt.MaxDocs == 0)
	opt.NearCopy = rapid.SampledFrom([]float64{0, 0.5, 1}).Draw(t, "NearCopy")
	wantNear := oracleNearCopies(want, cmp.Or(opt.NearCopy, 0.7))

	var first *Result
	for _, kind := range []CounterKind{CounterAuto, CounterTriangular, CounterSparse} {
		opt.Counter = kind
		got, err := Count(Input{Docs: docs, Excluded: excluded}, opt)
		if err != nil {
			t.Fatalf("%v: %v", kind, err)
		}
		if !slices.Equal(got.Pairs, want.pairs) {
			t.Fatalf("%v: pairs\n got %v\nwant %v", kind, got.Pairs, want.pairs)
		}
		if !groupsEqual(got.Groups, want.groups) {
			t.Fatalf("%v: groups\n got %v\nwant %v", kind, got.Groups, want.groups)
		}
		if got.GroupsTruncated {
			t.Fatalf("%v: groups truncated at %d steps", kind, got.Stats.GroupSteps)
		}
		if !clustersEqual(got.Clusters, want.clusters) {
			t.Fatalf("%v: clusters\n got %v\nwant %v", kind, got.Clusters, want.clusters)
		}
		if !slices.Equal(got.Common, want.common) {
			t.Fatalf("%v: common\n got %v\nwant %v", kind, got.Common, want.common)
		}
		if !slices.Equal(got.CommonShares, want.shares) {
			t.Fatalf("%v: common shares\n got %v\nwant %v", kind, got.CommonShares, want.shares)
		}
		if !nearCopiesEqual(got.NearCopies, wantNear) {
			t.Fatalf("%v: near-copies\n got %+v\nwant %+v", kind, got.NearCopies, wantNear)
		}
		if got.Stats.ExcludedHits != want.hits || got.Stats.Baskets != want.baskets {
			t.Fatalf("%v: excluded hits %d baskets %d, want %d and %d", kind, got.Stats.ExcludedHits, got.Stats.Baskets, want.hits, want.baskets)
		}
		if got.MinShared != s || got.MaxDocs != maxDocs {
			t.Fatalf("%v: effective MinShared %d MaxDocs %d, want %d and %d", kind, got.MinShared, got.MaxDocs, s, maxDocs)
		}
		if kind != CounterAuto && got.Counter != kind {
			t.Fatalf("forced %v, counted with %v", kind, got.Counter)
		}
		if kind == CounterAuto {
			// The survivors of pruning are the documents in
			// baskets less the pruned ones; the estimate is
			// min(increments, possible pairs).
			m := want.inBasket - got.Stats.Pruned
			est := min(got.Stats.Increments, int64(m)*int64(m-1)/2)
			if wantKind := ChooseCounter(m, est); got.Counter != wantKind {
				t.Fatalf("auto counted with %v, the rule picks %v for %d documents and %d pairs", got.Counter, wantKind, m, est)
			}
		}
		// Pruning removes only documents that are in no pair.
		inPairs := map[uint32]bool{}
		var shared int64
		for _, p := range got.Pairs {
			inPairs[p.A], inPairs[p.B] = true, true
			shared += int64(p.Shared)
		}
		if got.Stats.Pruned < 0 || want.inBasket-got.Stats.Pruned < len(inPairs) {
			t.Fatalf("%v: pruned %d of %d documents in baskets, but %d are in pairs", kind, got.Stats.Pruned, want.inBasket, len(inPairs))
		}
		if got.Stats.Increments < shared {
			t.Fatalf("%v: %d increments cannot count %d shared units", kind, got.Stats.Increments, shared)
		}
		if kind == CounterAuto {
			checkBudgets(t, Input{Docs: docs, Excluded: excluded}, opt, got)
		}
		if first == nil {
			first = got
		} else if got.Stats != first.Stats {
			t.Fatalf("%v: stats %+v differ from %+v", kind, got.Stats, first.Stats)
		}
	}
}

// oracleNearCopies finds the near-copy sets of the oracle's pairs by
// definition: components of the pairs whose shared units reach threshold
// times the larger of the two documents' counted units, each with the
// member of largest summed shared units (lowest first) as representative.
func oracleNearCopies(r oracleResult, threshold float64) []NearCopies {
	n := len(r.counted)
	adj := make([][]uint32, n)
	affinity := make([]int, n)
	for _, p := range r.pairs {
		if float64(p.Shared) >= threshold*float64(max(r.counted[p.A], r.counted[p.B])) {
			adj[p.A] = append(adj[p.A], p.B)
			adj[p.B] = append(adj[p.B], p.A)
			affinity[p.A] += int(p.Shared)
			affinity[p.B] += int(p.Shared)
		}
	}
	seen := make([]bool, n)
	var out []NearCopies
	for d := range n {
		if seen[d] || len(adj[d]) == 0 {
			continue
		}
		stack, comp := []uint32{uint32(d)}, []uint32{}
		seen[d] = true
		for len(stack) > 0 {
			x := stack[len(stack)-1]
			stack = stack[:len(stack)-1]
			comp = append(comp, x)
			for _, y := range adj[x] {
				if !seen[y] {
					seen[y] = true
					stack = append(stack, y)
				}
			}
		}
		slices.Sort(comp)
		nc := NearCopies{Docs: comp, Representative: comp[0]}
		for _, x := range comp {
			if affinity[x] > affinity[nc.Representative] {
				nc.Representative = x
			}
		}
		for _, x := range comp {
			nc.Units = append(nc.Units, r.counted[x])
			if x == nc.Representative {
				nc.Shared = append(nc.Shared, r.counted[x])
			} else {
				nc.Shared = append(nc.Shared, uint32(r.support([]uint32{nc.Representative, x})))
			}
		}
		for _, p := range r.pairs {
			if slices.Contains(comp, p.A) && slices.Contains(comp, p.B) {
				nc.Pairs++
			}
		}
		out = append(out, nc)
	}
	slices.SortFunc(out, func(x, y NearCopies) int {
		return cmp.Or(cmp.Compare(len(y.Docs), len(x.Docs)), cmp.Compare(x.Docs[0], y.Docs[0]))
	})
	return out
}

func nearCopiesEqual(x, y []NearCopies) bool {
	return slices.EqualFunc(x, y, func(a, b NearCopies) bool {
		return slices.Equal(a.Docs, b.Docs) && a.Representative == b.Representative &&
			slices.Equal(a.Shared, b.Shared) && slices.Equal(a.Units, b.Units) && a.Pairs == b.Pairs
	})
}
