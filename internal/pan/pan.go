// Package pan computes the passage-level measures of the PAN evaluation
// framework for text-reuse detection: character precision, recall,
// granularity and their combination, plagdet (M. Potthast, B. Stein, A.
// Barrón-Cedeño and P. Rosso, "An Evaluation Framework for Plagiarism
// Detection", COLING 2010, section 3). The benchmark in scripts/evaluate
// scores reprise's passages with it.
//
// A case s is a reused passage: a span of characters in a suspicious
// document and the span it came from in a source document; a detection r is
// a reported passage, two spans in the same shape. Both are sets of
// characters (of both documents). Following the paper:
//
//   - r detects s when r's span in the suspicious document overlaps s's and
//     r's span in the source document overlaps s's (same two documents);
//   - s ⊓ r is s ∩ r when r detects s, and empty otherwise;
//   - precision = 1/|R| Σ_r |∪_s (s ⊓ r)| / |r| (macro-averaged over detections);
//   - recall    = 1/|S| Σ_s |∪_r (s ⊓ r)| / |s| (macro-averaged over cases);
//   - granularity = 1/|S_R| Σ_{s ∈ S_R} |R_s|, where S_R are the cases
//     detected at all and R_s the detections of s (1 is ideal: one detection
//     per case, not shards);
//   - plagdet = F1 / log2(1 + granularity), F1 the harmonic mean of
//     precision and recall.
//
// Where the paper leaves a value open this package chooses (and the tests
// say so): with no detection, precision is 1 if there is no case either,
// else 0; with no case, recall is 1; with no detected case, granularity is 1.
//
// Spans are half-open [Start, End) in whatever character unit the caller
// uses (the benchmark uses Unicode code points). The work is
// O(|S|·|R|) within each document pair, with interval unions sorted once
// per case and per detection: a benchmark has hundreds of each, so nothing
// cleverer is needed. Rejected: materialising character sets as bitmaps,
// which costs memory proportional to document length for no gain here.
package pan

import (
	"cmp"
	"math"
	"slices"
)

// Span is a half-open range of characters [Start, End).
type Span struct{ Start, End int }

// Len is the span's length (0 for an empty or inverted span).
func (s Span) Len() int { return max(0, s.End-s.Start) }

func (s Span) intersect(t Span) Span {
	return Span{max(s.Start, t.Start), min(s.End, t.End)}
}

// A Passage is a case or a detection: characters SuspSpan of document Susp
// and SrcSpan of document Src.
type Passage struct {
	Susp, Src         string
	SuspSpan, SrcSpan Span
}

func (p Passage) size() int { return p.SuspSpan.Len() + p.SrcSpan.Len() }

// detects reports whether detection r detects case s.
func detects(r, s Passage) bool {
	return r.Susp == s.Susp && r.Src == s.Src &&
		r.SuspSpan.intersect(s.SuspSpan).Len() > 0 && r.SrcSpan.intersect(s.SrcSpan).Len() > 0
}

// Scores are the measures of one set of detections against one set of cases.
type Scores struct {
	Precision, Recall, F1, Granularity, Plagdet float64
	Cases, Detections, Detected                 int // |S|, |R|, |S_R|
}

// Evaluate scores detections against cases.
func Evaluate(cases, detections []Passage) Scores {
	sc := Scores{Cases: len(cases), Detections: len(detections), Granularity: 1}
	type key struct{ susp, src string }
	byPair := map[key][]int{}
	for i, s := range cases {
		k := key{s.Susp, s.Src}
		byPair[k] = append(byPair[k], i)
	}
	recallParts := make([][2][]Span, len(cases)) // per case: covered parts in susp, src
	hits := make([]int, len(cases))              // |R_s|
	precSum := 0.0
	for _, r := range detections {
		var susp, src []Span
		for _, i := range byPair[key{r.Susp, r.Src}] {
			s := cases[i]
			if !detects(r, s) {
				continue
			}
			a, b := r.SuspSpan.intersect(s.SuspSpan), r.SrcSpan.intersect(s.SrcSpan)
			susp, src = append(susp, a), append(src, b)
			recallParts[i][0] = append(recallParts[i][0], a)
			recallParts[i][1] = append(recallParts[i][1], b)
			hits[i]++
		}
		if n := r.size(); n > 0 {
			precSum += float64(unionLen(susp)+unionLen(src)) / float64(n)
		}
	}
	switch {
	case len(detections) > 0:
		sc.Precision = precSum / float64(len(detections))
	case len(cases) == 0:
		sc.Precision = 1
	}
	sc.Recall = 1
	if len(cases) > 0 {
		recSum, granSum := 0.0, 0
		for i, s := range cases {
			if n := s.size(); n > 0 {
				recSum += float64(unionLen(recallParts[i][0])+unionLen(recallParts[i][1])) / float64(n)
			}
			if hits[i] > 0 {
				sc.Detected++
				granSum += hits[i]
			}
		}
		sc.Recall = recSum / float64(len(cases))
		if sc.Detected > 0 {
			sc.Granularity = float64(granSum) / float64(sc.Detected)
		}
	}
	if sc.Precision+sc.Recall > 0 {
		sc.F1 = 2 * sc.Precision * sc.Recall / (sc.Precision + sc.Recall)
	}
	sc.Plagdet = sc.F1 / math.Log2(1+sc.Granularity)
	return sc
}

// unionLen is the number of characters in the union of spans.
func unionLen(spans []Span) int {
	if len(spans) == 0 {
		return 0
	}
	spans = slices.Clone(spans)
	slices.SortFunc(spans, func(x, y Span) int { return cmp.Compare(x.Start, y.Start) })
	total := 0
	cur := spans[0]
	for _, s := range spans[1:] {
		if s.Start <= cur.End {
			cur.End = max(cur.End, s.End)
			continue
		}
		total += cur.Len()
		cur = s
	}
	return total + cur.Len()
}
