package shingle

// Winnowing (Schleimer, Wilkerson & Aiken, "Winnowing: Local Algorithms for
// Document Fingerprinting", SIGMOD 2003).
//
// Every window of W consecutive shingle fingerprints keeps its minimum (the
// rightmost one on ties), and a fingerprint kept by several windows is kept
// once. Two texts that share a run of at least W+K-1 words share W
// consecutive shingles, a whole window, and both keep that window's minimum:
// the match is still found. On text whose fingerprints behave like random
// numbers the kept share is about 2/(W+1) (the paper's density figure), so
// the engine and the aligner see that much less. The cost is shorter
// matches: a shared run of fewer than W+K-1 words may be missed, and
// passages are chained from sparser points (report/chain.go).
//
// The minimum of each window comes from a monotone queue of positions whose
// fingerprints increase from front to back: a new fingerprint removes every
// one at the back that is not smaller (so on ties the rightmost stays), the
// front leaves when it falls out of the window, and the front is the
// window's minimum. Each position enters and leaves once: linear time, no
// allocation once the queue has grown. Rejected: rescanning every window,
// O(n·W), simpler but slower for large W.

// Winnow appends to dst the winnowed units of units (in text order, each
// kept unit once) for windows of w units; with w <= 1 it keeps them all.
// A text with fewer than w units has no full window; its minimum (rightmost
// on ties) is kept so that a short text still has a fingerprint.
func Winnow(dst, units []Unit, w int) []Unit {
	dst, _ = winnow(dst, units, w, nil)
	return dst
}

// winnow is Winnow with the queue's buffer passed in and returned for reuse.
func winnow(dst, units []Unit, w int, q []int32) ([]Unit, []int32) {
	if w <= 1 {
		return append(dst, units...), q
	}
	if len(units) == 0 {
		return dst, q
	}
	if len(units) < w {
		m := 0
		for i := range units {
			if units[i].Hash <= units[m].Hash {
				m = i
			}
		}
		return append(dst, units[m]), q
	}
	q = q[:0]
	head := 0
	last := -1 // the last position kept
	for i := range units {
		h := units[i].Hash
		for len(q) > head && units[q[len(q)-1]].Hash >= h {
			q = q[:len(q)-1]
		}
		q = append(q, int32(i))
		if int(q[head]) <= i-w {
			head++
		}
		if i >= w-1 {
			if m := int(q[head]); m != last {
				dst = append(dst, units[m])
				last = m
			}
		}
		if head > 1024 && head*2 > len(q) {
			// Keep the queue's buffer from growing with the text.
			n := copy(q, q[head:])
			q, head = q[:n], 0
		}
	}
	return dst, q
}
