// Package pipeline runs reprise's engine as an Apache Beam pipeline, so a
// corpus larger than one machine holds (or an existing Flink or Spark
// cluster) gives the same report as `reprise scan`: the same pairs, scores,
// passages, groups, clusters and common text, for sentence units.
//
// # The problem
//
// `reprise scan` holds every document's text and units in one process and
// counts pairs in one engine (reprise/pairs), spilling to disk when memory
// runs short. Past some 10^7 documents the one machine is the limit: its
// disk, its cores, its time. The engine's passes were shaped as map
// (units per document) → shuffle (by fingerprint) → reduce (pairs per
// basket) → shuffle (by pair) → reduce (count), so they map one to one onto
// Beam transforms, and a Beam runner distributes them. A home-made cluster
// was rejected: Beam already shuffles, retries and scales.
//
// # Phase 1, on the runner
//
//  1. The driver lists the input files with corpus.Read itself, at a size
//     limit of one byte: every file is then listed from its stat without
//     being opened, so the listing has exactly scan's walk (hidden names,
//     links, duplicates, devices), and only the names cross into the
//     pipeline. Templates (--exclude) are read and split in the driver;
//     their fingerprints ride in the read DoFn.
//  2. read and split (ParDo, one file per element): corpus.Read on that one
//     path (a ZIP archive may give several documents), shingle.Splitter per
//     worker (DoFn Setup). Out: skipped inputs; the document keyed by path;
//     its summary; (fingerprint, path) for each distinct fingerprint that is
//     not a template's; the template fingerprints it contains.
//  3. baskets (GroupByKey by fingerprint), then the cap: a basket of one
//     document pairs nothing; one of more than --max-docs documents is
//     common text, sent on keyed by its first path. The default cap needs
//     the document count, a singleton side input (stats.CountElms), so the
//     cap is global however the baskets are spread over workers.
//  4. A-Priori pruning (GroupByKey by path): a document in fewer than s of
//     the remaining baskets leaves them all. One round suffices for
//     exactness: pruning only drops documents that cannot be in a pair of
//     support s, and the support filter of step 6 is exact, so a further
//     round would only save work, never change the result.
//  5. pruned baskets (GroupByKey by fingerprint again), every pair of each
//     as the key "a\x00b", counted by CombinePerKey(sum) — the runner's
//     combiner lifting sums partial counts before the shuffle.
//  6. support ≥ s; each pair marks its two documents.
//  7. join back (CoGroupByKey by path: documents, common references, pair
//     marks): common units are quoted from their first document's text,
//     and paired documents are written out whole (text and units).
//
// The outputs are JSON Lines files in the work folder (textio.Write): the
// document summaries, skipped inputs, common units with their text, pairs
// with their counts, the paired documents, the template fingerprints hit,
// and the pruned documents.
//
// # Phase 2, in the driver
//
// The driver reads those files and runs pairs.Count on the paired documents
// only, with the template and common fingerprints excluded and the cap set
// to the corpus's. Restricting the corpus to documents that are in pairs
// removes no basket member that a reported pair or group needs, so the
// engine finds exactly phase 1's pairs (checked: a difference is an error,
// never smoothed over) and gives the groups and clusters. report.Build then
// aligns the pairs into passages and scores them; the driver completes the
// result with every document's summary, the common units and the corpus
// counts. Two summary fields describe the run and differ from scan's by
// design: "counter" is "beam-combine", and "pruned" counts the documents
// that step 4's one round removed (the engine counts those its repeated
// rounds remove).
//
// # Cost
//
// Every document's text crosses the network twice (read → join), each
// fingerprint entry three times (baskets, per document, pruned baskets) and
// every pair of every basket once before combining; the records are JSON
// strings (records.go), which any runner can code. Phase 2 holds only the
// paired documents in the driver, so its memory is bounded by the reuse
// found, not by the corpus; a corpus where most documents are in pairs
// would need phase 2 on the runner too (passages per pair from the two
// joined unit lists), which was left for later. On one machine the pipeline
// is slower than scan: see the README's measurement.
//
// # Limits
//
// Sentence units only (no --unit words), local paths only (a Beam file
// system such as gs:// is not read yet), one JSON Lines file per output
// (textio.Write gathers each output on one worker), and no HTML output
// (it needs every document's text in the driver). corpus has no JSON Lines
// corpus format at the time of writing, so JSON Lines corpora are left for
// later too.
package pipeline
