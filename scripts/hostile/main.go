// Command hostile writes and measures the adversarial inputs of
// internal/hostile, the files no extractor of reprise may be slow on.
//
//	go run ./scripts/hostile -out DIR [-mult M] [-shapes a,b]
//
// writes each shape at M times its base repetition count into DIR, named
// after the shape, for a look by hand or a run of reprise over them.
//
//	go run ./scripts/hostile -table [-count 5] [-benchtime 15x] [-max 2.5]
//
// runs BenchmarkHostileRatios (package corpus: every shape at n, 2n and 4n,
// through the extractor as Read runs it, the three sizes in alternation,
// -benchtime rounds) -count times, and prints, from the medians, a Markdown
// table of the time (processor time of the reading thread, on Linux) and
// allocated bytes at n and their growth per doubling; it exits with status
// 1 when a ratio is above -max. Linear code gives 2x; the margin above it
// is for the noise of a shared machine and of memory (fresh pages, the
// collector), which is why the table takes medians and ratios, never a
// time.
//
//	go run ./scripts/hostile -big 1MiB [-runs 5] [-shapes a,b]
//
// writes the shapes (by default the two Markdown shapes that were slowest:
// a line of ">" then "- ", and link openers) at the given size and times
// corpus.Read on each, the way reprise reads them, printing the median.
//
// A script, not a timed test: timings depend on the machine and its load.
package main

import (
	"bufio"
	"bytes"
	"flag"
	"fmt"
	"io"
	"os"
	"os/exec"
	"path/filepath"
	"slices"
	"strconv"
	"strings"
	"time"

	"reprise/corpus"
	"reprise/internal/hostile"
)

func main() {
	out := flag.String("out", "", "write the shapes into this folder")
	mult := flag.Int("mult", 1, "with -out: write each shape at this many times its base count")
	shapes := flag.String("shapes", "", "comma-separated shape names (default: all; with -big: the Markdown ones)")
	table := flag.Bool("table", false, "run the growth benchmark and print the table")
	count := flag.Int("count", 5, "with -table: runs of the benchmark (medians are taken)")
	benchtime := flag.String("benchtime", "15x", "with -table: go test -benchtime (rounds of n, 2n and 4n per run)")
	maxRatio := flag.Float64("max", 2.5, "with -table: the largest growth per doubling that passes")
	big := flag.String("big", "", "time corpus.Read on the shapes at this size (1MiB, 300KB)")
	runs := flag.Int("runs", 5, "with -big: reads per shape (the median is printed)")
	flag.Parse()
	var err error
	switch {
	case *out != "":
		err = write(*out, pick(*shapes, nil), *mult)
	case *table:
		var ok bool
		ok, err = growthTable(os.Stdout, *count, *benchtime, *maxRatio, *shapes)
		if err == nil && !ok {
			fmt.Fprintf(os.Stderr, "hostile: a growth ratio is above %.2f\n", *maxRatio)
			os.Exit(1)
		}
	case *big != "":
		err = timeBig(os.Stdout, *big, *runs, pick(*shapes, []string{"markdown-quote-list", "markdown-link-openers", "markdown-link-titles"}))
	default:
		flag.Usage()
		os.Exit(2)
	}
	if err != nil {
		fmt.Fprintln(os.Stderr, "hostile:", err)
		os.Exit(1)
	}
}

// pick returns the shapes named in list (comma-separated), or those of def,
// or all of them.
func pick(list string, def []string) []hostile.Shape {
	names := def
	if list != "" {
		names = strings.Split(list, ",")
	}
	if len(names) == 0 {
		return hostile.Shapes()
	}
	var ss []hostile.Shape
	for _, n := range names {
		s, ok := hostile.Lookup(strings.TrimSpace(n))
		if !ok {
			fmt.Fprintf(os.Stderr, "hostile: no shape %q\n", n)
			os.Exit(2)
		}
		ss = append(ss, s)
	}
	return ss
}

func write(dir string, ss []hostile.Shape, mult int) error {
	if err := os.MkdirAll(dir, 0o755); err != nil {
		return err
	}
	for _, s := range ss {
		raw, err := s.Make(s.Base * max(1, mult))
		if err != nil {
			return err
		}
		name := filepath.Join(dir, s.Name+s.Ext)
		if err := os.WriteFile(name, raw, 0o644); err != nil {
			return err
		}
		fmt.Printf("%s\t%d bytes\t%s\n", name, len(raw), s.About)
	}
	return nil
}

// growthTable runs BenchmarkHostileRatios count times and prints the
// medians of its metrics per shape; ok is false when a ratio is above
// maxRatio.
func growthTable(w io.Writer, count int, benchtime string, maxRatio float64, only string) (bool, error) {
	pattern := "BenchmarkHostileRatios"
	if only != "" {
		pattern += "/^(" + strings.ReplaceAll(only, ",", "|") + ")$"
	}
	args := []string{"test", "-run", "^$", "-bench", pattern, "-benchtime", benchtime, "-count", strconv.Itoa(count), "./corpus"}
	fmt.Fprintf(w, "go %s\n\n", strings.Join(args, " "))
	cmd := exec.Command("go", args...)
	cmd.Stderr = os.Stderr
	outp, err := cmd.Output()
	if err != nil {
		return false, fmt.Errorf("go test: %w\n%s", err, outp)
	}
	runs := map[string]map[string][]float64{} // shape -> metric -> one value per run
	var order []string
	sc := bufio.NewScanner(bytes.NewReader(outp))
	for sc.Scan() {
		f := strings.Fields(sc.Text())
		if len(f) < 4 || !strings.HasPrefix(f[0], "BenchmarkHostileRatios/") {
			continue
		}
		name := strings.TrimPrefix(f[0], "BenchmarkHostileRatios/")
		if i := strings.LastIndexByte(name, '-'); i > 0 {
			name = name[:i] // the GOMAXPROCS suffix
		}
		if runs[name] == nil {
			runs[name] = map[string][]float64{}
			order = append(order, name)
		}
		for k := 2; k+1 < len(f); k += 2 {
			if v, err := strconv.ParseFloat(f[k], 64); err == nil {
				runs[name][f[k+1]] = append(runs[name][f[k+1]], v)
			}
		}
	}
	if len(order) == 0 {
		return false, fmt.Errorf("no benchmark lines in the output of go test")
	}
	med := func(shape, metric string) float64 {
		v := slices.Clone(runs[shape][metric])
		if len(v) == 0 {
			return 0
		}
		slices.Sort(v)
		return v[len(v)/2]
	}
	fmt.Fprintf(w, "| shape | file at n | time at n | time 2n/n | time 4n/2n | allocated at n | alloc 2n/n | alloc 4n/2n |\n")
	fmt.Fprintf(w, "|---|---:|---:|---:|---:|---:|---:|---:|\n")
	ok := true
	worstT, worstA := 0.0, 0.0
	mark := func(r float64) string {
		if r > maxRatio {
			ok = false
			return fmt.Sprintf("**%.2f**", r)
		}
		return fmt.Sprintf("%.2f", r)
	}
	for _, shape := range order {
		t1, t2 := med(shape, "t2n/n"), med(shape, "t4n/2n")
		a1, a2 := med(shape, "a2n/n"), med(shape, "a4n/2n")
		worstT, worstA = max(worstT, t1, t2), max(worstA, a1, a2)
		fmt.Fprintf(w, "| %s | %s | %.2f ms | %s | %s | %s | %s | %s |\n", shape, human(med(shape, "bytes-at-n")), med(shape, "ms-at-n"),
			mark(t1), mark(t2), human(med(shape, "alloc-at-n")), mark(a1), mark(a2))
	}
	fmt.Fprintf(w, "\nlargest growth per doubling: time %.2f, allocated bytes %.2f (bound %.2f); medians of %d runs\n", worstT, worstA, maxRatio, count)
	return ok, nil
}

func human(b float64) string {
	switch {
	case b >= 1<<20:
		return fmt.Sprintf("%.1f MiB", b/(1<<20))
	case b >= 1<<10:
		return fmt.Sprintf("%.0f KiB", b/(1<<10))
	}
	return fmt.Sprintf("%.0f B", b)
}

// parseSize reads "1MiB", "300KB", "4096".
func parseSize(s string) (int, error) {
	units := []struct {
		suffix string
		mult   int
	}{{"MiB", 1 << 20}, {"KiB", 1 << 10}, {"MB", 1e6}, {"KB", 1e3}, {"B", 1}}
	for _, u := range units {
		if n, ok := strings.CutSuffix(s, u.suffix); ok {
			v, err := strconv.Atoi(n)
			return v * u.mult, err
		}
	}
	return strconv.Atoi(s)
}

// timeBig writes each shape at size bytes or just over, and times
// corpus.Read on it with the default options.
func timeBig(w io.Writer, sizeArg string, runs int, ss []hostile.Shape) error {
	size, err := parseSize(sizeArg)
	if err != nil {
		return fmt.Errorf("-big %q: %w", sizeArg, err)
	}
	dir, err := os.MkdirTemp("", "reprise-hostile-")
	if err != nil {
		return err
	}
	defer os.RemoveAll(dir)
	fmt.Fprintf(w, "| shape | file | corpus.Read, median of %d | result |\n|---|---:|---:|---|\n", runs)
	for _, s := range ss {
		raw, err := atLeast(s, size)
		if err != nil {
			return err
		}
		name := filepath.Join(dir, s.Name+s.Ext)
		if err := os.WriteFile(name, raw, 0o644); err != nil {
			return err
		}
		var times []time.Duration
		result := ""
		for range max(1, runs) {
			start := time.Now()
			docs, skipped, err := corpus.Read([]string{name}, corpus.Options{})
			times = append(times, time.Since(start))
			if err != nil {
				return err
			}
			switch {
			case len(docs) == 1:
				result = fmt.Sprintf("read, %d bytes of text", len(docs[0].Text))
			case len(skipped) > 0:
				result = "skipped: " + skipped[0].Reason
			}
		}
		slices.Sort(times)
		fmt.Fprintf(w, "| %s | %s | %v | %s |\n", s.Name, human(float64(len(raw))), times[len(times)/2].Round(time.Millisecond/10), result)
	}
	return nil
}

// atLeast makes the shape with the smallest repetition count (found by
// doubling, then bisection) whose file has at least size bytes.
func atLeast(s hostile.Shape, size int) ([]byte, error) {
	lo, hi := 0, 1
	for {
		raw, err := s.Make(hi)
		if err != nil {
			return nil, err
		}
		if len(raw) >= size {
			break
		}
		lo, hi = hi, hi*2
	}
	for hi-lo > 1 {
		mid := (lo + hi) / 2
		raw, err := s.Make(mid)
		if err != nil {
			return nil, err
		}
		if len(raw) >= size {
			hi = mid
		} else {
			lo = mid
		}
	}
	return s.Make(hi)
}
