package main

import (
	"context"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"os"
	"runtime"
	"slices"
	"strings"
	"text/tabwriter"

	"github.com/spf13/pflag"

	"reprise/archive"
	"reprise/corpus"
	"reprise/internal/outfile"
	"reprise/report"
	"reprise/scan"
	"reprise/shingle"
)

const archiveUsage = `Usage: reprise archive [--archive DIR] COMMAND [flags] [PATH|ID...]

A persistent archive of documents seen before, in the folder given by
--archive DIR or the REPRISE_ARCHIVE environment variable. The archive keeps
each document's path, SHA-256, format, size, date added, sentences and
extracted text (compressed), so a report can show the archived side after
the original file is gone. Files are readable by the owner only.

Commands:
  add PATH...           add documents; the same content again is a no-op, new
                        content at an archived path replaces the old version
  check PATH...         report the new documents' pairs with archived ones
                        (every --format; --add adds them afterwards)
  list                  one line per archived document
  stats                 counts and size on disk
  remove PATH|ID...     delete documents and compact the store, so their text
                        is gone from every file of the archive folder
  verify [--resplit]    check that every document is whole and indexed

Examples:
  reprise archive --archive ~/published add articles/
  reprise archive --archive ~/published check --format html -o week12.html submissions/
  reprise archive --archive ~/published check --add submissions/
  reprise archive --archive ~/published remove articles/2019/letter.txt

One process at a time may open an archive (it is locked while open).
Exit status: 0 done; 1 verify found a problem, or check reached --fail-on;
2 bad usage or an error; 130 interrupted (Ctrl-C).

Shared passages are leads for a human reviewer, not proof of misconduct.
`

// archiveFlags holds the flags of every archive subcommand.
type archiveFlags struct {
	dir         string
	minWords    int
	minShared   int
	maxDocs     int
	exclude     []string
	format      string
	output      string
	top         int
	jobs        int
	include     []string
	skip        []string
	maxFileSize string
	quiet       bool
	add         bool
	within      bool
	failOn      string
	resplit     bool
	help        bool
}

func newArchiveFlagSet(cmd string, f *archiveFlags, stderr io.Writer) *pflag.FlagSet {
	fs := pflag.NewFlagSet("archive "+cmd, pflag.ContinueOnError)
	fs.SetOutput(stderr)
	fs.SortFlags = false
	fs.Usage = func() {}
	fs.StringVar(&f.dir, "archive", os.Getenv("REPRISE_ARCHIVE"), "the archive `DIR` (default: $REPRISE_ARCHIVE)")
	fs.IntVar(&f.minWords, "min-words", sentenceMinWords, "a sentence with fewer words does not count (must match the archive's for add, check and verify --resplit)")
	fs.BoolVarP(&f.quiet, "quiet", "q", false, "no warnings, and no line per document added (the summary line stays)")
	fs.BoolVarP(&f.help, "help", "h", false, "show this help")
	if cmd == "add" || cmd == "check" {
		fs.IntVar(&f.jobs, "jobs", runtime.NumCPU(), "documents read and split at once")
		fs.StringArrayVar(&f.include, "include", nil, "read only files whose name matches `GLOB`; repeatable")
		fs.StringArrayVar(&f.skip, "skip", nil, "do not read files or folders whose name or path matches `GLOB`; repeatable")
		fs.StringVar(&f.maxFileSize, "max-file-size", "32MiB", "skip files larger than `SIZE`")
	}
	if cmd == "check" {
		fs.IntVar(&f.minShared, "min-shared", sentenceMinShared, "support threshold: distinct sentences a pair must share to be reported")
		fs.IntVar(&f.maxDocs, "max-docs", 0, "a sentence in more than N documents (archive and batch together) is common text\n(default: half of them, at least 5 and at most 1000)")
		fs.StringArrayVar(&f.exclude, "exclude", nil, "template `PATH` whose sentences never count; repeatable")
		fs.StringVar(&f.format, "format", "text", "output format: "+strings.Join(report.Formats, ", "))
		fs.StringVarP(&f.output, "output", "o", "", "write the report to `FILE` instead of standard output")
		fs.IntVar(&f.top, "top", 20, "pairs shown in the text table")
		fs.BoolVar(&f.within, "within", false, "also report pairs among the new documents")
		fs.BoolVar(&f.add, "add", false, "add the new documents to the archive after checking them")
		fs.StringVar(&f.failOn, "fail-on", "", "exit with status 1 when any pair's score reaches `SCORE`")
	}
	if cmd == "verify" {
		fs.BoolVar(&f.resplit, "resplit", false, "also split every archived text again and compare its sentences with the stored ones (slower)")
	}
	if cmd == "list" || cmd == "stats" {
		fs.StringVar(&f.format, "format", "text", "text or json")
	}
	return fs
}

func runArchive(ctx context.Context, args []string, stdout, stderr io.Writer) int {
	// --archive may come before the command.
	var pre []string
	for len(args) > 0 && strings.HasPrefix(args[0], "-") {
		if args[0] == "-h" || args[0] == "--help" {
			fmt.Fprint(stdout, archiveUsage)
			return exitOK
		}
		if args[0] == "--archive" && len(args) > 1 {
			pre, args = append(pre, args[0], args[1]), args[2:]
			continue
		}
		if strings.HasPrefix(args[0], "--archive=") {
			pre, args = append(pre, args[0]), args[1:]
			continue
		}
		fmt.Fprintf(stderr, "reprise archive: unknown flag %s before the command\n\n%s", args[0], archiveUsage)
		return exitUsage
	}
	if len(args) == 0 {
		fmt.Fprint(stderr, archiveUsage)
		return exitUsage
	}
	cmd := args[0]
	if cmd == "help" {
		fmt.Fprint(stdout, archiveUsage)
		return exitOK
	}
	if !slices.Contains([]string{"add", "check", "list", "stats", "remove", "verify"}, cmd) {
		fmt.Fprintf(stderr, "reprise archive: unknown command %q\n\n%s", cmd, archiveUsage)
		return exitUsage
	}
	var f archiveFlags
	fs := newArchiveFlagSet(cmd, &f, stderr)
	fail := func(err error) int {
		fmt.Fprintf(stderr, "reprise archive %s: %v\n", cmd, err)
		return exitUsage
	}
	if err := fs.Parse(append(pre, args[1:]...)); err != nil {
		if errors.Is(err, pflag.ErrHelp) {
			f.help = true
		} else {
			return fail(fmt.Errorf("%v\nRun 'reprise archive %s --help' for usage", err, cmd))
		}
	}
	if f.help {
		fmt.Fprint(stdout, archiveUsage)
		fmt.Fprintf(stdout, "\nFlags of 'archive %s':\n%s", cmd, fs.FlagUsages())
		return exitOK
	}
	if f.dir == "" {
		return fail(errors.New("no archive folder: give --archive DIR or set REPRISE_ARCHIVE"))
	}
	if f.minWords < 1 {
		return fail(fmt.Errorf("--min-words must be at least 1, not %d", f.minWords))
	}
	paths := fs.Args()
	switch cmd {
	case "add", "check", "remove":
		if len(paths) == 0 {
			return fail(errors.New("no PATH given"))
		}
	default:
		if len(paths) > 0 {
			return fail(fmt.Errorf("takes no arguments, got %q", paths[0]))
		}
	}
	warn := func(format string, a ...any) {
		if !f.quiet {
			fmt.Fprintf(stderr, "reprise: "+format+"\n", a...)
		}
	}
	writes := cmd == "add" || cmd == "remove" || (cmd == "check" && f.add)
	sopt := shingle.Options{MinWords: f.minWords}
	// Only the commands that cut sentences compare their settings with the
	// archive's; list, stats, remove and a plain verify cut none and open
	// any archive (the zero Settings asks for no comparison).
	var settings archive.Settings
	if cutsUnits(cmd, f.resplit) {
		settings = archive.SettingsFor(sopt)
	}
	ar, err := archive.Open(f.dir, archive.Options{Settings: settings, Create: cmd == "add" || (cmd == "check" && f.add), ReadOnly: !writes})
	if err != nil {
		return fail(err)
	}
	code := exitOK
	switch cmd {
	case "add":
		err = archiveAdd(ctx, ar, &f, paths, sopt, stdout)
	case "check":
		code, err = archiveCheck(ctx, ar, &f, paths, sopt, stdout, stderr, warn)
	case "list":
		err = archiveList(ar, f.format, stdout)
	case "stats":
		err = archiveStats(ar, f.format, stdout)
	case "remove":
		err = archiveRemove(ctx, ar, paths, stdout)
	case "verify":
		var problems []string
		problems, err = ar.Verify(f.resplit)
		if err == nil {
			for _, p := range problems {
				fmt.Fprintln(stdout, p)
			}
			if len(problems) > 0 {
				fmt.Fprintf(stdout, "%s found\n", report.Plural(len(problems), "problem"))
				code = exitFailOn
			} else {
				n, _ := ar.Count()
				fmt.Fprintf(stdout, "archive is whole: %s verified\n", report.Plural(n, "document"))
			}
		}
	}
	if cerr := ar.Close(); err == nil && cerr != nil {
		err = cerr
	}
	if err != nil {
		if ctx.Err() != nil && errors.Is(err, ctx.Err()) {
			return runError(ctx, stderr, "archive "+cmd, err, nil)
		}
		return fail(err)
	}
	return code
}

// cutsUnits reports whether the archive command splits text into sentences,
// so that its --min-words must match the archive's.
func cutsUnits(cmd string, resplit bool) bool {
	return cmd == "add" || cmd == "check" || (cmd == "verify" && resplit)
}

// readBatch reads and splits the documents under paths with the flags'
// limits; with ar, it leaves out (and counts in Unchanged) those archived
// with the same path and content.
func readBatch(ctx context.Context, f *archiveFlags, paths []string, sopt shingle.Options, ar *archive.Archive) (*scan.Batch, corpus.Options, error) {
	size, err := parseSize(f.maxFileSize)
	if err != nil {
		return nil, corpus.Options{}, fmt.Errorf("--max-file-size: %w", err)
	}
	if f.jobs < 1 {
		return nil, corpus.Options{}, fmt.Errorf("--jobs must be at least 1, not %d", f.jobs)
	}
	opt := corpus.Options{Include: f.include, Skip: f.skip, MaxFileSize: size, Jobs: f.jobs}
	b, err := scan.ReadBatch(ctx, paths, opt, sopt, ar)
	return b, opt, err
}

// addAll adds the batch, writing a line per document to each (io.Discard
// for none) and a summary line to out.
func addAll(ctx context.Context, ar *archive.Archive, b *scan.Batch, each, out io.Writer) error {
	counts, err := scan.AddBatch(ctx, ar, b, func(d *corpus.Document, r archive.AddResult) {
		switch r.Outcome {
		case archive.Added:
			fmt.Fprintf(each, "added      %d\t%s\n", r.ID, d.Path)
		case archive.Replaced:
			fmt.Fprintf(each, "replaced   %d\t%s (was %d)\n", r.ID, d.Path, r.Old)
		case archive.Duplicate:
			fmt.Fprintf(each, "duplicate  %d\t%s: same content archived as %s, not added again\n", r.ID, d.Path, r.Other)
		case archive.Unchanged:
			fmt.Fprintf(each, "unchanged  %d\t%s\n", r.ID, d.Path)
		}
	})
	if err != nil {
		return err
	}
	fmt.Fprintf(out, "%s, %s, %s, %s\n",
		report.Plural(counts[archive.Added], "document added", "documents added"),
		report.Plural(counts[archive.Replaced], "replaced", "replaced"),
		report.Plural(counts[archive.Unchanged]+b.Unchanged, "unchanged", "unchanged"),
		report.Plural(counts[archive.Duplicate], "duplicate"))
	return nil
}

func archiveAdd(ctx context.Context, ar *archive.Archive, f *archiveFlags, paths []string, sopt shingle.Options, stdout io.Writer) error {
	b, _, err := readBatch(ctx, f, paths, sopt, ar)
	if err != nil {
		return err
	}
	for _, s := range b.Skipped {
		fmt.Fprintf(stdout, "skipped    -\t%s: %s\n", s.Path, s.Reason)
	}
	if len(b.Docs)+b.Unchanged == 0 {
		return noDocumentError("document", paths, f.include)
	}
	if b.Unchanged > 0 && !f.quiet {
		fmt.Fprintf(stdout, "%s already in the archive with the same path and content: left as %s\n",
			report.Plural(b.Unchanged, "document"), map[bool]string{true: "it is", false: "they are"}[b.Unchanged == 1])
	}
	return addAll(ctx, ar, b, quietWriter(f.quiet, stdout), stdout)
}

func archiveCheck(ctx context.Context, ar *archive.Archive, f *archiveFlags, paths []string, sopt shingle.Options, stdout, stderr io.Writer, warn func(string, ...any)) (int, error) {
	if !slices.Contains(report.Formats, f.format) {
		return exitUsage, fmt.Errorf("--format %q: want one of %s", f.format, strings.Join(report.Formats, ", "))
	}
	if f.minShared < 1 || f.top < 1 || f.maxDocs < 0 || f.maxDocs == 1 {
		return exitUsage, errors.New("--min-shared and --top must be at least 1, --max-docs at least 2")
	}
	if err := outfile.CheckDir(f.output); err != nil {
		return exitUsage, err
	}
	failOn := -1.0
	if f.failOn != "" {
		var err error
		if failOn, err = parseScore(f.failOn); err != nil {
			return exitUsage, fmt.Errorf("--fail-on: %w", err)
		}
	}
	b, opt, err := readBatch(ctx, f, paths, sopt, nil)
	if err != nil {
		return exitUsage, err
	}
	if len(b.Docs) == 0 {
		return exitUsage, noDocumentError("document", paths, f.include)
	}
	res, err := scan.CheckArchive(ctx, ar, b, scan.CheckConfig{
		Corpus: opt, Shingle: sopt, MinShared: f.minShared, MaxDocs: f.maxDocs, Within: f.within,
		Exclude: f.exclude, Jobs: f.jobs, Version: version,
	})
	if errors.Is(err, scan.ErrNoDocuments) {
		return exitUsage, noDocumentError("document", paths, f.include)
	}
	if err != nil {
		return exitUsage, err
	}
	color := f.output == "" && isTerminal(stdout) && os.Getenv("NO_COLOR") == ""
	if err := outfile.Write(ctx, f.output, stdout, func(w io.Writer) error {
		return report.Write(w, res, f.format, report.TextOptions{Top: f.top, Color: color})
	}); err != nil {
		return exitUsage, err
	}
	if f.add {
		// The list of what was added goes to standard error: standard
		// output holds the report.
		if err := addAll(ctx, ar, b, quietWriter(f.quiet, stderr), quietWriter(f.quiet, stderr)); err != nil {
			return exitUsage, err
		}
	}
	if p := firstAtOrAbove(res, failOn); p != nil {
		warn("pair %s ~ %s has score %.4f, at or above --fail-on %s", p.A, p.B, p.Score, f.failOn)
		return exitFailOn, nil
	}
	return exitOK, nil
}

func quietWriter(quiet bool, w io.Writer) io.Writer {
	if quiet {
		return io.Discard
	}
	return w
}

func archiveList(ar *archive.Archive, format string, stdout io.Writer) error {
	docs, err := ar.List()
	if err != nil {
		return err
	}
	if format == "json" {
		type listed struct {
			archive.Doc
			SHA256 string `json:"sha256"`
		}
		out := make([]listed, len(docs))
		for i, d := range docs {
			out[i] = listed{d, fmt.Sprintf("%x", d.Hash)}
		}
		return writeJSON(stdout, out)
	}
	tw := tabwriter.NewWriter(stdout, 2, 8, 2, ' ', 0)
	fmt.Fprintln(tw, "id\tadded\tformat\twords\tsentences\tsha256\tpath")
	for _, d := range docs {
		fmt.Fprintf(tw, "%d\t%s\t%s\t%d\t%d\t%x\t%s\n", d.ID, d.Added.Format("2006-01-02"), d.Format, d.Words, d.Units, d.Hash[:6], d.Path)
	}
	return tw.Flush()
}

func archiveStats(ar *archive.Archive, format string, stdout io.Writer) error {
	s, err := ar.Stats()
	if err != nil {
		return err
	}
	if format == "json" {
		return writeJSON(stdout, s)
	}
	ratio := 0.0
	if s.TextBytes > 0 {
		ratio = float64(s.DiskBytes) / float64(s.TextBytes)
	}
	set := ar.Settings()
	fmt.Fprintf(stdout, "documents           %d\nsentences           %d\ndistinct sentences  %d\ntext                %d bytes\non disk             %d bytes (%.2f × the text)\nsettings            format %d, unit %s, --min-words %d, maximum sentence %d bytes\n",
		s.Documents, s.Units, s.Postings, s.TextBytes, s.DiskBytes, ratio, set.Format, set.Unit, set.MinWords, set.MaxUnitBytes)
	return nil
}

// archiveRemove removes documents named by archived path or by ID (see
// scan.RemoveFromArchive), a line for each on stdout.
func archiveRemove(ctx context.Context, ar *archive.Archive, targets []string, stdout io.Writer) error {
	return scan.RemoveFromArchive(ctx, ar, targets, func(id uint64, path string) {
		if path == "" {
			fmt.Fprintln(stdout, "compacted: the removed text is gone from the archive's files")
			return
		}
		fmt.Fprintf(stdout, "removed    %d\t%s\n", id, path)
	})
}

// writeJSON writes v as indented JSON.
func writeJSON(w io.Writer, v any) error {
	enc := json.NewEncoder(w)
	enc.SetEscapeHTML(false)
	enc.SetIndent("", "  ")
	return enc.Encode(v)
}
