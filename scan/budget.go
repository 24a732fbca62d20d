package scan

import (
	"unsafe"

	"reprise/corpus"
)

// minEngineBudget is the least the pair engine is given when the
// documents alone take the whole memory bound: it then spills at once.
const minEngineBudget = 1 << 20

// Bytes the run holds per document and per distinct unit (see
// BENCHMARKS.md, "What the budget covers").
//
// While the engine counts: a distinct unit is one 8-byte fingerprint in
// the engine's input; a document's fixed cost is its corpus.Document (144
// bytes), its digest (64 bytes) and the pointer to it (8), and its slice
// header in the engine's input (24 bytes); its path and notes are counted by what their allocations
// take.
//
// While the report is built (the fingerprints let go): its report.Doc (168
// bytes), its report.Document (96), its report.SourceText (32), and the
// report's spans header and reuse share (32).
const (
	heldPerUnit       = 8
	heldPerDocument   = 240
	reportPerDocument = 328
)

// runtimeShare is the part of the memory bound kept for the Go runtime
// rather than charged to what the run holds: the unused room in its spans
// of objects, its own metadata, the stacks, and the margin that lets the
// garbage collector keep the heap under the soft limit cmd/reprise sets to
// the bound. Measured at 10^6 documents with a bound of 1 GiB: 67 MiB of
// unused span room at 1,015 MiB of live objects; with the live heap at the
// bound, the collector could not keep it there and the peak RSS was 10%
// over (BENCHMARKS.md).
func runtimeShare(memory int64) int64 { return memory / 8 }

// allocSize is about what the Go allocator takes for n bytes: its size
// classes are at most an eighth apart above 256 bytes, 16 bytes below.
func allocSize(n int) int64 {
	if n <= 0 {
		return 0
	}
	step := 16
	for p := 256; p < n && step < 8192; p *= 2 {
		step = p / 8
	}
	return int64((n + step - 1) / step * step)
}

// heldBytes estimates what the run holds for the documents while the
// engine counts: each one's corpus.Document and digest, its path and
// notes, and its fingerprints (the texts are not held).
func heldBytes(docs []corpus.Document, digests []*docDigest) int64 {
	var n int64
	for i := range docs {
		n += heldPerDocument + namesBytes(docs[i].Path, digests[i].notes())
		n += allocSize(heldPerUnit * cap(digests[i].set))
	}
	return n
}

// reportHeldBytes estimates what the run holds for the documents once the
// engine is done, while the report is built: the report's own structs for
// each, its path and notes.
func reportHeldBytes(docs []corpus.Document, digests []*docDigest) int64 {
	var n int64
	for i := range docs {
		n += reportPerDocument + namesBytes(docs[i].Path, digests[i].notes())
	}
	return n
}

// namesBytes is what a document's path and notes take (with the
// digestRare that holds them).
func namesBytes(path string, notes []string) int64 {
	n := allocSize(len(path))
	if len(notes) > 0 {
		n += allocSize(int(unsafe.Sizeof(digestRare{}))) + allocSize(16*len(notes))
	}
	for _, note := range notes {
		n += allocSize(len(note))
	}
	return n
}

// engineBudget is what the pair engine may hold: the memory bound less
// the runtime's share and what the run already holds, at least
// minEngineBudget; 0 stays 0 (no bound).
func engineBudget(memory, held int64) int64 {
	if memory == 0 {
		return 0
	}
	return max(memory-runtimeShare(memory)-held, minEngineBudget)
}

// quotedFit reports whether the quoted documents ids may be held in
// memory: with no --memory bound, or when their texts and units take at
// most half of what the bound leaves after the runtime's share and what
// the report holds for every document (reportHeldBytes; the engine has let
// go of its memory by then; the other half is for the report's pairs).
func quotedFit(memory, held int64, digests []*docDigest, ids []int) bool {
	if memory == 0 {
		return true
	}
	var need int64
	for _, i := range ids {
		need += quotedBytes(int(digests[i].size), int(digests[i].units))
	}
	return need <= (memory-runtimeShare(memory)-held)/2
}
