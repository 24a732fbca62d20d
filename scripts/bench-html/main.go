// Command bench-html measures the HTML review page: its size, its bound, the
// time to write it, and the time headless Chromium takes to load and lay it
// out, for the demo corpus and for a generated corpus of many documents
// (disjoint pieces of the Brown corpus samples, fetched by
// scripts/fetch-data.sh, with verbatim copies planted between them by
// internal/plant), and for corpora of a given number of pairs (-pairs:
// families of documents that each hold one shared block, see families).
// Load times are medians of -runs runs, each in a fresh headless Chromium:
// first contentful paint and the end of the load event, both from the
// page's own timing entries.
//
//	go run ./scripts/bench-html [-docs 10000] [-copies 1000] [-pairs 1000,10000,100000] [-runs 5] [-keep DIR] [-page FILE]
package main

import (
	"context"
	"encoding/json"
	"flag"
	"fmt"
	"math/rand/v2"
	"os"
	"os/exec"
	"path/filepath"
	"slices"
	"strconv"
	"strings"
	"time"

	"github.com/chromedp/chromedp"

	"reprise/internal/brown"
	"reprise/internal/plant"
	"reprise/report"
	"reprise/shingle"
)

func main() {
	if err := run(); err != nil {
		fmt.Fprintln(os.Stderr, "bench-html:", err)
		os.Exit(1)
	}
}

func run() error {
	docs := flag.Int("docs", 10000, "documents in the generated corpus")
	copies := flag.Int("copies", 1000, "verbatim copies (3 to 8 sentences) planted between them")
	keep := flag.String("keep", "", "write the corpus and pages into DIR and keep them")
	pairCounts := flag.String("pairs", "", "comma-separated pair counts: also measure a generated corpus with exactly that many pairs each")
	runs := flag.Int("runs", 5, "page loads per page (the median is reported)")
	pageFile := flag.String("page", "", "only measure this HTML page's load (no corpus, no scan)")
	flag.Parse()
	loads = *runs
	if *pageFile != "" {
		abs, err := filepath.Abs(*pageFile)
		if err != nil {
			return err
		}
		fi, err := os.Stat(abs)
		if err != nil {
			return err
		}
		t, err := loadTimes(abs)
		if err != nil {
			return err
		}
		fmt.Printf("| %s | %d bytes | %s | %s |\n", *pageFile, fi.Size(), t.paint, t.load)
		return nil
	}
	dir := *keep
	if dir == "" {
		d, err := os.MkdirTemp("", "bench-html-")
		if err != nil {
			return err
		}
		defer os.RemoveAll(d)
		dir = d
	}
	bin := filepath.Join(dir, "reprise")
	if out, err := exec.Command("go", "build", "-o", bin, "./cmd/reprise").CombinedOutput(); err != nil {
		return fmt.Errorf("go build: %v\n%s", err, out)
	}
	fmt.Printf("| corpus | documents | pairs | detailed | page bytes | bound | write (scan + render) | first paint (median of %d) | load event (median of %d) |\n", loads, loads)
	fmt.Println("|---|---|---|---|---|---|---|---|---|")
	if err := measure(bin, dir, "demo", "testdata/demo"); err != nil {
		return err
	}
	corpus := filepath.Join(dir, "generated")
	if err := generate(corpus, *docs, *copies); err != nil {
		return err
	}
	if err := measure(bin, dir, fmt.Sprintf("Brown pieces, %d copies planted", *copies), corpus); err != nil {
		return err
	}
	if *pairCounts == "" {
		return nil
	}
	for _, f := range strings.Split(*pairCounts, ",") {
		n, err := strconv.Atoi(strings.TrimSpace(f))
		if err != nil || n < 1 {
			return fmt.Errorf("-pairs: %q is not a positive count", f)
		}
		corpus := filepath.Join(dir, fmt.Sprintf("pairs-%d", n))
		docs, err := families(corpus, n)
		if err != nil {
			return err
		}
		if err := measure(bin, dir, fmt.Sprintf("families of one shared block, %d pairs planned (%d documents)", n, docs), corpus); err != nil {
			return err
		}
	}
	return nil
}

// families writes a corpus with exactly n pairs: families of m documents
// (m at most familySize), each document a disjoint piece of the Brown
// samples, and one block of 3 to 8 sentences of one member (the first
// whose piece has such a block) copied into every other member, so each family gives m(m-1)/2 pairs and
// nothing else pairs (the pieces are disjoint). Pieces are long enough that
// no member is a near-copy of another, and there are at least twice as many
// documents as the largest family plus one, so no block is over the
// automatic common-text cap (half the documents). It returns the number of
// documents written.
func families(dir string, n int) (int, error) {
	const familySize = 60
	var sizes []int
	for left := n; left > 0; {
		m := familySize
		for m*(m-1)/2 > left {
			m--
		}
		sizes = append(sizes, m)
		left -= m * (m - 1) / 2
	}
	docs := 0
	for _, m := range sizes {
		docs += m
	}
	docs = max(docs, 2*sizes[0]+1)
	texts, err := pieces(docs)
	if err != nil {
		return 0, err
	}
	rng := rand.New(rand.NewPCG(18, uint64(n)))
	sp := shingle.New(shingle.Options{})
	at := 0
	for f, m := range sizes {
		// The source is the first member whose piece has such a block.
		src, start, end, ok := at, 0, 0, false
		for ; src < at+m && !ok; src++ {
			start, end, _, ok = plant.Block(rng, sp, texts[src], 3, 8)
		}
		src--
		if !ok {
			return 0, fmt.Errorf("family %d: no block of 3 to 8 sentences in pieces %d to %d", f, at, at+m-1)
		}
		block := texts[src][start:end]
		for k := at; k < at+m; k++ {
			if k != src {
				texts[k] = texts[k] + "\n" + block + "\n"
			}
		}
		at += m
	}
	if err := os.MkdirAll(dir, 0o755); err != nil {
		return 0, err
	}
	for i, t := range texts {
		if err := os.WriteFile(filepath.Join(dir, fmt.Sprintf("f%06d.txt", i)), []byte(t), 0o644); err != nil {
			return 0, err
		}
	}
	return len(texts), nil
}

// pieces cuts the Brown samples into n disjoint pieces of whole paragraphs.
func pieces(n int) ([]string, error) {
	bdir, err := brown.Dir()
	if err != nil {
		return nil, err
	}
	samples, err := brown.Load(bdir)
	if err != nil {
		return nil, err
	}
	// Cut each sample into per pieces; samples with fewer paragraphs give
	// fewer, so raise per until there are n pieces.
	var texts []string
	for per := (n + len(samples) - 1) / len(samples); len(texts) < n && per <= 200; per++ {
		texts = texts[:0]
		for _, s := range samples {
			paras := plant.Paragraphs(s.Text)
			for k := 0; k < per && len(texts) < n; k++ {
				lo, hi := k*len(paras)/per, (k+1)*len(paras)/per
				if lo >= hi {
					continue
				}
				texts = append(texts, s.Text[paras[lo][0]:paras[hi-1][1]]+"\n")
			}
		}
	}
	if len(texts) < n {
		return nil, fmt.Errorf("the Brown samples give only %d pieces", len(texts))
	}
	return texts, nil
}

// generate writes n documents: the Brown samples cut into n/500 disjoint
// pieces of whole paragraphs each, then copies planted between pieces.
func generate(dir string, n, copies int) error {
	texts, err := pieces(n)
	if err != nil {
		return err
	}
	rng := rand.New(rand.NewPCG(4, 4))
	sizes := make([]int, copies)
	for i := range sizes {
		sizes[i] = 3 + i%6
	}
	plant.Plant(rng, shingle.New(shingle.Options{}), texts, sizes)
	if err := os.MkdirAll(dir, 0o755); err != nil {
		return err
	}
	for i, t := range texts {
		if err := os.WriteFile(filepath.Join(dir, fmt.Sprintf("d%05d.txt", i)), []byte(t), 0o644); err != nil {
			return err
		}
	}
	return nil
}

func measure(bin, dir, name, corpus string) error {
	jsonPath := filepath.Join(dir, "result.json")
	page := filepath.Join(dir, "page.html")
	if out, err := exec.Command(bin, "scan", "-q", "--format", "json", "-o", jsonPath, corpus).CombinedOutput(); err != nil {
		return fmt.Errorf("scan: %v\n%s", err, out)
	}
	start := time.Now()
	if out, err := exec.Command(bin, "scan", "-q", "--format", "html", "-o", page, corpus).CombinedOutput(); err != nil {
		return fmt.Errorf("scan: %v\n%s", err, out)
	}
	write := time.Since(start)
	raw, err := os.ReadFile(jsonPath)
	if err != nil {
		return err
	}
	var res report.Result
	if err := json.Unmarshal(raw, &res); err != nil {
		return err
	}
	fi, err := os.Stat(page)
	if err != nil {
		return err
	}
	t, err := loadTimes(page)
	if err != nil {
		return err
	}
	opt := report.HTMLOptions{}
	detailed := min(len(res.Pairs), report.DefaultHTMLPairs)
	fmt.Printf("| %s | %d | %d | %d | %d | %d | %v | %s | %s |\n", name, len(res.Documents), len(res.Pairs), detailed,
		fi.Size(), report.HTMLSizeBound(&res, opt), write.Round(time.Millisecond), t.paint, t.load)
	return nil
}

// loads is the number of page loads per page (-runs).
var loads = 5

type timings struct{ paint, load string }

// loadTimes opens the page loads times, each in a fresh browser, and
// formats the medians with the range.
func loadTimes(page string) (timings, error) {
	var paint, load []float64
	for k := 0; k < loads; k++ {
		p, l, err := loadTime(page)
		if err != nil {
			return timings{}, err
		}
		paint, load = append(paint, p), append(load, l)
	}
	return timings{median(paint), median(load)}, nil
}

func median(xs []float64) string {
	slices.Sort(xs)
	m := xs[len(xs)/2]
	if len(xs)%2 == 0 {
		m = (xs[len(xs)/2-1] + xs[len(xs)/2]) / 2
	}
	return fmt.Sprintf("%.0f ms (%.0f–%.0f)", m, xs[0], xs[len(xs)-1])
}

// loadTime opens the page in headless Chromium (network off, fresh profile)
// and reads the page's own timing entries: first contentful paint, and the
// end of the load event (after layout of the whole document), both from the
// start of navigation, in milliseconds.
func loadTime(page string) (paint, load float64, err error) {
	profile, err := os.MkdirTemp("", "bench-html-profile-")
	if err != nil {
		return 0, 0, err
	}
	defer os.RemoveAll(profile)
	actx, cancelA := chromedp.NewExecAllocator(context.Background(),
		chromedp.ExecPath("/usr/bin/chromium"), chromedp.Headless, chromedp.NoSandbox, chromedp.DisableGPU, chromedp.NoFirstRun,
		chromedp.Flag("disable-quic", true), chromedp.Flag("disable-background-networking", true),
		chromedp.Flag("disable-component-update", true), chromedp.Flag("disable-sync", true),
		chromedp.UserDataDir(profile), chromedp.WindowSize(1280, 900))
	defer cancelA()
	ctx, cancel := chromedp.NewContext(actx)
	defer cancel()
	ctx, cancelT := context.WithTimeout(ctx, 3*time.Minute)
	defer cancelT()
	if err := chromedp.Do(ctx, chromedp.Navigate("file://"+page)); err != nil {
		return 0, 0, err
	}
	// Force a full layout, then read the timing (the paint entry may come a
	// frame after the load event: wait for it).
	ms, err := chromedp.Run(ctx, chromedp.Evaluate[[]float64](`new Promise(function (done) {
  document.body.getBoundingClientRect();
  function read() {
    var n = performance.getEntriesByType("navigation")[0];
    var p = performance.getEntriesByName("first-contentful-paint")[0];
    if (!p || !n.loadEventEnd) { requestAnimationFrame(read); return; }
    done([p.startTime, n.loadEventEnd - n.startTime]);
  }
  read();
})`, chromedp.EvalAwaitPromise))
	if err != nil {
		return 0, 0, err
	}
	return ms[0], ms[1], nil
}
