package main

import (
	"context"
	"errors"
	"fmt"
	"io"
	"os"
	"slices"

	"github.com/spf13/pflag"

	"reprise/internal/outfile"
	"reprise/report"
	"reprise/scan"
)

const compareUsage = `Usage: reprise compare --against REF_PATH... [flags] PATH...

Compares new documents (PATH...) with a reference set (--against, repeatable:
files or folders) and reports only pairs with one side in each; --within also
reports pairs among the new documents. Each pair lists its shared passages
with their lines; a new document's sources are its pairs, ranked by score,
and its "reused" share is the share of its words inside those passages.

With --master FILE (a reference that new documents are copies of, such as a
master policy), the report also gives, for every new document, the share of
the master it covers and the master's passages it lacks, in order, with
their lines: what the copy dropped or changed.

Takes every flag of 'reprise scan' as well (--min-shared, --min-words,
--exclude, --format, ...). The common-text cap counts reference and new
documents together; with --master and no --max-docs there is none (the
copies share most of the master, which must not become common text).

Examples:
  reprise compare --against published/ submissions/
  reprise compare --master policy/master.md departments/
  reprise compare --against sources/ --within --format json -o out.json essays/

Shared passages are leads for a human reviewer, not proof of misconduct.

Flags:
`

func runCompare(ctx context.Context, args []string, stdout, stderr io.Writer) int {
	var f scanFlags
	fs := newScanFlagSet(&f, stderr)
	fs.Init("compare", pflag.ContinueOnError)
	var against, masters []string
	var within bool
	fs.StringArrayVar(&against, "against", nil, "reference `PATH` (file or folder); repeatable")
	fs.StringArrayVar(&masters, "master", nil, "a reference `FILE` the new documents are copies of: report its coverage and missing passages; repeatable")
	fs.BoolVar(&within, "within", false, "also report pairs among the new documents")
	fs.Usage = func() {}
	fail := func(err error) int {
		fmt.Fprintf(stderr, "reprise compare: %v\nRun 'reprise compare --help' for usage.\n", err)
		return exitUsage
	}
	if err := fs.Parse(args); err != nil {
		if errors.Is(err, pflag.ErrHelp) {
			f.help = true
		} else {
			return fail(err)
		}
	}
	if f.help {
		fmt.Fprint(stdout, compareUsage)
		fmt.Fprint(stdout, fs.FlagUsages())
		return exitOK
	}
	refs := slices.Concat(against, masters)
	if len(refs) == 0 {
		return fail(errors.New("no reference set: give --against PATH or --master FILE"))
	}
	// The new documents are the positional paths and those --files-from
	// lists: every path config returns after the references.
	cfg, failOn, err := f.config(slices.Concat(refs, fs.Args()))
	if err != nil {
		return fail(err)
	}
	if len(cfg.Paths) <= len(refs) {
		return fail(errors.New("no PATH of new documents given (as arguments or with --files-from)"))
	}
	cfg.Paths = cfg.Paths[len(refs):]
	defer setMemoryLimit(cfg.Memory)()
	cfg.Warn = func(format string, args ...any) {
		if !f.quiet {
			fmt.Fprintf(stderr, "reprise: "+format+"\n", args...)
		}
	}
	prog := newProgress(&cfg, f.quiet, stderr)
	cfg.TextPairs = sideBySidePairs(f.format, f.htmlPairs)
	res, err := scan.Compare(ctx, scan.CompareConfig{
		Config: cfg, References: against, Masters: masters, Within: within, MaxDocsSet: fs.Changed("max-docs"),
	})
	prog.done()
	if err != nil {
		return runError(ctx, stderr, "compare", err, cfg.Corpus.Include)
	}
	color := f.output == "" && isTerminal(stdout) && os.Getenv("NO_COLOR") == ""
	opt := report.TextOptions{Top: f.top, Color: color, HTMLPairs: htmlPairsOption(f.htmlPairs)}
	err = outfile.Write(ctx, f.output, stdout, func(w io.Writer) error { return report.Write(w, res, f.format, opt) })
	if err != nil {
		return runError(ctx, stderr, "compare", err, nil)
	}
	if p := firstAtOrAbove(res, failOn); p != nil {
		if !f.quiet {
			fmt.Fprintf(stderr, "reprise: pair %s ~ %s has score %.4f, at or above --fail-on %s\n", p.A, p.B, p.Score, f.failOn)
		}
		return exitFailOn
	}
	return exitOK
}
