package report

import (
	"strings"
	"testing"

	"reprise/pairs"
	"reprise/shingle"
)

// Invented prose: a source passage and copies of it reworded by hand.
const (
	lighthouse = "The keeper of the northern lighthouse climbed the spiral stairs every evening before sunset. " +
		"He polished the great lens until it shone like still water under the moon. " +
		"Fishermen on the distant banks trusted the steady beam more than their own charts. " +
		"During the winter storms he wrote careful notes about the wind, the tides and the passing ships. " +
		"His daughter later gave those weathered notebooks to the harbour museum. " +
		"Visitors still read them to learn how the coast looked a century ago."
	// The same six sentences with about a third of the words changed
	// (synonyms, deletions, insertions) and in another order.
	lighthouseReordered = "Fishermen on the faraway banks relied on the steady beam more than on their charts. " +
		"His daughter afterwards donated those battered notebooks to the harbour museum. " +
		"The keeper of the northern lighthouse mounted the spiral stairs each evening before dusk. " +
		"Visitors today read them to discover how the coast appeared a century earlier. " +
		"He polished the huge lens until it gleamed like calm water under the moon. " +
		"Through the winter storms he kept careful records about the wind, the tides and passing vessels."
	// Sentences split in two and joined into one, words changed, order kept.
	lighthouseSplitJoined = "The keeper of the northern lighthouse climbed the spiral stairs. He did so every evening before sunset, " +
		"and he polished the great lens until it shone like quiet water under the moon. " +
		"Fishermen on the distant banks trusted the beam more than their own charts, and during the winter storms " +
		"he wrote careful notes about the wind, the tides and the ships. His daughter later gave those notebooks " +
		"to the harbour museum. Visitors still read them. They learn how the coast looked a century ago."
	prefaceA = "This report opens with a long account of the orchard budget, the pruning rota and the pressing of apples in October, " +
		"none of which the other text mentions at any point whatsoever."
	prefaceB = "Another document begins here with remarks on railway timetables, the price of coal and a quarrel between two clerks, " +
		"then turns to quite other business."
	tailA = "The orchard accounts close with a table of receipts and a note on the cider sold at the autumn fair."
	tailB = "Timetable notes end with a list of stations, a complaint about late trains and the clerk's signature."
)

func buildReworded(t *testing.T, a, b Doc, excluded []uint64) *Result {
	t.Helper()
	res, err := Build(Input{Docs: []Doc{a, b}, Engine: &pairs.Result{Pairs: []pairs.Pair{{A: 0, B: 1, Shared: 4}}},
		Excluded: excluded, Chaining: &Chaining{MinWords: 24, Reworded: &Reworded{MinSimilarity: 0.4, Gap: 5}}})
	if err != nil {
		t.Fatal(err)
	}
	return res
}

func TestRewordedPassages(t *testing.T) {
	for _, tc := range []struct {
		name string
		copy string
	}{
		{"reordered sentences with a third of the words changed are one passage", lighthouseReordered},
		{"split and joined sentences are one passage", lighthouseSplitJoined},
		{"a verbatim copy is one passage", lighthouse},
	} {
		t.Run(tc.name, func(t *testing.T) {
			a := prefaceA + "\n\n" + lighthouse + "\n\n" + tailA
			b := prefaceB + "\n\n" + tc.copy + "\n\n" + tailB
			res := buildReworded(t, wordDoc("a.txt", a, 5), wordDoc("b.txt", b, 5), nil)
			if len(res.Pairs) != 1 || len(res.Pairs[0].Passages) != 1 {
				t.Fatalf("pairs %d (unconfirmed %d), want one pair with one passage: %+v", len(res.Pairs), res.Summary.Unconfirmed, res.Pairs)
			}
			g := res.Pairs[0].Passages[0]
			wantA := strings.Index(a, lighthouse)
			if g.AStart != wantA || g.AEnd != wantA+len(lighthouse) {
				t.Errorf("A passage %q, want the source passage", a[g.AStart:g.AEnd])
			}
			wantB := strings.Index(b, tc.copy)
			if g.BStart != wantB || g.BEnd != wantB+len(tc.copy) {
				t.Errorf("B passage %q, want the copy", b[g.BStart:g.BEnd])
			}
			e := g.Explained
			if e == nil || e.BText != tc.copy || e.Terms == 0 || len(e.AShared) == 0 || len(e.BShared) == 0 {
				t.Fatalf("explanation %+v", e)
			}
			// Every marked word of B is a word whose term A's side has, and
			// the marks of "keeper" and "lighthouse" are there on both sides.
			aMarked := map[string]bool{}
			for _, m := range e.AShared {
				aMarked[strings.ToLower(g.Text[m[0]:m[1]])] = true
			}
			for _, w := range []string{"keeper", "lighthouse", "museum"} {
				if !aMarked[w] {
					t.Errorf("%q is not marked shared in A: %s", w, MarkShared(g.Text, e.AShared, "[", "]"))
				}
			}
			for _, m := range e.BShared {
				w := strings.ToLower(e.BText[m[0]:m[1]])
				if !strings.Contains(strings.ToLower(lighthouse), stemOf(w)) {
					t.Errorf("B's marked word %q is not in the source", w)
				}
			}
		})
	}
}

func TestRewordedTrimsToWhereTheSidesAgree(t *testing.T) {
	// The source goes on about the keeper after the passage copied
	// verbatim: the extension takes that neighbour in (it shares "keeper",
	// "lighthouse", "lens"), the trimming takes it out again, since none of
	// its words is in a shingle the copy has.
	neighbour := "Each winter the keeper of the lighthouse also painted the lens housing and the iron stairs."
	a := prefaceA + "\n\n" + lighthouse + " " + neighbour + "\n\n" + tailA
	b := prefaceB + "\n\n" + lighthouse + "\n\n" + tailB
	da, db := wordDoc("a.txt", a, 5), wordDoc("b.txt", b, 5)
	in := Input{Docs: []Doc{da, db}}
	qa, _ := in.quote(0, nil)
	qb, _ := in.quote(1, nil)
	ta, tb := qa.termText(), qb.termText()
	rw := &Reworded{MinSimilarity: 0.4, Gap: 5}
	untrimmed := rewordedPassages(rw, qa, qb, ta, tb, evidence(qa, qb, ta), evidence(qb, qa, tb), 24)
	wantA, wantEnd := strings.Index(a, lighthouse), strings.Index(a, lighthouse)+len(lighthouse)
	if len(untrimmed) != 1 || untrimmed[0].aEnd <= wantEnd {
		t.Fatalf("control: the sentence alignment alone gives %+v; want one passage running into the neighbour (A's copy ends at %d)", untrimmed, wantEnd)
	}
	res := buildReworded(t, da, db, nil)
	if len(res.Pairs) != 1 || len(res.Pairs[0].Passages) != 1 {
		t.Fatalf("pairs %+v, want one pair with one passage", res.Pairs)
	}
	if g := res.Pairs[0].Passages[0]; g.AStart != wantA || g.AEnd != wantEnd {
		t.Errorf("A passage %q, want the copied sentences only", a[g.AStart:g.AEnd])
	}
}

func TestRewordedShortVerbatimFragments(t *testing.T) {
	for _, tc := range []struct {
		name     string
		fragment string
		reported bool
	}{
		{"three short sentences copied verbatim are a passage", "So sorry, my friend. Limited interests, sadly. So sorry again, truly.", true},
		{"a verbatim run of under ten words is not", "So sorry, my friend. Limited interests.", false},
	} {
		t.Run(tc.name, func(t *testing.T) {
			a := prefaceA + "\n\n“" + tc.fragment + "”\n\n" + tailA
			b := prefaceB + "\n\n“" + tc.fragment + "”\n\n" + tailB
			res := buildReworded(t, wordDoc("a.txt", a, 5), wordDoc("b.txt", b, 5), nil)
			if !tc.reported {
				if len(res.Pairs) != 0 {
					t.Fatalf("pairs %+v, want none", res.Pairs)
				}
				return
			}
			if len(res.Pairs) != 1 || len(res.Pairs[0].Passages) != 1 {
				t.Fatalf("pairs %+v (unconfirmed %d), want one pair with one passage", res.Pairs, res.Summary.Unconfirmed)
			}
			// The quotation marks written against the first and last word
			// are part of the passage.
			quotedA := "“" + tc.fragment + "”"
			g := res.Pairs[0].Passages[0]
			if want := strings.Index(a, quotedA); g.AStart != want || g.AEnd != want+len(quotedA) {
				t.Errorf("A passage %q, want %q", a[g.AStart:g.AEnd], quotedA)
			}
			if want := strings.Index(b, quotedA); g.BStart != want || g.BEnd != want+len(quotedA) {
				t.Errorf("B passage %q, want %q", b[g.BStart:g.BEnd], quotedA)
			}
		})
	}
}

func stemOf(w string) string { return string(stem([]byte(w))) }

func TestRewordedDropsWhatItCannotConfirm(t *testing.T) {
	t.Run("unrelated texts sharing one phrase are not reported", func(t *testing.T) {
		phrase := " It was at the end of the day that the work was done."
		a := prefaceA + phrase + " " + tailA
		b := prefaceB + phrase + " " + tailB
		res := buildReworded(t, wordDoc("a.txt", a, 5), wordDoc("b.txt", b, 5), nil)
		if len(res.Pairs) != 0 || res.Summary.Unconfirmed != 1 || res.Summary.Pairs != 0 || len(res.Clusters) != 0 {
			t.Fatalf("pairs %d, unconfirmed %d, clusters %d: want the pair dropped", len(res.Pairs), res.Summary.Unconfirmed, len(res.Clusters))
		}
	})
	t.Run("a shared template never seeds a passage", func(t *testing.T) {
		a := lighthouse + "\n\n" + prefaceA + " " + tailA
		b := lighthouse + "\n\n" + prefaceB + " " + tailB
		tmpl, _ := shingle.New(shingle.Options{Unit: shingle.UnitWords, ShingleWords: 5}).Units(lighthouse, nil)
		var excluded []uint64
		for _, u := range tmpl {
			excluded = append(excluded, u.Hash)
		}
		// Control: the same texts with no template share a passage.
		if res := buildReworded(t, wordDoc("a.txt", a, 5), wordDoc("b.txt", b, 5), nil); len(res.Pairs) != 1 {
			t.Fatalf("without the template: pairs %+v, want one", res.Pairs)
		}
		res := buildReworded(t, wordDoc("a.txt", a, 5), wordDoc("b.txt", b, 5), excluded)
		if len(res.Pairs) != 0 || res.Summary.Unconfirmed != 1 {
			t.Fatalf("pairs %+v: want the template pair dropped", res.Pairs)
		}
	})
}

func TestTermText(t *testing.T) {
	text := "The exam-\nple was hard. Was it?\n\nA new paragraph starts here"
	tt := newTermText(text)
	var sentences []string
	for _, s := range tt.sentences {
		sentences = append(sentences, text[s.start:s.end])
	}
	want := []string{"The exam-\nple was hard.", "Was it?", "A new paragraph starts here"}
	if strings.Join(sentences, "|") != strings.Join(want, "|") {
		t.Errorf("sentences %q, want %q", sentences, want)
	}
	if w := text[tt.tokens[1].start:tt.tokens[1].end]; w != "exam-\nple" {
		t.Errorf("word hyphenated across a line break: %q", w)
	}
	tt.fill(0)
	if tt.tokens[1].term != termOf([]byte("example")) {
		t.Error("the hyphenated word's term is not that of the whole word")
	}
	if w := text[tt.tokens[8].start:tt.tokens[8].end]; w != "paragraph" || tt.tokens[8].term != 0 {
		t.Errorf("token 8 %q has a term before its sentence is filled", w)
	}
	tt.fillWithin(len(text)-5, len(text))
	if tt.tokens[8].term != termOf([]byte("paragraph")) {
		t.Error("fillWithin left the last sentence without terms")
	}
	if termOf([]byte("the")) != 0 || termOf([]byte("it")) != 0 {
		t.Error("function words and short words give a term")
	}
	if termOf([]byte("walked")) != termOf([]byte("walks")) || termOf([]byte("walking")) != termOf([]byte("walk")) {
		t.Error("suffixes are not removed alike")
	}
}

func TestASCIITermBytes(t *testing.T) {
	for c := range 128 {
		if isASCIITermByte(byte(c)) != isTermRune(rune(c)) {
			t.Errorf("byte %#x: isASCIITermByte %v, isTermRune %v", c, isASCIITermByte(byte(c)), isTermRune(rune(c)))
		}
	}
}

func TestStopWordsFitTheLengthBound(t *testing.T) {
	for w := range stopWords {
		if len(w) > maxStopWord {
			t.Errorf("stop word %q is longer than maxStopWord (%d): termOf would not look it up", w, maxStopWord)
		}
	}
}

func TestMarkShared(t *testing.T) {
	got := MarkShared("one two three", [][2]int{{0, 3}, {8, 13}}, "[", "]")
	if got != "[one] two [three]" {
		t.Errorf("got %q", got)
	}
	if got := MarkShared("short", [][2]int{{2, 40}}, "[", "]"); got != "short" {
		t.Errorf("a mark past the end: %q", got)
	}
}

func TestRewordedJSONMatchesEncodingJSON(t *testing.T) {
	a := prefaceA + "\n\n" + lighthouse + "\n\n" + tailA
	b := prefaceB + "\n\n" + lighthouseReordered + "\n\n" + tailB
	res := buildReworded(t, wordDoc("a.txt", a, 5), wordDoc("b.txt", b, 5), nil)
	if len(res.Pairs) != 1 || res.Pairs[0].Passages[0].Explained == nil {
		t.Fatalf("want one explained passage: %+v", res.Pairs)
	}
	res.Texts = nil
	sameAsReference(t, res) // WriteJSON and WriteNDJSON against encoding/json
}
