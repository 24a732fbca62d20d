package shingle

import (
	"math"
	"unicode/utf8"

	"github.com/cespare/xxhash/v2"
	"github.com/rivo/uniseg"
)

// Options control how text becomes units. The zero value is usable: every
// zero field takes the default documented on it (see withDefaults).
type Options struct {
	// Unit chooses what Units makes: sentences (the zero value) or word
	// shingles.
	Unit UnitKind
	// MinWords: a sentence with fewer words is not a unit (0 means 5).
	MinWords int
	// MaxUnitBytes: a sentence longer than this many bytes of original text
	// is cut at the last word boundary before the limit, and the rest
	// continues as a new sentence (0 means 2000).
	MaxUnitBytes int
	// ShingleWords is K for Words: every run of K consecutive words is a
	// unit (0 means 5). Sentences ignores it.
	ShingleWords int
	// Winnow is W for Words: keep only the winnowed fingerprints of each
	// window of W consecutive shingles (0 or 1 keeps every shingle).
	// Sentences ignores it.
	Winnow int
	// SkipQuoted: text inside quotation marks gives no unit (see quoted.go).
	SkipQuoted bool
	// SkipReferences: a trailing references or bibliography section,
	// recognised by its heading line, gives no unit (see quoted.go).
	SkipReferences bool
}

// Defaults for the zero fields of Options.
const (
	DefaultMinWords     = 5
	DefaultMaxUnitBytes = 2000
	DefaultShingleWords = 5
)

// withDefaults is the one place defaults are applied. Negative values are
// treated like zero.
func (o Options) withDefaults() Options {
	if o.MinWords <= 0 {
		o.MinWords = DefaultMinWords
	}
	if o.MaxUnitBytes <= 0 {
		o.MaxUnitBytes = DefaultMaxUnitBytes
	}
	if o.ShingleWords <= 0 {
		o.ShingleWords = DefaultShingleWords
	}
	if o.Winnow <= 1 {
		o.Winnow = 0
	}
	return o
}

// A Unit is one counted sentence or word shingle: the fingerprint of its
// normalized form and the byte span [Start, End) of the original text it came
// from. Pos fits in what was padding, so a Unit is still 24 bytes.
type Unit struct {
	Hash  uint64 // xxhash64 of the normalized sentence or shingle
	Start uint32 // byte offset of the first byte, inclusive
	End   uint32 // byte offset after the last byte, exclusive
	Words uint32 // words in the unit (UAX #29 word boundaries); K for a shingle
	Pos   uint32 // words of the text before the unit's first word
}

// Stats describe one text's segmentation.
type Stats struct {
	Words      int  // all words in the text, short sentences included
	Sentences  int  // sentences found, short ones included (each piece of a cut sentence counts)
	Short      int  // sentences with fewer than MinWords words (not units)
	LineBreaks bool // the text had no sentence punctuation: split at line breaks instead
	Cut        int  // sentences longer than MaxUnitBytes, cut into pieces

	QuotedWords     int  // words inside quotation marks, left out (SkipQuoted)
	References      bool // a trailing references section was found and left out (SkipReferences)
	ReferencesStart int  // byte offset of its heading line
	ReferencesWords int  // words in it
}

// MaxTextBytes is the longest text Sentences looks at, because offsets are
// uint32; bytes after it are ignored (the package assumes a 64-bit int).
const MaxTextBytes = math.MaxUint32

// A Splitter turns texts into sentence units. It keeps scratch buffers
// between calls, so it must not be used by two goroutines at once; make one
// per worker.
type Splitter struct {
	opt  Options
	slow bool   // never take the fast path (tests compare the two; see fast.go)
	wrap []byte // the text with single line breaks rewritten as spaces
	norm normalizer
	out  []byte // the normalized sentence

	// Scratch of Words and of the skip rules.
	words []wordSpan // word spans of the text
	wnorm []byte     // every word's normalized form, each followed by a space
	woff  []uint32   // offset of word i's normalized form in wnorm
	deque []int32    // winnowing window
	wout  []Unit     // shingles before winnowing
	skips []span     // quoted and references spans
	mask  []byte     // the text with skipped spans blanked
}

// New returns a Splitter with opt's zero fields set to their defaults.
func New(opt Options) *Splitter {
	return &Splitter{opt: opt.withDefaults(), norm: newNormalizer()}
}

// Options returns the effective options, defaults applied.
func (s *Splitter) Options() Options { return s.opt }

// Fingerprint returns the 64-bit xxhash of a normalized sentence.
func Fingerprint(normalized []byte) uint64 { return xxhash.Sum64(normalized) }

// Sentences splits text into sentences and appends to dst[:0] a Unit for
// every sentence with at least MinWords words. Units come in text order,
// their spans do not overlap, and each span starts and ends on a UTF-8
// boundary of text with no white space at either end. text may be any bytes;
// invalid UTF-8 is carried along, never split.
func (s *Splitter) Sentences(text string, dst []Unit) ([]Unit, Stats) {
	dst = dst[:0]
	var st Stats
	if len(text) > MaxTextBytes {
		text = text[:runeStartAtOrBefore(text, MaxTextBytes, 0)]
	}
	orig := text
	text, masked := s.applySkips(text, &st)
	var seg []byte
	lineMode := !hasTerminator(text)
	if lineMode {
		// With no STerm or ATerm in the text, UAX #29 breaks only after
		// line and paragraph separators (SB4): segmenting the text as it is
		// yields one sentence per line.
		s.wrap = append(s.wrap[:0], text...)
	} else {
		s.wrap = unwrap(s.wrap[:0], text)
	}
	seg = s.wrap
	lines := 0
	state := -1
	pos := 0
	for pos < len(seg) {
		var n int
		if s.slow {
			n, state = nextSentence(seg[pos:], state)
		} else if m, ok := fastFirstSentence(seg[pos:]); ok {
			n = m
		} else {
			// A sentence starts here, so uniseg's state is the one it
			// computes from the first rune (state -1); see fast.go.
			n, _ = nextSentence(seg[pos:], -1)
		}
		start, end := pos, pos+n
		pos = end
		start, end = trimSpan(text, start, end)
		if start == end {
			continue
		}
		lines++
		if end-start > s.opt.MaxUnitBytes {
			st.Cut++
			for end-start > s.opt.MaxUnitBytes {
				cut := s.cutPoint(text, start, end)
				a, b := trimSpan(text, start, cut)
				if a < b {
					dst = s.emit(dst, &st, text, a, b)
				}
				start, end = trimSpan(text, cut, end)
			}
			if start == end {
				continue
			}
		}
		dst = s.emit(dst, &st, text, start, end)
	}
	st.LineBreaks = lineMode && lines > 1
	if masked {
		st.Words = s.countWords(orig) // skipped words still count as the document's words
	}
	return dst, st
}

// countWords is CountWords, on uniseg alone when the fast path is off.
func (s *Splitter) countWords(text string) int {
	if s.slow {
		return countWordsUAX(text, true)
	}
	return countWords(text, true)
}

// nextSentence returns the length of the first UAX #29 sentence of b, and
// the segmenter state to pass on with the rest (-1 at the start of a text).
func nextSentence(b []byte, state int) (int, int) {
	sentence, _, state := uniseg.FirstSentence(b, state)
	return len(sentence), state
}

// emit counts the sentence text[start:end] and, if it is long enough,
// appends its unit.
func (s *Splitter) emit(dst []Unit, st *Stats, text string, start, end int) []Unit {
	sentence := text[start:end]
	var words int
	fused := false
	if !s.slow {
		// One pass for words and form when the sentence allows (fused.go).
		s.out, words, fused = fuseSentence(s.out[:0], sentence)
		if !fused {
			// Other scripts: one pass over the script table (scriptfused.go).
			s.out, words, fused = fuseScript(s.out[:0], sentence)
		}
	}
	if !fused {
		words = s.countWords(sentence)
	}
	pos := st.Words
	st.Sentences++
	st.Words += words
	if words < s.opt.MinWords {
		st.Short++
		return dst
	}
	if !fused {
		s.out = s.norm.appendPath(s.out[:0], sentence, s.slow)
	}
	return append(dst, Unit{
		Hash:  Fingerprint(s.out),
		Start: uint32(start),
		End:   uint32(end),
		Words: uint32(words),
		Pos:   uint32(pos),
	})
}

// cutPoint returns where to cut the over-long sentence text[start:end]: the
// last white space at or before start+MaxUnitBytes, else the last UAX #29
// word boundary there, else the last rune boundary. The result is in
// (start, start+MaxUnitBytes] unless a single rune is longer than the limit.
func (s *Splitter) cutPoint(text string, start, end int) int {
	limit := start + s.opt.MaxUnitBytes
	for p := limit; p > start; p-- {
		if isBlankByte(text[p]) || text[p] == '\n' || text[p] == '\r' {
			return p
		}
	}
	// Segment only a window a little past the limit, so that cutting a long
	// sentence into many pieces stays linear: UAX #29 word rules look ahead
	// one character (past any Extend or Format marks), so boundaries at or
	// before the limit come out as in the whole text unless more than
	// cutLookahead bytes of such marks follow the limit.
	window := min(end, limit+cutLookahead)
	best := start
	state := -1
	for p := start; p < window; {
		var w string
		w, _, state = uniseg.FirstWordInString(text[p:window], state)
		if p+len(w) > limit {
			break
		}
		p += len(w)
		best = p
	}
	if best > start && best < end {
		return best
	}
	p := runeStartAtOrBefore(text, limit, start)
	if p == start {
		_, size := utf8.DecodeRuneInString(text[start:end])
		p = start + size
	}
	return p
}

// cutLookahead is how far past the cut limit cutPoint lets the word
// segmenter look.
const cutLookahead = 256

// runeStartAtOrBefore returns p, or the nearest position before it (but
// after floor) where a UTF-8 sequence starts, so that a cut there never falls
// inside a valid sequence. It looks back at most three bytes: a valid
// sequence has at most three continuation bytes, so if four positions in a
// row are continuation bytes, p is not inside one (such bytes are invalid and
// each stands alone).
func runeStartAtOrBefore(text string, p, floor int) int {
	if p >= len(text) {
		return len(text)
	}
	for q := p; q > floor && p-q < utf8.UTFMax; q-- {
		if utf8.RuneStart(text[q]) {
			return q
		}
	}
	return p
}
