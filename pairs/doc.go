// Package pairs is the market-basket engine: it finds the pairs (and larger
// groups) of documents that share at least s units.
//
// # The model
//
// Baskets are units, items are documents. Every unit fingerprint that
// occurs in the corpus is a basket holding the documents that contain it;
// two documents sharing s distinct units are a pair found in s baskets, a
// "frequent pair" with support s. The engine sees only document IDs
// 0..n-1 and their sorted, distinct 64-bit fingerprints ([Input]); it knows
// nothing of files or text, and its output is exact: the pairs, groups and
// clusters a brute-force comparison of every pair and every subset of
// documents would find (the property test checks exactly that).
//
// The simple approach, intersecting the unit sets of all n(n-1)/2 document
// pairs, costs O(n²) set intersections whatever the overlap; 20,000
// documents make 200 million of them. Almost all pairs share nothing, so the
// engine works the other way round: it only ever touches pairs that occur
// together in some basket.
//
// # Steps and their cost
//
// Let N be the total number of (document, fingerprint) entries.
//
//  1. Baskets. All entries are gathered, documents in order, and sorted by
//     fingerprint with a stable MSD radix sort (O(N), about four times
//     faster than slices.SortFunc on the same entries; the 256 buckets of
//     its first pass are sorted by Options.Jobs goroutines, 1.5 times
//     faster with two); each run of one
//     fingerprint is a basket whose documents are already ascending. A
//     basket whose fingerprint is in Input.Excluded is skipped (merge walk
//     of two sorted lists, counted in Stats.ExcludedHits; an excluded unit
//     is never listed as common either); a basket of one document pairs
//     nothing and is dropped; a basket of more than MaxDocs documents is
//     common text: dropped and listed in Result.Common, never silently
//     hidden ([DefaultMaxDocs] gives the cap). The cap bounds the counting
//     work of one basket to C(MaxDocs, 2) increments. Baskets are kept in
//     compressed rows (fingerprints, row starts, documents), with no
//     allocation per unit.
//  2. A-Priori pruning. A document in fewer than s baskets cannot be in a
//     pair with support s, so it leaves every basket; a basket left with
//     fewer than two documents pairs nothing and is dropped, which can
//     weaken other documents, so passes repeat until one removes nothing.
//     Each pass is O(N); on real corpora a few passes suffice (a chain of
//     documents each propping up the next is the worst case, one document
//     per pass). The common-text cap was applied before pruning on
//     purpose: how many documents contain a unit is a property of the
//     corpus, not of what pruning leaves. The surviving documents are then
//     renumbered 0..m-1 in ascending order, so the counting structures are
//     sized by the m survivors, not by n.
//  3. Counting. Every pair of every basket is counted once
//     (Stats.Increments = sum of C(d, 2) over baskets) in one of two
//     structures, see below.
//  4. Pairs counted at least s times are kept, in (A, B) order of original
//     IDs (renumbering preserves order, so no re-sort is needed).
//  5. Groups, the maximal sets of three or more documents, are searched
//     for among the documents of frequent pairs, see below.
//  6. Clusters are the connected components of the reported pairs
//     (union-find, near O(pairs)), each ascending, ordered by their smallest
//     member.
//
// # Common text and near-copies
//
// The common-text cap exists for text that is a small part of each
// document holding it: a prompt, a disclaimer, a header, a license footer.
// Applied blindly it also sets aside text that makes up most of the
// documents holding it: a folder that is mostly copies of one essay would
// have every sentence over the cap and come out clean, the worst answer a
// near-duplicate finder can give. So, under the automatic cap only
// (Options.MaxDocs 0), a document more than half of whose distinct units
// are each in more than MaxDocs documents is mostly common text
// (CommonShare.Mostly), and common units still count in such documents:
// the basket of a common unit keeps its mostly-common holders and drops
// the others. A prompt pasted into twenty essays is still set aside in
// them; the eleven copies of one essay still pair on every sentence,
// prompt included. The rule is judged per document, in units (sentences
// or shingles, which track words closely): the walk that forms baskets
// counts each document's common units, and the mostly-common holders of
// each common run become baskets once it is over, so that only the common
// runs are read twice (in memory, where they start is remembered; in the
// spilling path they go to a side file that is read once more when there
// are any). An explicit MaxDocs, and templates in
// Input.Excluded, keep their meaning for every document.
//
// What it costs: a kept common unit in k documents costs C(k, 2)
// increments, which the automatic cap no longer bounds; the counting still
// keeps to MemoryBudget (pair ranges), and 1,000 copies of one text are
// about 500,000 pairs. Whole-document grouping before counting (count a
// unit once per group of nearly equal documents, as in Broder's
// resemblance) was the alternative; it needs an approximate sketch to find
// the groups and makes the engine's pair counts depend on it, while this
// rule keeps every count exact.
//
// Near-copies (Result.NearCopies) are the connected components of the
// pairs in which each document holds at least Options.NearCopy (0.7) of
// the other's counted units, so that a caller can show them as one set
// and need not align all C(k, 2) of their pairs. Why 0.7: two copies of
// one original, each keeping 85% of it and editing the rest on its own,
// share 70% of each other; a pairwise 0.9 would split a batch of lightly
// edited copies of a short policy into many small sets. Each member's shared
// units with one representative (the member sharing the most with its
// near-copies) are counted directly by a merge of the two fingerprint
// lists, linear in their units.
//
// # Why pruning is exact
//
// Removing document x from the baskets changes no basket's membership for
// any other document, and a basket with fewer than two documents contains
// no pair. So the support of every pair and every set of documents without
// x is unchanged, while any pair or set with x had support at most x's
// basket count, below s. By induction over the passes, pruning never loses a
// frequent pair or group and never changes a reported count.
//
// # Two counters and the one-third rule
//
// The triangular array holds a uint32 for every possible pair of the m
// survivors, in row-major order of the upper triangle ([TriangularIndex]):
// 4 bytes per possible pair, m(m-1)/2 of them, with no hashing and purely
// arithmetic addressing. The sparse table is an open-addressing hash table
// (linear probing, Fibonacci hashing, at most 3/4 full, doubling) of packed
// uint64 pair keys (the smaller ID in the high half) with uint32 counts: 12
// bytes per occurring pair plus the free slots. The array is smaller as soon
// as more than a third of the possible pairs occur (12 bytes × occurring >
// 4 bytes × possible), so [ChooseCounter] picks it then. The number of
// occurring pairs is estimated from above as min(Stats.Increments,
// m(m-1)/2). The array is also capped at 2^31-1 cells; past that the
// sparse table is used (a forced triangular counter is refused).
//
// The alternative of writing every increment as a packed key, sorting and
// run-length counting, was rejected for now: it needs 8 bytes per increment
// rather than per distinct pair, which only pays once the keys are spilled
// to disk anyway (see "Scale" below).
//
// # Groups and their bound
//
// A group is a maximal set of three or more documents whose support (the
// number of surviving baskets containing all of them) is at least s: no
// other document can join it with the support still s or more. Only
// maximal sets are listed; a set inside a larger frequent one is not.
//
// The simple approach, growing frequent sets level by level from the
// frequent pairs (A-Priori), was used before and rejected: k near-identical
// documents make every one of their C(k, 3) triples a candidate, then every
// C(k, 4), so on a folder of 691 copyright files made of a few license
// texts it stopped at its bound of 200,000 candidates still in sets of
// three, listing 182,844 of them and never the group of four identical
// files. The number of frequent sets is exponential in k; the number of
// maximal ones is usually small. So the search looks for the maximal sets
// directly, in two ways, over the same items:
//
//   - Items. Only baskets holding three or more documents of frequent
//     pairs can support a group; each document's support list is the
//     sorted list of those it is in. Documents with equal support lists
//     are one item, with all their documents (a maximal set holds all of
//     them or none), so a hundred identical copies cost what one does.
//   - By shared units (searchByUnits, first). A set of documents is
//     frequent exactly when it lies inside the documents holding some s
//     units, so the maximal sets are the largest among the document sets
//     of the closed unit sets (the units all their documents share) of at
//     least s units. The search walks closed unit sets in prefix-preserving
//     order (LCM, Uno et al. 2004: each closed set is reached once, from
//     the one it extends), and never past one of s units, so its depth is
//     at most s; then it drops every set found inside another. It is fast
//     when the documents are many and alike and the units few (50 copies
//     of one text, each missing two of its 15 sentences: 105 groups in
//     6,880 steps), slow when many units each have a small closure.
//   - By documents (expand, when the first does not finish in half of the
//     bound): depth-first over sets of items, each node a set (head) and
//     the items that keep it frequent (tail, by support ascending), with
//     the pruning of MAFIA (Burdick et al. 2001) and MaxMiner (Bayardo
//     1998): if head with all of tail is frequent it is the one maximal
//     set below (look-ahead); if a group found before holds head and all
//     of tail, nothing below is new; an item whose support list holds
//     head's moves into head (every maximal set above head holds it). A
//     set recorded is maximal: a larger frequent set would lie in a branch
//     searched before, whose groups are checked. So when the bound stops
//     this search, every group listed is still a maximal group; only some
//     are missing.
//
// Each search gives every maximal set exactly, and the same ones (the
// property test checks both, on their own, against every subset of
// documents). Neither depends on how the baskets are numbered, only on
// the sizes of intersections, so the in-memory and spilling paths, whose
// baskets come in different orders, take the same steps.
//
// Cost and bound: a step is one merge or binary search of two sorted
// lists (a set's support list with a document's; a set of items with a
// group found before), each at most the baskets of one document long.
// At most Options.MaxGroupSteps steps are taken (default 20,000,000, a few
// seconds; Stats.GroupSteps says how many were). When the bound is
// reached, Result.GroupsTruncated is set and the groups found so far by
// the search by documents are returned, each a maximal group. Memory: the
// support lists (one entry per document per basket of three or more), one
// support list per level of the depth-first path, and the groups found.
//
// # Scale: a memory budget, partitions and several workers
//
// With Options.MemoryBudget unset everything above is held in memory
// (about 36 bytes per entry while baskets form, plus the counter). With a
// budget, Count first estimates that; when it does not fit, the spilling
// path (spill.go) runs the same steps out of core: the entries are cut
// into sorted runs that fit the budget and written to Options.TempDir, the
// runs are k-way merged (the shuffle by fingerprint) straight into a
// basket file of varint-delta rows, and pruning streams that file once per
// pass. Per document only a few small arrays stay in memory (about 24
// bytes: basket counts, compact IDs, counting weights).
//
// Counting, in both paths, is partitioned by pair key (partition.go): the
// pairs are cut into ranges of their first document, each range counted in
// one pass over the baskets by one of Options.Jobs workers, with ranges
// sized so that all workers' counters fit the budget together. A range's
// keys are exactly the pairs whose smaller ID lies in it, so ranges share
// no cell and their sorted outputs concatenate into the one full count's
// output: the Result is byte-identical at every budget and for every
// number of workers (the property test checks tiny budgets and several
// workers against the brute-force oracle). Only Result.Spill, which says
// how the work was split, differs.
//
// The alternative of spilling every pair increment as a packed key and
// merging sorted runs of keys was rejected: a pair's first document bounds
// its range, so range passes need no disk for the counts at all, and a
// range can always be made small enough (one document's pairs, at most
// m-1 of them), while an increment stream costs 8 bytes per increment on
// disk and a merge. What stays in memory whatever the budget: the Input
// itself (8 bytes per entry, held by the caller), the frequent pairs, the
// common units, and for groups the baskets restricted to documents in
// frequent pairs with three or more of them.
package pairs
