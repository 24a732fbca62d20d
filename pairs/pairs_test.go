package pairs

import (
	"errors"
	"math/rand/v2"
	"slices"
	"strings"
	"testing"
)

var allCounters = []CounterKind{CounterAuto, CounterTriangular, CounterSparse}

// seq returns the fingerprints lo, lo+1, ..., hi.
func seq(lo, hi uint64) []uint64 {
	var out []uint64
	for v := lo; v <= hi; v++ {
		out = append(out, v)
	}
	return out
}

// join merges fingerprint lists into one ascending list.
func join(lists ...[]uint64) []uint64 {
	var out []uint64
	for _, l := range lists {
		out = append(out, l...)
	}
	slices.Sort(out)
	return slices.Compact(out)
}

func TestCountRules(t *testing.T) {
	tests := []struct {
		name       string
		in         Input
		opt        Options
		pairs      []Pair
		groups     []Group
		clusters   [][]uint32
		common     []CommonUnit
		stats      Stats // only the fields set here are compared
		checkStats bool
	}{
		{
			name: "unit in one document pairs nothing",
			// Documents 0 and 1 share units 1..3; units 10..12 are in
			// document 0 only and must not add to the pair.
			in:         Input{Docs: [][]uint64{join(seq(1, 3), seq(10, 12)), seq(1, 3)}},
			pairs:      []Pair{{0, 1, 3}},
			clusters:   [][]uint32{{0, 1}},
			stats:      Stats{Baskets: 3, Increments: 3},
			checkStats: true,
		},
		{
			name: "excluded unit never counts",
			// Units 1..3 are shared but 2 is excluded, so the pair has
			// 2 < 3 shared units. Fingerprint 99 is excluded but in no
			// document, so it is not a hit.
			in:         Input{Docs: [][]uint64{seq(1, 3), seq(1, 3)}, Excluded: []uint64{2, 99}},
			stats:      Stats{Baskets: 2, ExcludedHits: 1, Pruned: 2},
			checkStats: true,
		},
		{
			name:     "excluded unit never counts even at a lower threshold",
			in:       Input{Docs: [][]uint64{seq(1, 3), seq(1, 3)}, Excluded: []uint64{2}},
			opt:      Options{MinShared: 2},
			pairs:    []Pair{{0, 1, 2}},
			clusters: [][]uint32{{0, 1}},
		},
		{
			name: "unit in more than MaxDocs documents is common, listed with its count",
			// Unit 100 is in all 7 documents (> 5); unit 200 is in
			// documents 1..6 (> 5); unit 300 in exactly 5 is counted.
			// Documents 2 and 3 share 1..2 and 300.
			in: Input{Docs: [][]uint64{
				{100, 300},
				{100, 200, 300},
				join(seq(1, 2), []uint64{100, 200, 300}),
				join(seq(1, 2), []uint64{100, 200, 300}),
				{100, 200, 300},
				{100, 200},
				{100, 200},
			}},
			opt:      Options{MaxDocs: 5},
			pairs:    []Pair{{2, 3, 3}},
			clusters: [][]uint32{{2, 3}},
			common:   []CommonUnit{{Hash: 100, Docs: 7, First: 0}, {Hash: 200, Docs: 6, First: 1}},
		},
		{
			name: "pruned document appears in no pair",
			// Document 2 shares only unit 1 with document 0: in one
			// basket, fewer than s = 3, so it is pruned.
			in:         Input{Docs: [][]uint64{seq(1, 3), seq(1, 3), {1}}},
			pairs:      []Pair{{0, 1, 3}},
			clusters:   [][]uint32{{0, 1}},
			stats:      Stats{Baskets: 3, Pruned: 1, Increments: 3},
			checkStats: true,
		},
		{
			name: "pruning repeats until nothing changes",
			// s = 2. Unit 1 = {0,1}, unit 2 = {1,2}, units 3,4 = {2,3}.
			// Document 0 is in one basket: pruned, unit 1 drops, then
			// document 1 is in one basket: pruned, unit 2 drops.
			in:         Input{Docs: [][]uint64{{1}, {1, 2}, {2, 3, 4}, {3, 4}}},
			opt:        Options{MinShared: 2},
			pairs:      []Pair{{2, 3, 2}},
			clusters:   [][]uint32{{2, 3}},
			stats:      Stats{Baskets: 4, Pruned: 2, Increments: 2},
			checkStats: true,
		},
		{
			name:     "support exactly s counts and s-1 does not",
			in:       Input{Docs: [][]uint64{seq(1, 3), seq(1, 3), seq(10, 11), seq(10, 11)}},
			pairs:    []Pair{{0, 1, 3}},
			clusters: [][]uint32{{0, 1}},
		},
		{
			name:       "empty input finds nothing",
			in:         Input{},
			checkStats: true,
		},
		{
			name:       "one document pairs with nothing",
			in:         Input{Docs: [][]uint64{seq(1, 5)}},
			checkStats: true,
		},
		{
			name:     "three documents all sharing s units form a group",
			in:       Input{Docs: [][]uint64{seq(1, 3), seq(1, 3), seq(1, 3)}},
			pairs:    []Pair{{0, 1, 3}, {0, 2, 3}, {1, 2, 3}},
			groups:   []Group{{Docs: []uint32{0, 1, 2}, Shared: 3}},
			clusters: [][]uint32{{0, 1, 2}},
		},
		{
			name: "pairwise sharing without s units common to all forms no group",
			in: Input{Docs: [][]uint64{
				join(seq(1, 3), seq(7, 9)),
				join(seq(1, 3), seq(4, 6)),
				join(seq(4, 6), seq(7, 9)),
			}},
			pairs:    []Pair{{0, 1, 3}, {0, 2, 3}, {1, 2, 3}},
			clusters: [][]uint32{{0, 1, 2}},
		},
		{
			name: "groups are maximal and ordered by size, shared units, then documents",
			// 0..3 share 1..3 and 0,1,2 also 20..21: {0,1,2} shares 5
			// units but is inside the frequent {0,1,2,3}, so it is not
			// maximal. 4,5,6 and 10,11,12 share 5 units, 7,8,9 share 4.
			in: Input{Docs: [][]uint64{
				join(seq(1, 3), seq(20, 21)),
				join(seq(1, 3), seq(20, 21)),
				join(seq(1, 3), seq(20, 21)),
				seq(1, 3),
				seq(30, 34), seq(30, 34), seq(30, 34),
				seq(40, 43), seq(40, 43), seq(40, 43),
				seq(50, 54), seq(50, 54), seq(50, 54),
			}},
			pairs: []Pair{
				{0, 1, 5}, {0, 2, 5}, {0, 3, 3}, {1, 2, 5}, {1, 3, 3}, {2, 3, 3},
				{4, 5, 5}, {4, 6, 5}, {5, 6, 5},
				{7, 8, 4}, {7, 9, 4}, {8, 9, 4},
				{10, 11, 5}, {10, 12, 5}, {11, 12, 5},
			},
			groups: []Group{
				{Docs: []uint32{0, 1, 2, 3}, Shared: 3},
				{Docs: []uint32{4, 5, 6}, Shared: 5},
				{Docs: []uint32{10, 11, 12}, Shared: 5},
				{Docs: []uint32{7, 8, 9}, Shared: 4},
			},
			clusters: [][]uint32{{0, 1, 2, 3}, {4, 5, 6}, {7, 8, 9}, {10, 11, 12}},
		},
		{
			name: "clusters are components of pairs ordered by smallest member",
			// Pairs (1,4) and (0,2), (2,3): two components.
			in: Input{Docs: [][]uint64{
				seq(1, 3), seq(10, 12), join(seq(1, 3), seq(20, 22)), seq(20, 22), seq(10, 12),
			}},
			pairs:    []Pair{{0, 2, 3}, {1, 4, 3}, {2, 3, 3}},
			clusters: [][]uint32{{0, 2, 3}, {1, 4}},
		},
	}
	for _, tc := range tests {
		for _, kind := range allCounters {
			t.Run(tc.name+"/"+kind.String(), func(t *testing.T) {
				opt := tc.opt
				opt.Counter = kind
				got, err := Count(tc.in, opt)
				if err != nil {
					t.Fatal(err)
				}
				if !slices.Equal(got.Pairs, tc.pairs) {
					t.Errorf("pairs = %v, want %v", got.Pairs, tc.pairs)
				}
				if !groupsEqual(got.Groups, tc.groups) {
					t.Errorf("groups = %v, want %v", got.Groups, tc.groups)
				}
				if !clustersEqual(got.Clusters, tc.clusters) {
					t.Errorf("clusters = %v, want %v", got.Clusters, tc.clusters)
				}
				if !slices.Equal(got.Common, tc.common) {
					t.Errorf("common = %v, want %v", got.Common, tc.common)
				}
				if tc.checkStats {
					st := got.Stats
					st.GroupSteps, st.GroupItems = 0, 0
					if st != tc.stats {
						t.Errorf("stats = %+v, want %+v", got.Stats, tc.stats)
					}
				}
			})
		}
	}
}

func TestCountRejectsInvalidInput(t *testing.T) {
	ok := [][]uint64{{1, 2}, {1, 2}}
	tests := []struct {
		name    string
		in      Input
		opt     Options
		want    error
		context string // the message must say where
	}{
		{"unsorted document fingerprints are rejected", Input{Docs: [][]uint64{{1, 2}, {3, 2}}}, Options{}, ErrUnsorted, "document 1"},
		{"duplicate document fingerprint is rejected", Input{Docs: [][]uint64{{1, 2, 2}}}, Options{}, ErrDuplicate, "document 0: index 2"},
		{"unsorted excluded fingerprints are rejected", Input{Docs: ok, Excluded: []uint64{5, 4}}, Options{}, ErrUnsorted, "excluded"},
		{"duplicate excluded fingerprint is rejected", Input{Docs: ok, Excluded: []uint64{4, 4}}, Options{}, ErrDuplicate, "excluded"},
		{"MinShared below 1 is rejected", Input{Docs: ok}, Options{MinShared: -1}, ErrOption, "MinShared"},
		{"MaxDocs below 1 is rejected", Input{Docs: ok}, Options{MaxDocs: -2}, ErrOption, "MaxDocs"},
		{"MaxGroupSteps below 1 is rejected", Input{Docs: ok}, Options{MaxGroupSteps: -1}, ErrOption, "MaxGroupSteps"},
		{"unknown counter is rejected", Input{Docs: ok}, Options{Counter: 7}, ErrOption, "CounterKind(7)"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			res, err := Count(tc.in, tc.opt)
			if !errors.Is(err, tc.want) {
				t.Fatalf("err = %v, want %v", err, tc.want)
			}
			if res != nil {
				t.Errorf("result %+v returned with an error", res)
			}
			if !strings.HasPrefix(err.Error(), "pairs: ") || !strings.Contains(err.Error(), tc.context) {
				t.Errorf("error %q lacks context %q", err, tc.context)
			}
		})
	}
}

func TestCountAppliesDefaults(t *testing.T) {
	got, err := Count(Input{Docs: make([][]uint64, 30)}, Options{})
	if err != nil {
		t.Fatal(err)
	}
	if got.MinShared != 3 || got.MaxDocs != DefaultMaxDocs(30) {
		t.Errorf("MinShared %d MaxDocs %d, want 3 and %d", got.MinShared, got.MaxDocs, DefaultMaxDocs(30))
	}
}

func TestDefaultMaxDocs(t *testing.T) {
	// The rule min(1000, max(5, n/2)), as specified for the project.
	tests := []struct {
		name string
		n    int
		want int
	}{
		{"a tiny batch keeps the floor of 5", 2, 5},
		{"ten documents: half is 5", 10, 5},
		{"24 documents: half is 12", 24, 12},
		{"30 documents: half is 15", 30, 15},
		{"a large corpus is capped at 1000", 3000, 1000},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			if got := DefaultMaxDocs(tc.n); got != tc.want {
				t.Errorf("DefaultMaxDocs(%d) = %d, want %d", tc.n, got, tc.want)
			}
		})
	}
}

func TestDefaultCapInABatchOf30(t *testing.T) {
	// 30 essays. Essays 0..11 copy the same three sentences (10..12)
	// from one source; essays 0..15 repeat the prompt (sentence 1).
	docs := make([][]uint64, 30)
	for d := range docs {
		docs[d] = []uint64{1000 + uint64(d)} // one sentence of its own
		if d < 16 {
			docs[d] = append(docs[d], 1)
		}
		if d < 12 {
			docs[d] = append(docs[d], 10, 11, 12)
		}
		slices.Sort(docs[d])
	}
	got, err := Count(Input{Docs: docs}, Options{})
	if err != nil {
		t.Fatal(err)
	}
	t.Run("a sentence copied by 12 of 30 essays is reported", func(t *testing.T) {
		if want := 12 * 11 / 2; len(got.Pairs) != want {
			t.Fatalf("%d pairs, want %d", len(got.Pairs), want)
		}
		for _, p := range got.Pairs {
			if p.A >= 12 || p.B >= 12 || p.Shared != 3 {
				t.Fatalf("unexpected pair %v", p)
			}
		}
	})
	t.Run("a sentence in more than half of 30 essays is common", func(t *testing.T) {
		want := []CommonUnit{{Hash: 1, Docs: 16, First: 0}}
		if !slices.Equal(got.Common, want) {
			t.Fatalf("common = %v, want %v", got.Common, want)
		}
	})
}

func TestTriangularIndex(t *testing.T) {
	t.Run("n = 10, pair (3, 5) is at position 19", func(t *testing.T) {
		// Common practice: the row-major upper-triangle layout.
		if got := TriangularIndex(10, 3, 5); got != 19 {
			t.Errorf("TriangularIndex(10, 3, 5) = %d, want 19", got)
		}
	})
	t.Run("positions are a bijection onto 1..n(n-1)/2 in row-major order", func(t *testing.T) {
		for _, n := range []int{2, 3, 4, 5, 10, 17, 64} {
			want := int64(1)
			for i := 1; i <= n; i++ {
				for j := i + 1; j <= n; j++ {
					// Row-major order visits every position once,
					// in order, so consecutive visits give a bijection.
					if got := TriangularIndex(n, i, j); got != want {
						t.Fatalf("n=%d: TriangularIndex(%d, %d) = %d, want %d", n, i, j, got, want)
					}
					want++
				}
			}
			if last := want - 1; last != int64(n*(n-1)/2) {
				t.Fatalf("n=%d: %d positions, want %d", n, last, n*(n-1)/2)
			}
		}
	})
}

func TestChooseCounter(t *testing.T) {
	// Triangular when more than a third of the possible pairs occur:
	// 12 bytes per occurring pair then exceed 4 bytes per possible pair
	// (common practice).
	tests := []struct {
		name string
		n    int
		est  int64
		want CounterKind
	}{
		{"n=10: 15 of 45 pairs is exactly a third: sparse", 10, 15, CounterSparse},
		{"n=10: 14 of 45 pairs: sparse", 10, 14, CounterSparse},
		{"n=10: 16 of 45 pairs: triangular", 10, 16, CounterTriangular},
		{"n=5: 3 of 10 pairs is under a third: sparse", 5, 3, CounterSparse},
		{"n=5: 4 of 10 pairs is over a third: triangular", 5, 4, CounterTriangular},
		{"n=1000: 166500 of 499500 is exactly a third: sparse", 1000, 166500, CounterSparse},
		{"n=1000: 166501 of 499500: triangular", 1000, 166501, CounterTriangular},
		{"an estimate above the possible pairs is clamped: triangular", 10, 1 << 40, CounterTriangular},
		{"no pairs: sparse", 10, 0, CounterSparse},
		{"fewer than two documents: sparse", 1, 5, CounterSparse},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			if got := ChooseCounter(tc.n, tc.est); got != tc.want {
				t.Errorf("ChooseCounter(%d, %d) = %v, want %v", tc.n, tc.est, got, tc.want)
			}
			// The same rule stated in bytes.
			possible := int64(tc.n) * int64(tc.n-1) / 2
			est := min(tc.est, possible)
			if bytes := (12*est > 4*possible); bytes != (tc.want == CounterTriangular) {
				t.Errorf("byte rule says triangular=%v", bytes)
			}
		})
	}
}

func TestAutoCounterFollowsDensity(t *testing.T) {
	// 30 documents in 15 disjoint pairs: 15 of 435 possible pairs occur.
	sparse := make([][]uint64, 30)
	for d := range sparse {
		sparse[d] = seq(uint64(d/2)*10, uint64(d/2)*10+2)
	}
	// 4 documents sharing everything: all 6 possible pairs occur.
	dense := [][]uint64{seq(1, 3), seq(1, 3), seq(1, 3), seq(1, 3)}
	tests := []struct {
		name string
		docs [][]uint64
		want CounterKind
	}{
		{"disjoint pairs count in the sparse table", sparse, CounterSparse},
		{"a dense batch counts in the triangular array", dense, CounterTriangular},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			got, err := Count(Input{Docs: tc.docs}, Options{})
			if err != nil {
				t.Fatal(err)
			}
			if got.Counter != tc.want {
				t.Errorf("counter = %v, want %v", got.Counter, tc.want)
			}
		})
	}
}

func TestSparseTableGrowsAndCountsExactly(t *testing.T) {
	// Start at the smallest table and insert far more keys than it holds.
	tab := newSparseTable(0)
	want := map[pairKey]uint32{}
	r := rand.New(rand.NewPCG(1, 2))
	for range 50000 {
		a, b := uint32(r.IntN(300)), uint32(r.IntN(300))
		if a == b {
			continue
		}
		k := makePairKey(a, b)
		tab.add(k)
		want[k]++
	}
	if tab.used != len(want) {
		t.Fatalf("%d keys stored, want %d", tab.used, len(want))
	}
	if tab.used > tab.limit || tab.limit > len(tab.keys)*3/4 {
		t.Fatalf("load %d/%d over the limit %d", tab.used, len(tab.keys), tab.limit)
	}
	for k, n := range want {
		if got := tab.get(k); got != n {
			a, b := k.docs()
			t.Fatalf("pair (%d, %d) counted %d, want %d", a, b, got, n)
		}
	}
}

func TestRadixSortMatchesStableSort(t *testing.T) {
	r := rand.New(rand.NewPCG(3, 4))
	for _, n := range []int{0, 1, 2, 100, 5000, parallelSortMin + 777} {
		ents := make([]entry, n)
		for i := range ents {
			// Few distinct values in some bytes, random in others.
			ents[i] = entry{fp: r.Uint64()&0xff00ff00000000ff | uint64(r.IntN(4))<<40, doc: uint32(i)}
			if i%2 == 1 { // and ties below random top bytes
				ents[i].fp = r.Uint64()&0xffff000000000000 | uint64(r.IntN(3))
			}
		}
		want := slices.Clone(ents)
		slices.SortStableFunc(want, func(x, y entry) int {
			switch {
			case x.fp < y.fp:
				return -1
			case x.fp > y.fp:
				return 1
			}
			return 0
		})
		for _, jobs := range []int{1, 3} {
			got := radixSortEntries(slices.Clone(ents), make([]entry, n), jobs)
			if !slices.Equal(got, want) {
				t.Fatalf("n=%d, jobs %d: radix sort differs from a stable sort", n, jobs)
			}
		}
	}
}

func TestCounterKindString(t *testing.T) {
	for kind, want := range map[CounterKind]string{
		CounterAuto: "auto", CounterTriangular: "triangular", CounterSparse: "sparse", 9: "CounterKind(9)",
	} {
		if got := kind.String(); got != want {
			t.Errorf("%d.String() = %q, want %q", int(kind), got, want)
		}
	}
}

func TestClustersOfKeptPairsFollowTheResultRule(t *testing.T) {
	tests := []struct {
		name  string
		pairs []Pair
		n     int
		want  [][]uint32
	}{
		{"no pair, no cluster", nil, 4, nil},
		{"a chain is one cluster", []Pair{{A: 0, B: 3}, {A: 3, B: 5}}, 6, [][]uint32{{0, 3, 5}}},
		{"components ordered by smallest member, members ascending", []Pair{{A: 4, B: 6}, {A: 1, B: 2}, {A: 2, B: 7}}, 8,
			[][]uint32{{1, 2, 7}, {4, 6}}},
	}
	for _, tc := range tests {
		if got := Clusters(tc.pairs, tc.n); !slices.EqualFunc(got, tc.want, slices.Equal[[]uint32]) {
			t.Errorf("%s: Clusters = %v, want %v", tc.name, got, tc.want)
		}
	}
}

// TestMostlyCommonDocumentsStillCount checks the automatic cap's rule: a
// unit in more than half of the documents is set aside only in documents
// where it is a small part; documents that are mostly such units are
// copies of one text and still pair on it.
func TestMostlyCommonDocumentsStillCount(t *testing.T) {
	// 11 copies of one 30-unit text (copy 10 lacks its first unit, as a
	// format that drops a title would) and one unrelated document.
	docs := make([][]uint64, 12)
	for d := range 11 {
		for u := uint64(1); u <= 30; u++ {
			if d == 10 && u == 1 {
				continue
			}
			docs[d] = append(docs[d], u)
		}
	}
	docs[11] = []uint64{100, 101, 102}
	got, err := Count(Input{Docs: docs}, Options{MinShared: 2})
	if err != nil {
		t.Fatal(err)
	}
	t.Run("every pair of copies is reported", func(t *testing.T) {
		if len(got.Pairs) != 55 {
			t.Fatalf("%d pairs, want 55", len(got.Pairs))
		}
		for _, p := range got.Pairs {
			if p.B == 11 {
				t.Fatalf("the unrelated document is in pair %v", p)
			}
		}
	})
	t.Run("nothing is listed as common text", func(t *testing.T) {
		if len(got.Common) != 0 {
			t.Fatalf("common = %v", got.Common)
		}
	})
	t.Run("the copies are one set of near-copies", func(t *testing.T) {
		if len(got.NearCopies) != 1 || len(got.NearCopies[0].Docs) != 11 || got.NearCopies[0].Pairs != 55 {
			t.Fatalf("near-copies = %+v", got.NearCopies)
		}
		nc := got.NearCopies[0]
		// Copy 10 shares 29 units with the others and so has the least affinity;
		// the representative is the lowest ID among the equal rest.
		if nc.Representative != 0 || nc.Shared[10] != 29 || nc.Units[10] != 29 || nc.Shared[0] != 30 {
			t.Fatalf("near-copies = %+v", nc)
		}
	})
	t.Run("an explicit cap applies to every document", func(t *testing.T) {
		got, err := Count(Input{Docs: docs}, Options{MinShared: 2, MaxDocs: 6})
		if err != nil {
			t.Fatal(err)
		}
		if len(got.Pairs) != 0 || len(got.Common) != 30 {
			t.Fatalf("%d pairs and %d common units, want 0 and 30", len(got.Pairs), len(got.Common))
		}
	})
	t.Run("a prompt pasted into copies and essays counts only in the copies", func(t *testing.T) {
		// Documents 0-10 as above plus, for 5 more essays of their own,
		// unit 1 (the first unit of the copied text) as a pasted line.
		more := slices.Clone(docs)
		for e := range 5 {
			more = append(more, []uint64{1, 1000 + 10*uint64(e), 1001 + 10*uint64(e), 1002 + 10*uint64(e)})
		}
		got, err := Count(Input{Docs: more}, Options{MinShared: 2})
		if err != nil {
			t.Fatal(err)
		}
		// 17 documents: cap 8; unit 1 is in 15 of them and counts in
		// the 10 copies that hold it, not in the essays (1 unit of 4);
		// the essays pair with nothing.
		want := []CommonUnit{{Hash: 1, Docs: 15, First: 0, Kept: 10}}
		if !slices.Equal(got.Common, want) || len(got.Pairs) != 55 {
			t.Fatalf("common %v and %d pairs, want %v and 55", got.Common, len(got.Pairs), want)
		}
	})
}
