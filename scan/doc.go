// Package scan is the driver of reprise as a library: it runs the stages
// corpus → shingle → pairs → report for a Config, under a
// context.Context, and gives a *report.Result that every renderer of
// package report writes.
//
// Three runs share the driver:
//
//   - Run reads and compares every document with every other (the
//     streaming scan: documents are split as they are read, only their
//     fingerprints are kept while the engine counts, and the documents the
//     report quotes are read again, their units coming back from a spool
//     file rather than a second split);
//   - Compare reads new documents and a reference set in one run and keeps
//     the pairs across the two, adding each new document's sources and,
//     for master texts, what each copy keeps of them (report.Sources,
//     report.MasterCoverage);
//   - CheckArchive compares a Batch of new documents with everything an
//     archive holds (document frequency over the archive and the batch,
//     candidates from the postings, then the same engine and report); with
//     ReadBatch, AddBatch and RemoveFromArchive it is all the archive
//     commands need.
//
// The command line (cmd/reprise) turns flags into a Config, shows the
// Progress reports, writes the Result and chooses exit codes; the Beam
// driver (module reprise/beam) reads templates and writes notes through the
// same functions. Nothing below this package imports it: the arrows go
// cmd → scan → corpus, shingle, pairs, report, archive.
//
// # Cancellation and temporary files
//
// Each run makes one private folder under Config.TempDir (the system's
// temporary folder by default) for the engine's sorted runs, the unit
// spool, the store of quoted documents and the corpus's copies of PDFs
// inside ZIP archives, and removes it when it returns. Cancelling the
// context stops the run at the next file read, step of the engine (sorted
// run, merge, pruning pass, range of pairs) or pair aligned; the run
// returns the context's error and no result. No state is global: several
// runs may go at once.
//
// # Memory
//
// Config.Memory bounds what a run holds. An eighth of it is left to the Go
// runtime (the room in its spans, its metadata, the collector's margin
// under the soft limit the command line sets to the bound); the documents'
// digests (names, notes, fingerprints) are charged next (heldBytes); the
// engine gets the rest and spills to disk when its counting does not fit.
// Once it has counted, the run keeps only the report's view of each
// document (reportHeldBytes), and the quoted documents are kept in memory
// only when they fit in half of what is left. The result is the same at
// every bound. Between stages a bounded run collects the garbage of the
// stage that ended and returns it to the system (debug.FreeOSMemory: a
// process-wide collection, so two bounded runs in one process each pay for
// the other's too; a speed matter only).
//
// # Trade-offs
//
// Reading the quoted documents twice costs a second read of their files
// (not a second split), and a file that changed during the run stops it
// with an error rather than show a passage at offsets into another text.
// Compare counts reference–reference pairs and drops them: counting only
// cross pairs inside the engine would touch every counting path, and the
// cost is bounded by the reference set's own overlap.
package scan
