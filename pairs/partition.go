package pairs

import (
	"slices"
	"sync"
)

// Partitioned counting: the pair-key space is cut into ranges of first
// document, [lo, hi) of compact IDs, and each range is counted on its own
// by one worker in a pass over the baskets. The pair keys of a range are
// exactly those whose smaller ID lies in it, so ranges never share a
// counter cell, the per-range results are each in (a, b) order, and their
// concatenation in range order is the same list one full count gives:
// the output does not depend on the number of ranges or workers.
//
// Ranges are sized by cost, so that one range's counter fits its share of
// the memory budget: a triangular range costs 4 bytes per cell of its rows
// (document a owns m-1-a cells), a sparse range is charged
// sparseBytesPerIncrement for every increment its documents start (the
// increments bound the distinct pairs from above, and a doubling table at
// most 3/4 full with 12-byte slots holds under 32 bytes per distinct pair,
// plus the old table while it grows). More ranges mean more passes over the
// baskets, never a different answer.

// sparseBytesPerIncrement is the budget charged per increment of a sparse
// range (see above).
const sparseBytesPerIncrement = 48

// rowSource yields the counting rows: each basket's documents in compact
// IDs, ascending, rows of two or more only. forEach may be called from
// several goroutines at once; each call is one full pass.
type rowSource interface {
	forEach(fn func(row []uint32)) error
}

// memoryRows serves the rows of baskets held in memory.
type memoryRows struct{ b *baskets }

func (r memoryRows) forEach(fn func(row []uint32)) error {
	for i := range r.b.fps {
		fn(r.b.row(i))
	}
	return nil
}

// startWeights returns, for each compact document a, the increments of the
// pairs (a, c) with a < c over all rows, and their total.
func startWeights(src rowSource, m int) ([]int64, int64, error) {
	w := make([]int64, m)
	var total int64
	err := src.forEach(func(row []uint32) {
		for x, a := range row {
			k := int64(len(row) - 1 - x)
			w[a] += k
			total += k
		}
	})
	return w, total, err
}

// splitRanges cuts 0..m into consecutive ranges whose cost stays within
// limit (a single document over the limit gets a range of its own) and,
// when parts > 1, into at least about parts ranges of similar cost so that
// every worker has one. limit <= 0 means no limit.
func splitRanges(m int, cost func(a int) int64, limit int64, parts int) [][2]int {
	if m == 0 {
		return nil
	}
	var total int64
	for a := range m {
		total += cost(a)
	}
	target := total
	if parts > 1 {
		target = (total + int64(parts) - 1) / int64(parts)
	}
	if limit > 0 && limit < target {
		target = limit
	}
	target = max(target, 1)
	var out [][2]int
	lo := 0
	var sum int64
	for a := range m {
		c := cost(a)
		if a > lo && sum+c > target {
			out = append(out, [2]int{lo, a})
			lo, sum = a, 0
		}
		sum += c
	}
	return append(out, [2]int{lo, m})
}

// startCell is the 0-based triangular cell of the pair (a, a+1) among m
// compact documents: the number of pairs whose first document is below a.
func startCell(m, a int) int64 {
	a64, m64 := int64(a), int64(m)
	return a64 * (2*m64 - a64 - 1) / 2
}

// countPlan says how the counting step runs.
type countPlan struct {
	kind   CounterKind
	s      uint32
	jobs   int
	budget int64 // bytes for all counters at once; 0: no bound
	// stopped, when set, is checked before each range is counted.
	stopped func() error
}

// countRanges counts every pair of every row with the plan's counter, in
// ranges of first document (see the top of this file), and returns the
// pairs counted at least s times in (a, b) order and the number of ranges.
func countRanges(src rowSource, m int, weights []int64, p countPlan) ([]countedPair, int, error) {
	jobs := max(1, p.jobs)
	var cost func(a int) int64
	if p.kind == CounterTriangular {
		cost = func(a int) int64 { return 4 * int64(m-1-a) }
	} else {
		cost = func(a int) int64 { return sparseBytesPerIncrement * weights[a] }
	}
	var limit int64
	if p.budget > 0 {
		limit = max(p.budget/int64(jobs), 1)
	}
	ranges := splitRanges(m, cost, limit, jobs)
	results := make([][]countedPair, len(ranges))
	errs := make([]error, len(ranges))
	next := make(chan int)
	var wg sync.WaitGroup
	for range min(jobs, len(ranges)) {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for i := range next {
				if p.stopped != nil {
					if errs[i] = p.stopped(); errs[i] != nil {
						continue
					}
				}
				lo, hi := ranges[i][0], ranges[i][1]
				var est int64
				for a := lo; a < hi; a++ {
					est += weights[a]
				}
				results[i], errs[i] = countRange(src, m, p.kind, lo, hi, est, p.s)
			}
		}()
	}
	for i := range ranges {
		next <- i
	}
	close(next)
	wg.Wait()
	var out []countedPair
	for i := range ranges {
		if errs[i] != nil {
			return nil, len(ranges), errs[i]
		}
		out = append(out, results[i]...)
	}
	return out, len(ranges), nil
}

// countRange counts the pairs (a, c) with lo <= a < hi in one pass over
// the rows.
func countRange(src rowSource, m int, kind CounterKind, lo, hi int, est int64, s uint32) ([]countedPair, error) {
	lo32, hi32 := uint32(lo), uint32(hi)
	// Rows are ascending, so the documents of a row inside the range are
	// one slice of it, found by binary search.
	if kind == CounterTriangular {
		base := startCell(m, lo)
		tri := make([]uint32, startCell(m, hi)-base)
		err := src.forEach(func(row []uint32) {
			x, _ := slices.BinarySearch(row, lo32)
			for ; x < len(row)-1 && row[x] < hi32; x++ {
				a := int(row[x])
				// 0-based cell of (a, c) is startCell(a) + c - a - 1.
				off := int(startCell(m, a)-base) - a - 1
				for _, c := range row[x+1:] {
					tri[off+int(c)]++
				}
			}
		})
		if err != nil {
			return nil, err
		}
		var out []countedPair
		k := 0
		for a := lo; a < hi; a++ {
			for c := a + 1; c < m; c++ {
				if tri[k] >= s {
					out = append(out, countedPair{a: uint32(a), b: uint32(c), n: tri[k]})
				}
				k++
			}
		}
		return out, nil
	}
	t := newSparseTable(est)
	err := src.forEach(func(row []uint32) {
		x, _ := slices.BinarySearch(row, lo32)
		for ; x < len(row)-1 && row[x] < hi32; x++ {
			a := row[x]
			for _, c := range row[x+1:] {
				t.add(makePairKey(a, c))
			}
		}
	})
	if err != nil {
		return nil, err
	}
	return t.frequent(s), nil
}
