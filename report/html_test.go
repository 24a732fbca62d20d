package report

import (
	"bytes"
	"cmp"
	"crypto/sha256"
	"encoding/base64"
	"encoding/json"
	"fmt"
	"html"
	"math/rand/v2"
	"regexp"
	"slices"
	"strings"
	"testing"

	"reprise/pairs"
)

// hostileResult builds a Result by hand whose every string is hostile and
// whose documents are long (n passages each, texts of size bytes).
func hostileResult(t *testing.T, docs, passages, size int, filler string) *Result {
	t.Helper()
	r := &Result{Format: FormatVersion, Caution: Caution, Settings: Settings{Unit: "sentence", MinShared: 3, MinWords: 5, MaxDocs: 5,
		MaxDocsRule: `<b>"rule"</b>`, Version: "0", Exclude: []string{`<x>`}, Include: []string{}, Skip: []string{}}}
	text := strings.Repeat(filler, size/len(filler)+1)[:size]
	name := func(i int) string { return fmt.Sprintf(`<script>"'&%s%d.txt`, strings.Repeat("<", 40), i) }
	for i := 0; i < docs; i++ {
		r.Documents = append(r.Documents, Document{Path: name(i), Words: 10, Notes: []string{`<i>note</i>`}})
		r.Texts = append(r.Texts, SourceText{Text: text})
	}
	for i := 0; i+1 < docs; i++ {
		p := Pair{A: name(i), B: name(i + 1), Shared: 3, Score: 0.5, CoverageA: 0.5, CoverageB: 0.25}
		step := max(1, size/(passages+1))
		for k := 0; k < passages; k++ {
			s := min(size-1, k*step+step/2)
			e := min(size, s+step/3+1)
			p.Passages = append(p.Passages, Passage{AStart: s, AEnd: e, BStart: s, BEnd: e, AWhere: "line <1>", BWhere: `line "2"`,
				Units: 1, Words: 5, Text: text[s:e]})
		}
		r.Pairs = append(r.Pairs, p)
	}
	r.Skipped = []Skipped{{Path: `<img src=x onerror=alert(1)>`, Reason: `"binary" <b>`}}
	r.Common = []Common{{Text: `</style><script>alert(1)</script>`, Documents: 9}}
	r.Groups = []Group{{Documents: []string{name(0), name(1), name(2)}, Shared: 3}}
	r.Clusters = []Cluster{{Documents: func() []string {
		var all []string
		for i := 0; i < docs; i++ {
			all = append(all, name(i))
		}
		return all
	}()}}
	r.Summary = Summary{Documents: docs, Pairs: len(r.Pairs), Skipped: 1, Groups: 1, CommonUnits: 1}
	return r
}

func render(t *testing.T, r *Result, opt HTMLOptions) []byte {
	t.Helper()
	var b bytes.Buffer
	if err := WriteHTML(&b, r, opt); err != nil {
		t.Fatal(err)
	}
	return b.Bytes()
}

func TestHTMLPageStaysUnderItsSizeBound(t *testing.T) {
	for _, c := range []struct {
		name                    string
		docs, passages, size    int
		filler                  string
		pairs                   int
		wantDetailedTextAtLeast int
	}{
		{"short documents are shown whole", 4, 3, 2000, "Plain words here. ", 0, 2000},
		{"long documents show passages in context", 5, 50, 400_000, "A long text goes on. ", 0, htmlContext},
		{"text made only of characters that escape", 5, 300, 200_000, `<"'&>`, 0, htmlContext},
		{"one passage longer than a window", 3, 1, 300_000, "word ", 0, htmlWindowMax / 2},
		{"table only: no detail views beyond N", 40, 2, 30_000, "<b>x</b> ", 3, 1},
		{"a first screen of 2: the rest as data", 40, 20, 60_000, `<"'&>`, 30, htmlContext},
	} {
		t.Run(c.name, func(t *testing.T) {
			r := hostileResult(t, c.docs, c.passages, c.size, c.filler)
			opt := HTMLOptions{Pairs: c.pairs}
			if c.pairs == 30 {
				opt.Screen = 2
			}
			out := render(t, r, opt)
			bound := HTMLSizeBound(r, opt)
			if int64(len(out)) > bound {
				t.Errorf("page %d bytes, over its bound %d", len(out), bound)
			}
			details := bytes.Count(out, []byte(`<section class="pair block"`))
			later := bytes.Count(out, []byte(`<script type="application/json" id="pair-data-`))
			if want := opt.detailed(len(r.Pairs)); details+later != want || details != min(want, opt.screen()) {
				t.Errorf("%d detail views and %d kept as data, want %d in all, %d as HTML", details, later, want, min(want, opt.screen()))
			}
			if c.size > htmlFullText && bytes.Count(out, []byte(`class="gap"`)) == 0 {
				t.Errorf("a long document shows no gap")
			}
			t.Logf("%d bytes, bound %d", len(out), bound)
		})
	}
}

func TestHTMLEscapesEverythingFromInput(t *testing.T) {
	for _, opt := range []HTMLOptions{{}, {Screen: 1}} {
		t.Run(fmt.Sprintf("screen %d", opt.screen()), func(t *testing.T) { testHTMLEscapes(t, opt) })
	}
}

// testHTMLEscapes checks a hostile result's page: with Screen 1 most of it
// is in the page's data blocks.
func testHTMLEscapes(t *testing.T, opt HTMLOptions) {
	r := hostileResult(t, 4, 2, 500, `<script>alert(1)</script> " onmouseover="x" <img src=x onerror=y> `)
	r.Groups = append(r.Groups, r.Groups[0])
	out := string(render(t, r, opt))
	// The page's own script, and its data blocks (never run: not a script type).
	if n, data := strings.Count(out, "<script"), strings.Count(out, `<script type="application/json" id="`); n != data+1 || strings.Count(out, "<script>") != 1 {
		t.Errorf("%d <script elements, %d of them data blocks: want only the page's own script and its data", n, data)
	}
	for _, bad := range []string{"<img", "<b>", "<i>", "</style><", `onmouseover="x"`} {
		if strings.Contains(out, bad) {
			t.Errorf("input markup %q reached the page unescaped", bad)
		}
	}
	if !strings.Contains(out, "&lt;script&gt;alert(1)&lt;/script&gt;") {
		t.Errorf("document text not shown escaped")
	}
}

func TestHTMLPolicyAllowsOnlyItsOwnStyleAndScript(t *testing.T) {
	out := string(render(t, hostileResult(t, 3, 2, 500, "words "), HTMLOptions{}))
	csp := regexp.MustCompile(`http-equiv="Content-Security-Policy" content="([^"]*)"`).FindStringSubmatch(out)
	if csp == nil {
		t.Fatal("no Content-Security-Policy meta")
	}
	policy := html.UnescapeString(csp[1])
	hash := func(s string) string {
		sum := sha256.Sum256([]byte(s))
		return "'sha256-" + base64.StdEncoding.EncodeToString(sum[:]) + "'"
	}
	style := regexp.MustCompile(`(?s)<style>(.*?)</style>`).FindStringSubmatch(out)
	script := regexp.MustCompile(`(?s)<script>(.*?)</script>`).FindStringSubmatch(out)
	if style == nil || script == nil {
		t.Fatal("no inline style or script")
	}
	for _, want := range []string{"default-src 'none'", "style-src " + hash(style[1]) + ";", "script-src " + hash(script[1]) + ";", "connect-src 'none'", "img-src 'none'"} {
		if !strings.Contains(policy, want) {
			t.Errorf("policy %q lacks %q", policy, want)
		}
	}
	if strings.Contains(out, " style=") || strings.Contains(out, "http://") || strings.Contains(out, "https://") {
		t.Errorf("the page has an inline style attribute or an outside address")
	}
}

func TestHTMLIsDeterministic(t *testing.T) {
	r := hostileResult(t, 6, 4, 30_000, "Same words each time. ")
	if a, b := render(t, r, HTMLOptions{}), render(t, r, HTMLOptions{}); !bytes.Equal(a, b) {
		t.Error("two renderings of one result differ")
	}
}

func TestHTMLSaysWhyATextIsMissing(t *testing.T) {
	r := hostileResult(t, 2, 2, 500, "words ")
	r.Texts[1] = SourceText{Missing: "the file has changed since the scan"}
	out := string(render(t, r, HTMLOptions{}))
	if !strings.Contains(out, "The text is not shown: the file has changed since the scan.") {
		t.Error("a missing text is not explained")
	}
	// Offsets that do not fit the text are refused, not sliced.
	r.Texts[1] = SourceText{Text: "short"}
	if out := string(render(t, r, HTMLOptions{})); !strings.Contains(out, "offsets do not fit this text") {
		t.Error("offsets outside the text are not explained")
	}
}

func TestSideWindowsRules(t *testing.T) {
	long := strings.Repeat("abcdefghij", 10_000) // 100,000 bytes
	for _, c := range []struct {
		name  string
		text  string
		spans []span
		check func(t *testing.T, ws []span)
	}{
		{"a short text is one window, all of it", "short text", []span{{0, 5}}, func(t *testing.T, ws []span) {
			if len(ws) != 1 || ws[0] != (span{0, 10}) {
				t.Errorf("windows %v", ws)
			}
		}},
		{"a long text shows each passage with context", long, []span{{50_000, 50_100}, {90_000, 90_010}}, func(t *testing.T, ws []span) {
			want := []span{{50_000 - htmlContext, 50_100 + htmlContext}, {90_000 - htmlContext, 90_010 + htmlContext}}
			if fmt.Sprint(ws) != fmt.Sprint(want) {
				t.Errorf("windows %v, want %v", ws, want)
			}
		}},
		{"overlapping contexts merge", long, []span{{50_000, 50_100}, {50_200, 50_300}}, func(t *testing.T, ws []span) {
			if len(ws) != 1 || ws[0] != (span{50_000 - htmlContext, 50_300 + htmlContext}) {
				t.Errorf("windows %v", ws)
			}
		}},
		{"a window longer than the cap shows head and tail", long, []span{{10_000, 30_000}}, func(t *testing.T, ws []span) {
			if len(ws) != 2 || ws[0].end-ws[0].start != htmlWindowMax/2 || ws[1].end != 30_000+htmlContext {
				t.Errorf("windows %v", ws)
			}
		}},
		{"the side budget stops the windows", long, func() []span {
			var s []span
			for k := 0; k < 90; k++ {
				s = append(s, span{k * 1000, k*1000 + 100})
			}
			return s
		}(), func(t *testing.T, ws []span) {
			total := 0
			for _, w := range ws {
				total += w.end - w.start
			}
			if total > htmlSideBudget || len(ws) == 0 {
				t.Errorf("%d bytes in %d windows, budget %d", total, len(ws), htmlSideBudget)
			}
		}},
	} {
		t.Run(c.name, func(t *testing.T) { c.check(t, sideWindows(c.text, c.spans)) })
	}
}

func TestBuildKeepsTextsBesideTheResult(t *testing.T) {
	a := doc("a.txt", "p:One two three four five.", "q:Six seven eight nine ten.", "r:Eleven twelve thirteen fourteen.")
	b := doc("b.txt", "p:One two three four five.", "q:Six seven eight nine ten.", "r:Eleven twelve thirteen fourteen.")
	res, err := Build(Input{Docs: []Doc{a, b}, Engine: &pairs.Result{Pairs: []pairs.Pair{{A: 0, B: 1, Shared: 3}}}})
	if err != nil {
		t.Fatal(err)
	}
	if len(res.Texts) != 2 || res.Texts[0].Text != a.Text || res.Texts[1].Text != b.Text {
		t.Fatalf("texts %+v", res.Texts)
	}
	var js bytes.Buffer
	if err := WriteJSON(&js, res); err != nil {
		t.Fatal(err)
	}
	if strings.Contains(js.String(), "Texts") || strings.Contains(js.String(), `"texts"`) {
		t.Error("the texts leaked into the JSON contract")
	}
}

// largeResult builds a Result of n pairs among docs short documents, each
// pair with one to three passages at offsets that fit the texts.
func largeResult(n, docs int) *Result {
	r := &Result{Format: FormatVersion, Caution: Caution, Settings: Settings{Unit: "sentence", MinShared: 2, MinWords: 5, MaxDocs: 1000}}
	rng := rand.New(rand.NewPCG(18, 5))
	for i := 0; i < docs; i++ {
		var b strings.Builder
		for k := 0; k < 12; k++ {
			fmt.Fprintf(&b, "Document %d says sentence %d in words of its own <%d>.\n", i, k, rng.IntN(1000))
		}
		r.Documents = append(r.Documents, Document{Path: fmt.Sprintf("corpus/part-%02d/doc-%05d.txt", i%37, i), Words: 120, Reused: float64(rng.IntN(10001)) / 10000})
		r.Texts = append(r.Texts, SourceText{Text: b.String()})
	}
	seen := make(map[[2]int]bool, n)
	for len(r.Pairs) < n {
		a, b := rng.IntN(docs), rng.IntN(docs)
		if a >= b || seen[[2]int{a, b}] {
			continue
		}
		seen[[2]int{a, b}] = true
		p := Pair{A: r.Documents[a].Path, B: r.Documents[b].Path, Shared: 2 + rng.IntN(30),
			CoverageA: float64(rng.IntN(10001)) / 10000, CoverageB: float64(rng.IntN(10001)) / 10000, Jaccard: float64(rng.IntN(10001)) / 10000}
		p.Score = max(p.CoverageA, p.CoverageB)
		for k, at := 0, 0; k < 1+rng.IntN(3); k++ {
			end := at + 20 + rng.IntN(40)
			line := 1 + k*3
			p.Passages = append(p.Passages, Passage{AStart: at, AEnd: end, BStart: at, BEnd: end, ALine: line, BLine: line + 1,
				AWhere: fmt.Sprintf("line %d", line), BWhere: fmt.Sprintf("lines %d–%d", line+1, line+2), Units: 2, Words: 5 + rng.IntN(60),
				Text: r.Texts[a].Text[at:end]})
			at = end + 100
		}
		r.Pairs = append(r.Pairs, p)
	}
	// Rank order, as Build gives it.
	slices.SortStableFunc(r.Pairs, func(x, y Pair) int { return cmp.Compare(y.Score, x.Score) })
	r.Summary = Summary{Documents: docs, Pairs: n, Words: 120 * docs}
	return r
}

// pageDataBlock is the page's data block, decoded.
type pageDataBlock struct {
	Paths    []string `json:"paths"`
	Detailed int      `json:"detailed"`
	Rows     [][]any  `json:"rows"`
	Docs     [][]any  `json:"docs"`
}

func readPageData(t *testing.T, page []byte) pageDataBlock {
	t.Helper()
	m := regexp.MustCompile(`(?s)<script type="application/json" id="page-data">(.*?)</script>`).FindSubmatch(page)
	if m == nil {
		t.Fatal("no page-data block")
	}
	var d pageDataBlock
	if err := json.Unmarshal(m[1], &d); err != nil {
		t.Fatalf("page data: %v", err)
	}
	return d
}

func TestHTMLLargeResultKeepsEveryPairUnderTheBound(t *testing.T) {
	const n, docs = 100_000, 3000
	r := largeResult(n, docs)
	opt := HTMLOptions{}
	out := render(t, r, opt)
	bound := HTMLSizeBound(r, opt)
	t.Logf("%d pairs: page %d bytes (%.0f per pair), bound %d", n, len(out), float64(len(out))/n, bound)
	if int64(len(out)) > bound {
		t.Errorf("page %d bytes, over its bound %d", len(out), bound)
	}
	// The first screen is HTML: that many rows and detail views, no more.
	if rows := bytes.Count(out, []byte(`<tr data-rank=`)); rows != DefaultHTMLScreen {
		t.Errorf("%d rows written as HTML, want the first screen's %d", rows, DefaultHTMLScreen)
	}
	if views := bytes.Count(out, []byte(`<section class="pair block"`)); views != DefaultHTMLScreen {
		t.Errorf("%d detail views as HTML, want %d", views, DefaultHTMLScreen)
	}
	// Every pair is in the data, with the Result's numbers and paths.
	d := readPageData(t, out)
	if len(d.Rows) != n || d.Detailed != DefaultHTMLPairs {
		t.Fatalf("data has %d rows and %d detailed, want %d and %d", len(d.Rows), d.Detailed, n, DefaultHTMLPairs)
	}
	for i, row := range d.Rows {
		p := &r.Pairs[i]
		path := func(k int) string { return d.Paths[int(row[k].(float64))] }
		want := []any{p.Score, p.CoverageA, p.CoverageB, float64(p.Shared), float64(p.LongestWords())}
		if len(row) != 9 || fmt.Sprint(row[:5]) != fmt.Sprint(want) || path(5) != p.A || path(6) != p.B ||
			row[7] != p.Passages[0].AWhere || row[8] != p.Passages[0].BWhere {
			t.Fatalf("data row %d %v does not match pair %+v", i+1, row, *p)
		}
	}
	if want := docs - DefaultHTMLScreen; len(d.Docs) != want {
		t.Errorf("%d document rows in the data, want the %d after the first screen", len(d.Docs), want)
	}
	// Pairs after the first screen with a detail view: one data block each,
	// with the pair's figures as the template formats them.
	blocks := regexp.MustCompile(`(?s)<script type="application/json" id="pair-data-(\d+)">(.*?)</script>`).FindAllSubmatch(out, -1)
	if len(blocks) != DefaultHTMLPairs-DefaultHTMLScreen {
		t.Fatalf("%d detail data blocks, want %d", len(blocks), DefaultHTMLPairs-DefaultHTMLScreen)
	}
	for k, b := range blocks {
		var v detailData
		if err := json.Unmarshal(b[2], &v); err != nil {
			t.Fatalf("block %s: %v", b[1], err)
		}
		rank := DefaultHTMLScreen + 1 + k
		p := &r.Pairs[rank-1]
		if string(b[1]) != fmt.Sprint(rank) || v.Rank != rank || v.Facts[0] != percent(p.Score) || len(v.Items) != len(p.Passages) ||
			v.Sides[0].Path != p.A || v.Sides[1].Path != p.B || len(v.Sides[0].Segments) == 0 {
			t.Errorf("block %s (pair %d) does not match its pair: %+v", b[1], rank, v)
		}
	}
}
