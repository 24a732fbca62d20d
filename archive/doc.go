// Package archive is a persistent index of every document seen before, so
// that new documents can be checked against all of them without reading the
// old files again.
//
// # The problem
//
// A scan compares the documents of one run. Real screening is incremental:
// this week's submissions against everything already published. The simple
// approach — keep the old files and rescan them with the new ones — costs a
// full scan per check, needs the old files to stay where they were, and
// cannot show an archived passage once the file is gone. An archive keeps,
// per document, everything a report needs (path, SHA-256, format, size,
// date added, unit fingerprints with their spans, extracted text), and an
// inverted index from fingerprint to documents, so a check costs one point
// lookup per distinct unit of the new documents plus the loading of the few
// archived documents that share enough units.
//
// # The store
//
// An embedded key-value store, github.com/cockroachdb/pebble/v2 (an LSM
// tree: writes go to a write-ahead log and a memtable, then to sorted,
// immutable table files merged in the background). Keys hold no text, only
// prefixes, numbers and hashes, because key bounds are copied into the
// store's MANIFEST, which remove could not scrub:
//
//	m/settings             format version and unit settings (JSON)
//	m/next, m/count        next document ID, number of documents
//	d/<id>                 document metadata (JSON: path, hash, format, size, date, marks, notes)
//	t/<id>                 extracted text, a DEFLATE stream (RFC 1951; Huffman coding only, see textLevel)
//	u/<id>                 units in text order, in shingle's unit encoding (shingle.AppendUnits)
//	h/<sha256 of content>  → id, for idempotent add
//	n/<sha256 of path>     → id, so changed content at the same path replaces the old version
//	p/<fingerprint>        postings: the IDs of the documents holding the unit, as uvarints
//
// IDs and fingerprints are 8-byte big-endian, so keys sort numerically.
//
// # Postings by merge, not read-modify-write
//
// Adding a document appends its ID to the posting of each of its distinct
// fingerprints with the store's merge operator (the merger "reprise.postings.v1"
// concatenates uvarint operands; pebble folds them lazily, on reads and in
// compactions). An add therefore never reads a posting, and the cost of
// adding is independent of how common its sentences are. A posting's length
// is the unit's document frequency over the whole archive, which is how a
// check recognises common text across everything archived, not only within
// one batch. Removing is the rare path and does read: each posting of the
// removed document is rewritten without its ID (or deleted when empty).
//
// # Nothing lost, nothing left behind
//
//   - Atomicity: Add writes one document (all of its keys, including the
//     removal of the version it replaces) as one pebble Batch, applied at
//     once: after a crash the write-ahead log replays whole batches only, so
//     a document is in the archive wholly or not at all. Batches are applied
//     without waiting for fsync; Sync forces the log to disk.
//   - Chunks: AddAll, the add command's path, writes runs of new documents
//     (content and path not archived, nor earlier in the run) as table
//     files, one per key prefix (d, h, m, n, p, t, u: the files of one
//     ingestion may not overlap), sorted in memory and handed to pebble's
//     Ingest, which links them into the store and records them in its
//     MANIFEST in one step, synced. The unit of atomicity of AddAll is
//     therefore the chunk: after a crash each chunk is in the archive
//     wholly or not at all, and durable once AddAll has told of its
//     documents; re-running the same add skips what is there and adds the
//     rest. A chunk's postings are merge operands, one per fingerprint,
//     holding the chunk's IDs in order, exactly as the operands Add would
//     write folded together. A document that replaces a version or whose
//     content is archived goes through Add, after the chunk before it is
//     ingested. A chunk is written and ingested in the background while
//     the next one is gathered, one chunk in flight at a time, so chunks
//     are still ingested (and told of) in order. The chunk's files are
//     written in DIR/ingest.tmp; a kill
//     before their ingestion leaves them there (text included) until the
//     next writable Open deletes the folder. Chunks grow from 8 documents
//     by half each time up to 8192 documents or 32 MB of text: a small add is not
//     held back, and a large one costs a few dozen ingestions (each a few
//     fsyncs) and L0 files that pebble's compactions merge.
//   - One writer: pebble locks the folder's LOCK file (fcntl) for as long as
//     the store is open, read-only or not. A second process gets an error
//     that names that file.
//   - Erasure: Erase compacts the whole key range after a removal, so the
//     removed values leave the table files; the write-ahead logs that held
//     them become obsolete and are deleted. Pebble normally recycles old
//     log files for reuse, which would keep old bytes on disk inside a file
//     of the folder; the file system wrapper below declines every reuse
//     (the vfs contract allows that) so a retired log is always deleted.
//     What is deleted is gone from the folder; whether the file system or
//     the disk keeps the freed blocks is outside what a program can promise.
//   - Permissions: the folder is created 0700 and every file pebble creates
//     through the wrapper is set to 0600 right after creation, whatever the
//     umask (the folder is already private at that moment).
//
// # Settings
//
// The settings record holds the archive's format version (FormatVersion):
// the key layout and the encoding of every record. Open refuses an archive
// of another format for every caller, with a *FormatError that says what to
// do (build a new archive from the files); nothing converts an archive in
// place. Format 1 stored each unit in 20 fixed bytes without its word
// position; format 2 stores the units in shingle's varint encoding (about
// 12.4 bytes a sentence unit of the Brown corpus), positions included.
//
// Units are only comparable when they were cut by the same rules. The
// archive records the unit kind, the minimum words and the maximum unit
// bytes it was built with, and the fingerprint of a fixed probe text split
// under those settings. A check asking for other settings
// is refused with the name of the setting; a program whose normalization
// gives another probe fingerprint is refused too ("sentence normalization").
// Only callers that cut units give settings to compare: listing, counting,
// removing and verifying without a re-split open with the zero Settings,
// and any archive of this format opens for them, whatever its settings.
//
// # Cost and the alternative rejected
//
// Add costs one batch of about 3 + u keys for a document with u distinct
// units, plus the compression of its text (Huffman coding only: about 240
// MB/s a core, where the standard library's BestSpeed did 53; textLevel).
// AddAll compresses on every core and writes its keys once, into table
// files, instead of through the write-ahead log, the memtable and a flush;
// the tables of one chunk are written on every core too, while the next
// chunk is prepared. It asks the store whether each new document's content
// and path are archived (two point lookups) unless the archive was empty
// when it began: then the documents of the run are all it needs to know.
// (Bloom filters on the tables, tried to make those lookups cheaper, made
// a check of one document cost half again as much CPU: each check is a new
// process, which loads the filter of every table it touches.) In an add
// of 10^5 documents on two cores, what is left is reading the files (a
// fifth of the CPU), splitting them, compressing, writing the tables and
// pebble's compactions of L0 (BENCHMARKS.md). A check of a document with
// u distinct units costs u point lookups; the postings read are bounded by
// the common-text cap. Loading a candidate costs two point reads and a
// decompression. The alternative of a flat file of sorted (fingerprint,
// document) pairs, rebuilt by merging on every add, was rejected: it makes
// each add cost the whole archive, and crash safety would have to be built
// by hand; an LSM store gives appends, atomic batches and background
// merging for free.
package archive
