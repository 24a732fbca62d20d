package pairs

import "strconv"

// Options tune the engine. The zero value is usable: zero fields take the
// defaults documented on them.
type Options struct {
	// MinShared is the support threshold s: the distinct units a pair must
	// share to be reported (0 means 3).
	MinShared int
	// MaxDocs: a unit found in more documents than this is common text and
	// pairs nothing; it is returned in Result.Common. 0 means the automatic
	// cap, DefaultMaxDocs(n), with the mostly-common rule: in a document
	// whose units are mostly common text, common units still count (see
	// "Common text and near-copies" in the package documentation). An
	// explicit MaxDocs applies to every document alike.
	MaxDocs int
	// NearCopy is the containment, both ways, above which two documents
	// of a pair are near-copies (0 means 0.7; at most 1): each holds at
	// least this share of the other's counted units.
	NearCopy float64
	// MaxGroupSteps bounds the search for groups, in steps: one step
	// intersects two support lists, tests one found group against a
	// candidate, or starts one branch (see "Groups and their bound" in the
	// package documentation). When reached, the search stops and
	// Result.GroupsTruncated is set; every group listed is still a maximal
	// group, but some may be missing (0 means 20,000,000).
	MaxGroupSteps int
	// Counter forces a counting structure (for tests and benchmarks); the
	// zero value chooses one from the estimated pair density.
	Counter CounterKind
	// MemoryBudget bounds, in bytes, what the engine holds beyond its
	// Input (0 means no bound: everything in memory). When the entries do
	// not fit, they are spilled as sorted runs to TempDir and merged back,
	// and pairs are counted in ranges of pair keys that fit (see spill.go
	// and partition.go). The Result is the same at every budget.
	MemoryBudget int64
	// TempDir is the folder for spilled runs ("" means os.TempDir()); the
	// engine makes a private folder in it and removes it before returning.
	TempDir string
	// Jobs is the number of goroutines counting pair ranges at once (0
	// means 1). The Result is the same for every value.
	Jobs int
}

// CounterKind names a pair-counting structure.
type CounterKind int

const (
	CounterAuto       CounterKind = iota // chosen from estimated density
	CounterTriangular                    // 4 bytes per possible pair
	CounterSparse                        // open-addressing table of occurring pairs
)

// String names the kind: "auto", "triangular" or "sparse".
func (k CounterKind) String() string {
	switch k {
	case CounterAuto:
		return "auto"
	case CounterTriangular:
		return "triangular"
	case CounterSparse:
		return "sparse"
	}
	return "CounterKind(" + strconv.Itoa(int(k)) + ")"
}

// Input is what the engine sees: fingerprints only, no text or files.
type Input struct {
	// Docs[i] holds document i's distinct unit fingerprints, sorted ascending.
	Docs [][]uint64
	// Excluded holds fingerprints that never count (from template documents),
	// sorted ascending, distinct.
	Excluded []uint64
}

// A Pair is two documents (A < B) sharing Shared distinct counted units.
type Pair struct {
	A, B   uint32
	Shared uint32
}

// A Group is a maximal set of three or more documents (sorted ascending) that
// all share at least MinShared units: no document can join it with the set
// still sharing that many. Shared is how many they all share.
type Group struct {
	Docs   []uint32
	Shared uint32
}

// A CommonUnit is a unit found in more than MaxDocs documents: common text,
// set aside and reported, never silently hidden. Under the automatic cap it
// still counts in the documents that are mostly common text (Kept of them);
// a unit that counts in all its holders is not common and not listed.
type CommonUnit struct {
	Hash  uint64
	Docs  uint32 // documents containing it
	First uint32 // the lowest document ID containing it (to quote its text)
	Kept  uint32 // holders in which it still counts (mostly-common documents)
}

// A CommonShare says how much of one document is common text: Common of
// its distinct units are each in more than MaxDocs documents. Mostly is
// set when that is more than half of its units; the common units then still
// count in it (automatic cap only).
type CommonShare struct {
	Doc    uint32
	Common uint32
	Units  uint32 // the document's distinct units
	Mostly bool
}

// A NearCopies is a set of two or more documents that are near-copies of
// each other: connected by pairs whose documents each hold at least
// Options.NearCopy of the other's counted units. Every slice is parallel to
// Docs. Counted units are a document's distinct units less those excluded
// and those set aside as common text in it.
type NearCopies struct {
	Docs           []uint32 // ascending
	Representative uint32   // the member sharing the most with the other near-copies
	Shared         []uint32 // counted units each member shares with the representative
	Units          []uint32 // each member's counted units
	Pairs          int      // the engine's pairs with both documents in the set
}

// Stats count the engine's work, for the report's summary.
type Stats struct {
	Baskets      int   // units in two or more documents, not common, not excluded (before pruning)
	ExcludedHits int   // distinct excluded units found in the input documents
	Pruned       int   // documents removed by A-Priori pruning (in a basket before it, in none after)
	Increments   int64 // pair increments counted: sum over the baskets left after pruning of C(d, 2)
	// GroupSteps counts the steps of the group search (at most
	// Options.MaxGroupSteps).
	GroupSteps int
	// GroupItems is how many items the group search ran over: documents
	// that can be in a group, those with the same support list merged
	// into one.
	GroupItems int
}

// Result is the engine's output. Every slice is in a deterministic order.
type Result struct {
	Pairs    []Pair       // sorted by (A, B)
	Groups   []Group      // maximal; by size desc, Shared desc, then Docs
	Clusters [][]uint32   // connected components of Pairs, each sorted; ordered by first member
	Common   []CommonUnit // by Docs desc, then Hash
	// CommonShares lists, by document, the documents holding common
	// units (ascending Doc); nil when there are none.
	CommonShares []CommonShare
	// NearCopies are the sets of near-copies among the pairs, ordered by
	// size descending, then first member.
	NearCopies      []NearCopies
	MaxDocs         int         // the effective common-text cap
	MinShared       int         // the effective support threshold
	Counter         CounterKind // the structure that counted
	GroupsTruncated bool
	GroupStepLimit  int // the effective Options.MaxGroupSteps
	Stats           Stats
	// Spill describes how the work was split; unlike everything else in
	// the Result it depends on MemoryBudget and Jobs.
	Spill SpillStats
}

// SpillStats say how a run was split to fit its memory budget.
type SpillStats struct {
	Runs         int   // sorted runs written to disk (0: everything stayed in memory)
	BytesWritten int64 // bytes written to temporary files
	Ranges       int   // ranges of pair keys counted, each in one pass over the baskets
}
