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
	Hidden                              bool
}

const rowsJS = `Array.from(document.querySelectorAll("#pair-table tbody tr")).map(function (r) {
  var c = r.cells;
  return {Rank: +r.dataset.rank, Shared: +c[4].textContent, Longest: +c[5].textContent,
    Score: +r.dataset.score, CovA: +r.dataset.cova, CovB: +r.dataset.covb,
    ScoreText: c[1].textContent, CovAText: c[2].textContent, CovBText: c[3].textContent,
    A: c[6].textContent, B: c[7].textContent, Hidden: r.hidden};
})`

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
	for i, r := range rows {
		p := res.Pairs[i]
		if r.Rank != i+1 || r.A != p.A || r.B != p.B || r.Shared != p.Shared || r.Longest != p.LongestWords() ||
			r.Score != p.Score || r.CovA != p.CoverageA || r.CovB != p.CoverageB {
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

	// Each pair opened shows every JSON passage, numbered, in both columns, at the right text.
	for i, p := range res.Pairs {
		id := fmt.Sprintf("pair-%d", i+1)
		type detail struct {
			Visible        bool
			LabelsA        []string
			LabelsB        []string
			MarksA, MarksB map[string]string
			Score          string
		}
		// Follow the rank's link in the table, as a reader would.
		do(t, ctx, chromedp.Click(chromedp.CSS(fmt.Sprintf(`#pair-table a[href="#%s"]`, id))))
		js := fmt.Sprintf(`(function () {
  var s = document.getElementById(%q);
  function side(k) {
    var col = s.querySelector('.side[data-side="' + k + '"]');
    var marks = {};
    col.querySelectorAll("mark").forEach(function (m) {
      m.dataset.p.split(" ").forEach(function (n) { marks[n] = (marks[n] || "") + m.textContent; });
    });
    return {labels: Array.from(col.querySelectorAll(".num")).map(function (e) { return e.textContent; }), marks: marks};
  }
  var a = side("A"), b = side("B");
  return {Visible: s.offsetParent !== null && getComputedStyle(s).display !== "none",
    LabelsA: a.labels, LabelsB: b.labels, MarksA: a.marks, MarksB: b.marks,
    Score: s.querySelector('dd[data-field="score"]').textContent};
})()`, id)
		// The script shows the pair on "hashchange", which fires after the click returns.
		got := eval[detail](t, ctx, js)
		for try := 0; !got.Visible && try < 40; try++ {
			time.Sleep(25 * time.Millisecond)
			got = eval[detail](t, ctx, js)
		}
		if !got.Visible {
			t.Errorf("pair %d: not shown after following its link", i+1)
		}
		if len(got.LabelsA) != len(p.Passages) || len(got.LabelsB) != len(p.Passages) {
			t.Errorf("pair %d: %d and %d numbered passages in the columns, JSON lists %d", i+1, len(got.LabelsA), len(got.LabelsB), len(p.Passages))
		}
		textB, err := os.ReadFile(filepath.FromSlash(p.B))
		if err != nil {
			t.Fatal(err)
		}
		for k, g := range p.Passages {
			n := fmt.Sprint(k + 1)
			if got.MarksA[n] != g.Text {
				t.Errorf("pair %d passage %s: column A marks %q, JSON text %q", i+1, n, got.MarksA[n], g.Text)
			}
			// The demo's files are UTF-8 text, so B's offsets are offsets into the file.
			if want := string(textB[g.BStart:g.BEnd]); got.MarksB[n] != want {
				t.Errorf("pair %d passage %s: column B marks %q, file bytes %d..%d are %q", i+1, n, got.MarksB[n], g.BStart, g.BEnd, want)
			}
		}
		if math.Abs(percentOf(t, got.Score)-p.Score) > 1e-9 {
			t.Errorf("pair %d: detail score %s, JSON %v", i+1, got.Score, p.Score)
		}
		if i == 0 {
			screenshot(t, ctx, "demo-pair-1-view")
		}
	}
	checkQuiet(t, ev, url)
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
	scripts := eval[int](t, ctx, `document.querySelectorAll("script").length`)
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
	if scripts != 1 || styles != 1 || injected != 0 {
		t.Errorf("page has %d scripts, %d styles and %d injected elements; want 1, 1, 0", scripts, styles, injected)
	}
	screenshot(t, ctx, "hostile-input")
	checkQuiet(t, ev, url)
}
