package pairs

import (
	"fmt"
	"math"
	"slices"
)

// TriangularIndex is the 1-based position of the pair (i, j), 1 <= i < j <=
// n, in the row-major upper triangle of n items: (i-1)(n - i/2) + j - i,
// computed in integers as (i-1)(2n-i)/2 + j - i ((i-1)(2n-i) is always
// even). The positions of all pairs are exactly 1..n(n-1)/2.
func TriangularIndex(n, i, j int) int64 {
	n64, i64, j64 := int64(n), int64(i), int64(j)
	return (i64-1)*(2*n64-i64)/2 + j64 - i64
}

// possiblePairs is n(n-1)/2.
func possiblePairs(n int) int64 {
	if n < 2 {
		return 0
	}
	return int64(n) * int64(n-1) / 2
}

// ChooseCounter picks the counting structure for n documents when about
// estimatedPairs distinct pairs occur. The triangular array costs 4 bytes
// per possible pair, n(n-1)/2 of them; the sparse table costs 12 bytes (an
// 8-byte key and a 4-byte count) per occurring pair. The array is smaller
// once more than a third of the possible pairs occur, so it is chosen when
// 3*estimatedPairs > n(n-1)/2, and the sparse table otherwise.
func ChooseCounter(n int, estimatedPairs int64) CounterKind {
	possible := possiblePairs(n)
	est := min(estimatedPairs, possible)
	// 3*est > possible, without overflow: est > floor(possible/3).
	if est > possible/3 {
		return CounterTriangular
	}
	return CounterSparse
}

// countedPair is a pair of compact document IDs (a < b) and its count.
type countedPair struct {
	a, b uint32
	n    uint32
}

// maxTriangularCells bounds the array (8 GiB) so that its size cannot
// overflow an int on any platform. Beyond it Count falls back to the sparse
// table when choosing, and refuses a forced triangular counter; a corpus
// that large and dense needs the later partitioning work.
const maxTriangularCells = math.MaxInt32

// countTriangular counts every pair of every basket in the triangular
// array over the m compact IDs and returns the pairs counted at least s
// times, in (a, b) order.
func countTriangular(b *baskets, m int, s uint32) ([]countedPair, error) {
	cells := possiblePairs(m)
	if cells > maxTriangularCells {
		return nil, fmt.Errorf("pairs: triangular counter for %d documents needs %d cells, more than %d: %w", m, cells, maxTriangularCells, ErrOption)
	}
	tri := make([]uint32, cells)
	for i := range b.fps {
		row := b.row(i)
		for x, a := range row {
			// 0-based cell of (a, c) is a(2m-a-1)/2 + c - a - 1.
			// In int64 so that 32-bit platforms do not overflow.
			base := int(int64(a)*int64(2*m-int(a)-1)/2) - int(a) - 1
			for _, c := range row[x+1:] {
				tri[base+int(c)]++
			}
		}
	}
	var out []countedPair
	k := 0
	for a := 0; a < m; a++ {
		for c := a + 1; c < m; c++ {
			if tri[k] >= s {
				out = append(out, countedPair{a: uint32(a), b: uint32(c), n: tri[k]})
			}
			k++
		}
	}
	return out, nil
}

// A pairKey holds two compact document IDs, the smaller in the high half,
// so that sorting keys orders pairs by (a, b). No pair has key 0 (it would
// be (0, 0)), so 0 marks an empty slot.
type pairKey uint64

func makePairKey(a, b uint32) pairKey {
	if a > b {
		a, b = b, a
	}
	return pairKey(a)<<32 | pairKey(b)
}

func (k pairKey) docs() (uint32, uint32) { return uint32(k >> 32), uint32(k) }

// sparseTable is an open-addressing hash table with linear probing from
// pair keys to counts: 12 bytes per slot, at most 3/4 full, doubling when
// it would be fuller.
type sparseTable struct {
	keys   []pairKey
	counts []uint32
	shift  uint // 64 - log2(len(keys))
	used   int
	limit  int // used may reach limit before the table grows
}

func newSparseTable(expected int64) *sparseTable {
	want := min(max(expected, 16), 1<<16) * 4 / 3
	size, bits := 16, uint(4)
	for int64(size) < want {
		size *= 2
		bits++
	}
	t := &sparseTable{}
	t.alloc(size, bits)
	return t
}

func (t *sparseTable) alloc(size int, bits uint) {
	t.keys = make([]pairKey, size)
	t.counts = make([]uint32, size)
	t.shift = 64 - bits
	t.limit = size / 4 * 3
}

// slot is the home slot of k (Fibonacci hashing).
func (t *sparseTable) slot(k pairKey) int {
	return int((uint64(k) * 0x9e3779b97f4a7c15) >> t.shift)
}

func (t *sparseTable) add(k pairKey) {
	mask := len(t.keys) - 1
	for i := t.slot(k); ; i = (i + 1) & mask {
		switch t.keys[i] {
		case k:
			t.counts[i]++
			return
		case 0:
			if t.used >= t.limit {
				t.grow()
				t.add(k)
				return
			}
			t.keys[i] = k
			t.counts[i] = 1
			t.used++
			return
		}
	}
}

func (t *sparseTable) grow() {
	keys, counts := t.keys, t.counts
	t.alloc(2*len(keys), 64-t.shift+1)
	mask := len(t.keys) - 1
	for i, k := range keys {
		if k == 0 {
			continue
		}
		j := t.slot(k)
		for t.keys[j] != 0 {
			j = (j + 1) & mask
		}
		t.keys[j] = k
		t.counts[j] = counts[i]
	}
}

// countSparse counts every pair of every basket in a sparseTable and
// returns the pairs counted at least s times, in (a, b) order.
func countSparse(b *baskets, expected int64, s uint32) []countedPair {
	t := newSparseTable(expected)
	for i := range b.fps {
		row := b.row(i)
		for x, a := range row {
			for _, c := range row[x+1:] {
				t.add(makePairKey(a, c))
			}
		}
	}
	out := t.frequent(s)
	if len(out) == 0 {
		return nil
	}
	return out
}

func (t *sparseTable) get(k pairKey) uint32 {
	mask := len(t.keys) - 1
	for i := t.slot(k); ; i = (i + 1) & mask {
		switch t.keys[i] {
		case k:
			return t.counts[i]
		case 0:
			return 0
		}
	}
}

// frequent returns the pairs counted at least s times, sorted by key
// (the smaller document first, then the larger).
func (t *sparseTable) frequent(s uint32) []countedPair {
	var keys []pairKey
	for i, k := range t.keys {
		if k != 0 && t.counts[i] >= s {
			keys = append(keys, k)
		}
	}
	slices.Sort(keys)
	out := make([]countedPair, len(keys))
	for i, k := range keys {
		a, c := k.docs()
		// Look the count up again rather than carry it through the sort.
		out[i] = countedPair{a: a, b: c, n: t.get(k)}
	}
	return out
}
