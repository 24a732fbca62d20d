// Command bench-html measures the HTML review page: its size, its bound, the
// time to write it, and the time headless Chromium takes to load and lay it
// out, for the demo corpus and for a generated corpus of many documents
// (disjoint pieces of the Brown corpus samples, fetched by
// scripts/fetch-data.sh, with verbatim copies planted between them by
// internal/plant).
//
//	go run ./scripts/bench-html [-docs 10000] [-copies 1000] [-keep DIR]
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
	flag.Parse()
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
	fmt.Println("| corpus | documents | pairs | detailed | page bytes | bound | write (scan + render) | load in Chromium |")
	fmt.Println("|---|---|---|---|---|---|---|---|")
	if err := measure(bin, dir, "demo", "testdata/demo"); err != nil {
		return err
	}
	corpus := filepath.Join(dir, "generated")
	if err := generate(corpus, *docs, *copies); err != nil {
		return err
	}
	return measure(bin, dir, fmt.Sprintf("Brown pieces, %d copies planted", *copies), corpus)
}

// generate writes n documents: the Brown samples cut into n/500 disjoint
// pieces of whole paragraphs each, then copies planted between pieces.
func generate(dir string, n, copies int) error {
	bdir, err := brown.Dir()
	if err != nil {
		return err
	}
	samples, err := brown.Load(bdir)
	if err != nil {
		return err
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
		return fmt.Errorf("the Brown samples give only %d pieces", len(texts))
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
	load, err := loadTime(page)
	if err != nil {
		return err
	}
	opt := report.HTMLOptions{}
	detailed := min(len(res.Pairs), report.DefaultHTMLPairs)
	fmt.Printf("| %s | %d | %d | %d | %d | %d | %v | %v |\n", name, len(res.Documents), len(res.Pairs), detailed,
		fi.Size(), report.HTMLSizeBound(&res, opt), write.Round(time.Millisecond), load)
	return nil
}

// loadTime opens the page in headless Chromium (network off, fresh profile)
// and reads the page's own navigation timing: from the start of navigation
// to the end of the load event, after layout of the whole document.
func loadTime(page string) (string, error) {
	profile, err := os.MkdirTemp("", "bench-html-profile-")
	if err != nil {
		return "", err
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
		return "", err
	}
	// Force a full layout, then read the timing.
	ms, err := chromedp.Run(ctx, chromedp.Evaluate[float64](`(function () {
  document.body.getBoundingClientRect();
  var n = performance.getEntriesByType("navigation")[0];
  return n.loadEventEnd - n.startTime;
})()`))
	if err != nil {
		return "", err
	}
	return strings.TrimSuffix(fmt.Sprintf("%.0f ms", ms), ".0"), nil
}
