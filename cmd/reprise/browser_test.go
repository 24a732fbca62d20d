package main

// Browser tests of the HTML review page: headless Chromium (Debian's
// /usr/bin/chromium, installed by .ci/run) driven by chromedp. They fail in
// CI when Chromium is missing and skip elsewhere.

import (
	"bytes"
	"context"
	"encoding/json"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"strings"
	"sync"
	"testing"
	"time"

	"github.com/chromedp/cdproto/emulation"
	cdplog "github.com/chromedp/cdproto/log"
	"github.com/chromedp/cdproto/network"
	"github.com/chromedp/cdproto/page"
	cdpruntime "github.com/chromedp/cdproto/runtime"
	"github.com/chromedp/chromedp"

	"reprise/report"
)

const chromiumPath = "/usr/bin/chromium"

// browserEvents collects what the page did that a test forbids or counts.
type browserEvents struct {
	mu       sync.Mutex
	requests []string // every URL the page requested
	problems []string // console errors, exceptions, log errors (CSP refusals among them)
	dialogs  []string
}

func (e *browserEvents) add(list *[]string, s string) {
	e.mu.Lock()
	defer e.mu.Unlock()
	*list = append(*list, s)
}

func (e *browserEvents) snapshot() (req, prob, dlg []string) {
	e.mu.Lock()
	defer e.mu.Unlock()
	return append([]string(nil), e.requests...), append([]string(nil), e.problems...), append([]string(nil), e.dialogs...)
}

// newBrowser starts a headless Chromium with background networking off and
// a fresh profile, and records network requests, console errors,
// exceptions and dialogs.
func newBrowser(t *testing.T) (context.Context, *browserEvents) {
	t.Helper()
	if _, err := os.Stat(chromiumPath); err != nil {
		if os.Getenv("CI") != "" {
			t.Fatalf("%s missing (.ci/run installs Debian's chromium): %v", chromiumPath, err)
		}
		t.Skipf("%s missing: apt-get install chromium to run the browser tests", chromiumPath)
	}
	opts := []chromedp.ExecAllocatorOption{
		chromedp.ExecPath(chromiumPath),
		chromedp.Headless,
		chromedp.NoSandbox,
		chromedp.DisableGPU,
		chromedp.NoFirstRun,
		chromedp.NoDefaultBrowserCheck,
		chromedp.Flag("disable-quic", true),
		chromedp.Flag("disable-background-networking", true),
		chromedp.Flag("disable-component-update", true),
		chromedp.Flag("disable-sync", true),
		chromedp.Flag("disable-extensions", true),
		chromedp.Flag("disable-default-apps", true),
		chromedp.UserDataDir(t.TempDir()),
		chromedp.WindowSize(1280, 900),
	}
	actx, cancelAlloc := chromedp.NewExecAllocator(context.Background(), opts...)
	ctx, cancelCtx := chromedp.NewContext(actx)
	ctx, cancelTime := context.WithTimeout(ctx, 90*time.Second)
	t.Cleanup(func() { cancelTime(); cancelCtx(); cancelAlloc() })

	ev := &browserEvents{}
	err := chromedp.Listen(ctx, func(v any) {
		switch e := v.(type) {
		case *network.EventRequestWillBeSent:
			ev.add(&ev.requests, e.Request.URL)
		case *cdpruntime.EventConsoleAPICalled:
			if k := string(e.Type); k == "error" || k == "warning" || k == "assert" {
				ev.add(&ev.problems, fmt.Sprintf("console.%s: %v", e.Type, e.Args))
			}
		case *cdpruntime.EventExceptionThrown:
			ev.add(&ev.problems, fmt.Sprintf("exception: %s at %d:%d", e.ExceptionDetails.Text, e.ExceptionDetails.LineNumber, e.ExceptionDetails.ColumnNumber))
		case *cdplog.EventEntryAdded:
			if e.Entry.Level == cdplog.EntryLevelError || e.Entry.Level == cdplog.EntryLevelWarning {
				ev.add(&ev.problems, fmt.Sprintf("log %s: %s", e.Entry.Level, e.Entry.Text))
			}
		case *page.EventJavascriptDialogOpening:
			ev.add(&ev.dialogs, e.Message)
			// A dialog blocks the page: dismiss it from another goroutine.
			go func() {
				_, _ = chromedp.Call(ctx, page.HandleJavaScriptDialog, page.HandleJavaScriptDialogParams{Accept: false})
			}()
		}
	})
	if err != nil {
		t.Fatalf("starting chromium: %v", err)
	}
	// chromedp enables the page, network, runtime and log domains of a tab;
	// enabling network again here makes the request log not depend on that.
	if _, err := chromedp.Call(ctx, network.Enable, network.EnableParams{}); err != nil {
		t.Fatalf("enabling network events: %v", err)
	}
	return ctx, ev
}

// openPage loads file and measures the time until the load event.
func openPage(t *testing.T, ctx context.Context, file string) (string, time.Duration) {
	t.Helper()
	url := "file://" + file
	start := time.Now()
	if err := chromedp.Do(ctx, chromedp.Navigate(url), chromedp.WaitReady(chromedp.CSS("body"))); err != nil {
		t.Fatalf("opening %s: %v", url, err)
	}
	return url, time.Since(start)
}

// screenshot saves a PNG of the whole page (or of the window, when name
// ends in "-view") under $REPRISE_SCREENSHOTS or a test folder, and logs
// its path.
func screenshot(t *testing.T, ctx context.Context, name string) {
	t.Helper()
	dir := os.Getenv("REPRISE_SCREENSHOTS")
	if dir == "" {
		dir = t.TempDir()
	}
	shot := chromedp.FullScreenshot(100)
	if strings.HasSuffix(name, "-view") {
		shot = chromedp.CaptureScreenshot()
	}
	png, err := chromedp.Run(ctx, shot)
	if err != nil {
		t.Fatalf("screenshot: %v", err)
	}
	p := filepath.Join(dir, name+".png")
	if err := os.WriteFile(p, png, 0o644); err != nil {
		t.Fatal(err)
	}
	t.Logf("screenshot: %s", p)
}

// eval runs js in the page and decodes its value.
func eval[T any](t *testing.T, ctx context.Context, js string) T {
	t.Helper()
	v, err := chromedp.Run(ctx, chromedp.Evaluate[T](js))
	if err != nil {
		t.Fatalf("evaluating in the page: %v\n%s", err, js)
	}
	return v
}

// do runs browser steps, failing the test on an error.
func do(t *testing.T, ctx context.Context, steps ...chromedp.Action[chromedp.Void]) {
	t.Helper()
	if err := chromedp.Do(ctx, steps...); err != nil {
		t.Fatalf("in the browser: %v", err)
	}
}

// checkQuiet fails the test on any request but the page itself, any console
// error, exception or log error, and any dialog.
func checkQuiet(t *testing.T, ev *browserEvents, url string) {
	t.Helper()
	req, prob, dlg := ev.snapshot()
	if len(req) == 0 {
		t.Errorf("no request seen at all: the network listener is not working")
	}
	for _, r := range req {
		if r != url {
			t.Errorf("the page made a request: %s", r)
		}
	}
	for _, p := range prob {
		t.Errorf("browser reported: %s", p)
	}
	for _, d := range dlg {
		t.Errorf("a dialog opened: %q", d)
	}
}

// renderBoth scans args into a JSON result and an HTML page in a temporary folder.
func renderBoth(t *testing.T, args ...string) (*report.Result, string) {
	t.Helper()
	dir := t.TempDir()
	jsonPath, htmlPath := filepath.Join(dir, "result.json"), filepath.Join(dir, "review.html")
	var stderr bytes.Buffer
	if code := run(append([]string{"scan", "-q", "--format", "json", "-o", jsonPath}, args...), &bytes.Buffer{}, &stderr); code != exitOK {
		t.Fatalf("scan json: exit %d: %s", code, stderr.String())
	}
	if code := run(append([]string{"scan", "-q", "--format", "html", "-o", htmlPath}, args...), &bytes.Buffer{}, &stderr); code != exitOK {
		t.Fatalf("scan html: exit %d: %s", code, stderr.String())
	}
	raw, err := os.ReadFile(jsonPath)
	if err != nil {
		t.Fatal(err)
	}
	var res report.Result
	if err := json.Unmarshal(raw, &res); err != nil {
		t.Fatal(err)
	}
	return &res, htmlPath
}

type rowData struct {
	Rank, Shared, Longest               int
	Score, CovA, CovB                   float64
	ScoreText, CovAText, CovBText, A, B string
	Where                               string
	Hidden                              bool
}

const rowsJS = `Array.from(document.querySelectorAll("#pair-table tbody tr")).map(function (r) {
  var c = r.cells;
  return {Rank: +r.dataset.rank, Shared: +c[4].textContent, Longest: +c[5].textContent,
    Score: +r.dataset.score, CovA: +r.dataset.cova, CovB: +r.dataset.covb,
    ScoreText: c[1].textContent, CovAText: c[2].textContent, CovBText: c[3].textContent,
    A: c[6].textContent, B: c[7].textContent, Where: c[8].textContent, Hidden: r.hidden};
})`

// checkRows checks that rows are the result's first pairs, in rank order,
// with the JSON's numbers.
func checkRows(t *testing.T, rows []rowData, res *report.Result) {
	t.Helper()
	for i, r := range rows {
		p := res.Pairs[i]
		if r.Rank != i+1 || r.A != p.A || r.B != p.B || r.Shared != p.Shared || r.Longest != p.LongestWords() ||
			r.Score != p.Score || r.CovA != p.CoverageA || r.CovB != p.CoverageB ||
			r.Where != fmt.Sprintf("A %s, B %s", p.Passages[0].AWhere, p.Passages[0].BWhere) {
			t.Errorf("row %d %+v differs from JSON pair %+v", i+1, r, p)
		}
		// Shown percentages have two decimals of a four-decimal fraction: exact.
		for _, c := range []struct {
			text string
			want float64
		}{{r.ScoreText, p.Score}, {r.CovAText, p.CoverageA}, {r.CovBText, p.CoverageB}} {
			if got := percentOf(t, c.text); math.Abs(got-c.want) > 1e-9 {
				t.Errorf("row %d shows %s, JSON has %v", i+1, c.text, c.want)
			}
		}
	}
}

// percentOf parses a cell such as "71.43%" back into a fraction.
func percentOf(t *testing.T, s string) float64 {
	t.Helper()
	var v float64
	if _, err := fmt.Sscanf(strings.TrimSuffix(s, "%"), "%g", &v); err != nil {
		t.Fatalf("cell %q is not a percentage: %v", s, err)
	}
	return v / 100
}

func TestBrowserDemoPageAgreesWithJSON(t *testing.T) {
	res, htmlPath := renderBoth(t, filepath.Join("..", "..", "testdata", "demo"))
	ctx, ev := newBrowser(t)
	url, took := openPage(t, ctx, htmlPath)
	fi, _ := os.Stat(htmlPath)
	t.Logf("demo page: %d bytes, loaded in %v", fi.Size(), took)
	screenshot(t, ctx, "demo-overview")

	// The summary says what the JSON says.
	summary := eval[map[string]string](t, ctx, `Object.fromEntries(Array.from(document.querySelectorAll("#summary dd[data-field]")).map(function (d) { return [d.dataset.field, d.textContent]; }))`)
	s := res.Summary
	for field, want := range map[string]int{"documents": s.Documents, "skipped": s.Skipped, "words": s.Words, "units": s.Units,
		"pairs": s.Pairs, "groups": s.Groups, "common_units": s.CommonUnits, "templates": s.Templates, "template_units": s.TemplateUnits, "pruned": s.Pruned,
		"near_copy_documents": s.NearCopyDocuments} {
		if summary[field] != fmt.Sprint(want) {
			t.Errorf("summary %s: page %q, JSON %d", field, summary[field], want)
		}
	}

	// One row per JSON pair, in rank order, with the JSON's numbers.
	rows := eval[[]rowData](t, ctx, rowsJS)
	if len(rows) != len(res.Pairs) || len(rows) == 0 {
		t.Fatalf("%d rows on the page, %d pairs in the JSON", len(rows), len(res.Pairs))
	}
	checkRows(t, rows, res)

	// Each pair opened shows every JSON passage, numbered, in both columns, at the right text.
	for i, p := range res.Pairs {
		// Follow the rank's link in the table, as a reader would.
		do(t, ctx, chromedp.Click(chromedp.CSS(fmt.Sprintf(`#pair-table a[href="#pair-%d"]`, i+1))))
		checkOpenPair(t, ctx, i+1, p)
		if i == 0 {
			screenshot(t, ctx, "demo-pair-1-view")
		}
	}
	checkQuiet(t, ev, url)
}

// checkOpenPair checks that pair rank is shown (once its link was
// followed) with every JSON passage numbered in both columns, column A
// marking the passage's text and column B the bytes of B's file at its
// offsets (the documents are UTF-8 text files, read from the working folder).
func checkOpenPair(t *testing.T, ctx context.Context, rank int, p report.Pair) {
	t.Helper()
	type detail struct {
		Visible        bool
		LabelsA        []string
		LabelsB        []string
		MarksA, MarksB map[string]string
		Score          string
	}
	js := fmt.Sprintf(`(function () {
  var s = document.getElementById("pair-%d");
  if (!s) { return {Visible: false}; }
  function side(k) {
    var col = s.querySelector('.side[data-side="' + k + '"]');
    var marks = {};
    col.querySelectorAll("mark").forEach(function (m) {
      m.dataset.p.split(" ").forEach(function (n) { marks[n] = (marks[n] || "") + m.textContent; });
    });
    return {labels: Array.from(col.querySelectorAll(".num")).map(function (e) { return e.textContent; }), marks: marks};
  }
  var a = side("A"), b = side("B");
  var box = s.getBoundingClientRect();
  return {Visible: s.offsetParent !== null && getComputedStyle(s).display !== "none" && box.top < innerHeight && box.bottom > 0,
    LabelsA: a.labels, LabelsB: b.labels, MarksA: a.marks, MarksB: b.marks,
    Score: s.querySelector('dd[data-field="score"]').textContent};
})()`, rank)
	// The script shows the pair on "hashchange", which fires after the click returns.
	got := eval[detail](t, ctx, js)
	for try := 0; !got.Visible && try < 40; try++ {
		time.Sleep(25 * time.Millisecond)
		got = eval[detail](t, ctx, js)
	}
	if !got.Visible {
		t.Fatalf("pair %d: not shown after following its link", rank)
	}
	if len(got.LabelsA) != len(p.Passages) || len(got.LabelsB) != len(p.Passages) {
		t.Errorf("pair %d: %d and %d numbered passages in the columns, JSON lists %d", rank, len(got.LabelsA), len(got.LabelsB), len(p.Passages))
	}
	textB, err := os.ReadFile(filepath.FromSlash(p.B))
	if err != nil {
		t.Fatal(err)
	}
	for k, g := range p.Passages {
		n := fmt.Sprint(k + 1)
		if got.MarksA[n] != g.Text {
			t.Errorf("pair %d passage %s: column A marks %q, JSON text %q", rank, n, got.MarksA[n], g.Text)
		}
		if want := string(textB[g.BStart:g.BEnd]); got.MarksB[n] != want {
			t.Errorf("pair %d passage %s: column B marks %q, file bytes %d..%d are %q", rank, n, got.MarksB[n], g.BStart, g.BEnd, want)
		}
	}
	if math.Abs(percentOf(t, got.Score)-p.Score) > 1e-9 {
		t.Errorf("pair %d: detail score %s, JSON %v", rank, got.Score, p.Score)
	}
}

func TestBrowserTableSortsAndFilters(t *testing.T) {
	res, htmlPath := renderBoth(t, filepath.Join("..", "..", "testdata", "demo"))
	ctx, ev := newBrowser(t)
	url, _ := openPage(t, ctx, htmlPath)
	read := func() []rowData { return eval[[]rowData](t, ctx, rowsJS) }
	ordered := func(name string, rows []rowData, key func(rowData) float64, desc bool) {
		t.Helper()
		for k := 1; k < len(rows); k++ {
			x, y := key(rows[k-1]), key(rows[k])
			if (desc && x < y) || (!desc && x > y) || (x == y && rows[k-1].Rank > rows[k].Rank) {
				t.Errorf("%s: row %d (%v, rank %d) before row %d (%v, rank %d)", name, k, x, rows[k-1].Rank, k+1, y, rows[k].Rank)
			}
		}
	}
	// Keyboard: focus the "Shared" heading's button and press Enter.
	do(t, ctx, chromedp.Focus(chromedp.CSS(`button[data-key="shared"]`)), chromedp.KeyEvent("\r"))
	rows := read()
	ordered("shared, descending", rows, func(r rowData) float64 { return float64(r.Shared) }, true)
	if rows[0].Shared != 12 {
		t.Errorf("sorted by shared, first row shares %d, want the verbatim copy's 12", rows[0].Shared)
	}
	do(t, ctx, chromedp.Click(chromedp.CSS(`button[data-key="covb"]`)))
	ordered("cover B, descending", read(), func(r rowData) float64 { return r.CovB }, true)
	do(t, ctx, chromedp.Click(chromedp.CSS(`button[data-key="covb"]`)))
	ordered("cover B, ascending", read(), func(r rowData) float64 { return r.CovB }, false)

	// Filters: the visible rows are the JSON pairs that pass them.
	visible := func() map[int]bool {
		m := map[int]bool{}
		for _, r := range read() {
			if !r.Hidden {
				m[r.Rank] = true
			}
		}
		return m
	}
	expect := func(name string, keep func(report.Pair) bool) {
		t.Helper()
		got := visible()
		n := 0
		for i, p := range res.Pairs {
			if keep(p) {
				n++
				if !got[i+1] {
					t.Errorf("%s: pair %d hidden", name, i+1)
				}
			} else if got[i+1] {
				t.Errorf("%s: pair %d shown", name, i+1)
			}
		}
		if n == 0 || n == len(res.Pairs) {
			t.Errorf("%s keeps %d of %d pairs: the filter test shows nothing", name, n, len(res.Pairs))
		}
	}
	do(t, ctx, chromedp.SendKeys(chromedp.CSS("#filter-path"), "wesley"))
	expect(`path contains "wesley"`, func(p report.Pair) bool { return strings.Contains(p.A+p.B, "wesley") })
	// Clear the path box; typing into the score box then refilters by both.
	eval[string](t, ctx, `document.getElementById("filter-path").value = ""; document.getElementById("filter-score").value = ""`)
	do(t, ctx, chromedp.SendKeys(chromedp.CSS("#filter-score"), "50"))
	expect("score at least 50%", func(p report.Pair) bool { return p.Score*100 >= 50 })
	shown := eval[string](t, ctx, `document.getElementById("shown").textContent`)
	if want := fmt.Sprintf("%d of %d pairs shown", len(visible()), len(res.Pairs)); shown != want {
		t.Errorf("counter says %q, want %q", shown, want)
	}
	screenshot(t, ctx, "demo-filtered")
	checkQuiet(t, ev, url)
}

// The probes: markup, event handlers, javascript: URLs and broken tags, in
// file names and texts. Each would set window.__reprise_pwned if it ran.
var xssProbes = []string{
	`<script>window.__reprise_pwned=1;alert(1)</script>`,
	`<img src=x onerror="window.__reprise_pwned=2;alert(2)">`,
	`" onmouseover="window.__reprise_pwned=3" x="`,
	`' onfocus='window.__reprise_pwned=4' autofocus '`,
	`<a href="javascript:window.__reprise_pwned=5">link</a>`,
	`javascript:window.__reprise_pwned=6`,
	`<svg onload="window.__reprise_pwned=7"></svg>`,
	`</pre></mark></td></table><b><i>unbalanced`,
	`</script><script>window.__reprise_pwned=8</script>`,
	`</style><style>body{background:url(http://127.0.0.1:9/x)}</style>`,
	`<!-- <iframe src="javascript:window.__reprise_pwned=9"> ]]>`,
}

func TestBrowserHostileInputStaysInert(t *testing.T) {
	dir := t.TempDir()
	shared := "The shared paragraph comes first and it is long enough to count. " +
		"It carries " + xssProbes[0] + " inside a sentence that goes on for a while. " +
		"A second sentence brings " + xssProbes[1] + " and more words to count. " +
		"A third sentence holds " + xssProbes[2] + " with its quotes intact today. " +
		"The fourth sentence offers " + xssProbes[4] + " as a link in the text. " +
		"The fifth sentence ends with " + xssProbes[7] + " and still goes on. " +
		"Sixth: " + xssProbes[8] + " then words and words again here. " +
		"Seventh: " + xssProbes[9] + " with a style break in it too. " +
		"Eighth: " + xssProbes[10] + " and a comment that never closes."
	names := []string{
		`<script>window.__reprise_pwned=10<\script>.txt`,
		`" onmouseover="window.__reprise_pwned=11".txt`,
		`<img src=x onerror=window.__reprise_pwned=12>.txt`,
		`javascript:window.__reprise_pwned=13.txt`,
	}
	for i, n := range names {
		writeFile(t, filepath.Join(dir, strings.ReplaceAll(n, "/", "_")),
			fmt.Sprintf("Essay %d opens with its own words, which are not shared by anyone else at all %d.\n\n%s\n\n%s also closes alone with words of its own, number %d.\n",
				i, i, shared, xssProbes[(i+3)%len(xssProbes)], i))
	}
	writeFile(t, filepath.Join(dir, `<b>broken.md`), "# <i>Title\n\n[click](javascript:window.__reprise_pwned=14) "+shared+"\n")
	res, htmlPath := renderBoth(t, dir)
	if len(res.Pairs) < 6 {
		t.Fatalf("%d pairs among the hostile files; the test needs them all paired", len(res.Pairs))
	}
	ctx, ev := newBrowser(t)
	url, _ := openPage(t, ctx, htmlPath)
	// Open every pair, hover and focus every element, click every link.
	js := `(function () {
  var ids = Array.from(document.querySelectorAll(".pair")).map(function (s) { return s.id; });
  ids.forEach(function (id) {
    location.hash = "#" + id;
    document.querySelectorAll("*").forEach(function (e) {
      ["mouseover", "mouseenter", "focus", "load", "error"].forEach(function (t) { e.dispatchEvent(new Event(t)); });
    });
  });
  document.querySelectorAll("a").forEach(function (a) { if (a instanceof HTMLElement && a.getAttribute("href").charAt(0) === "#") { a.click(); } });
  return String(ids.length);
})()`
	text := eval[string](t, ctx, js)
	do(t, ctx, chromedp.Sleep(300*time.Millisecond))
	pwned := eval[string](t, ctx, `typeof window.__reprise_pwned === "undefined" ? "inert" : "ran: " + window.__reprise_pwned`)
	if pwned != "inert" {
		t.Errorf("injected code %s", pwned)
	}
	if text != fmt.Sprint(min(len(res.Pairs), report.DefaultHTMLPairs)) {
		t.Errorf("%s pair views on the page, want %d", text, len(res.Pairs))
	}
	// The probes are shown as text: the page's text contains them verbatim,
	// and the page holds exactly one script and one style element.
	body := eval[string](t, ctx, `document.body.textContent`)
	scripts := eval[int](t, ctx, `document.querySelectorAll("script:not([type])").length`)
	dataBlocks := eval[int](t, ctx, `document.querySelectorAll("script[type]").length - document.querySelectorAll('script[type="application/json"]').length`)
	styles := eval[int](t, ctx, `document.querySelectorAll("style").length`)
	injected := eval[int](t, ctx, `document.querySelectorAll("img, iframe, svg [onload], [onerror], [onmouseover], [onfocus], a[href^=javascript]").length`)
	for _, p := range append(xssProbes[:3], xssProbes[7:]...) {
		if !strings.Contains(body, p) {
			t.Errorf("probe %q not shown as text", p)
		}
	}
	if !strings.Contains(body, names[1]) {
		t.Errorf("file name %q not shown as text", names[1])
	}
	if scripts != 1 || dataBlocks != 0 || styles != 1 || injected != 0 {
		t.Errorf("page has %d scripts, %d other script elements than JSON data, %d styles and %d injected elements; want 1, 0, 1, 0", scripts, dataBlocks, styles, injected)
	}
	screenshot(t, ctx, "hostile-input")
	checkQuiet(t, ev, url)
}

// writeFamilies writes families of documents into dir: family f has
// sizes[f] members, each with its own sentences (a different number each,
// so that scores differ) and the family's three shared sentences, so each
// family gives m(m-1)/2 pairs and nothing else pairs.
func writeFamilies(t *testing.T, dir string, sizes []int) int {
	t.Helper()
	pairs, doc := 0, 0
	for f, m := range sizes {
		pairs += m * (m - 1) / 2
		for k := 0; k < m; k++ {
			var b strings.Builder
			for s := 0; s < 8+(doc*7)%23; s++ {
				fmt.Fprintf(&b, "Member %d of the collection writes its own sentence number %d here.\n", doc, s)
			}
			b.WriteString("\n")
			for s := 0; s < 3; s++ {
				fmt.Fprintf(&b, "Family %d keeps the shared sentence %d <in every> member's text.\n", f, s)
			}
			writeFile(t, filepath.Join(dir, fmt.Sprintf("f%03d.txt", doc)), b.String())
			doc++
		}
	}
	return pairs
}

// waitFor polls js in the page until it is true (or fails the test).
func waitFor(t *testing.T, ctx context.Context, what, js string) {
	t.Helper()
	for try := 0; try < 80; try++ {
		if eval[bool](t, ctx, js) {
			return
		}
		time.Sleep(25 * time.Millisecond)
	}
	t.Fatalf("%s: still not so after 2 s", what)
}

func TestBrowserLargePageLoadsMoreOnDemand(t *testing.T) {
	dir := t.TempDir()
	want := writeFamilies(t, dir, []int{15, 15, 15})
	res, htmlPath := renderBoth(t, dir)
	if len(res.Pairs) != want {
		t.Fatalf("%d pairs, the families give %d", len(res.Pairs), want)
	}
	screen, detailed := report.DefaultHTMLScreen, report.DefaultHTMLPairs
	ctx, ev := newBrowser(t)
	url, took := openPage(t, ctx, htmlPath)
	fi, _ := os.Stat(htmlPath)
	t.Logf("%d pairs: page %d bytes, loaded in %v", len(res.Pairs), fi.Size(), took)
	screenshot(t, ctx, "large-first-screen-view")

	// The first screen: the reviewer notice and the summary in the window
	// without scrolling, the first rows of the table written out.
	type firstScreen struct {
		ScrollY                  float64
		CautionIn, SummaryInView bool
		Rows                     int
		Shown                    string
	}
	first := eval[firstScreen](t, ctx, `(function () {
  function inView(e) { var r = e.getBoundingClientRect(); return r.height > 0 && r.top >= 0 && r.bottom <= innerHeight; }
  return {ScrollY: scrollY, CautionIn: inView(document.getElementById("caution")),
    SummaryInView: inView(document.querySelector("#summary dl.facts")),
    Rows: document.querySelectorAll("#pair-table tbody tr").length, Shown: document.getElementById("shown").textContent};
})()`)
	if first.ScrollY != 0 || !first.CautionIn || !first.SummaryInView {
		t.Errorf("first screen %+v: the caution and the summary are not in the window unscrolled", first)
	}
	if first.Rows != screen || first.Shown != fmt.Sprintf("%d of %d pairs shown", screen, want) {
		t.Errorf("first screen has %d rows, counter %q; want %d rows of %d", first.Rows, first.Shown, screen, want)
	}
	checkRows(t, eval[[]rowData](t, ctx, rowsJS), res)

	// "Show more" adds the next rows, with the JSON's numbers, until all are there.
	for n := screen; n < want; n += screen {
		do(t, ctx, chromedp.Click(chromedp.CSS("#more-pairs")))
		next := min(n+screen, want)
		waitFor(t, ctx, "more rows", fmt.Sprintf(`document.querySelectorAll("#pair-table tbody tr").length === %d`, next))
		if got := eval[string](t, ctx, `document.getElementById("shown").textContent`); got != fmt.Sprintf("%d of %d pairs shown", next, want) {
			t.Errorf("after more: counter %q", got)
		}
	}
	rows := eval[[]rowData](t, ctx, rowsJS)
	if len(rows) != want {
		t.Fatalf("%d rows after showing all, want %d", len(rows), want)
	}
	checkRows(t, rows, res)
	if eval[bool](t, ctx, `document.getElementById("more-pairs").offsetParent !== null`) {
		t.Errorf("the more button still shows with every row in the table")
	}
	// A row after the detailed ones has no link; one before has.
	links := eval[[]int](t, ctx, `Array.from(document.querySelectorAll("#pair-table tbody tr")).filter(function (r) { return r.cells[0].querySelector("a"); }).map(function (r) { return +r.dataset.rank; })`)
	if len(links) != detailed || links[len(links)-1] != detailed {
		t.Errorf("%d rows link to a side-by-side view (last %v), want ranks 1 to %d", len(links), links[len(links)-1:], detailed)
	}

	// A pair not on the first screen, opened from its row: side by side, every passage.
	rank := screen + 70
	if eval[bool](t, ctx, fmt.Sprintf(`!!document.getElementById("pair-%d")`, rank)) {
		t.Fatalf("pair %d is in the page before it is opened", rank)
	}
	do(t, ctx, chromedp.Click(chromedp.CSS(fmt.Sprintf(`#pair-table a[href="#pair-%d"]`, rank))))
	checkOpenPair(t, ctx, rank, res.Pairs[rank-1])
	screenshot(t, ctx, "large-pair-later-view")
	// Its pager leads on to the next pair, also kept as data.
	do(t, ctx, chromedp.Click(chromedp.CSS(fmt.Sprintf(`#pair-%d .pager a[href="#pair-%d"]`, rank, rank+1))))
	checkOpenPair(t, ctx, rank+1, res.Pairs[rank])

	// Sorting covers every row, shown or not.
	do(t, ctx, chromedp.Click(chromedp.CSS(`a[href="#pairs"]`)), chromedp.Click(chromedp.CSS(`button[data-key="covb"]`)))
	sorted := eval[[]rowData](t, ctx, rowsJS)
	if len(sorted) != want {
		t.Errorf("%d rows after sorting, want %d", len(sorted), want)
	}
	for k := 1; k < len(sorted); k++ {
		if x, y := sorted[k-1], sorted[k]; x.CovB < y.CovB || (x.CovB == y.CovB && x.Rank > y.Rank) {
			t.Fatalf("sorted by cover B: row %d (%v, rank %d) before (%v, rank %d)", k, x.CovB, x.Rank, y.CovB, y.Rank)
		}
	}
	checkQuiet(t, ev, url)
}

func TestBrowserFirstScreenWorksWithoutScript(t *testing.T) {
	dir := t.TempDir()
	want := writeFamilies(t, dir, []int{12, 12})
	_, htmlPath := renderBoth(t, dir)
	ctx, ev := newBrowser(t)
	if _, err := chromedp.Call(ctx, emulation.SetScriptExecutionDisabled, emulation.SetScriptExecutionDisabledParams{Value: true}); err != nil {
		t.Fatalf("disabling scripts: %v", err)
	}
	url, _ := openPage(t, ctx, htmlPath)
	type state struct {
		JS                   bool
		Rows, Views, Shown   int
		MoreShown, NoteShown bool
		CautionIn            bool
	}
	// Evaluating through the protocol still works with the page's scripts off.
	got := eval[state](t, ctx, `(function () {
  function shown(e) { return !!e && e.offsetParent !== null; }
  var r = document.getElementById("caution").getBoundingClientRect();
  return {JS: document.documentElement.classList.contains("js"),
    Rows: document.querySelectorAll("#pair-table tbody tr").length,
    Views: document.querySelectorAll("section.pair").length,
    Shown: Array.from(document.querySelectorAll("section.pair")).filter(shown).length,
    MoreShown: shown(document.getElementById("more-pairs")),
    NoteShown: shown(document.querySelector("#pairs .nojs")), CautionIn: r.top >= 0 && r.bottom <= innerHeight};
})()`)
	screen := report.DefaultHTMLScreen
	if got.JS || got.Rows != screen || got.Views != screen || got.Shown != screen || got.MoreShown || !got.NoteShown || !got.CautionIn {
		t.Errorf("without script: %+v; want no js class, %d rows and %d views shown, the note and not the button, the caution in view (%d pairs)", got, screen, screen, want)
	}
	screenshot(t, ctx, "no-script")
	checkQuiet(t, ev, url)
}

// handResult builds a result by hand (texts included) with n pairs among
// docs documents, sets sets of near-copies and groups groups, every name
// and text holding markup, for comparing what the script builds with what
// the template writes.
func handResult(n, docs, sets, groups int) *report.Result {
	r := &report.Result{Format: report.FormatVersion, Caution: report.Caution,
		Settings: report.Settings{Unit: "sentence", MinShared: 2, MinWords: 5, MaxDocs: 1000}}
	name := func(i int) string { return fmt.Sprintf(`d/<b>%03d</b> "x" & 'y'.txt`, i) }
	for i := 0; i < docs; i++ {
		var b strings.Builder
		for k := 0; k < 6+i%5; k++ {
			fmt.Fprintf(&b, "Text %d, sentence %d: <i>markup</i> & \"quotes\" stay text.\n", i, k)
		}
		r.Documents = append(r.Documents, report.Document{Path: name(i), Words: 50 + i, Reused: float64(i%97) / 97})
		r.Texts = append(r.Texts, report.SourceText{Text: b.String()})
	}
	for k := 0; len(r.Pairs) < n; k++ {
		a, b := k%docs, (k/docs+k+1)%docs
		if a >= b {
			continue
		}
		p := report.Pair{A: name(a), B: name(b), Shared: 2 + k%9, CoverageA: float64(k%89) / 89, CoverageB: float64(k%83) / 83}
		p.CoverageA, p.CoverageB = math.Round(p.CoverageA*1e4)/1e4, math.Round(p.CoverageB*1e4)/1e4
		p.Score, p.Jaccard = max(p.CoverageA, p.CoverageB), math.Round(p.CoverageA*p.CoverageB*1e4)/1e4
		ta, tb := r.Texts[a].Text, r.Texts[b].Text
		for g := 0; g < 1+k%3; g++ {
			s, e := 10+g*60, 40+g*60
			p.Passages = append(p.Passages, report.Passage{AStart: s, AEnd: e, BStart: s + 5, BEnd: e + 5, AWhere: fmt.Sprintf("line %d", g+1),
				BWhere: fmt.Sprintf("lines %d–%d", g+1, g+2), Units: 1 + g, Words: 5 + g, Text: ta[s:e]})
			_ = tb
		}
		r.Pairs = append(r.Pairs, p)
	}
	for s := 0; s < sets; s++ {
		set := report.NearCopySet{Representative: name(s), Pairs: 3, PairsListed: 2}
		if s%2 == 0 {
			set.DiffersMost = name(s + 1)
		}
		for m := 0; m < 2+s%3; m++ {
			set.Documents = append(set.Documents, report.NearCopy{Path: name(s + m), Resemblance: float64(100-m) / 100})
		}
		r.NearCopies = append(r.NearCopies, set)
	}
	for g := 0; g < groups; g++ {
		r.Groups = append(r.Groups, report.Group{Documents: []string{name(g), name(g + 1), name(g + 2)}, Shared: 2 + g%4})
	}
	r.Summary = report.Summary{Documents: docs, Pairs: n, Groups: groups, NearCopyDocuments: sets}
	return r
}

// canonJS describes the page's lists and a pair's view as a list of
// elements (tag and sorted attributes) and the text between them (runs of
// white space as one space; the texts of pre elements exactly), so that
// the page as the template writes it and as the script builds it compare
// equal when they show the same thing.
const canonJS = `(function (rank) {
  function canon(root) {
    var out = [], text = "";
    function flush() { var t = text.replace(/\s+/g, " ").trim(); if (t) { out.push(JSON.stringify(t)); } text = ""; }
    (function walk(n) {
      if (n.nodeType === 3) { text += n.textContent; return; }
      if (n.nodeType !== 1) { return; }
      flush();
      var attrs = Array.from(n.attributes).map(function (a) { return a.name + "=" + a.value; }).sort();
      out.push("<" + n.tagName + " " + attrs.join(" ") + ">");
      if (n.tagName === "PRE") { out.push("pre:" + JSON.stringify(n.textContent)); }
      n.childNodes.forEach(walk);
      flush();
      out.push("</" + n.tagName + ">");
    })(root);
    return out.join("\n");
  }
  return ["#pair-table tbody", "#doc-table tbody", "#group-list", "#near-list", "#pair-" + rank].map(function (s) {
    return s + "\n" + canon(document.querySelector(s));
  });
})`

func TestBrowserOnDemandRowsAndViewsMatchTheWrittenOnes(t *testing.T) {
	r := handResult(200, 40, 30, 25)
	const rank = 97 // on demand in the first page, written out in the second
	// Its B side's text is missing: the view says why.
	for i, d := range r.Documents {
		if d.Path == r.Pairs[rank-1].B {
			r.Texts[i] = report.SourceText{Missing: "the file has changed since the scan"}
		}
	}
	dir := t.TempDir()
	write := func(name string, screen int) string {
		var b bytes.Buffer
		if err := report.WriteHTML(&b, r, report.HTMLOptions{Screen: screen}); err != nil {
			t.Fatal(err)
		}
		p := filepath.Join(dir, name)
		if err := os.WriteFile(p, b.Bytes(), 0o644); err != nil {
			t.Fatal(err)
		}
		return p
	}
	// The same result twice: a first screen of 10, and everything written out.
	later, all := write("later.html", 10), write("all.html", 1000)
	ctx, ev := newBrowser(t)
	url, _ := openPage(t, ctx, later)
	for _, b := range []string{"more-pairs", "more-docs", "more-groups", "more-near"} {
		for k := 0; k < 40 && eval[bool](t, ctx, fmt.Sprintf(`document.getElementById(%q).offsetParent !== null`, b)); k++ {
			do(t, ctx, chromedp.Click(chromedp.CSS("#"+b)))
		}
		if eval[bool](t, ctx, fmt.Sprintf(`document.getElementById(%q).offsetParent !== null`, b)) {
			t.Errorf("%s still shows after forty clicks", b)
		}
	}
	eval[string](t, ctx, fmt.Sprintf(`location.hash = "#pair-%d"; ""`, rank))
	waitFor(t, ctx, "the pair built", fmt.Sprintf(`!!document.querySelector("#pair-%d.open")`, rank))
	built := eval[[]string](t, ctx, canonJS+fmt.Sprintf("(%d)", rank))
	checkQuiet(t, ev, url)

	ctx2, ev2 := newBrowser(t)
	url2, _ := openPage(t, ctx2, all)
	if eval[bool](t, ctx2, `!!document.getElementById("more-pairs")`) {
		t.Fatal("the page written out whole still has a more button")
	}
	eval[string](t, ctx2, fmt.Sprintf(`location.hash = "#pair-%d"; ""`, rank))
	waitFor(t, ctx2, "the pair opened", fmt.Sprintf(`!!document.querySelector("#pair-%d.open")`, rank))
	written := eval[[]string](t, ctx2, canonJS+fmt.Sprintf("(%d)", rank))
	checkQuiet(t, ev2, url2)

	for k := range written {
		if built[k] != written[k] {
			a, b := strings.Split(built[k], "\n"), strings.Split(written[k], "\n")
			line := 0
			for line < min(len(a), len(b)) && a[line] == b[line] {
				line++
			}
			t.Errorf("%s: built by the script differs from the template's at item %d:\nscript:   %q\ntemplate: %q",
				a[0], line, a[min(line, len(a)-1)], b[min(line, len(b)-1)])
		}
	}
	// What was compared: every row, document row, group and set, and some
	// document with more partners than its row lists.
	for k, want := range map[int]int{0: len(r.Pairs), 1: len(r.Documents), 2: len(r.Groups)} {
		if n := strings.Count(written[k], "<TR ") + strings.Count(written[k], "<LI "); n != want {
			t.Errorf("%s: %d items compared, want %d", strings.SplitN(written[k], "\n", 2)[0], n, want)
		}
	}
	if n := strings.Count(written[3], "<H3 "); n != len(r.NearCopies) || !strings.Contains(written[1], " more\"") ||
		!strings.Contains(written[4], "The text is not shown: the file has changed since the scan.") {
		t.Errorf("%d sets compared, want %d; or no document row lists more partners; or the view shows no missing text", n, len(r.NearCopies))
	}
}
