package report

import (
	"bytes"
	"crypto/sha256"
	"encoding/base64"
	"fmt"
	"html"
	"regexp"
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
	} {
		t.Run(c.name, func(t *testing.T) {
			r := hostileResult(t, c.docs, c.passages, c.size, c.filler)
			opt := HTMLOptions{Pairs: c.pairs}
			out := render(t, r, opt)
			bound := HTMLSizeBound(r, opt)
			if int64(len(out)) > bound {
				t.Errorf("page %d bytes, over its bound %d", len(out), bound)
			}
			details := bytes.Count(out, []byte(`<section class="pair block"`))
			if want := opt.detailed(len(r.Pairs)); details != want {
				t.Errorf("%d detail views, want %d", details, want)
			}
			if c.size > htmlFullText && bytes.Count(out, []byte(`class="gap"`)) == 0 {
				t.Errorf("a long document shows no gap")
			}
			t.Logf("%d bytes, bound %d", len(out), bound)
		})
	}
}

func TestHTMLEscapesEverythingFromInput(t *testing.T) {
	r := hostileResult(t, 3, 2, 500, `<script>alert(1)</script> " onmouseover="x" <img src=x onerror=y> `)
	out := string(render(t, r, HTMLOptions{}))
	if n := strings.Count(out, "<script"); n != 1 {
		t.Errorf("%d <script elements, want only the page's own", n)
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
