package pairs

import (
	"sync"
	"sync/atomic"
)

// radixSortEntries sorts a by fingerprint, stably (entries with equal
// fingerprints keep their order), using buf (len(buf) == len(a)) as
// scratch, and returns the sorted slice.
//
// It is a most-significant-byte-first radix sort: a pass scatters the
// entries into 256 buckets by one byte and each bucket is sorted the same
// way on the next byte, by insertion once it holds fewer than 32 entries.
// For hashed fingerprints two passes leave buckets of a few entries, and
// the second pass already runs on a bucket small enough to stay in cache.
// A byte equal across a whole bucket costs only its histogram. Measured
// (BenchmarkSortEntries, 1.2 million entries): the eight-pass LSD radix
// sort this replaced took about three times as long, because each of its
// passes scatters writes over the whole array, and slices.SortFunc about
// four times as long.
//
// With jobs > 1 the buckets of the first pass, which do not overlap, are
// sorted by jobs goroutines at once; the result is the same, for a stable
// sort has only one.
func radixSortEntries(a, buf []entry, jobs int) []entry {
	buf = buf[:len(a)]
	if jobs <= 1 || len(a) < parallelSortMin {
		sortMSD(a, buf, 56)
		return a
	}
	var at [257]int
	for _, e := range a {
		at[int(e.fp>>56)+1]++
	}
	for i := 1; i < len(at); i++ {
		at[i] += at[i-1]
	}
	next := at
	for _, e := range a {
		k := e.fp >> 56
		buf[next[k]] = e
		next[k]++
	}
	copy(a, buf)
	var bucket atomic.Int32
	var wg sync.WaitGroup
	for range jobs {
		wg.Go(func() {
			for {
				k := int(bucket.Add(1) - 1)
				if k >= 256 {
					return
				}
				if lo, hi := at[k], at[k+1]; hi-lo > 1 {
					sortMSD(a[lo:hi], buf[lo:hi], 48)
				}
			}
		})
	}
	wg.Wait()
	return a
}

// parallelSortMin is the least number of entries radixSortEntries shares
// among goroutines: below it, starting them costs more than it saves.
const parallelSortMin = 1 << 16

func sortMSD(b, scratch []entry, shift uint) {
	for {
		if len(b) < 32 {
			for i := 1; i < len(b); i++ {
				e := b[i]
				j := i
				for j > 0 && b[j-1].fp > e.fp {
					b[j] = b[j-1]
					j--
				}
				b[j] = e
			}
			return
		}
		var at [257]int
		for _, e := range b {
			at[int(byte(e.fp>>shift))+1]++
		}
		if at[int(byte(b[0].fp>>shift))+1] == len(b) {
			// One bucket: nothing to move at this byte.
			if shift == 0 {
				return
			}
			shift -= 8
			continue
		}
		for i := 1; i < len(at); i++ {
			at[i] += at[i-1]
		}
		next := at
		for _, e := range b {
			k := byte(e.fp >> shift)
			scratch[next[k]] = e
			next[k]++
		}
		copy(b, scratch)
		if shift == 0 {
			return
		}
		for k := range 256 {
			lo, hi := at[k], at[k+1]
			if hi-lo > 1 {
				sortMSD(b[lo:hi], scratch[lo:hi], shift-8)
			}
		}
		return
	}
}
