// Package shingle turns text into units: the pieces of a document that are
// fingerprinted and compared across documents. Two units are built here,
// sharing the word rule and the normalization: the sentence (Sentences,
// below) and the edit-tolerant word shingle, every run of K words, optionally
// thinned by winnowing (Words, in kwords.go and winnow.go, whose comments
// explain their design and cost). Options.Unit chooses which one Units
// makes. Options.SkipQuoted and Options.SkipReferences leave quotations and
// a trailing references section out of both (quoted.go).
//
// # The problem
//
// Two documents share a passage when they share sentences. Comparing
// sentences as strings fails on everything that does not change the words:
// line wrapping, CRLF, curly against straight quotes, ligatures, full-width
// letters, case, soft hyphens, a byte order mark. Comparing them with an edit
// distance is quadratic per pair and cannot be indexed. So each sentence is
// reduced to a normalized form and hashed to 64 bits (xxhash64), and two
// sentences are "the same" exactly when their normalized forms are equal
// (up to 64-bit collisions, about one in 10^19 per pair). The hash goes into
// the pairs engine; the byte span [Start, End) of the original text goes
// along, so that every match can be shown in the reader's own text.
//
// # Sentences
//
// Boundaries are those of Unicode UAX #29 (github.com/rivo/uniseg, Unicode
// 15.0.0, checked against every case of SentenceBreakTest-15.0.0.txt). UAX
// #29 breaks after every line break (rule SB4), which is right for
// paragraphs but would cut every sentence of a hard-wrapped document at each
// line end. So, before segmenting, a single line break (LF, CR or CRLF, with
// any blanks around it) is rewritten as spaces, while a blank line (two or
// more line breaks with only white space between) is left to end the
// paragraph. The rewrite goes into a scratch buffer of the same length, byte
// for byte, so offsets into it are offsets into the original text; spans
// are then trimmed of white space and format characters such as a BOM.
// The cost is that a heading without a full stop runs into the sentence on
// the next line unless a blank line separates them.
//
// A text with no sentence terminator at all (no character with
// Sentence_Break STerm or ATerm: . ! ? 。 and the like) but more than one
// line, such as a list, a poem or source code, is split at every line break
// instead, and Stats.LineBreaks says so: joining its lines would make the
// whole text one sentence. A sentence longer than MaxUnitBytes is cut at the
// last white space before the limit, else at the last UAX #29 word boundary,
// else at the last rune boundary, and the rest goes on as a new sentence.
// No span ever starts or ends inside a UTF-8 sequence, whatever the input.
//
// # Words
//
// A word is a UAX #29 word segment (uniseg again) holding a letter, digit or
// ideograph. Segments joined by a single hyphen ("term-end") count as one
// word, and so does a word hyphenated across a line break; apostrophe forms
// ("don't") are single segments already. Measured on the 500 Brown corpus
// samples against the manual's 1,014,312 words: joining hyphen compounds
// gives 1,013,880 (-0.04%), counting their parts apart 1,022,235 (+0.78%),
// so they are joined. uniseg was chosen over github.com/blevesearch/segment
// because it implements the same Unicode version (15.0.0, against 8.0.0)
// as the sentence rules and segments without allocating, where segment's
// word functions allocate per call. A faster counter handles text made only
// of ASCII and common typographic punctuation (checked against uniseg by a
// property test); anything else goes through uniseg.
//
// A sentence with fewer than MinWords words is counted (Stats.Short) but is
// not a unit: short sentences ("Yes.", "See above.") are shared by
// unrelated documents and would only add noise.
//
// # What "the same sentence" means
//
// Normalize builds the compared form: format characters (Cf: soft hyphen,
// BOM, zero-width space) removed; a word hyphenated at a line end joined
// (letter, hyphen, line break, blanks, lower-case letter: "exam-\n ple" is
// "example"); Unicode NFKC ("ﬁ" is "fi", "Ａ" is "A"); full case folding
// (golang.org/x/text/cases, not Turkic: "İ" becomes "i" plus a combining
// dot); all punctuation (P*), including every quote style and dash, and all
// white space as word separators, collapsed to one ASCII space, none at the
// ends. Symbols (S*: $ + € ©) are kept. So "The “cat”, sat." and "the cat
// sat" are the same sentence. Pure ASCII text skips NFKC and folding, which
// are the identity and A-Z lowering there.
//
// Rejected: normalizing the whole text once and segmenting the normalized
// text. It would be cheaper by one pass, but NFKC and folding change byte
// lengths, so spans would need an offset map back to the original; here
// segmentation runs on (a same-length rewrite of) the original and only each
// sentence is normalized.
//
// # Cost
//
// One copy of the text into the Splitter's scratch buffer, one UAX #29
// sentence pass, and per sentence one word pass, one normalization and one
// hash, all into reused buffers: no allocation per unit once the buffers
// have grown. A Splitter is used by one goroutine; make one per worker.
// About 12 MB/s per core on English prose (BenchmarkSentences); most of the
// time is uniseg's sentence property lookups.
package shingle
