// Command hostile writes and measures the adversarial inputs of
// internal/hostile, the files no extractor of reprise may be slow on.
//
//	go run ./scripts/hostile -out DIR [-mult M] [-shapes a,b]
//
// writes each shape at M times its base repetition count into DIR, named
// after the shape, for a look by hand or a run of reprise over them.
//
//	go run ./scripts/hostile -table [-count 5] [-benchtime 9x] [-max 2.5]
//
// runs BenchmarkHostileRatios (package corpus: every shape at n, 2n and 4n,
// through the extractor as Read runs it, the three sizes in alternation,
// -benchtime rounds) -count times, and prints, from the medians, a Markdown
// table: at the "big" scale (n = the shape's base, files of 0.5 to 2.5 MiB)
// the growth per doubling of the time (processor time of the process, the
// collector on as reprise runs, on Linux), the time per input byte at n, 2n and 4n, and the
// growth of the allocated bytes; at the "cache" scale (the largest n whose
// 4n read touches at most 512 KiB, input and allocations, so that it runs
// from the second-level cache) the growth of the time. Linear code gives
// 2x. It exits with status 1 when an allocation ratio or a time ratio at
// the cache scale is above -max: those are the code's. A time ratio above
// -max at the big scale is printed in bold and counted in the summary, but
// it does not fail the run by itself (-strict makes it): with instructions
// that grow 2x (-instructions), it is the memory system, not the code.
//
//	go run ./scripts/hostile -instructions [-cache-sim] [-shapes a,b]
//
// counts the instructions of one read of each shape at n, 2n and 4n under
// valgrind's cachegrind (see instructions.go): the same count on every run,
// whatever the machine's load. It exits with status 1 when a ratio is above
// -max.
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
	mult := flag.Int("mult", 1, "with -out: write each shape at this many times its base count; with -process: n is this many times the base count")
	shapes := flag.String("shapes", "", "comma-separated shape names (default: all; with -big: the Markdown ones)")
	table := flag.Bool("table", false, "run the growth benchmark and print the table")
	count := flag.Int("count", 5, "with -table: runs of the benchmark (medians are taken)")
	benchtime := flag.String("benchtime", "15x", "with -table: go test -benchtime (rounds of n, 2n and 4n per run)")
	maxRatio := flag.Float64("max", 2.5, "with -table and -instructions: the largest growth per doubling that passes")
	strict := flag.Bool("strict", false, "with -table: a time ratio above -max at the big scale also fails the run")
	big := flag.String("big", "", "time corpus.Read on the shapes at this size (1MiB, 300KB)")
	runs := flag.Int("runs", 5, "with -big: reads per shape (the median is printed)")
	instr := flag.Bool("instructions", false, "count the instructions of one read at n, 2n and 4n under valgrind (cachegrind) and print the table")
	cacheSim := flag.Bool("cache-sim", false, "with -instructions: also simulate the caches (cachegrind's --cache-sim, last level as -ll)")
	ll := flag.String("ll", "1048576,16,64", "with -cache-sim: the simulated last-level cache, size,associativity,line (cachegrind --LL)")
	readOnce := flag.String("read-once", "", "(used by -instructions and -process) read this shape -reads times with corpus.Read (with -batch: -reads copies through corpus.ReadEach), print the time and page faults of the reads after the first, and exit")
	reads := flag.Int("reads", 1, "with -read-once: how many reads")
	batch := flag.Bool("batch", false, "with -process and -read-once: the reads are copies of the file in one folder, read by one corpus.ReadEach that lends the texts, as reprise scan reads a folder")
	process := flag.Bool("process", false, "time one read of each shape at n, 2n and 4n, each size in processes of its own (see process.go), and print the table")
	reps := flag.Int("reps", 3, "with -process: pairs of processes per size (the median is taken)")
	extra := flag.Int("extra", 8, "with -process: the second process of a pair reads the file this many more times at 4n (twice as many at 2n, four times at n)")
	flag.Parse()
	var err error
	switch {
	case *out != "":
		err = write(*out, pick(*shapes, nil), *mult)
	case *table:
		var ok bool
		ok, err = growthTable(os.Stdout, *count, *benchtime, *maxRatio, *strict, *shapes)
		if err == nil && !ok {
			fmt.Fprintf(os.Stderr, "hostile: a growth ratio of the code (allocations, or time in cache) is above %.2f\n", *maxRatio)
			os.Exit(1)
		}
	case *process:
		var ok bool
		ok, err = processTable(os.Stdout, pick(*shapes, nil), *batch, *mult, *reps, *extra, *maxRatio)
		if err == nil && !ok {
			fmt.Fprintf(os.Stderr, "hostile: a time ratio is above %.2f\n", *maxRatio)
			os.Exit(1)
		}
	case *readOnce != "":
		if *batch {
			err = readBatch(os.Stdout, pick(*readOnce, nil)[0], *mult, *reads)
		} else {
			err = readShape(os.Stdout, pick(*readOnce, nil)[0], *mult, *reads)
		}
	case *instr:
		var ok bool
		ok, err = instructionTable(os.Stdout, pick(*shapes, nil), *cacheSim, *ll, *maxRatio)
		if err == nil && !ok {
			fmt.Fprintf(os.Stderr, "hostile: an instruction growth ratio is above %.2f\n", *maxRatio)
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
// medians of its metrics per shape and scale; ok is false when an
// allocation ratio or a time ratio at the cache scale (with strict, any
// time ratio) is above maxRatio.
func growthTable(w io.Writer, count int, benchtime string, maxRatio float64, strict bool, only string) (bool, error) {
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
	// shape -> scale ("big", "cache") -> metric -> one value per run
	runs := map[string]map[string]map[string][]float64{}
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
		shape, scale, ok := strings.Cut(name, "/")
		if !ok {
			continue
		}
		if runs[shape] == nil {
			runs[shape] = map[string]map[string][]float64{}
			order = append(order, shape)
		}
		if runs[shape][scale] == nil {
			runs[shape][scale] = map[string][]float64{}
		}
		for k := 2; k+1 < len(f); k += 2 {
			if v, err := strconv.ParseFloat(f[k], 64); err == nil {
				runs[shape][scale][f[k+1]] = append(runs[shape][scale][f[k+1]], v)
			}
		}
	}
	if len(order) == 0 {
		return false, fmt.Errorf("no benchmark lines in the output of go test")
	}
	med := func(shape, scale, metric string) float64 {
		v := slices.Clone(runs[shape][scale][metric])
		if len(v) == 0 {
			return 0
		}
		slices.Sort(v)
		return v[len(v)/2]
	}
	fmt.Fprintf(w, "| shape | file at n | time 2n/n | time 4n/2n | ns per byte at n, 2n, 4n | allocated at n | alloc 2n/n | alloc 4n/2n | in cache: file at n | time 2n/n | time 4n/2n |\n")
	fmt.Fprintf(w, "|---|---:|---:|---:|---:|---:|---:|---:|---:|---:|---:|\n")
	ok := true
	var worstBig, worstCache, worstA float64
	var overBig []string
	mark := func(r float64, gate bool) string {
		if r > maxRatio {
			if gate {
				ok = false
			}
			return fmt.Sprintf("**%.2f**", r)
		}
		return fmt.Sprintf("%.2f", r)
	}
	for _, shape := range order {
		t1, t2 := med(shape, "big", "t2n/n"), med(shape, "big", "t4n/2n")
		a1, a2 := med(shape, "big", "a2n/n"), med(shape, "big", "a4n/2n")
		c1, c2 := med(shape, "cache", "t2n/n"), med(shape, "cache", "t4n/2n")
		worstBig, worstCache, worstA = max(worstBig, t1, t2), max(worstCache, c1, c2), max(worstA, a1, a2)
		if max(t1, t2) > maxRatio {
			overBig = append(overBig, shape)
		}
		fmt.Fprintf(w, "| %s | %s | %s | %s | %.1f, %.1f, %.1f | %s | %s | %s | %s | %s | %s |\n", shape,
			human(med(shape, "big", "bytes-at-n")), mark(t1, strict), mark(t2, strict),
			med(shape, "big", "nsB-n"), med(shape, "big", "nsB-2n"), med(shape, "big", "nsB-4n"),
			human(med(shape, "big", "alloc-at-n")), mark(a1, true), mark(a2, true),
			human(med(shape, "cache", "bytes-at-n")), mark(c1, true), mark(c2, true))
	}
	fmt.Fprintf(w, "\nlargest growth per doubling (bound %.2f; medians of %d runs): allocated bytes %.2f; time in cache %.2f; time at the big scale %.2f",
		maxRatio, count, worstA, worstCache, worstBig)
	if len(overBig) > 0 {
		fmt.Fprintf(w, ", above the bound for %d shapes: %s", len(overBig), strings.Join(overBig, ", "))
	}
	fmt.Fprintln(w)
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
