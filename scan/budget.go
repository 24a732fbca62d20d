package scan

import "reprise/corpus"

// minEngineBudget is the least the pair engine is given when the
// documents alone take the whole memory bound: it then spills at once.
const minEngineBudget = 1 << 20

// Bytes the run holds per document and per distinct unit while the engine
// counts (see BENCHMARKS.md, "What the budget covers"): a distinct unit is
// one 8-byte fingerprint in the engine's input; a document's fixed cost is
// its corpus.Document (144 bytes), its digest (80 bytes), slice headers and
// allocation rounding; its path and notes are counted by their length.
const (
	heldPerUnit     = 8
	heldPerDocument = 256
)

// heldBytes estimates what the run holds for the documents while the
// engine counts: each one's corpus.Document and digest, its path and
// notes, and its fingerprints (the texts are not held).
func heldBytes(docs []corpus.Document, digests []docDigest) int64 {
	var n int64
	for i := range docs {
		n += heldPerDocument + int64(len(docs[i].Path))
		for _, note := range digests[i].notes {
			n += int64(len(note)) + 16
		}
		n += heldPerUnit * int64(cap(digests[i].set))
	}
	return n
}

// engineBudget is what the pair engine may hold: the memory bound less
// what the run already holds, at least minEngineBudget; 0 stays 0 (no
// bound).
func engineBudget(memory, held int64) int64 {
	if memory == 0 {
		return 0
	}
	return max(memory-held, minEngineBudget)
}

// quotedFit reports whether the quoted documents ids may be held in
// memory: with no --memory bound, or when their texts and units take at
// most half of what the bound leaves after the held bytes (the engine has
// let go of its memory by then; the other half is for the report).
func quotedFit(memory, held int64, digests []docDigest, ids []int) bool {
	if memory == 0 {
		return true
	}
	var need int64
	for _, i := range ids {
		need += quotedBytes(digests[i].size, int(digests[i].units))
	}
	return need <= (memory-held)/2
}
