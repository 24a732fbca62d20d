// Package report turns the engine's document pairs into something a reviewer
// can act on: passages located in each document's own text, scores, a
// ranking, and renderings as text, JSON, NDJSON and CSV.
//
// # From pairs to passages
//
// The engine (package pairs) says only that documents A and B share s
// distinct units. A reviewer needs to see where. For each reported pair the
// two documents' unit sequences (in text order) are aligned: a passage is a
// maximal run of consecutive units that are equal in both documents, in the
// same order — a diagonal in the dot plot of A's units against B's. Units set
// aside as common text or taken from templates never match, so a passage
// never runs through a template sentence. Seeds are the positions where both
// documents hold a shared unit and the previous units do not also match;
// each seed is extended forward, so every (i, j) cell of the dot plot is
// visited at most once. A unit repeated r times in A and t times in B gives
// up to r·t seeds; to keep one pathological document (the same line pasted a
// thousand times) from costing a quadratic amount of work, only the first
// maxRepeats occurrences of a unit in each document seed passages. The
// engine's shared count is unaffected; the cap is documented in the README.
//
// Word shingles overlap and may be winnowed, so runs of consecutive equal
// units would cut an edited copy into shards; for them (Input.Chaining)
// passages are chained across gaps of up to G words and merged where they
// cross, as chain.go explains.
//
// The simpler alternative — a longest-common-subsequence or edit-distance
// alignment of the whole documents — finds one best chain and hides
// reordered or repeated copies; reused text is often moved around, so the
// diagonal runs are the more honest picture.
//
// # Scores
//
//   - shared: distinct counted units the two documents have in common (the
//     engine's support count);
//   - coverage_a, coverage_b: the share of each document's words that lie
//     inside the pair's passages (overlapping passages counted once);
//   - jaccard: shared / |units(A) ∪ units(B)| over distinct counted units;
//   - score: max(coverage_a, coverage_b), so that a short text copied whole
//     into a long one ranks high.
//
// Pairs rank by score, then shared, then paths. A document's reused share is
// the share of its words inside passages it shares with any other document.
// Every fraction is rounded once, to four decimals, when the Result is built;
// the renderers only format those numbers, never compute new ones.
//
// # Determinism
//
// Everything here is a pure function of the documents and the engine's
// result, with slices in fixed orders, so the same input gives the same bytes
// in every format whatever the number of workers upstream.
package report
