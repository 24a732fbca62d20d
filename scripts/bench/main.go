// Command bench measures reprise at scale against counting the words of
// the same files, and against a brute-force all-pairs comparison.
//
// It builds deterministic corpora from the Brown corpus sentences (fetched
// by scripts/fetch-data.sh): N documents of 20 to 80 sentences, with a
// fixed share of documents receiving a planted copy of 3 to 8 consecutive
// sentences from an earlier document. Every sentence is a Brown sentence
// with one word in every four replaced by a word drawn from the corpus vocabulary:
// the 57,000 Brown sentences alone, spread over 10^5 documents, would put
// every sentence in about ninety documents, while real collections hold
// mostly distinct sentences; the replacement keeps Brown's sentence
// lengths, punctuation and words and makes accidental sharing as rare as it
// is in real text.
//
// For every size it runs, alternately and -runs times each,
//
//	reprise scan --format json -o /dev/null -q DIR
//	find DIR -type f -exec cat {} + | wc -w
//
// and prints the median wall times, their ratio and the peak resident
// memory (from /usr/bin/time -f %M). At -brute documents it also compares
// all pairs directly, checks that the pairs are the engine's, and times
// both.
//
// A script, never a timed unit test: timings depend on the machine and
// its load; BENCHMARKS.md records the figures with the machine they came
// from.
package main

import (
	"bytes"
	"cmp"
	"encoding/json"
	"flag"
	"fmt"
	"hash/fnv"
	"math"
	"math/rand/v2"
	"os"
	"os/exec"
	"path/filepath"
	"runtime"
	"runtime/debug"
	"slices"
	"strconv"
	"strings"
	"time"

	"reprise/internal/brown"
	"reprise/pairs"
	"reprise/shingle"
)

func main() {
	if len(os.Args) > 1 && os.Args[1] == "engine-child" {
		if err := engineChild(os.Args[2:]); err != nil {
			fmt.Fprintln(os.Stderr, "bench engine-child:", err)
			os.Exit(1)
		}
		return
	}
	if err := run(); err != nil {
		fmt.Fprintln(os.Stderr, "bench:", err)
		os.Exit(1)
	}
}

type options struct {
	sizes  []int
	runs   int
	brute  int
	reuse  float64
	work   string
	memory string
	seed   uint64
	extra  []string
	copies copyPlan
	// budgets: measure the scan at each --memory (-budgets) instead of
	// against the word count, with other as a second binary side by side.
	budgets []string
	other   string
}

// copyPlan replaces documents of a corpus by copies of one text, each with
// a few words changed: the near-copy benchmark (-copies).
type copyPlan struct {
	count int      // documents replaced (0: none)
	edits int      // words changed in each copy, in different lines
	name  string   // the copied text's name, for the corpus folder
	lines []string // the copied text, by line
}

func run() error {
	var o options
	sizes := flag.String("sizes", "10000,20000,100000", "comma-separated corpus sizes (documents)")
	flag.IntVar(&o.runs, "runs", 5, "runs of each command per size, alternating")
	flag.IntVar(&o.brute, "brute", 2000, "documents for the brute-force comparison (0: skip)")
	flag.Float64Var(&o.reuse, "reuse", 0.1, "share of documents that receive a planted copy")
	flag.StringVar(&o.work, "work", filepath.Join(os.TempDir(), "reprise-bench"), "folder for the corpora and the binary")
	flag.StringVar(&o.memory, "memory", "", "pass --memory SIZE to reprise scan (default: its own default)")
	flag.Uint64Var(&o.seed, "seed", 2026, "corpus seed")
	extra := flag.String("args", "", "more flags for reprise scan, space-separated")
	engineDocs := flag.Int("engine", 0, "also run the pair engine alone on this many documents' fingerprints (e.g. 1000000; 0: skip)")
	engineMem := flag.String("engine-memory", "1GiB,0", "budgets for -engine, comma-separated (0: no bound)")
	generateOnly := flag.Bool("generate-only", false, "write the corpora of -sizes under -work and stop (to time a size by hand)")
	flag.IntVar(&o.copies.count, "copies", 0, "also measure each size with this many documents replaced by copies of -copy-text, side by side with the corpus without them")
	copyText := flag.String("copy-text", "", "-copies: the text copied (a text file, or an SPDX license JSON file: its licenseText)")
	flag.IntVar(&o.copies.edits, "copy-edits", 3, "-copies: words changed in each copy, each in another line")
	budgets := flag.String("budgets", "", "measure each size at these --memory sizes, comma-separated (e.g. 1GiB,0): wall time, peak RSS against the bound plus 64 MiB, and whether the JSON reports are byte-identical")
	scriptsRow := flag.Bool("scripts", false, "measure the first of -sizes written in each of 14 scripts (letters mapped) against the Latin corpus, time per MB side by side (e.g. -sizes 5000)")
	flag.StringVar(&o.other, "other", "", "-budgets: also run this reprise binary (e.g. built from an earlier commit), alternating with the current build")
	flag.Parse()
	for _, b := range strings.Split(*budgets, ",") {
		if b = strings.TrimSpace(b); b != "" {
			o.budgets = append(o.budgets, b)
		}
	}
	if o.copies.count > 0 {
		if err := o.copies.load(*copyText); err != nil {
			return err
		}
	}
	for _, s := range strings.Split(*sizes, ",") {
		if s = strings.TrimSpace(s); s == "" {
			continue
		}
		n, err := strconv.Atoi(s)
		if err != nil || n < 2 {
			return fmt.Errorf("-sizes: %q is not a size", s)
		}
		o.sizes = append(o.sizes, n)
	}
	o.extra = strings.Fields(*extra)
	if o.runs < 1 {
		return fmt.Errorf("-runs must be at least 1")
	}

	dir, err := brown.Dir()
	if err != nil {
		return err
	}
	samples, err := brown.Load(dir)
	if err != nil {
		return err
	}
	g := newGenerator(samples, o.seed, o.reuse)
	if err := os.MkdirAll(o.work, 0o755); err != nil {
		return err
	}
	if *generateOnly {
		for _, n := range o.sizes {
			dir := corpusDir(o, n)
			bytes, err := g.ensure(dir, n)
			if err != nil {
				return err
			}
			fmt.Printf("%d documents, %.1f MB in %s\n", n, float64(bytes)/1e6, dir)
		}
		return nil
	}
	bin := filepath.Join(o.work, "reprise")
	build := exec.Command("go", "build", "-o", bin, "./cmd/reprise")
	build.Stdout, build.Stderr = os.Stderr, os.Stderr
	if err := build.Run(); err != nil {
		return fmt.Errorf("go build: %w", err)
	}
	mem, _ := os.ReadFile("/proc/meminfo")
	fmt.Printf("machine: %s/%s, %d cores, %s, %s\n", runtime.GOOS, runtime.GOARCH, runtime.NumCPU(), memTotal(mem), runtime.Version())
	fmt.Printf("corpus: Brown sentences (one word in four replaced), 20-80 per document, %.0f%% of documents with a planted copy of 3-8 sentences, seed %d\n\n", o.reuse*100, o.seed)

	if o.copies.count > 0 {
		return measureCopies(g, bin, o)
	}
	if *scriptsRow {
		return measureScripts(g, bin, o, o.sizes[0])
	}
	if len(o.budgets) > 0 {
		return measureBudgets(g, bin, o)
	}
	var prev *result
	for _, n := range o.sizes {
		r, err := measure(g, bin, n, o)
		if err != nil {
			return err
		}
		if prev != nil {
			growth := r.scan / prev.scan
			perDoubling := math.Pow(growth, math.Log(2)/math.Log(float64(n)/float64(prev.n)))
			fmt.Printf("  growth from %d to %d documents: %.2fx the time (%.2fx per doubling)\n", prev.n, n, growth, perDoubling)
		}
		fmt.Println()
		prev = r
	}
	if o.brute > 0 {
		if err := bruteForce(g, bin, o); err != nil {
			return err
		}
	}
	if *engineDocs > 0 {
		if err := engineRuns(*engineDocs, *engineMem, o); err != nil {
			return err
		}
	}
	return nil
}

// engineRuns runs the pair engine alone, in a child process per budget
// (so that each has its own peak RSS), on the fingerprints of n documents
// shaped like the corpus: 20 to 80 distinct sentences each, and the same
// share of planted copies of 3 to 8 sentences from an earlier document.
// Splitting a million documents' text would take most of an hour on two
// cores; the engine's input is fingerprints only, so this measures the
// counting at that scale without it. The budget given to the engine is
// the --memory figure less the Input it is handed (8 bytes per entry and
// a slice header per document), as cmd/reprise does for what it holds.
func engineRuns(n int, budgets string, o options) error {
	self, err := os.Executable()
	if err != nil {
		return err
	}
	fmt.Printf("pair engine alone, %d documents\n", n)
	var digests []string
	for _, b := range strings.Split(budgets, ",") {
		b = strings.TrimSpace(b)
		t, rss, out, err := timed(self, "engine-child", strconv.Itoa(n), b, strconv.FormatUint(o.seed, 10), strconv.FormatFloat(o.reuse, 'g', -1, 64), o.work)
		if err != nil {
			return err
		}
		fmt.Printf("  --memory %s: %.1f s, peak RSS %.0f MiB; %s", b, t, rss/1024, out)
		digests = append(digests, strings.Fields(out)[1])
	}
	same := true
	for _, d := range digests {
		same = same && d == digests[0]
	}
	fmt.Printf("  identical results at every budget: %v\n", same)
	return nil
}

// engineChild: engine-child N BUDGET SEED REUSE TEMP.
func engineChild(args []string) error {
	if len(args) != 5 {
		return fmt.Errorf("want N BUDGET SEED REUSE TEMP")
	}
	n, err := strconv.Atoi(args[0])
	if err != nil {
		return err
	}
	var memory int64
	if args[1] != "0" {
		if memory, err = parseSize(args[1]); err != nil {
			return err
		}
	}
	seed, err := strconv.ParseUint(args[2], 10, 64)
	if err != nil {
		return err
	}
	reuse, err := strconv.ParseFloat(args[3], 64)
	if err != nil {
		return err
	}
	if memory > 0 {
		debug.SetMemoryLimit(memory)
	}
	docs := make([][]uint64, n)
	var entries int64
	for i := range docs {
		docs[i] = engineDoc(seed, reuse, i)
		entries += int64(len(docs[i]))
	}
	budget := int64(0)
	if memory > 0 {
		budget = max(memory-8*entries-24*int64(n), 1<<20)
	}
	start := time.Now()
	res, err := pairs.Count(pairs.Input{Docs: docs}, pairs.Options{MemoryBudget: budget, TempDir: args[4], Jobs: runtime.NumCPU()})
	if err != nil {
		return err
	}
	h := fnv.New64a()
	for _, p := range res.Pairs {
		fmt.Fprintf(h, "%d %d %d\n", p.A, p.B, p.Shared)
	}
	for _, g := range res.Groups {
		fmt.Fprintf(h, "%v %d\n", g.Docs, g.Shared)
	}
	fmt.Printf("digest %016x: %d entries, %d pairs, %d groups, count %.1f s, %d runs on disk (%d MiB), %d ranges\n",
		h.Sum64(), entries, len(res.Pairs), len(res.Groups), time.Since(start).Seconds(), res.Spill.Runs, res.Spill.BytesWritten>>20, res.Spill.Ranges)
	return nil
}

// engineDoc is document i's distinct fingerprints: its own, and for a
// share of documents 3 to 8 of an earlier document's.
func engineDoc(seed uint64, reuse float64, i int) []uint64 {
	own := func(d int) []uint64 {
		r := rand.New(rand.NewPCG(seed, uint64(d)))
		out := make([]uint64, 20+r.IntN(61))
		for k := range out {
			out[k] = r.Uint64()
		}
		return out
	}
	fps := own(i)
	r := rand.New(rand.NewPCG(seed^0x5eed, uint64(i)))
	if i > 0 && r.Float64() < reuse {
		src := own(r.IntN(i))
		k := 3 + r.IntN(6)
		from := r.IntN(len(src) - k + 1)
		fps = append(fps, src[from:from+k]...)
	}
	slices.Sort(fps)
	return slices.Compact(fps)
}

// parseSize reads 512MiB, 1GiB or a byte count.
func parseSize(s string) (int64, error) {
	for _, u := range []struct {
		suffix string
		factor int64
	}{{"GiB", 1 << 30}, {"MiB", 1 << 20}, {"KiB", 1 << 10}} {
		if v, ok := strings.CutSuffix(s, u.suffix); ok {
			f, err := strconv.ParseFloat(v, 64)
			return int64(f * float64(u.factor)), err
		}
	}
	return strconv.ParseInt(s, 10, 64)
}

// loadAverage is the first three fields of /proc/loadavg, or "unknown".
func loadAverage() string {
	b, err := os.ReadFile("/proc/loadavg")
	if f := strings.Fields(string(b)); err == nil && len(f) >= 3 {
		return strings.Join(f[:3], " ")
	}
	return "unknown"
}

func memTotal(meminfo []byte) string {
	for _, line := range strings.Split(string(meminfo), "\n") {
		if f := strings.Fields(line); len(f) >= 2 && f[0] == "MemTotal:" {
			kb, _ := strconv.ParseFloat(f[1], 64)
			return fmt.Sprintf("%.1f GiB memory", kb/(1<<20))
		}
	}
	return "memory unknown"
}

type result struct {
	n          int
	scan, base float64 // median seconds
}

// measure builds (or reuses) the corpus of n documents and times the two
// commands alternately.
func measure(g *generator, bin string, n int, o options) (*result, error) {
	dir := corpusDir(o, n)
	bytes, err := g.ensure(dir, n)
	if err != nil {
		return nil, err
	}
	scanArgs := []string{"scan", "--format", "json", "-o", os.DevNull, "-q"}
	if o.memory != "" {
		scanArgs = append(scanArgs, "--memory", o.memory)
	}
	scanArgs = append(append(scanArgs, o.extra...), dir)
	fmt.Printf("%d documents, %.1f MB in %s\n", n, float64(bytes)/1e6, dir)
	fmt.Printf("  reprise %s\n", strings.Join(scanArgs, " "))
	fmt.Printf("  sh -c 'find %s -type f -exec cat {} + | wc -w'\n", dir)
	var scans, bases []float64
	var scanRSS, baseRSS []float64
	for i := range o.runs {
		t, rss, _, err := timed(bin, scanArgs...)
		if err != nil {
			return nil, fmt.Errorf("reprise scan (run %d): %w", i+1, err)
		}
		scans, scanRSS = append(scans, t), append(scanRSS, rss)
		t, rss, out, err := timed("sh", "-c", "find "+shellQuote(dir)+" -type f -exec cat {} + | wc -w")
		if err != nil {
			return nil, fmt.Errorf("baseline (run %d): %w", i+1, err)
		}
		bases, baseRSS = append(bases, t), append(baseRSS, rss)
		if i == 0 {
			fmt.Printf("  words (wc -w): %s\n", strings.TrimSpace(out))
		}
	}
	r := &result{n: n, scan: median(scans), base: median(bases)}
	fmt.Printf("  load average after the runs: %s (other work on the machine skews both commands)\n", loadAverage())
	fmt.Printf("  reprise scan: median %.2f s (runs %s), peak RSS %.0f MiB\n", r.scan, list(scans), slices.Max(scanRSS)/1024)
	fmt.Printf("  cat | wc -w:  median %.2f s (runs %s), peak RSS %.0f MiB\n", r.base, list(bases), slices.Max(baseRSS)/1024)
	fmt.Printf("  ratio scan / baseline: %.2f\n", r.scan/r.base)
	return r, nil
}

// corpusVersion names the generator's version in the corpus folder, so
// that a corpus written by an earlier generator is not reused.
const corpusVersion = 2

// corpusDir is where the corpus of n documents is written.
func corpusDir(o options, n int) string {
	dir := filepath.Join(o.work, fmt.Sprintf("corpus-%d-%d-%g-v%d", n, o.seed, o.reuse, corpusVersion))
	if o.copies.count > 0 {
		dir += fmt.Sprintf("-copies-%d-%s-%d", o.copies.count, o.copies.name, o.copies.edits)
	}
	return dir
}

// load reads the text to copy.
func (c *copyPlan) load(path string) error {
	if path == "" {
		return fmt.Errorf("-copies needs -copy-text")
	}
	raw, err := os.ReadFile(path)
	if err != nil {
		return err
	}
	text := string(raw)
	if strings.HasSuffix(path, ".json") {
		var lic struct {
			LicenseText string `json:"licenseText"`
		}
		if err := json.Unmarshal(raw, &lic); err != nil || lic.LicenseText == "" {
			return fmt.Errorf("%s: no licenseText (%v)", path, err)
		}
		text = lic.LicenseText
	}
	c.name = strings.TrimSuffix(filepath.Base(path), filepath.Ext(path))
	c.lines = strings.Split(text, "\n")
	return nil
}

// copyAt reports whether document i of n is a copy: count of them, evenly
// spread.
func (c *copyPlan) copyAt(i, n int) bool {
	if c.count == 0 {
		return false
	}
	every := max(n/c.count, 1)
	return i%every == every/2 && i/every < c.count
}

// copyText is copy i: the text with c.edits words, in as many lines drawn
// for i, replaced by words of the vocabulary.
func (c *copyPlan) copyText(g *generator, i int) string {
	r := rand.New(rand.NewPCG(g.seed^0xc0b1e5, uint64(i)))
	lines := slices.Clone(c.lines)
	var withWords []int
	for k, l := range lines {
		if len(strings.Fields(l)) >= 4 {
			withWords = append(withWords, k)
		}
	}
	r.Shuffle(len(withWords), func(a, b int) { withWords[a], withWords[b] = withWords[b], withWords[a] })
	for _, k := range withWords[:min(c.edits, len(withWords))] {
		toks := strings.Fields(lines[k])
		for try := 0; try < len(toks); try++ {
			if replaceWord(&toks[r.IntN(len(toks))], g.vocab[r.IntN(len(g.vocab))]) {
				break
			}
		}
		lines[k] = strings.Join(toks, " ")
	}
	return strings.Join(lines, "\n")
}

// measureCopies measures every size twice, side by side: the corpus as
// generated, and the same corpus with o.copies.count documents replaced by
// copies of one text; for each it also reports what the run found (pairs,
// sets of near-copies, pairs not listed, the JSON's size).
func measureCopies(g *generator, bin string, o options) error {
	fmt.Printf("copies: %d documents replaced by copies of %s (%d lines), %d words changed in each\n\n", o.copies.count, o.copies.name, len(o.copies.lines), o.copies.edits)
	for _, n := range o.sizes {
		plain, with := o, o
		plain.copies = copyPlan{}
		for _, v := range []options{plain, with} {
			gv := *g
			gv.copies = &v.copies
			if _, err := measure(&gv, bin, n, v); err != nil {
				return err
			}
			if err := describeRun(&gv, bin, n, v); err != nil {
				return err
			}
			fmt.Println()
		}
	}
	return nil
}

// describeRun runs the scan once more with the JSON kept, and prints what
// it found.
func describeRun(g *generator, bin string, n int, o options) error {
	out, err := os.CreateTemp("", "reprise-bench-*.json")
	if err != nil {
		return err
	}
	out.Close()
	defer os.Remove(out.Name())
	args := []string{"scan", "--format", "json", "-o", out.Name(), "-q"}
	if o.memory != "" {
		args = append(args, "--memory", o.memory)
	}
	args = append(append(args, o.extra...), corpusDir(o, n))
	if _, _, _, err := timed(bin, args...); err != nil {
		return err
	}
	raw, err := os.ReadFile(out.Name())
	if err != nil {
		return err
	}
	var r struct {
		Summary struct {
			Pairs             int     `json:"pairs"`
			CommonUnits       int     `json:"common_units"`
			NearCopySets      int     `json:"near_copy_sets"`
			NearCopyDocuments int     `json:"near_copy_documents"`
			PairsNotListed    int     `json:"pairs_not_listed"`
			CommonShare       float64 `json:"common_share"`
		} `json:"summary"`
		Settings struct {
			MaxDocs int `json:"max_docs"`
		} `json:"settings"`
	}
	if err := json.Unmarshal(raw, &r); err != nil {
		return err
	}
	s := r.Summary
	fmt.Printf("  found: %d pairs listed, %d not listed; %d sets of near-copies holding %d documents; %d common units (%.2f%% of the words; cap %d); JSON %.1f MB\n",
		s.Pairs, s.PairsNotListed, s.NearCopySets, s.NearCopyDocuments, s.CommonUnits, 100*s.CommonShare, r.Settings.MaxDocs, float64(len(raw))/1e6)
	return nil
}

// timed runs a command under /usr/bin/time and returns its wall time in
// seconds, its peak RSS in KiB and its standard output.
func timed(name string, args ...string) (float64, float64, string, error) {
	rssFile, err := os.CreateTemp("", "reprise-bench-rss-")
	if err != nil {
		return 0, 0, "", err
	}
	rssFile.Close()
	defer os.Remove(rssFile.Name())
	cmd := exec.Command("/usr/bin/time", append([]string{"-f", "%M", "-o", rssFile.Name(), name}, args...)...)
	var out, errs bytes.Buffer
	cmd.Stdout, cmd.Stderr = &out, &errs
	start := time.Now()
	err = cmd.Run()
	wall := time.Since(start).Seconds()
	if err != nil {
		return 0, 0, "", fmt.Errorf("%s: %w: %s", name, err, errs.String())
	}
	b, err := os.ReadFile(rssFile.Name())
	if err != nil {
		return 0, 0, "", err
	}
	fields := strings.Fields(string(b))
	if len(fields) == 0 {
		return 0, 0, "", fmt.Errorf("/usr/bin/time gave no figure")
	}
	rss, err := strconv.ParseFloat(fields[len(fields)-1], 64)
	if err != nil {
		return 0, 0, "", fmt.Errorf("/usr/bin/time: %q", b)
	}
	return wall, rss, out.String(), nil
}

func shellQuote(s string) string { return "'" + strings.ReplaceAll(s, "'", `'\''`) + "'" }

func median(xs []float64) float64 {
	s := slices.Clone(xs)
	slices.Sort(s)
	if len(s)%2 == 1 {
		return s[len(s)/2]
	}
	return (s[len(s)/2-1] + s[len(s)/2]) / 2
}

func list(xs []float64) string {
	parts := make([]string, len(xs))
	for i, x := range xs {
		parts[i] = strconv.FormatFloat(x, 'f', 2, 64)
	}
	return strings.Join(parts, " ")
}

// generator makes the documents: document i depends only on the seed and
// i, so a corpus of n documents is the first n of any larger one.
type generator struct {
	sentences []string   // Brown sentences, one per line of the untagged text
	vocab     []string   // Brown words made of letters only
	words     [][]string // each sentence's tokens
	seed      uint64
	reuse     float64
	copies    *copyPlan // documents replaced by copies of one text (nil: none)
	n         int       // the corpus size being written, for copies
}

func newGenerator(samples []brown.Sample, seed uint64, reuse float64) *generator {
	g := &generator{seed: seed, reuse: reuse}
	seen := map[string]bool{}
	for _, s := range samples {
		for _, line := range strings.Split(s.Text, "\n") {
			line = strings.TrimSpace(line)
			if line == "" {
				continue
			}
			g.sentences = append(g.sentences, line)
			toks := strings.Fields(line)
			g.words = append(g.words, toks)
			for _, t := range toks {
				if isWord(t) && !seen[t] {
					seen[t] = true
					g.vocab = append(g.vocab, t)
				}
			}
		}
	}
	slices.Sort(g.vocab)
	return g
}

// replaceEvery: one word is replaced in every run of this many tokens.
const replaceEvery = 4

// replaceWord replaces the letters of *tok (a word with any punctuation
// before or after it, "daughter," or "(Mr.") by w, and reports whether it
// held a word.
func replaceWord(tok *string, w string) bool {
	t := *tok
	lo, hi := 0, len(t)
	for lo < hi && !isWord(t[lo:lo+1]) {
		lo++
	}
	for hi > lo && !isWord(t[hi-1:hi]) {
		hi--
	}
	if lo == hi || !isWord(t[lo:hi]) {
		return false
	}
	*tok = t[:lo] + w + t[hi:]
	return true
}

func isWord(t string) bool {
	for _, c := range []byte(t) {
		if (c|0x20) < 'a' || (c|0x20) > 'z' {
			return false
		}
	}
	return t != ""
}

// base returns document i's own sentences.
func (g *generator) base(i int) []string {
	r := rand.New(rand.NewPCG(g.seed, uint64(i)))
	n := 20 + r.IntN(61)
	out := make([]string, n)
	for k := range out {
		toks := slices.Clone(g.words[r.IntN(len(g.words))])
		// One word in every replaceEvery tokens (at a random place in each
		// run of that many) is replaced, keeping any punctuation around it,
		// so that every piece the splitter may cut a line into ("Mr."
		// ends a sentence for UAX #29) holds a replaced word: replacing two
		// words per line left many pieces as Brown wrote them, shared by
		// the ninety documents that drew the line.
		for lo := 0; lo < len(toks); lo += replaceEvery {
			hi := min(lo+replaceEvery, len(toks))
			x := lo + r.IntN(hi-lo)
			for try := 0; try < hi-lo && !replaceWord(&toks[x], g.vocab[r.IntN(len(g.vocab))]); try++ {
				x = lo + (x-lo+1)%(hi-lo)
			}
		}
		out[k] = strings.Join(toks, " ")
	}
	return out
}

// doc returns document i: its own sentences and, for a share of the
// documents, a planted block of 3 to 8 consecutive sentences from an
// earlier document.
func (g *generator) doc(i int) string {
	if g.copies != nil && g.copies.copyAt(i, g.n) {
		return g.copies.copyText(g, i)
	}
	sents := g.base(i)
	r := rand.New(rand.NewPCG(g.seed^0x5eed, uint64(i)))
	if i > 0 && r.Float64() < g.reuse {
		src := g.base(r.IntN(i))
		k := 3 + r.IntN(6)
		from := r.IntN(len(src) - k + 1)
		at := r.IntN(len(sents) + 1)
		sents = slices.Concat(sents[:at], src[from:from+k], sents[at:])
	}
	var b strings.Builder
	for k, s := range sents {
		switch {
		case k == 0:
		case k%5 == 0:
			b.WriteString("\n\n")
		default:
			b.WriteByte(' ')
		}
		b.WriteString(s)
	}
	b.WriteByte('\n')
	return b.String()
}

func (g *generator) path(dir string, i int) string {
	return filepath.Join(dir, fmt.Sprintf("%04d", i/1000), fmt.Sprintf("doc%07d.txt", i))
}

// ensure writes the corpus of n documents into dir unless a complete one
// is there (a marker file beside it says so), and returns its size.
func (g *generator) ensure(dir string, n int) (int64, error) {
	marker := dir + ".done"
	if b, err := os.ReadFile(marker); err == nil {
		if size, err := strconv.ParseInt(strings.TrimSpace(string(b)), 10, 64); err == nil {
			return size, nil
		}
	}
	if err := os.RemoveAll(dir); err != nil {
		return 0, err
	}
	g.n = n
	var size int64
	for i := range n {
		p := g.path(dir, i)
		if i%1000 == 0 {
			if err := os.MkdirAll(filepath.Dir(p), 0o755); err != nil {
				return 0, err
			}
		}
		text := g.doc(i)
		if err := os.WriteFile(p, []byte(text), 0o644); err != nil {
			return 0, err
		}
		size += int64(len(text))
	}
	return size, os.WriteFile(marker, []byte(strconv.FormatInt(size, 10)), 0o644)
}

// bruteForce compares every pair of the first o.brute documents directly:
// each document's distinct sentence fingerprints (the same splitter and
// normalization as reprise) intersected with every other's by a merge
// walk. It checks the pairs sharing at least 3 against reprise's, and
// times the comparison against pairs.Count on the same fingerprints, and
// the whole brute force (splitting included) against reprise scan.
// bruteMinShared is the support threshold of the brute-force comparison,
// passed to reprise scan explicitly so the check does not depend on its default.
const bruteMinShared = 2

func bruteForce(g *generator, bin string, o options) error {
	n := o.brute
	dir := corpusDir(o, n)
	if _, err := g.ensure(dir, n); err != nil {
		return err
	}
	fmt.Printf("brute force at %d documents (%d pairs)\n", n, n*(n-1)/2)
	out := filepath.Join(o.work, "brute.json")
	var scans []float64
	for range o.runs {
		t, _, _, err := timed(bin, "scan", "--format", "json", "-q", "--min-shared", strconv.Itoa(bruteMinShared), "-o", out, dir)
		if err != nil {
			return err
		}
		scans = append(scans, t)
	}
	var rep struct {
		Pairs []struct {
			A, B   string
			Shared int
		}
	}
	b, err := os.ReadFile(out)
	if err != nil {
		return err
	}
	if err := json.Unmarshal(b, &rep); err != nil {
		return err
	}
	engine := map[string]int{}
	for _, p := range rep.Pairs {
		engine[p.A+"\x00"+p.B] = p.Shared
	}

	var splits, compares, counts []float64
	var found map[string]int
	sp := shingle.New(shingle.Options{})
	for range o.runs {
		start := time.Now()
		sets := make([][]uint64, n)
		var units []shingle.Unit
		for i := range n {
			text, err := os.ReadFile(g.path(dir, i))
			if err != nil {
				return err
			}
			units, _ = sp.Sentences(string(text), units[:0])
			set := make([]uint64, len(units))
			for k, u := range units {
				set[k] = u.Hash
			}
			slices.Sort(set)
			sets[i] = slices.Compact(set)
		}
		splits = append(splits, time.Since(start).Seconds())

		start = time.Now()
		found = map[string]int{}
		for a := range n {
			for c := a + 1; c < n; c++ {
				if k := intersectCount(sets[a], sets[c]); k >= bruteMinShared {
					found[filepath.ToSlash(g.path(dir, a))+"\x00"+filepath.ToSlash(g.path(dir, c))] = k
				}
			}
		}
		compares = append(compares, time.Since(start).Seconds())

		start = time.Now()
		if _, err := pairs.Count(pairs.Input{Docs: sets}, pairs.Options{MinShared: bruteMinShared}); err != nil {
			return err
		}
		counts = append(counts, time.Since(start).Seconds())
	}
	same := len(found) == len(engine)
	for k, v := range found {
		same = same && engine[k] == v
	}
	fmt.Printf("  same pairs as reprise scan: %v (%d pairs, brute force %d)\n", same, len(engine), len(found))
	fmt.Printf("  all-pairs comparison: median %.3f s; pairs.Count on the same fingerprints: median %.4f s; ratio %.0fx\n",
		median(compares), median(counts), median(compares)/median(counts))
	fmt.Printf("  brute force with splitting: median %.2f s; reprise scan: median %.2f s; ratio %.1fx\n",
		median(splits)+median(compares), median(scans), (median(splits)+median(compares))/median(scans))
	if !same {
		return fmt.Errorf("brute force and reprise disagree")
	}
	return nil
}

func intersectCount(x, y []uint64) int {
	i, j, n := 0, 0, 0
	for i < len(x) && j < len(y) {
		switch cmp.Compare(x[i], y[j]) {
		case -1:
			i++
		case 1:
			j++
		default:
			n++
			i++
			j++
		}
	}
	return n
}
