package report

import (
	"cmp"
	"errors"
	"math"
	"slices"
	"strings"
	"unicode"
	"unicode/utf8"

	"github.com/cespare/xxhash/v2"

	"reprise/shingle"
)

// Passages of reworded copies: sentence pairs seeded by shared content words.
//
// Chaining (chain.go) joins exact shingle matches, so a passage exists only
// where runs of K words survived the editing. A copy with a third of its
// words replaced, its sentences reordered, split and joined keeps few such
// runs: the engine may still pair the two documents, but the chains cover
// only scattered pieces. For such pairs (Chaining.Reworded) the alignment
// works on sentences and their content words instead, in five steps:
//
//  1. Terms. Both texts are cut into sentences (at a full stop, question
//     or exclamation mark followed by white space, and at blank lines) and
//     words (runs of letters and digits, case-folded; a word hyphenated
//     across a line break is one word). A word's term is its folded form
//     with a crude English suffix removed ("-ing", "-ed", "-es", "-s",
//     "-ly", "'s"); words of fewer than three letters and a fixed list of
//     function words give no term. Each term is weighted by its inverse
//     sentence frequency over the sentences of both documents,
//     log(N/n_t), so that terms the two texts use everywhere count little.
//  2. Seeds. Only sentences near the engine's evidence take part: those
//     within Gap sentences of a sentence holding a counted unit (shingle)
//     that the other document also holds. Text set aside (templates and
//     common units) never seeds: a sentence most of whose words lie only
//     in set-aside units is left out. A pair of such sentences is a seed
//     when both its weighted cosine and its Dice coefficient over distinct
//     terms reach MinSimilarity, and they share at least three terms.
//  3. Joining. Each seed is a rectangle of one sentence in each document;
//     rectangles within Gap sentences of each other in both documents are
//     one passage (so sentences reordered within a copied stretch join, as
//     crossing chains do), repeated until nothing changes. A passage is then
//     extended by one sentence at a time at either end in A while the next
//     sentence is similar (cosine and Dice at half MinSimilarity) to a
//     sentence inside or next to the passage in B, and the same in B.
//  4. Filtering. A passage with fewer than two seeds, or spanning fewer than
//     MinWords words in either document, is dropped; so is one that lies
//     inside a passage with more seeds in either document (an echo). A pair
//     left with no passage is not reported (Summary.Unconfirmed counts
//     them): the engine's lower threshold makes it a candidate, the
//     alignment confirms it.
//  5. Exact edges. Dense chains of exact shingle matches (chain.go) join
//     the passages (withChains), so verbatim and lightly edited stretches
//     keep the edges chaining gives them; a verbatim run of two whole
//     sentences or more needs only verbatimWords words, not MinWords. Then
//     each side of a passage most of whose sentences agree with the other
//     side word for word loses the edge sentences that do not
//     (trimToEvidence: the extension of step 3 takes in a source's own
//     neighbouring sentence when it speaks of the same things), and takes
//     in the quotation marks and final punctuation written against its
//     first and last word.
//
// Each passage carries its explanation (Explained): B's side of the text
// and the words of either side whose term the other side of the passage
// also has, which the renderers mark.
//
// This follows the published sentence-pair approach to text alignment
// (seeding by cosine and Dice over sentence term vectors, extension by
// clustering nearby seeds, filtering short passages) in our own shape:
// the candidate documents and the neighbourhoods searched come from the
// exact counting engine, not from an all-pairs comparison.
//
// Cost: for a pair of documents with sa and sb sentences near evidence,
// one pass over both texts and, for every term of an A sentence, a walk of
// the B sentences holding it; terms held by more than maxPostings B
// sentences are not walked (they weigh almost nothing). Rejected: seeding
// from the shingle matches alone (a sentence with a third of its words
// edited often keeps no five-word run) and comparing every sentence pair of
// the two documents (quadratic in long documents, and it lets text far
// from any evidence seed).

// Reworded are the settings of the sentence alignment for reworded copies.
type Reworded struct {
	// MinSimilarity: a sentence pair seeds a passage when its cosine and
	// its Dice coefficient both reach this (0 means 0.4).
	MinSimilarity float64 `json:"min_similarity"`
	// Gap: seeds within this many sentences of each other in both
	// documents join one passage; sentences within it of shared units are
	// searched (0 means 5).
	Gap int `json:"sentence_gap"`
}

func (r *Reworded) minSimilarity() float64 {
	if r.MinSimilarity <= 0 {
		return 0.4
	}
	return r.MinSimilarity
}

func (r *Reworded) gap() int {
	if r.Gap <= 0 {
		return 5
	}
	return r.Gap
}

// Explained shows why a reworded passage was reported: B's side of it, and
// the words of each side whose term the other side also has.
type Explained struct {
	// BText is B's side of the passage (cut like Passage.Text).
	BText string `json:"b_text"`
	// AShared and BShared are the shared words' byte spans [start, end)
	// in Passage.Text and in BText.
	AShared [][2]int `json:"a_shared"`
	BShared [][2]int `json:"b_shared"`
	// Terms counts the distinct terms the two sides share; ATerms and
	// BTerms the distinct terms of each side.
	Terms  int `json:"terms"`
	ATerms int `json:"a_terms"`
	BTerms int `json:"b_terms"`
}

// verbatimWords is the shortest verbatim run (every word in a matched
// shingle, in the same order on both sides) shown as a passage when
// MinWords is larger, if it holds two whole sentences or more on each
// side: a copied fragment of a few short sentences ("So sorry. Limited
// interests. So sorry.") shares too few content words to seed, and is as
// plainly copied as a long one, while one shared sentence may be a common
// saying (the sentence unit, too, asks two shared sentences by default).
// Ten words were chosen on the tuning corpus (EVALUATION.md, seed 11:
// eight gave the same figures; eight without the two-sentence condition
// reported a dateline two unrelated newspaper texts share).
const verbatimWords = 10

// maxPostings bounds the B sentences walked for one term.
const maxPostings = 64

// token is one word of a text: its bytes and its term (0: none).
type token struct {
	start, end int32
	term       uint64
}

// sentenceSpan is one sentence: its tokens tokens[lo:hi] and its bytes.
type sentenceSpan struct {
	lo, hi     int
	start, end int
}

// termText is a text cut into sentences and tokens. Terms are found a
// sentence at a time, when first asked for (fill): the alignment reads only
// the sentences near the engine's evidence, often a small part of a long
// document, and folding and hashing words is most of the cost of cutting.
type termText struct {
	text      string
	tokens    []token
	sentences []sentenceSpan
	filled    []bool // sentence k's tokens have their terms
	buf       []byte
}

// newTermText cuts text into sentences and words (step 1); their terms
// come with fill.
func newTermText(text string) *termText {
	// About one word in six bytes of English prose: room for most texts'
	// words at once (growing the slice was a third of the cutting).
	t := &termText{text: text, tokens: make([]token, 0, len(text)/6+1)}
	sentStart := -1
	lo := 0
	closeSentence := func(end int) {
		if sentStart >= 0 && len(t.tokens) > lo {
			t.sentences = append(t.sentences, sentenceSpan{lo: lo, hi: len(t.tokens), start: sentStart, end: end})
		}
		sentStart, lo = -1, len(t.tokens)
	}
	i := 0
	for i < len(text) {
		r, size := rune(text[i]), 1
		if r >= utf8.RuneSelf {
			r, size = utf8.DecodeRuneInString(text[i:])
		}
		if r < utf8.RuneSelf && isASCIITermByte(byte(r)) || r >= utf8.RuneSelf && isTermRune(r) {
			start := i
			for i < len(text) {
				r, size = rune(text[i]), 1
				if r >= utf8.RuneSelf {
					r, size = utf8.DecodeRuneInString(text[i:])
				}
				if r < utf8.RuneSelf && isASCIITermByte(byte(r)) || r >= utf8.RuneSelf && isTermRune(r) {
					i += size
					continue
				}
				// A word hyphenated across a line break goes on.
				if r == '-' {
					if k := hyphenBreak(text[i+1:]); k > 0 {
						i += 1 + k
						continue
					}
				}
				break
			}
			if sentStart < 0 {
				sentStart = start
			}
			t.tokens = append(t.tokens, token{start: int32(start), end: int32(i)})
			continue
		}
		switch r {
		case '.', '!', '?':
			j := i + 1
			for j < len(text) && isCloser(text[j]) {
				j++
			}
			if j >= len(text) || text[j] == ' ' || text[j] == '\n' || text[j] == '\t' || text[j] == '\r' {
				closeSentence(j)
			}
			i = j
			continue
		case '\n':
			j := i + 1
			for j < len(text) && (text[j] == ' ' || text[j] == '\t' || text[j] == '\r') {
				j++
			}
			if j < len(text) && text[j] == '\n' && sentStart >= 0 {
				closeSentence(lastNonSpace(text, i))
			}
		}
		i += size
	}
	closeSentence(len(text))
	if n := len(t.sentences); n > 0 {
		// A sentence ends at its last token when no full stop closed it.
		for k := range t.sentences {
			s := &t.sentences[k]
			if last := int(t.tokens[s.hi-1].end); s.end < last {
				s.end = last
			}
		}
	}
	t.filled = make([]bool, len(t.sentences))
	return t
}

// fill gives the tokens of sentence k their terms: each word folded to
// lower case (the letters and digits of its bytes, so a word hyphenated
// across a line break is the whole word), then termOf.
func (t *termText) fill(k int) {
	if t.filled[k] {
		return
	}
	t.filled[k] = true
	s := t.sentences[k]
	for x := s.lo; x < s.hi; x++ {
		tok := &t.tokens[x]
		w := t.text[tok.start:tok.end]
		t.buf = t.buf[:0]
		for i := 0; i < len(w); {
			c := w[i]
			if c < utf8.RuneSelf {
				switch {
				case 'A' <= c && c <= 'Z':
					t.buf = append(t.buf, c+'a'-'A')
				case 'a' <= c && c <= 'z' || '0' <= c && c <= '9':
					t.buf = append(t.buf, c)
				}
				i++
				continue
			}
			r, size := utf8.DecodeRuneInString(w[i:])
			if isTermRune(r) {
				t.buf = utf8.AppendRune(t.buf, unicode.ToLower(r))
			}
			i += size
		}
		tok.term = termOf(t.buf)
	}
}

// fillWithin gives terms to the tokens of every sentence overlapping the
// bytes [start, end).
func (t *termText) fillWithin(start, end int) {
	k, _ := slices.BinarySearchFunc(t.sentences, start, func(s sentenceSpan, b int) int { return cmp.Compare(s.end, b+1) })
	for ; k < len(t.sentences) && t.sentences[k].start < end; k++ {
		t.fill(k)
	}
}

func lastNonSpace(text string, i int) int {
	for i > 0 && (text[i-1] == ' ' || text[i-1] == '\t' || text[i-1] == '\r' || text[i-1] == '\n') {
		i--
	}
	return i
}

// isASCIITermByte is isTermRune for an ASCII byte, small enough to be
// inlined in the cutting loop.
func isASCIITermByte(c byte) bool {
	return '0' <= c && c <= '9' || 'a' <= c|0x20 && c|0x20 <= 'z'
}

func isTermRune(r rune) bool {
	if r < utf8.RuneSelf {
		return 'a' <= r && r <= 'z' || 'A' <= r && r <= 'Z' || '0' <= r && r <= '9'
	}
	return unicode.IsLetter(r) || unicode.IsDigit(r)
}

// isCloser: closing quotes and brackets after a sentence's final mark.
func isCloser(b byte) bool { return b == '"' || b == '\'' || b == ')' || b == ']' || b >= 0x80 }

// hyphenBreak returns the bytes of white space holding one line break
// between a hyphen and a lower-case letter ("exam-\nple"), or 0.
func hyphenBreak(s string) int {
	k, breaks := 0, 0
	for k < len(s) && (s[k] == ' ' || s[k] == '\t' || s[k] == '\r' || s[k] == '\n') {
		if s[k] == '\n' {
			breaks++
		}
		k++
	}
	if breaks != 1 || k == len(s) || s[k] < 'a' || s[k] > 'z' {
		return 0
	}
	return k
}

// termOf returns the term of a folded word, 0 for none.
func termOf(w []byte) uint64 {
	if utf8.RuneCount(w) < 3 || len(w) <= maxStopWord && isStopWord(string(w)) {
		return 0
	}
	w = stem(w)
	h := xxhash.Sum64(w)
	if h == 0 {
		h = 1
	}
	return h
}

// stem removes one common English suffix, keeping at least three bytes
// (common practice: a light suffix stripper, not a full stemmer).
func stem(w []byte) []byte {
	for _, suf := range [...]string{"ing", "ed", "es", "ly", "s"} {
		if len(w) >= len(suf)+3 && string(w[len(w)-len(suf):]) == suf {
			return w[:len(w)-len(suf)]
		}
	}
	return w
}

// stopWords are English function words and the commonest verbs, which
// carry little of what a sentence says (common practice; our own list).
var stopWords = func() map[string]struct{} {
	m := map[string]struct{}{}
	for _, w := range []string{
		"the", "and", "for", "are", "but", "not", "you", "all", "any", "can", "had", "her", "was", "one",
		"our", "out", "has", "him", "his", "how", "man", "new", "now", "old", "see", "two", "way", "who",
		"its", "let", "say", "she", "too", "use", "did", "get", "may", "own", "yet", "nor", "off", "why",
		"about", "above", "after", "again", "against", "also", "although", "among", "another", "because",
		"been", "before", "being", "below", "between", "both", "could", "does", "doing", "down", "during",
		"each", "either", "else", "even", "ever", "every", "from", "further", "have", "having", "here",
		"hers", "herself", "himself", "into", "itself", "just", "like", "made", "make", "many", "more",
		"most", "much", "must", "myself", "neither", "never", "only", "other", "others", "ours", "over",
		"same", "said", "says", "shall", "should", "since", "some", "such", "than", "that", "their",
		"theirs", "them", "themselves", "then", "there", "these", "they", "this", "those", "though",
		"through", "thus", "till", "under", "until", "upon", "very", "were", "what", "when", "where",
		"whether", "which", "while", "whom", "whose", "will", "with", "within", "without", "would",
		"your", "yours", "yourself", "well", "still", "back", "come", "came", "went", "goes", "going",
		"know", "knew", "take", "took", "give", "gave", "seem", "seemed", "upon", "onto", "per", "via",
		"is", "am", "be", "do", "of", "to", "in", "on", "at", "by", "or", "an", "as", "it", "we", "us",
		"me", "my", "he", "if", "so", "no", "up",
	} {
		m[w] = struct{}{}
	}
	return m
}()

// maxStopWord is the bytes of the longest stop word: a longer word is not
// looked up.
const maxStopWord = len("themselves")

func isStopWord(w string) bool {
	_, ok := stopWords[w]
	return ok
}

// bag is one sentence's distinct terms, sorted, and its weighted norm.
type bag struct {
	terms []uint64
	norm  float64 // sqrt of the sum of squared weights
	ok    bool    // takes part in seeding
}

// rewordedPassages is the alignment of one pair of documents for
// reworded copies (steps 2 to 4 of the comment above).
func rewordedPassages(rw *Reworded, a, b *quoted, ta, tb *termText, ea, eb []bool, minWords int) []rewordedPassage {
	gap := rw.gap()
	near := func(ev []bool) []bool {
		out := make([]bool, len(ev))
		last := -1 << 30
		for i := range ev {
			if ev[i] {
				last = i
			}
			out[i] = i-last <= gap
		}
		last = 1 << 30
		for i := len(ev) - 1; i >= 0; i-- {
			if ev[i] {
				last = i
			}
			out[i] = out[i] || last-i <= gap
		}
		return out
	}
	na, nb := near(ea), near(eb)
	asideA, asideB := asideTokens(a, ta), asideTokens(b, tb)

	// Inverse sentence frequency over both documents' searched sentences.
	sf := map[uint64]int32{}
	var scratch []uint64
	distinct := func(t *termText, s sentenceSpan) []uint64 {
		scratch = scratch[:0]
		for _, tok := range t.tokens[s.lo:s.hi] {
			if tok.term != 0 {
				scratch = append(scratch, tok.term)
			}
		}
		slices.Sort(scratch)
		return slices.Compact(scratch)
	}
	bags := func(t *termText, searched []bool, aside []bool) []bag {
		out := make([]bag, len(t.sentences))
		for k, s := range t.sentences {
			if !searched[k] {
				continue
			}
			setAside, words := 0, 0
			for x := s.lo; x < s.hi; x++ {
				words++
				if aside[x] {
					setAside++
				}
			}
			if 2*setAside > words {
				continue
			}
			t.fill(k)
			out[k] = bag{terms: slices.Clone(distinct(t, s)), ok: true}
			for _, term := range out[k].terms {
				sf[term]++
			}
		}
		return out
	}
	ba, bb := bags(ta, na, asideA), bags(tb, nb, asideB)
	total := 0
	for _, x := range [2][]bag{ba, bb} {
		for _, g := range x {
			if g.ok {
				total++
			}
		}
	}
	if total == 0 {
		return nil
	}
	weight := func(term uint64) float64 {
		return math.Log(float64(total+1) / float64(sf[term]))
	}
	for _, x := range [2][]bag{ba, bb} {
		for k := range x {
			sum := 0.0
			for _, term := range x[k].terms {
				w := weight(term)
				sum += w * w
			}
			x[k].norm = math.Sqrt(sum)
		}
	}

	// B's sentences by term.
	postings := map[uint64][]int32{}
	for k, g := range bb {
		if !g.ok {
			continue
		}
		for _, term := range g.terms {
			postings[term] = append(postings[term], int32(k))
		}
	}
	minSim := rw.minSimilarity()
	sim := func(x, y *bag) (cos, dice float64, shared int) {
		dot := 0.0
		i, j := 0, 0
		for i < len(x.terms) && j < len(y.terms) {
			switch {
			case x.terms[i] < y.terms[j]:
				i++
			case x.terms[i] > y.terms[j]:
				j++
			default:
				w := weight(x.terms[i])
				dot += w * w
				shared++
				i++
				j++
			}
		}
		if x.norm == 0 || y.norm == 0 {
			return 0, 0, shared
		}
		return dot / (x.norm * y.norm), 2 * float64(shared) / float64(len(x.terms)+len(y.terms)), shared
	}

	// Step 2: seeds.
	var seeds []rect
	touched := make([]bool, len(bb))
	var cand []int32
	for i := range ba {
		x := &ba[i]
		if !x.ok || len(x.terms) < 3 {
			continue
		}
		cand = cand[:0]
		for _, term := range x.terms {
			ps := postings[term]
			if len(ps) > maxPostings {
				continue
			}
			for _, j := range ps {
				if !touched[j] {
					touched[j] = true
					cand = append(cand, j)
				}
			}
		}
		for _, j := range cand {
			touched[j] = false
			cos, dice, shared := sim(x, &bb[j])
			if shared >= 3 && cos >= minSim && dice >= minSim {
				seeds = append(seeds, rect{aLo: i, aHi: i, bLo: int(j), bHi: int(j), seeds: 1})
			}
		}
	}
	if len(seeds) == 0 {
		return nil
	}

	// Step 3: join and extend.
	rs := joinRects(seeds, gap)
	half := minSim / 2
	similar := func(x *bag, others []bag, lo, hi int) bool {
		if !x.ok || len(x.terms) == 0 {
			return false
		}
		for k := max(0, lo); k <= min(len(others)-1, hi); k++ {
			if !others[k].ok {
				continue
			}
			if cos, dice, shared := sim(x, &others[k]); shared >= 2 && cos >= half && dice >= half {
				return true
			}
		}
		return false
	}
	for k := range rs {
		r := &rs[k]
		for r.aLo > 0 && similar(&ba[r.aLo-1], bb, r.bLo-1, r.bHi+1) {
			r.aLo--
		}
		for r.aHi+1 < len(ba) && similar(&ba[r.aHi+1], bb, r.bLo-1, r.bHi+1) {
			r.aHi++
		}
		for r.bLo > 0 && similar(&bb[r.bLo-1], ba, r.aLo-1, r.aHi+1) {
			r.bLo--
		}
		for r.bHi+1 < len(bb) && similar(&bb[r.bHi+1], ba, r.aLo-1, r.aHi+1) {
			r.bHi++
		}
	}
	rs = joinRects(rs, 0)

	// Step 4: filter.
	rs = slices.DeleteFunc(rs, func(r rect) bool {
		return r.seeds < 2 ||
			wordsOf(ta, r.aLo, r.aHi) < minWords || wordsOf(tb, r.bLo, r.bHi) < minWords
	})
	for i := range rs {
		for j := range rs {
			if i == j || rs[j].dead || rs[j].seeds <= rs[i].seeds {
				continue
			}
			inA := rs[j].aLo <= rs[i].aLo && rs[i].aHi <= rs[j].aHi
			inB := rs[j].bLo <= rs[i].bLo && rs[i].bHi <= rs[j].bHi
			if inA || inB {
				rs[i].dead = true
				break
			}
		}
	}
	rs = slices.DeleteFunc(rs, func(r rect) bool { return r.dead })
	out := make([]rewordedPassage, len(rs))
	for k, r := range rs {
		out[k] = rewordedPassage{
			aStart: ta.sentences[r.aLo].start, aEnd: ta.sentences[r.aHi].end,
			bStart: tb.sentences[r.bLo].start, bEnd: tb.sentences[r.bHi].end,
			seeds: r.seeds,
		}
	}
	return out
}

// withChains adds to ps the chained passages of exact shingle matches
// (chain.go) that span at least minWords words in both documents, with a
// matched shingle starting at one word in three or more, and the verbatim
// runs of two whole sentences on each side and verbatimWords words (ta and
// tb give the sentences): a passage overlapping one of ps in both
// documents widens it, any other is a passage of its own. Verbatim and
// lightly edited stretches so keep the exact edges chaining gives them,
// whatever the sentences do.
func withChains(ps []rewordedPassage, a, b *quoted, ta, tb *termText, gap, minWords int) []rewordedPassage {
	ua, ub := a.units, b.units
	for _, l := range chainPassages(&a.seq, &b.seq, ua, ub, gap, 0) {
		aWords := int(ua[l.aLast].Pos+ua[l.aLast].Words) - int(ua[l.aFirst].Pos)
		bWords := int(ub[l.bLast].Pos+ub[l.bLast].Words) - int(ub[l.bFirst].Pos)
		// A verbatim run (every word but the last K-1 starts a matched
		// shingle) of two whole sentences or more needs only
		// verbatimWords words.
		k := int(ua[l.aFirst].Words)
		if l.n+k-1 >= max(aWords, bWords) && min(aWords, bWords) >= min(minWords, verbatimWords) &&
			ta.wholeSentences(int(ua[l.aFirst].Start), int(ua[l.aLast].End)) >= 2 &&
			tb.wholeSentences(int(ub[l.bFirst].Start), int(ub[l.bLast].End)) >= 2 {
			ps = joinChain(ps, rewordedPassage{aStart: int(ua[l.aFirst].Start), aEnd: int(ua[l.aLast].End),
				bStart: int(ub[l.bFirst].Start), bEnd: int(ub[l.bLast].End)})
			continue
		}
		// Dense chains only: a third of the words starting a matched
		// shingle (a verbatim run has nearly all, a light edit more than
		// half), not common phrases chained across wide gaps.
		if aWords < max(minWords, 1) || bWords < max(minWords, 1) || 3*l.n < max(aWords, bWords) {
			continue
		}
		ps = joinChain(ps, rewordedPassage{aStart: int(ua[l.aFirst].Start), aEnd: int(ua[l.aLast].End),
			bStart: int(ub[l.bFirst].Start), bEnd: int(ub[l.bLast].End)})
	}
	slices.SortFunc(ps, func(x, y rewordedPassage) int {
		return cmp.Or(cmp.Compare(x.aStart, y.aStart), cmp.Compare(x.bStart, y.bStart),
			cmp.Compare(x.aEnd, y.aEnd), cmp.Compare(x.bEnd, y.bEnd))
	})
	// Widened passages may now hold one another: keep the outer one.
	return slices.CompactFunc(ps, func(x, y rewordedPassage) bool {
		return x.aStart <= y.aStart && y.aEnd <= x.aEnd && x.bStart <= y.bStart && y.bEnd <= x.bEnd
	})
}

// joinChain widens every passage of ps that c overlaps in both documents
// to cover c, or adds c when it overlaps none.
func joinChain(ps []rewordedPassage, c rewordedPassage) []rewordedPassage {
	joined := false
	for k := range ps {
		p := &ps[k]
		if c.aStart < p.aEnd && p.aStart < c.aEnd && c.bStart < p.bEnd && p.bStart < c.bEnd {
			p.aStart, p.aEnd = min(p.aStart, c.aStart), max(p.aEnd, c.aEnd)
			p.bStart, p.bEnd = min(p.bStart, c.bStart), max(p.bEnd, c.bEnd)
			joined = true
		}
	}
	if !joined {
		ps = append(ps, c)
	}
	return ps
}

// trimToEvidence drops, on each side of each passage, the sentences at
// its ends that barely agree with the other side: fewer than half of their
// words lie in a counted unit found on the other side of the passage. It
// does so only when more than two thirds of the side's sentences agree so
// (chosen on seed 11, EVALUATION.md: a half trimmed heavy copies, which
// keep shingles in many sentences but not in all). A
// copy that kept most of its words keeps nearly every word of every
// sentence in a shared shingle; a sentence at the edge without is a
// neighbour the extension took in because it speaks of the same things
// (the source's own next sentence), not a copy. A reworded copy, many of
// whose sentences keep no shingle, is left whole.
func trimToEvidence(ps []rewordedPassage, a, b *quoted, ta, tb *termText) {
	ua, ub := a.units, b.units
	where := b.seq.positions()
	// sentencesOf returns the sentences of t that bytes [start, end) touch.
	sentencesOf := func(t *termText, start, end int) (int, int) {
		lo, _ := slices.BinarySearchFunc(t.sentences, start, func(s sentenceSpan, b int) int { return cmp.Compare(s.end, b+1) })
		hi := lo - 1
		for hi+1 < len(t.sentences) && t.sentences[hi+1].start < end {
			hi++
		}
		return lo, hi
	}
	// mark sets the tokens of t from first on that lie in [start, end).
	mark := func(t *termText, marks []bool, first, start, end int) {
		x, _ := slices.BinarySearchFunc(t.tokens, start, func(tok token, s int) int { return cmp.Compare(int(tok.start), s) })
		for ; x < len(t.tokens) && int(t.tokens[x].start) < end; x++ {
			if x-first >= 0 && x-first < len(marks) {
				marks[x-first] = true
			}
		}
	}
	trim := func(t *termText, marks []bool, lo, hi int, start, end *int) {
		first := t.sentences[lo].lo
		agrees := func(k int) bool {
			s, n := t.sentences[k], 0
			for x := s.lo; x < s.hi; x++ {
				if marks[x-first] {
					n++
				}
			}
			return 2*n >= s.hi-s.lo
		}
		n := 0
		for k := lo; k <= hi; k++ {
			if agrees(k) {
				n++
			}
		}
		if hi == lo || 3*n <= 2*(hi-lo+1) {
			return
		}
		l, h := lo, hi
		for !agrees(l) {
			l++
		}
		for !agrees(h) {
			h--
		}
		if l > lo {
			*start = max(*start, t.sentences[l].start)
		}
		if h < hi {
			*end = min(*end, t.sentences[h].end)
		}
	}
	for k := range ps {
		p := &ps[k]
		aLo, aHi := sentencesOf(ta, p.aStart, p.aEnd)
		bLo, bHi := sentencesOf(tb, p.bStart, p.bEnd)
		if aHi < aLo || bHi < bLo {
			continue
		}
		aFirst, bFirst := ta.sentences[aLo].lo, tb.sentences[bLo].lo
		marksA := make([]bool, ta.sentences[aHi].hi-aFirst)
		marksB := make([]bool, tb.sentences[bHi].hi-bFirst)
		i, _ := slices.BinarySearchFunc(ua, p.aStart, func(u shingle.Unit, s int) int { return cmp.Compare(int(u.Start), s) })
		for ; i < len(ua) && int(ua[i].Start) < p.aEnd; i++ {
			if !a.seq.counted[i] {
				continue
			}
			for _, j := range where[ua[i].Hash] {
				u := ub[j]
				if int(u.Start) < p.bStart || int(u.Start) >= p.bEnd {
					continue
				}
				mark(ta, marksA, aFirst, int(ua[i].Start), int(ua[i].End))
				mark(tb, marksB, bFirst, int(u.Start), int(u.End))
			}
		}
		trim(ta, marksA, aLo, aHi, &p.aStart, &p.aEnd)
		trim(tb, marksB, bLo, bHi, &p.bStart, &p.bEnd)
	}
}

// widenToPunctuation takes into each side of each passage the marks
// written against its first and last word: an opening quotation mark or
// bracket before it, closing marks and final punctuation after it, up to
// white space or the next word.
func widenToPunctuation(ps []rewordedPassage, a, b string) {
	widen := func(text string, start, end *int) {
		for *start > 0 {
			r, size := utf8.DecodeLastRuneInString(text[:*start])
			if unicode.IsSpace(r) || isTermRune(r) || !(unicode.Is(unicode.Ps, r) || unicode.Is(unicode.Pi, r) || r == '"' || r == '\'') {
				break
			}
			*start -= size
		}
		for *end < len(text) {
			r, size := utf8.DecodeRuneInString(text[*end:])
			if unicode.IsSpace(r) || isTermRune(r) || !unicode.IsPunct(r) || r == '-' || unicode.Is(unicode.Ps, r) || unicode.Is(unicode.Pi, r) {
				break
			}
			*end += size
		}
	}
	for k := range ps {
		p := &ps[k]
		widen(a, &p.aStart, &p.aEnd)
		widen(b, &p.bStart, &p.bEnd)
	}
}

// rewordedPassage is one passage in byte offsets, with the shared words'
// spans (absolute offsets) on each side.
type rewordedPassage struct {
	aStart, aEnd, bStart, bEnd int
	seeds                      int
	aShared, bShared           []span
	terms, aTerms, bTerms      int
}

// wholeSentences counts the sentences of t all of whose words lie inside
// the bytes [start, end).
func (t *termText) wholeSentences(start, end int) int {
	k, _ := slices.BinarySearchFunc(t.sentences, start, func(s sentenceSpan, b int) int { return cmp.Compare(s.start, b) })
	n := 0
	for ; k < len(t.sentences) && int(t.tokens[t.sentences[k].hi-1].end) <= end; k++ {
		n++
	}
	return n
}

// within returns the tokens of t inside the bytes [start, end).
func (t *termText) within(start, end int) []token {
	lo, _ := slices.BinarySearchFunc(t.tokens, start, func(x token, s int) int { return cmp.Compare(int(x.start), s) })
	hi := lo
	for hi < len(t.tokens) && int(t.tokens[hi].end) <= end {
		hi++
	}
	return t.tokens[lo:hi]
}

// explain finds the words of each side whose term the other side has.
func (p *rewordedPassage) explain(ta, tb *termText) {
	setOf := func(toks []token) map[uint64]bool {
		m := map[uint64]bool{}
		for _, tok := range toks {
			if tok.term != 0 {
				m[tok.term] = true
			}
		}
		return m
	}
	ta.fillWithin(p.aStart, p.aEnd)
	tb.fillWithin(p.bStart, p.bEnd)
	wa, wb := ta.within(p.aStart, p.aEnd), tb.within(p.bStart, p.bEnd)
	sa, sb := setOf(wa), setOf(wb)
	p.aTerms, p.bTerms = len(sa), len(sb)
	for term := range sa {
		if sb[term] {
			p.terms++
		}
	}
	marks := func(toks []token, other map[uint64]bool) []span {
		var out []span
		for _, tok := range toks {
			if tok.term != 0 && other[tok.term] {
				out = append(out, span{int(tok.start), int(tok.end)})
			}
		}
		return out
	}
	p.aShared = marks(wa, sb)
	p.bShared = marks(wb, sa)
}

// wordsOf counts the tokens of sentences lo..hi.
func wordsOf(t *termText, lo, hi int) int { return t.sentences[hi].hi - t.sentences[lo].lo }

// rect is a passage in sentence indices: A's lo..hi and B's lo..hi.
type rect struct {
	aLo, aHi, bLo, bHi int
	seeds              int
	dead               bool
}

// joinRects merges rectangles within gap sentences of each other in both
// documents until no two are.
func joinRects(rs []rect, gap int) []rect {
	for {
		slices.SortFunc(rs, func(x, y rect) int {
			return cmp.Or(cmp.Compare(x.aLo, y.aLo), cmp.Compare(x.bLo, y.bLo), cmp.Compare(x.aHi, y.aHi), cmp.Compare(x.bHi, y.bHi))
		})
		merged := false
		for i := range rs {
			if rs[i].dead {
				continue
			}
			for j := i + 1; j < len(rs) && rs[j].aLo-rs[i].aHi <= gap+1; j++ {
				if rs[j].dead || rs[j].bLo-rs[i].bHi > gap+1 || rs[i].bLo-rs[j].bHi > gap+1 {
					continue
				}
				rs[i].aLo, rs[i].aHi = min(rs[i].aLo, rs[j].aLo), max(rs[i].aHi, rs[j].aHi)
				rs[i].bLo, rs[i].bHi = min(rs[i].bLo, rs[j].bLo), max(rs[i].bHi, rs[j].bHi)
				rs[i].seeds += rs[j].seeds
				rs[j].dead = true
				merged = true
			}
		}
		rs = slices.DeleteFunc(rs, func(r rect) bool { return r.dead })
		if !merged {
			return rs
		}
	}
}

// evidence marks the sentences of t (the text of x) that hold a counted
// unit y also holds.
func evidence(x, y *quoted, t *termText) []bool {
	ev := make([]bool, len(t.sentences))
	where := y.seq.positions()
	k := 0
	for i, u := range x.units {
		if !x.seq.counted[i] {
			continue
		}
		if _, ok := where[u.Hash]; !ok {
			continue
		}
		// The sentence holding the unit's first byte (units are in text
		// order, so k only moves forward).
		for k+1 < len(t.sentences) && t.sentences[k+1].start <= int(u.Start) {
			k++
		}
		if k < len(t.sentences) {
			ev[k] = true
		}
	}
	return ev
}

// asideTokens marks the tokens of t that lie only in units set aside
// (templates, common text): inside some unit's span but inside no
// counted unit's span.
func asideTokens(q *quoted, t *termText) []bool {
	covered := func(want bool) []span {
		var out []span
		for i, u := range q.units {
			if q.seq.counted[i] != want {
				continue
			}
			if n := len(out); n > 0 && int(u.Start) <= out[n-1].end {
				out[n-1].end = max(out[n-1].end, int(u.End))
				continue
			}
			out = append(out, span{int(u.Start), int(u.End)})
		}
		return out
	}
	in := func(spans []span) func(start, end int) bool {
		k := 0
		return func(start, end int) bool {
			for k < len(spans) && spans[k].end <= start {
				k++
			}
			return k < len(spans) && spans[k].start < end
		}
	}
	inCounted, inAside := in(covered(true)), in(covered(false))
	out := make([]bool, len(t.tokens))
	for k, tok := range t.tokens {
		c := inCounted(int(tok.start), int(tok.end))
		s := inAside(int(tok.start), int(tok.end))
		out[k] = s && !c
	}
	return out
}

// unitsWithin counts x's counted units inside [start, end) that y also holds.
func unitsWithin(x, y *quoted, start, end int) int {
	where := y.seq.positions()
	n := 0
	for i, u := range x.units {
		if int(u.Start) >= end {
			break
		}
		if int(u.Start) < start || int(u.End) > end || !x.seq.counted[i] {
			continue
		}
		if _, ok := where[u.Hash]; ok {
			n++
		}
	}
	return n
}

// termText returns q's text cut into sentences and words, cut on first
// use and kept: a document is the first of many pairs (BuildContext loads
// it once for all of them), and only one goroutine aligns its pairs.
func (q *quoted) termText() *termText {
	if q.terms == nil {
		q.terms = newTermText(q.text)
	}
	return q.terms
}

// errUnconfirmed: the sentence alignment found no passage in a pair the
// engine gave; the pair is not reported.
var errUnconfirmed = errors.New("report: no reworded passage confirms the pair")

// alignReworded is alignPair for Chaining.Reworded: the passages of the
// sentence alignment, each with its explanation, and the pair's scores.
func alignReworded(p *Pair, aSpans, bSpans *[]span, ch *Chaining, a, b *quoted, shared, textLimit int) error {
	da, db := a.doc, b.doc
	ta, tb := a.termText(), b.termText()
	ea, eb := evidence(a, b, ta), evidence(b, a, tb)
	passages := rewordedPassages(ch.Reworded, a, b, ta, tb, ea, eb, ch.MinWords)
	passages = withChains(passages, a, b, ta, tb, max(0, ch.Gap), ch.MinWords)
	if len(passages) == 0 {
		return errUnconfirmed
	}
	trimToEvidence(passages, a, b, ta, tb)
	widenToPunctuation(passages, a.text, b.text)
	*p = Pair{A: da.Path, B: db.Path, Shared: shared}
	for _, r := range passages {
		r.explain(ta, tb)
		g := Passage{AStart: r.aStart, AEnd: r.aEnd, BStart: r.bStart, BEnd: r.bEnd,
			Units: unitsWithin(a, b, r.aStart, r.aEnd)}
		whole := a.text[g.AStart:g.AEnd]
		g.Words = shingle.CountWords(whole)
		g.Text, g.TextCut = cutText(whole, textLimit)
		g.Text = strings.Clone(g.Text)
		bText, _ := cutText(b.text[g.BStart:g.BEnd], textLimit)
		g.Explained = &Explained{
			BText:   strings.Clone(bText),
			AShared: relative(r.aShared, g.AStart, len(g.Text)),
			BShared: relative(r.bShared, g.BStart, len(bText)),
			Terms:   r.terms, ATerms: r.aTerms, BTerms: r.bTerms,
		}
		g.ALine = a.lines.line(a.text, g.AStart)
		g.BLine = b.lines.line(b.text, g.BStart)
		g.AWhere = where(da.Marks, g.AStart, g.ALine)
		g.BWhere = where(db.Marks, g.BStart, g.BLine)
		*aSpans = append(*aSpans, span{g.AStart, g.AEnd})
		*bSpans = append(*bSpans, span{g.BStart, g.BEnd})
		p.Passages = append(p.Passages, g)
	}
	p.CoverageA = fraction(wordsIn(a.text, *aSpans), da.Words)
	p.CoverageB = fraction(wordsIn(b.text, *bSpans), db.Words)
	p.Jaccard = fraction(shared, a.seq.distinct+b.seq.distinct-shared)
	p.Score = max(p.CoverageA, p.CoverageB)
	return nil
}

// relative turns absolute spans into spans of a text starting at base and
// limit bytes long, leaving out those past its end.
func relative(spans []span, base, limit int) [][2]int {
	out := make([][2]int, 0, len(spans))
	for _, s := range spans {
		if s.end-base > limit {
			break
		}
		out = append(out, [2]int{s.start - base, s.end - base})
	}
	return out
}
