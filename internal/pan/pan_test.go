package pan

import (
	"math"
	"testing"
)

// TestEvaluateHandComputed checks the measures on a small case computed by
// hand from the definitions of Potthast, Stein, Barrón-Cedeño & Rosso, "An
// Evaluation Framework for Plagiarism Detection" (COLING 2010), section 3
// (definitions restated from memory in the package comment).
//
// Cases, in suspicious document "s" and source document "o":
//
//	c1: s[0,100)   o[0,100)    |c1| = 200
//	c2: s[200,300) o[500,600)  |c2| = 200
//
// Detections:
//
//	r1: s[0,50)    o[0,50)     |r1| = 100, all of it inside c1
//	r2: s[50,120)  o[50,120)   |r2| = 140, 50 + 50 inside c1
//	r3: s[400,450) o[700,750)  |r3| = 100, detects nothing
//
// precision = (100/100 + 100/140 + 0) / 3 = 4/7
// recall    = (200/200 + 0) / 2 = 1/2         (r1 ∪ r2 cover c1 whole)
// granularity = |{r1, r2}| / |{c1}| = 2
// F1 = 2·(4/7)·(1/2) / (4/7 + 1/2) = 8/15
// plagdet = (8/15) / log2(3)
func TestEvaluateHandComputed(t *testing.T) {
	p := func(s0, s1, o0, o1 int) Passage {
		return Passage{Susp: "s", Src: "o", SuspSpan: Span{s0, s1}, SrcSpan: Span{o0, o1}}
	}
	cases := []Passage{p(0, 100, 0, 100), p(200, 300, 500, 600)}
	dets := []Passage{p(0, 50, 0, 50), p(50, 120, 50, 120), p(400, 450, 700, 750)}
	got := Evaluate(cases, dets)
	want := Scores{
		Precision: 4.0 / 7, Recall: 0.5, F1: 8.0 / 15, Granularity: 2,
		Plagdet: (8.0 / 15) / math.Log2(3), Cases: 2, Detections: 3, Detected: 1,
	}
	checkScores(t, got, want)
}

func checkScores(t *testing.T, got, want Scores) {
	t.Helper()
	close := func(a, b float64) bool { return math.Abs(a-b) < 1e-12 }
	if !close(got.Precision, want.Precision) || !close(got.Recall, want.Recall) || !close(got.F1, want.F1) ||
		!close(got.Granularity, want.Granularity) || !close(got.Plagdet, want.Plagdet) ||
		got.Cases != want.Cases || got.Detections != want.Detections || got.Detected != want.Detected {
		t.Errorf("Evaluate = %+v\nwant       %+v", got, want)
	}
}

func TestEvaluateRules(t *testing.T) {
	c := Passage{Susp: "s", Src: "o", SuspSpan: Span{10, 20}, SrcSpan: Span{30, 40}}
	tests := []struct {
		name  string
		cases []Passage
		dets  []Passage
		want  Scores
	}{
		{"an exact detection scores one on every measure", []Passage{c}, []Passage{c},
			Scores{Precision: 1, Recall: 1, F1: 1, Granularity: 1, Plagdet: 1, Cases: 1, Detections: 1, Detected: 1}},
		{"overlap in the suspicious document only does not detect (our reading of the paper)", []Passage{c},
			[]Passage{{Susp: "s", Src: "o", SuspSpan: Span{10, 20}, SrcSpan: Span{0, 10}}},
			Scores{Granularity: 1, Cases: 1, Detections: 1}},
		{"a detection in another document pair detects nothing", []Passage{c},
			[]Passage{{Susp: "s", Src: "x", SuspSpan: Span{10, 20}, SrcSpan: Span{30, 40}}},
			Scores{Granularity: 1, Cases: 1, Detections: 1}},
		{"no detection: precision 0, recall 0 (our choice where the paper is silent)", []Passage{c}, nil,
			Scores{Granularity: 1, Cases: 1}},
		{"no case and no detection: precision and recall 1 (our choice)", nil, nil,
			Scores{Precision: 1, Recall: 1, F1: 1, Granularity: 1, Plagdet: 1}},
		{"two halves: full recall and precision, granularity 2", []Passage{c},
			[]Passage{{Susp: "s", Src: "o", SuspSpan: Span{10, 15}, SrcSpan: Span{30, 35}}, {Susp: "s", Src: "o", SuspSpan: Span{15, 20}, SrcSpan: Span{35, 40}}},
			Scores{Precision: 1, Recall: 1, F1: 1, Granularity: 2, Plagdet: 1 / math.Log2(3), Cases: 1, Detections: 2, Detected: 1}},
		{"overlapping detections count covered characters once for recall", []Passage{c},
			[]Passage{{Susp: "s", Src: "o", SuspSpan: Span{10, 18}, SrcSpan: Span{30, 38}}, {Susp: "s", Src: "o", SuspSpan: Span{12, 20}, SrcSpan: Span{32, 40}}},
			Scores{Precision: 1, Recall: 1, F1: 1, Granularity: 2, Plagdet: 1 / math.Log2(3), Cases: 1, Detections: 2, Detected: 1}},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) { checkScores(t, Evaluate(tc.cases, tc.dets), tc.want) })
	}
}
