package shingle

import (
	"unicode/utf8"
)

// Word shingles: the edit-tolerant unit.
//
// A sentence unit is lost as soon as one of its words is edited. A shingle
// of K consecutive words is lost only where an edit falls inside it, so an
// edited passage still shares every run of K untouched words with its
// source. Words are found by the rule CountWords uses (UAX #29 word
// segments holding a letter, digit or ideograph; hyphen compounds and words
// hyphenated across a line break are one word), each word is normalized
// like a sentence (NFKC, case folding, punctuation removed), and the
// fingerprint of a shingle is the xxhash64 of its K normalized words, each
// followed by one space. The normalized words are written once, one after
// the other, into one buffer, so shingle i is the contiguous slice from word
// i to word i+K and hashing it copies nothing.
//
// Shingles run across sentence and paragraph boundaries (an edit that merges
// or splits sentences changes no word), but not across text left out by
// SkipQuoted or SkipReferences: a shingle made of the words on both sides of
// a left-out quotation would match nothing real.
//
// Cost: one word pass (the fast scanner of words.go on ASCII and Latin-1
// text, uniseg otherwise), one normalization per word and one hash per
// shingle over K words, into reused buffers (BenchmarkWords). There are
// about as many shingles as words, some 20 times as many units as sentences;
// winnowing (Options.Winnow, winnow.go) keeps about 2/(W+1) of them.
//
// Rejected: hashing each word and combining K word hashes with a rolling
// polynomial. It saves the K-fold hashing but xxhash over K short words is
// already cheap next to the word segmentation, and a polynomial of 64-bit
// word hashes needs care to keep collisions as rare as xxhash's. It would
// also change every shingle fingerprint (archives and stored results hold
// them), and xxhash64 cannot be rolled while keeping them; so the scheme
// stays, and the fast path only speeds up finding and normalizing words.
// After it, xxhash is about 7% of BenchmarkWords (pprof).

// UnitKind names a kind of unit.
type UnitKind int

const (
	UnitSentence UnitKind = iota // one sentence (Sentences)
	UnitWords                    // a shingle of K words (Words)
)

// String is the name the report uses: "sentence" or "shingle".
func (k UnitKind) String() string {
	if k == UnitWords {
		return "shingle"
	}
	return "sentence"
}

// Units splits text into the units Options.Unit names: Sentences or Words.
func (s *Splitter) Units(text string, dst []Unit) ([]Unit, Stats) {
	if s.opt.Unit == UnitWords {
		return s.Words(text, dst)
	}
	return s.Sentences(text, dst)
}

// wordSpan is one word: its byte span in the text.
type wordSpan struct{ start, end int }

// Words splits text into word shingles of Options.ShingleWords words and
// appends to dst[:0] one Unit per shingle, in text order (winnowed when
// Options.Winnow is set). Each unit's span runs from its first word's first
// byte to its last word's last byte, Words is K and Pos is the index of its
// first word. A text (or a stretch between left-out spans) of fewer than K
// words gives no unit. Stats.Words counts all words; Sentences and Short
// stay zero.
func (s *Splitter) Words(text string, dst []Unit) ([]Unit, Stats) {
	dst = dst[:0]
	var st Stats
	if len(text) > MaxTextBytes {
		text = text[:runeStartAtOrBefore(text, MaxTextBytes, 0)]
	}
	orig := text
	text, masked := s.applySkips(text, &st)
	s.words = s.appendWordSpans(s.words[:0], text)
	k := s.opt.ShingleWords

	// Normalized words, each followed by a space, one after the other.
	s.wnorm = s.wnorm[:0]
	s.woff = s.woff[:0]
	for _, w := range s.words {
		s.woff = append(s.woff, uint32(len(s.wnorm)))
		before := len(s.wnorm)
		s.wnorm = s.norm.appendPath(s.wnorm, text[w.start:w.end], s.slow)
		if len(s.wnorm) == before {
			// A word that normalizes to nothing (not expected, since a
			// word holds a letter or digit) still takes its place.
			s.wnorm = append(s.wnorm, '_')
		}
		s.wnorm = append(s.wnorm, ' ')
	}
	s.woff = append(s.woff, uint32(len(s.wnorm)))

	out := dst
	if s.opt.Winnow > 1 {
		out = s.wout[:0]
	}
	for i := 0; i+k <= len(s.words); i++ {
		first, last := s.words[i], s.words[i+k-1]
		if masked && s.crossesSkip(first.start, last.end) {
			continue
		}
		out = append(out, Unit{
			Hash:  Fingerprint(s.wnorm[s.woff[i]:s.woff[i+k]]),
			Start: uint32(first.start),
			End:   uint32(last.end),
			Words: uint32(k),
			Pos:   uint32(i),
		})
	}
	if s.opt.Winnow > 1 {
		s.wout = out
		dst, s.deque = winnow(dst, out, s.opt.Winnow, s.deque)
	} else {
		dst = out
	}
	st.Words = len(s.words)
	if masked {
		st.Words = s.countWords(orig)
	}
	return dst, st
}

// crossesSkip reports whether [start, end) overlaps a left-out span (the
// spans are sorted and disjoint; a shingle spanning one is skipped).
func (s *Splitter) crossesSkip(start, end int) bool {
	lo, hi := 0, len(s.skips)
	for lo < hi {
		m := (lo + hi) / 2
		if s.skips[m].end <= start {
			lo = m + 1
		} else {
			hi = m
		}
	}
	return lo < len(s.skips) && s.skips[lo].start < end
}

// appendWordSpans appends the spans of text's words: by the fast scanner when
// text is all in its set, else (or with the fast path off) by uniseg.
func (s *Splitter) appendWordSpans(dst []wordSpan, text string) []wordSpan {
	if !s.slow {
		base := len(dst)
		_, out, ok := scanWordsFast(text, true, dst, true)
		if ok {
			return out
		}
		dst = out[:base]
	}
	return appendWordSpans(dst, text, !s.slow)
}

// appendWordSpans appends the spans of text's words by the CountWords rule,
// segment by segment as countWordsSegments counts them: by the script table
// where it can when fast is set, else by the uniseg segmenter directly (the
// reference the fast paths are checked against), so spans and counts always
// agree.
func appendWordSpans(dst []wordSpan, text string, fast bool) []wordSpan {
	state := -1
	pos := 0
	joined := false // the previous word ended in a joining hyphen
	for pos < len(text) {
		size, st, wordy := firstWord(text[pos:], state, fast)
		state = st
		start, end := pos, pos+size
		pos = end
		if !wordy {
			joined = false
			continue
		}
		if joined && len(dst) > 0 {
			dst[len(dst)-1].end = end
		} else {
			dst = append(dst, wordSpan{start, end})
		}
		joined = false
		if pos >= len(text) || !isHyphen(text[pos:]) {
			continue
		}
		_, hsize := utf8.DecodeRuneInString(text[pos:])
		after := text[pos+hsize:]
		if r, _ := utf8.DecodeRuneInString(after); isWordRune(r) {
			pos, state, joined = pos+hsize, -1, true
		} else if k := lineBreakJoin(after); k > 0 {
			pos, state, joined = pos+hsize+k, -1, true
		}
	}
	return dst
}
