package report

import (
	"bytes"
	"flag"
	"fmt"
	"math/rand/v2"
	"os"
	"path/filepath"
	"reflect"
	"slices"
	"strings"
	"testing"

	"reprise/corpus"
	"reprise/pairs"
	"reprise/shingle"
)

var update = flag.Bool("update", false, "rewrite the golden files in testdata/")

// doc builds a report.Doc from sentences joined by single spaces, giving
// each sentence the fingerprint named by its label (the text before ':').
func doc(path string, sentences ...string) Doc {
	d := Doc{Path: path, Format: "text", Encoding: "utf-8"}
	var b strings.Builder
	for i, s := range sentences {
		label, text, _ := strings.Cut(s, ":")
		if i > 0 {
			b.WriteByte(' ')
		}
		start := b.Len()
		b.WriteString(text)
		var h uint64
		for _, c := range label {
			h = h*31 + uint64(c)
		}
		d.Units = append(d.Units, shingle.Unit{Hash: h, Start: uint32(start), End: uint32(b.Len()),
			Words: uint32(shingle.CountWords(text))})
	}
	d.Text = b.String()
	d.Words = shingle.CountWords(d.Text)
	return d
}

func hashOf(label string) uint64 {
	var h uint64
	for _, c := range label {
		h = h*31 + uint64(c)
	}
	return h
}

func TestAlignFindsMaximalRunsInBothOrders(t *testing.T) {
	a := doc("a.txt", "x:One two three four five.", "p:Six seven eight nine ten.", "q:Eleven twelve thirteen fourteen.",
		"r:Fifteen sixteen seventeen eighteen.", "y:Nineteen twenty twentyone twentytwo.")
	b := doc("b.txt", "q:Eleven twelve thirteen fourteen.", "r:Fifteen sixteen seventeen eighteen.", "z:Other words here now.",
		"p:Six seven eight nine ten.")
	res, err := Build(Input{Docs: []Doc{a, b}, Engine: &pairs.Result{Pairs: []pairs.Pair{{A: 0, B: 1, Shared: 3}}}})
	if err != nil {
		t.Fatal(err)
	}
	got := res.Pairs[0].Passages
	// Two runs: [p] at A1/B3 and [q r] at A2..3/B0..1, ordered by start in A.
	if len(got) != 2 {
		t.Fatalf("want 2 passages, got %+v", got)
	}
	if got[0].Units != 1 || got[0].Text != "Six seven eight nine ten." {
		t.Errorf("first passage %+v", got[0])
	}
	if got[1].Units != 2 || got[1].Text != "Eleven twelve thirteen fourteen. Fifteen sixteen seventeen eighteen." {
		t.Errorf("second passage %+v", got[1])
	}
	if b.Text[got[1].BStart:got[1].BEnd] != got[1].Text {
		t.Errorf("B span %d:%d does not hold the passage", got[1].BStart, got[1].BEnd)
	}
}

func TestScoresByHand(t *testing.T) {
	// A: 4 units, 18 words; B: 3 units, 13 words; shared p, q (2 units).
	a := doc("a.txt", "p:One two three four five.", "q:Six seven eight nine.", "x:Ten eleven twelve thirteen fourteen.", "y:Fifteen sixteen seventeen eighteen.")
	b := doc("b.txt", "p:One two three four five.", "q:Six seven eight nine.", "z:Four more words here.")
	if a.Words != 18 || b.Words != 13 {
		t.Fatalf("word counts %d, %d; the hand computation below assumes 18, 13", a.Words, b.Words)
	}
	res, err := Build(Input{Docs: []Doc{a, b}, Engine: &pairs.Result{Pairs: []pairs.Pair{{A: 0, B: 1, Shared: 2}}}})
	if err != nil {
		t.Fatal(err)
	}
	p := res.Pairs[0]
	// One passage of 9 words; coverage_a = 9/18, coverage_b = 9/13 = 0.6923;
	// jaccard = 2 / (4 + 3 - 2) = 0.4; score = max = 0.6923.
	if len(p.Passages) != 1 || p.Passages[0].Words != 9 {
		t.Fatalf("passages %+v", p.Passages)
	}
	for name, c := range map[string][2]float64{
		"coverage_a": {p.CoverageA, 0.5}, "coverage_b": {p.CoverageB, 0.6923},
		"jaccard": {p.Jaccard, 0.4}, "score": {p.Score, 0.6923},
		"reused a": {res.Documents[0].Reused, 0.5}, "reused b": {res.Documents[1].Reused, 0.6923},
	} {
		if c[0] != c[1] {
			t.Errorf("%s = %v, want %v", name, c[0], c[1])
		}
	}
}

func TestSetAsideUnitsBreakPassages(t *testing.T) {
	a := doc("a.txt", "p:One two three four five.", "t:Template words in the middle.", "q:Six seven eight nine.")
	b := doc("b.txt", "p:One two three four five.", "t:Template words in the middle.", "q:Six seven eight nine.")
	res, err := Build(Input{Docs: []Doc{a, b}, Excluded: []uint64{hashOf("t")},
		Engine: &pairs.Result{Pairs: []pairs.Pair{{A: 0, B: 1, Shared: 2}}}})
	if err != nil {
		t.Fatal(err)
	}
	p := res.Pairs[0]
	if len(p.Passages) != 2 {
		t.Fatalf("a template sentence must split the passage: %+v", p.Passages)
	}
	// Jaccard over counted units only: 2 / (2 + 2 - 2).
	if p.Jaccard != 1 {
		t.Errorf("jaccard %v, want 1 (template units are not in the unit sets)", p.Jaccard)
	}
}

func TestLinesCountCRLFAndBOM(t *testing.T) {
	text := "\ufeffTitle line\r\n\r\nFirst sentence of the text.\r\nSecond one here."
	var x lineIndex
	for offset, want := range map[int]int{0: 1, 3: 1, 15: 2, strings.Index(text, "First"): 3, strings.Index(text, "Second"): 4, len(text) - 1: 4} {
		if got := x.line(text, offset); got != want {
			t.Errorf("offset %d: line %d, want %d", offset, got, want)
		}
	}
}

func TestRankingBreaksTiesByPaths(t *testing.T) {
	same := []string{"p:One two three four five.", "q:Six seven eight nine."}
	docs := []Doc{doc("c.txt", same...), doc("a.txt", same...), doc("b.txt", same...)}
	eng := &pairs.Result{Pairs: []pairs.Pair{{A: 0, B: 1, Shared: 2}, {A: 0, B: 2, Shared: 2}, {A: 1, B: 2, Shared: 2}}}
	res, err := Build(Input{Docs: docs, Engine: eng})
	if err != nil {
		t.Fatal(err)
	}
	var order []string
	for _, p := range res.Pairs {
		order = append(order, p.A+"~"+p.B)
	}
	// Pairs keep engine order of documents (A is the lower ID); equal scores rank by paths.
	if got, want := strings.Join(order, " "), "a.txt~b.txt c.txt~a.txt c.txt~b.txt"; got != want {
		t.Errorf("ranking %q, want %q", got, want)
	}
}

func TestCSVCellsCannotRunAsFormulas(t *testing.T) {
	for in, want := range map[string]string{"=HYPERLINK(1)": "'=HYPERLINK(1)", "+1": "'+1", "@x": "'@x", "plain": "plain", "": ""} {
		if got := safeCell(in); got != want {
			t.Errorf("safeCell(%q) = %q, want %q", in, got, want)
		}
	}
}

func TestCleanRemovesTerminalEscapes(t *testing.T) {
	if got := clean("evil\x1b[31mred\x07 name\u200b.txt"); strings.ContainsAny(got, "\x1b\x07\u200b") {
		t.Errorf("clean left control characters: %q", got)
	}
}

// TestGolden renders a fixed result in every format and compares it with
// testdata/golden.*; run 'go test ./report -update' after an intended change.
func TestGolden(t *testing.T) {
	a := doc("essays/ana.txt", "p:The bridge was built in 1903 by the town.", "q:It carried carts and later cars across the river.",
		"r:Today only people on foot may cross it.", "x:I like to walk there on Sundays with my dog.")
	b := doc("essays/ben.txt", "y:My grandfather told me a story about the bridge.", "p:The bridge was built in 1903 by the town.",
		"q:It carried carts and later cars across the river.", "r:Today only people on foot may cross it.")
	c := doc("essays/cy.txt", "c:Write about a building in your town.", "z:The library has a new roof made of copper.")
	eng := &pairs.Result{
		Pairs:     []pairs.Pair{{A: 0, B: 1, Shared: 3}},
		Clusters:  [][]uint32{{0, 1}},
		Common:    []pairs.CommonUnit{{Hash: hashOf("c"), Docs: 9, First: 2}},
		MaxDocs:   5,
		MinShared: 3,
		Counter:   pairs.CounterTriangular,
	}
	res, err := Build(Input{Docs: []Doc{a, b, c}, Engine: eng,
		Skipped:  []Skipped{{Path: "essays/=cmd.txt", Reason: "empty file"}},
		Settings: Settings{Version: "test", Unit: "sentence", MinShared: 3, MinWords: 5, MaxDocs: 5, MaxUnitBytes: 2000}})
	if err != nil {
		t.Fatal(err)
	}
	for _, format := range Formats {
		var buf bytes.Buffer
		if err := Write(&buf, res, format, TextOptions{}); err != nil {
			t.Fatal(err)
		}
		golden := filepath.Join("testdata", "golden."+format)
		if *update {
			if err := os.WriteFile(golden, buf.Bytes(), 0o644); err != nil {
				t.Fatal(err)
			}
			continue
		}
		want, err := os.ReadFile(golden)
		if err != nil {
			t.Fatalf("%v (run go test ./report -update)", err)
		}
		if !bytes.Equal(buf.Bytes(), want) {
			t.Errorf("%s rendering differs from %s:\n%s", format, golden, buf.String())
		}
		if !strings.Contains(buf.String(), "not proof of misconduct") {
			t.Errorf("%s rendering lacks the caution", format)
		}
	}
}

func TestWhereNamesPagesParagraphsOrLines(t *testing.T) {
	marks := []corpus.Mark{{Offset: 0, Page: 1, Paragraph: 1}, {Offset: 100, Page: 1, Paragraph: 2}, {Offset: 250, Page: 2, Paragraph: 3}}
	chapters := []corpus.Mark{{Offset: 10, Chapter: 2, Paragraph: 7}}
	tests := []struct {
		name   string
		marks  []corpus.Mark
		offset int
		want   string
	}{
		{"no marks: the line", nil, 40, "line 3"},
		{"at a mark: that mark", marks, 100, "page 1, paragraph 2"},
		{"between marks: the earlier one", marks, 249, "page 1, paragraph 2"},
		{"after the last mark", marks, 9000, "page 2, paragraph 3"},
		{"chapter and paragraph", chapters, 11, "chapter 2, paragraph 7"},
		{"before the first mark: the line", chapters, 5, "line 3"},
	}
	for _, tc := range tests {
		if got := where(tc.marks, tc.offset, 3); got != tc.want {
			t.Errorf("%s: where = %q, want %q", tc.name, got, tc.want)
		}
	}
}

// TestBuildSameForEveryJobs: aligning pairs on several goroutines gives the
// result of aligning them one at a time, for sentences and word chaining;
// and a document in no pair may come without its text and units.
func TestBuildSameForEveryJobs(t *testing.T) {
	rng := rand.New(rand.NewPCG(7, 7))
	labels := []string{"a", "b", "c", "d", "e", "f", "g", "h"}
	var docs []Doc
	for i := range 40 {
		var ss []string
		for k := range 6 + rng.IntN(6) {
			l := labels[rng.IntN(len(labels))]
			ss = append(ss, fmt.Sprintf("%s:Sentence %s number %d here.", l, l, k))
		}
		if i == 2 || i == 5 || i == 9 { // sentences of their own, quoted as common units below
			ss = append(ss, fmt.Sprintf("z:Only document %d has this one.", i), fmt.Sprintf("z:And this one is document %d's.", i))
		}
		docs = append(docs, doc(fmt.Sprintf("d%02d.txt", i), ss...))
	}
	eng := &pairs.Result{}
	for a := range 30 {
		for b := a + 1; b < 30; b += 1 + rng.IntN(4) {
			eng.Pairs = append(eng.Pairs, pairs.Pair{A: uint32(a), B: uint32(b), Shared: 2})
		}
	}
	// Common units, several from one first holder, holders out of order:
	// each is quoted from its holder's text.
	for _, c := range []struct{ k, back int }{{5, 1}, {2, 2}, {5, 2}, {9, 1}, {2, 1}} {
		u := docs[c.k].Units[len(docs[c.k].Units)-c.back]
		eng.Common = append(eng.Common, pairs.CommonUnit{Hash: u.Hash, Docs: 3, First: uint32(c.k)})
	}
	// Documents 30..39 are in no pair: they are given by their counts only.
	for i := 30; i < 40; i++ {
		docs[i].UnitCount, docs[i].Units, docs[i].Text = len(docs[i].Units), nil, ""
	}
	for _, ch := range []*Chaining{nil, {Gap: 3}} {
		one, err := Build(Input{Docs: docs, Engine: eng, Chaining: ch, Jobs: 1})
		if err != nil {
			t.Fatal(err)
		}
		if len(one.Pairs) != len(eng.Pairs) {
			t.Fatalf("%d pairs reported of %d", len(one.Pairs), len(eng.Pairs))
		}
		for _, c := range eng.Common {
			d := docs[c.First]
			want := ""
			for _, u := range d.Units {
				if u.Hash == c.Hash {
					want = d.Text[u.Start:u.End]
					break
				}
			}
			if !slices.ContainsFunc(one.Common, func(x Common) bool { return x.Text == want && want != "" }) {
				t.Errorf("common unit of %s: %q not among %v", d.Path, want, one.Common)
			}
		}
		if got := one.Documents[35].Units; got != docs[35].UnitCount {
			t.Errorf("a document given by its count shows %d units, want %d", got, docs[35].UnitCount)
		}
		for _, jobs := range []int{2, 8} {
			many, err := Build(Input{Docs: docs, Engine: eng, Chaining: ch, Jobs: jobs})
			if err != nil {
				t.Fatal(err)
			}
			if !reflect.DeepEqual(many, one) {
				t.Errorf("chaining %v, Jobs %d: the result differs from Jobs 1", ch != nil, jobs)
			}
		}
	}
	// A pair naming a document without its units is an error, not a guess.
	eng.Pairs = append(eng.Pairs, pairs.Pair{A: 1, B: 35, Shared: 2})
	if _, err := Build(Input{Docs: docs, Engine: eng}); err == nil || !strings.Contains(err.Error(), "d35.txt") {
		t.Errorf("a pair with a document given without units: error %v", err)
	}
}
