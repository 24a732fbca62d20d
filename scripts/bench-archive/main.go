// Command bench-archive measures the persistent archive: add throughput,
// size on disk against the input text, and check latency for one
// 3,000-word document and for a batch of 1,000 documents.
//
// The corpus follows the recipe of scripts/bench (Brown corpus sentences
// fetched by scripts/fetch-data.sh, two words of each replaced by words
// drawn from the corpus vocabulary so that accidental sharing stays rare;
// 20 to 80 sentences per document; a share of documents with a planted
// copy of 3 to 8 consecutive sentences from an earlier one), generated
// here with its own seed so that this program stands alone.
//
// It runs the reprise binary, as a user would: every time includes
// starting the process and opening the store.
//
//	reprise archive --archive DIR add -q CORPUS             (once, timed)
//	reprise archive --archive DIR check --format json ONE   (-runs times, median)
//	reprise archive --archive DIR check --format json BATCH (once)
//
// With -bin, it measures that binary instead of building ./cmd/reprise:
// build another revision and run both in turn on the same corpus.
//
// A script, never a timed unit test: timings depend on the machine and its
// load; BENCHMARKS.md records the figures with the machine they came from.
package main

import (
	"flag"
	"fmt"
	"math/rand/v2"
	"os"
	"os/exec"
	"path/filepath"
	"runtime"
	"slices"
	"strings"
	"time"

	"reprise/archive"
	"reprise/internal/brown"
)

func main() {
	if err := run(); err != nil {
		fmt.Fprintln(os.Stderr, "bench-archive:", err)
		os.Exit(1)
	}
}

func run() error {
	n := flag.Int("n", 100000, "documents in the archive")
	runs := flag.Int("runs", 20, "runs of the one-document check")
	batch := flag.Int("batch", 1000, "documents in the batch check")
	work := flag.String("work", filepath.Join(os.TempDir(), "reprise-bench-archive"), "folder for the corpus, the archive and the binary")
	seed := flag.Uint64("seed", 2026, "corpus seed")
	prebuilt := flag.String("bin", "", "a reprise binary to measure instead of building ./cmd/reprise (another revision, side by side)")
	flag.Parse()

	dir, err := brown.Dir()
	if err != nil {
		return err
	}
	samples, err := brown.Load(dir)
	if err != nil {
		return err
	}
	g := newGenerator(samples, *seed)
	if err := os.MkdirAll(*work, 0o755); err != nil {
		return err
	}
	bin := *prebuilt
	if bin == "" {
		bin = filepath.Join(*work, "reprise")
		build := exec.Command("go", "build", "-o", bin, "./cmd/reprise")
		build.Stdout, build.Stderr = os.Stderr, os.Stderr
		if err := build.Run(); err != nil {
			return fmt.Errorf("go build: %w", err)
		}
	}
	fmt.Printf("binary: %s\n", bin)
	fmt.Printf("machine: %s/%s, %d cores, %s\n", runtime.GOOS, runtime.GOARCH, runtime.NumCPU(), runtime.Version())

	corpus := filepath.Join(*work, fmt.Sprintf("corpus-%d-%d", *n, *seed))
	textBytes, err := g.write(corpus, 0, *n)
	if err != nil {
		return err
	}
	fmt.Printf("corpus: %d documents, %.1f MB of text in %s\n", *n, float64(textBytes)/1e6, corpus)

	ar := filepath.Join(*work, fmt.Sprintf("archive-%d-%d", *n, *seed))
	if err := os.RemoveAll(ar); err != nil {
		return err
	}
	t0 := time.Now()
	addCmd := exec.Command(bin, "archive", "--archive", ar, "add", "-q", corpus)
	if out, err := addCmd.CombinedOutput(); err != nil {
		return fmt.Errorf("add: %v\n%s", err, out)
	}
	add := time.Since(t0).Seconds()
	cpu := (addCmd.ProcessState.UserTime() + addCmd.ProcessState.SystemTime()).Seconds()
	disk, err := archive.DiskUsage(ar)
	if err != nil {
		return err
	}
	fmt.Printf("add:   %.1f s wall (%.1f s CPU), %.0f documents/s, %.2f MB/s of text; load average after: %s\n",
		add, cpu, float64(*n)/add, float64(textBytes)/1e6/add, loadAverage())
	fmt.Printf("size:  %.1f MB on disk, %.2f × the input text\n", float64(disk)/1e6, float64(disk)/float64(textBytes))

	// One document of about 3,000 words: 150 sentences, some of them
	// copied from archived documents.
	one := filepath.Join(*work, "one")
	os.RemoveAll(one)
	if err := os.MkdirAll(one, 0o755); err != nil {
		return err
	}
	text := g.long(*n, 3000)
	if err := os.WriteFile(filepath.Join(one, "new.txt"), []byte(text), 0o644); err != nil {
		return err
	}
	var times, cpus []float64
	var pairs string
	for range *runs {
		t0 := time.Now()
		c := exec.Command(bin, "archive", "--archive", ar, "check", "--format", "csv", one)
		out, err := c.Output()
		if err != nil {
			return fmt.Errorf("check: %v", err)
		}
		times = append(times, time.Since(t0).Seconds()*1000)
		cpus = append(cpus, (c.ProcessState.UserTime()+c.ProcessState.SystemTime()).Seconds()*1000)
		pairs = fmt.Sprint(strings.Count(string(out), "\npair,"))
	}
	slices.Sort(times)
	slices.Sort(cpus)
	fmt.Printf("check, one document of %d words (%s pairs found): median %.0f ms wall of %d runs (min %.0f, max %.0f), median CPU %.0f ms; load average after: %s\n",
		len(strings.Fields(text)), pairs, times[len(times)/2], *runs, times[0], times[len(times)-1], cpus[len(cpus)/2], loadAverage())

	bdir := filepath.Join(*work, fmt.Sprintf("batch-%d", *batch))
	bBytes, err := g.write(bdir, *n, *batch)
	if err != nil {
		return err
	}
	t0 = time.Now()
	out, err := exec.Command(bin, "archive", "--archive", ar, "check", "--format", "csv", bdir).Output()
	if err != nil {
		return fmt.Errorf("batch check: %v", err)
	}
	bt := time.Since(t0).Seconds()
	fmt.Printf("check, batch of %d documents (%.1f MB, %d pairs found): %.2f s, %.0f documents/s\n",
		*batch, float64(bBytes)/1e6, strings.Count(string(out), "\npair,"), bt, float64(*batch)/bt)
	return nil
}

func loadAverage() string {
	b, err := os.ReadFile("/proc/loadavg")
	if err != nil {
		return "unknown"
	}
	return strings.Join(strings.Fields(string(b))[:3], " ")
}

type generator struct {
	vocab []string
	words [][]string
	seed  uint64
}

func newGenerator(samples []brown.Sample, seed uint64) *generator {
	g := &generator{seed: seed}
	seen := map[string]bool{}
	for _, s := range samples {
		for _, line := range strings.Split(s.Text, "\n") {
			toks := strings.Fields(line)
			if len(toks) == 0 {
				continue
			}
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

func isWord(t string) bool {
	for _, c := range []byte(t) {
		if (c|0x20) < 'a' || (c|0x20) > 'z' {
			return false
		}
	}
	return t != ""
}

// base returns document i's own sentences.
func (g *generator) base(i, lo, hi int) []string {
	r := rand.New(rand.NewPCG(g.seed, uint64(i)))
	out := make([]string, lo+r.IntN(hi-lo+1))
	for k := range out {
		toks := slices.Clone(g.words[r.IntN(len(g.words))])
		for range 2 {
			if x := r.IntN(len(toks)); isWord(toks[x]) {
				toks[x] = g.vocab[r.IntN(len(g.vocab))]
			}
		}
		out[k] = strings.Join(toks, " ")
	}
	return out
}

// doc is document i; one in ten gets a copy of 3 to 8 sentences of an
// earlier document (for a batch document, of an archived one).
func (g *generator) doc(i int) string {
	sents := g.base(i, 20, 80)
	r := rand.New(rand.NewPCG(g.seed^0x5eed, uint64(i)))
	if i > 0 && r.IntN(10) == 0 {
		src := g.base(r.IntN(i), 20, 80)
		k := 3 + r.IntN(6)
		from := r.IntN(len(src) - k + 1)
		at := r.IntN(len(sents) + 1)
		sents = slices.Concat(sents[:at], src[from:from+k], sents[at:])
	}
	return join(sents)
}

// long is a document of about words words with copies from five archived documents.
func (g *generator) long(archived, words int) string {
	r := rand.New(rand.NewPCG(g.seed, 0x1016))
	var sents []string
	count := 0
	for count < words {
		toks := slices.Clone(g.words[r.IntN(len(g.words))])
		toks[r.IntN(len(toks))] = g.vocab[r.IntN(len(g.vocab))]
		sents = append(sents, strings.Join(toks, " "))
		count += len(toks)
		if len(sents)%30 == 0 {
			src := g.base(r.IntN(archived), 20, 80)
			sents = append(sents, src[:4]...)
		}
	}
	return join(sents)
}

func join(sents []string) string {
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

// write writes documents from, from+1, ... from+n-1 under dir (unless a
// marker says they are there) and returns their total size.
func (g *generator) write(dir string, from, n int) (int64, error) {
	marker := dir + ".done"
	if b, err := os.ReadFile(marker); err == nil {
		var size int64
		if _, err := fmt.Sscan(string(b), &size); err == nil {
			return size, nil
		}
	}
	if err := os.RemoveAll(dir); err != nil {
		return 0, err
	}
	var size int64
	for i := from; i < from+n; i++ {
		p := filepath.Join(dir, fmt.Sprintf("%04d", i/1000), fmt.Sprintf("doc%07d.txt", i))
		if (i-from)%1000 == 0 || i == from {
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
	return size, os.WriteFile(marker, []byte(fmt.Sprint(size)), 0o644)
}
