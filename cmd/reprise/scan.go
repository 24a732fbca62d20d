package main

import (
	"context"
	"errors"
	"fmt"
	"io"
	"math"
	"os"
	"path/filepath"
	"runtime"
	"slices"
	"strconv"
	"strings"

	"github.com/spf13/pflag"

	"reprise/corpus"
	"reprise/internal/outfile"
	"reprise/pairs"
	"reprise/report"
	"reprise/scan"
	"reprise/shingle"
)

const scanUsage = `Usage: reprise scan [flags] PATH...

Reads every document under the given files and folders (plain text,
Markdown, DOCX, ODT, RTF, HTML, EPUB, PDF, e-mail .eml, and ZIP archives
of these), splits each into sentences, and reports every pair of documents
that share at least --min-shared sentences, with the shared passages, their
line numbers, and how much of each document they cover.

Sentences count as the same when they match after Unicode NFKC
normalization, case folding, and removal of punctuation, quote styles and
extra white space. Sentences with fewer than --min-words words are ignored.

Examples:
  reprise scan essays/
      compare every essay with every other; a ranked table on the terminal
  reprise scan --exclude prompt.txt essays/
      sentences of the assignment prompt never count
  reprise scan --unit words essays/
      compare runs of words instead of sentences: also finds edited copies
  reprise scan --format json -o result.json submissions/ archive/
      the full result, every passage with byte offsets, as JSON
  reprise scan --fail-on 0.5 -q policies/
      exit status 1 when any pair covers 50% or more of one document

Exit status: 0 done; 1 a pair reached --fail-on; 2 bad usage or no readable
document; 130 interrupted (Ctrl-C), temporary files removed.

Flags:
`

// scanFlags holds the parsed command line of 'reprise scan'.
type scanFlags struct {
	minShared   int
	minWords    int
	units       unitFlags // --unit, --words, --winnow, --gap, --skip-quoted, --skip-references (units.go)
	maxDocs     int
	exclude     []string
	format      string
	output      string
	top         int
	htmlPairs   int
	nearPairs   int
	passageText int
	jobs        int
	scale       scaleFlags // --memory, --temp, --files-from, -0 (scale.go)
	include     []string
	skip        []string
	maxFileSize string
	limits      formatLimits
	jsonl       jsonlFlags // --jsonl-id, --jsonl-text, --jsonl-max-line (jsonl.go)
	quiet       bool
	failOn      string
	help        bool
}

func newScanFlagSet(f *scanFlags, stderr io.Writer) *pflag.FlagSet {
	fs := pflag.NewFlagSet("scan", pflag.ContinueOnError)
	fs.SetOutput(stderr)
	fs.SortFlags = false
	fs.IntVar(&f.minShared, "min-shared", 0, fmt.Sprintf("support threshold: distinct units a pair must share to be reported\n(default: %d with --unit sentence, %d with --unit words)", sentenceMinShared, wordsMinShared))
	fs.IntVar(&f.minWords, "min-words", 0, fmt.Sprintf("--unit sentence: a sentence with fewer words does not count (default %d)", sentenceMinWords))
	f.units.register(fs)
	fs.IntVar(&f.maxDocs, "max-docs", 0, "a sentence in more than N documents is common text, listed and not counted\n(default: half the documents, at least 5 and at most 1000; by default such sentences\nstill count in documents that are mostly made of them: copies are never hidden)")
	fs.StringArrayVar(&f.exclude, "exclude", nil, "template `PATH` (prompt, disclaimer) whose sentences never count; repeatable")
	fs.StringVar(&f.format, "format", "text", "output format: "+strings.Join(report.Formats, ", "))
	fs.StringVarP(&f.output, "output", "o", "", "write the report to `FILE` (via a temporary file, then renamed) instead of standard output")
	fs.IntVar(&f.top, "top", 20, "pairs shown in the text table")
	fs.IntVar(&f.htmlPairs, "html-pairs", report.DefaultHTMLPairs, "html: the top `N` pairs get a side-by-side view; the rest are in the table only")
	fs.IntVar(&f.nearPairs, "near-copy-pairs", report.DefaultNearCopyPairs, "a set of near-copies lists at most `N` of its pairs: the representative's with the\nmembers least like it (0: all)")
	fs.IntVar(&f.passageText, "passage-text", report.DefaultPassageText, "a passage's text in the report is its first `N` bytes (cut at a word; its offsets and\nword count stay the whole passage's; 0: all of it)")
	fs.IntVar(&f.jobs, "jobs", runtime.NumCPU(), "documents read and split at once, and ranges of pairs counted at once")
	f.scale.register(fs)
	fs.StringArrayVar(&f.include, "include", nil, "read only files whose name matches `GLOB` (e.g. '*.txt'); repeatable")
	fs.StringArrayVar(&f.skip, "skip", nil, "do not read files or folders whose name or path matches `GLOB`; repeatable")
	fs.StringVar(&f.maxFileSize, "max-file-size", "32MiB", "skip files larger than `SIZE` (bytes, or with k, KiB, MB, MiB, GB, GiB)")
	f.limits.register(fs)
	f.jsonl.register(fs)
	fs.BoolVarP(&f.quiet, "quiet", "q", false, "no progress or warnings on standard error")
	fs.StringVar(&f.failOn, "fail-on", "", "exit with status 1 when any pair's score reaches `SCORE` (0..1, or a percentage such as 80%)")
	fs.BoolVarP(&f.help, "help", "h", false, "show this help")
	return fs
}

func runScan(ctx context.Context, args []string, stdout, stderr io.Writer) int {
	var f scanFlags
	fs := newScanFlagSet(&f, stderr)
	fs.Usage = func() {}
	if err := fs.Parse(args); err != nil {
		if errors.Is(err, pflag.ErrHelp) {
			printScanHelp(stdout, fs)
			return exitOK
		}
		fmt.Fprintf(stderr, "reprise scan: %v\nRun 'reprise scan --help' for usage.\n", err)
		return exitUsage
	}
	if f.help {
		printScanHelp(stdout, fs)
		return exitOK
	}
	cfg, failOn, err := f.config(fs.Args())
	if err != nil {
		fmt.Fprintf(stderr, "reprise scan: %v\nRun 'reprise scan --help' for usage.\n", err)
		return exitUsage
	}
	defer setMemoryLimit(cfg.Memory)()
	warn := func(format string, args ...any) {
		if !f.quiet {
			fmt.Fprintf(stderr, "reprise: "+format+"\n", args...)
		}
	}
	cfg.Warn = warn
	prog := newProgress(&cfg, f.quiet, stderr)
	cfg.TextPairs = sideBySidePairs(f.format, f.htmlPairs)
	res, err := scan.Run(ctx, cfg)
	prog.done()
	if err != nil {
		return runError(ctx, stderr, "scan", err, cfg.Corpus.Include)
	}
	if len(res.Documents) == 1 {
		warn("only one document was read: nothing to compare it with")
	}

	color := f.output == "" && isTerminal(stdout) && os.Getenv("NO_COLOR") == ""
	opt := report.TextOptions{Top: f.top, Color: color, HTMLPairs: htmlPairsOption(f.htmlPairs)}
	if err := outfile.Write(ctx, f.output, stdout, func(w io.Writer) error { return report.Write(w, res, f.format, opt) }); err != nil {
		return runError(ctx, stderr, "scan", err, nil)
	}
	if p := firstAtOrAbove(res, failOn); p != nil {
		warn("pair %s ~ %s has score %.4f, at or above --fail-on %s", p.A, p.B, p.Score, f.failOn)
		return exitFailOn
	}
	return exitOK
}

// runError prints err for the command cmd and returns its exit code:
// exitInterrupted when ctx was cancelled (the temporary files are gone by
// then), exitUsage otherwise; a set of inputs that gave no document is
// explained (include: the --include globs).
func runError(ctx context.Context, stderr io.Writer, cmd string, err error, include []string) int {
	if ctx.Err() != nil && errors.Is(err, ctx.Err()) {
		fmt.Fprintln(stderr, "reprise: interrupted; temporary files removed")
		return exitInterrupted
	}
	var none *scan.NoDocumentsError
	switch {
	case errors.As(err, &none):
		prefix, _, _ := strings.Cut(err.Error(), none.Error())
		err = fmt.Errorf("%s%w", prefix, noDocumentError(none.What, none.Paths, include))
	case errors.Is(err, scan.ErrNoDocuments):
		err = noDocumentError("document", nil, include)
	}
	fmt.Fprintf(stderr, "reprise %s: %v\n", cmd, err)
	return exitUsage
}

// firstAtOrAbove returns the best-ranked pair whose score reaches failOn,
// or nil when none does or failOn is negative (--fail-on not given).
func firstAtOrAbove(res *report.Result, failOn float64) *report.Pair {
	if failOn < 0 {
		return nil
	}
	for i := range res.Pairs {
		if res.Pairs[i].Score >= failOn {
			return &res.Pairs[i]
		}
	}
	return nil
}

func printScanHelp(w io.Writer, fs *pflag.FlagSet) {
	fmt.Fprint(w, scanUsage)
	fmt.Fprint(w, fs.FlagUsages())
	fmt.Fprint(w, "\nShared passages are leads for a human reviewer, not proof of misconduct.\n")
}

// config checks the flags and builds the scan configuration; failOn is -1
// when --fail-on is not set.
func (f *scanFlags) config(paths []string) (cfg scan.Config, failOn float64, err error) {
	failOn = -1
	if err := outfile.CheckDir(f.output); err != nil {
		return cfg, failOn, err
	}
	if paths, err = f.scale.paths(paths, os.Stdin); err != nil {
		return cfg, failOn, err
	}
	if len(paths) == 0 {
		return cfg, failOn, errors.New("no PATH given")
	}
	if err := f.units.resolve(f); err != nil {
		return cfg, failOn, err
	}
	if f.minShared < 1 {
		return cfg, failOn, fmt.Errorf("--min-shared must be at least 1, not %d", f.minShared)
	}
	if f.minWords < 1 {
		return cfg, failOn, fmt.Errorf("--min-words must be at least 1, not %d", f.minWords)
	}
	if f.maxDocs < 0 || f.maxDocs == 1 {
		return cfg, failOn, fmt.Errorf("--max-docs must be at least 2 (a sentence in one document pairs nothing), not %d", f.maxDocs)
	}
	if !slices.Contains(report.Formats, f.format) {
		return cfg, failOn, fmt.Errorf("--format %q: want one of %s", f.format, strings.Join(report.Formats, ", "))
	}
	if f.top < 1 {
		return cfg, failOn, fmt.Errorf("--top must be at least 1, not %d", f.top)
	}
	if f.htmlPairs < 0 {
		return cfg, failOn, fmt.Errorf("--html-pairs must be 0 or more, not %d", f.htmlPairs)
	}
	if f.passageText < 0 {
		return cfg, failOn, fmt.Errorf("--passage-text must be 0 or more, not %d", f.passageText)
	}
	if f.nearPairs < 0 {
		return cfg, failOn, fmt.Errorf("--near-copy-pairs must be 0 or more, not %d", f.nearPairs)
	}
	if f.jobs < 1 {
		return cfg, failOn, fmt.Errorf("--jobs must be at least 1, not %d", f.jobs)
	}
	size, err := parseSize(f.maxFileSize)
	if err != nil {
		return cfg, failOn, fmt.Errorf("--max-file-size: %w", err)
	}
	var formats corpus.Options
	if formats, err = f.limits.options(); err != nil {
		return cfg, failOn, err
	}
	formats.Include, formats.Skip, formats.MaxFileSize = f.include, f.skip, size
	if err = f.jsonl.apply(&formats); err != nil {
		return cfg, failOn, err
	}
	if f.failOn != "" {
		if failOn, err = parseScore(f.failOn); err != nil {
			return cfg, -1, fmt.Errorf("--fail-on: %w", err)
		}
	}
	for _, g := range slices.Concat(f.include, f.skip) {
		if _, err := filepath.Match(g, ""); err != nil {
			return cfg, -1, fmt.Errorf("bad glob %q: %w", g, err)
		}
	}
	rule := defaultMaxDocsRule
	if f.maxDocs > 0 {
		rule = "set by --max-docs"
	}
	cfg = scan.Config{
		Paths:         paths,
		Exclude:       f.exclude,
		Corpus:        formats,
		Shingle:       shingle.Options{MinWords: f.minWords},
		Pairs:         pairs.Options{MinShared: f.minShared, MaxDocs: f.maxDocs},
		Jobs:          f.jobs,
		MaxDocsRule:   rule,
		NearCopyPairs: nearCopyPairsOption(f.nearPairs),
		PassageText:   nearCopyPairsOption(f.passageText),
		Version:       version,
	}
	f.units.apply(&cfg)
	if err := f.scale.apply(&cfg); err != nil {
		return cfg, -1, err
	}
	return cfg, failOn, nil
}

// defaultMaxDocsRule says how the automatic common-text cap was chosen.
const defaultMaxDocsRule = "default: half the documents, at least 5, at most 1000; still counted in documents that are mostly common text"

// nearCopyPairsOption maps a count flag whose 0 means no bound
// (--near-copy-pairs, --passage-text) to the report.Input field, whose 0
// means the default and -1 no bound.
func nearCopyPairsOption(n int) int {
	if n == 0 {
		return -1
	}
	return n
}

// parseSize reads a byte count such as 4096, 512k, 10MB or 32MiB.
func parseSize(s string) (int64, error) {
	t := strings.TrimSpace(s)
	units := []struct {
		suffix string
		factor int64
	}{
		{"KiB", 1 << 10}, {"MiB", 1 << 20}, {"GiB", 1 << 30},
		{"kB", 1000}, {"KB", 1000}, {"MB", 1000 * 1000}, {"GB", 1000 * 1000 * 1000},
		{"k", 1000}, {"K", 1000}, {"M", 1000 * 1000}, {"G", 1000 * 1000 * 1000}, {"B", 1},
	}
	factor := int64(1)
	for _, u := range units {
		if strings.HasSuffix(t, u.suffix) {
			t, factor = strings.TrimSpace(strings.TrimSuffix(t, u.suffix)), u.factor
			break
		}
	}
	n, err := strconv.ParseFloat(t, 64)
	// !(n > 0) also refuses NaN, which no comparison accepts.
	if err != nil || !(n > 0) || n*float64(factor) > 1<<62 {
		return 0, fmt.Errorf("%q is not a size (try 4096, 512KiB or 32MiB)", s)
	}
	return int64(n * float64(factor)), nil
}

// parseScore reads a score as a fraction (0.8) or a percentage (80%).
func parseScore(s string) (float64, error) {
	t := strings.TrimSpace(s)
	scale := 1.0
	if strings.HasSuffix(t, "%") {
		t, scale = strings.TrimSuffix(t, "%"), 100
	}
	v, err := strconv.ParseFloat(t, 64)
	if err != nil || math.IsNaN(v) {
		return 0, fmt.Errorf("%q is not a score (try 0.8 or 80%%)", s)
	}
	v /= scale
	if v < 0 || v > 1 {
		return 0, fmt.Errorf("%q is outside 0..1 (0%%..100%%)", s)
	}
	return v, nil
}
