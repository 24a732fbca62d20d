package main

import (
	"context"
	"errors"
	"fmt"
	"io"
	"os"
	"slices"
	"strings"

	"github.com/spf13/pflag"

	"reprise/internal/outfile"
	"reprise/report"
	"reprise/scan"
)

const reportUsage = `Usage: reprise report [flags] RESULT.json

Renders a result saved with 'reprise scan --format json' again, in another
format, without scanning: text, json, ndjson, csv or html.

The HTML page shows the two documents of a pair side by side. The JSON holds
only the shared passages, so for html the documents of the detailed pairs are
read again from their paths as recorded (relative to the folder the scan ran
in; a ZIP member from its archive, a JSON Lines document from its file),
with the reading options the result records. A document is shown only when it still has the word count the result
recorded and every passage's text is where the result says; otherwise that
pair shows its passages and locations only, and the page says why.

Examples:
  reprise scan --format json -o result.json essays/
  reprise report --format html -o review.html result.json
      the review page; open review.html in a browser (it works offline)
  reprise report --format csv result.json > pairs.csv

Flags:
`

type reportFlags struct {
	format    string
	output    string
	top       int
	htmlPairs int
	root      string
	help      bool
}

func runReport(ctx context.Context, args []string, stdout, stderr io.Writer) int {
	var f reportFlags
	fs := pflag.NewFlagSet("report", pflag.ContinueOnError)
	fs.SetOutput(stderr)
	fs.SortFlags = false
	fs.Usage = func() {}
	fs.StringVar(&f.format, "format", "text", "output format: "+strings.Join(report.Formats, ", "))
	fs.StringVarP(&f.output, "output", "o", "", "write the report to `FILE` (via a temporary file, then renamed) instead of standard output")
	fs.IntVar(&f.top, "top", 20, "pairs shown in the text table")
	fs.IntVar(&f.htmlPairs, "html-pairs", report.DefaultHTMLPairs, "html: the top `N` pairs get a side-by-side view; the rest are in the table only")
	fs.StringVar(&f.root, "root", "", "html: read the documents again from `DIR`: relative paths in the result are taken\nas relative to it (the folder the scan ran in; default: this folder)")
	fs.BoolVarP(&f.help, "help", "h", false, "show this help")
	usage := func() {
		fmt.Fprint(stdout, reportUsage)
		fmt.Fprint(stdout, fs.FlagUsages())
		fmt.Fprint(stdout, "\nShared passages are leads for a human reviewer, not proof of misconduct.\n")
	}
	fail := func(format string, a ...any) int {
		fmt.Fprintf(stderr, "reprise report: "+format+"\n", a...)
		return exitUsage
	}
	if err := fs.Parse(args); err != nil {
		if errors.Is(err, pflag.ErrHelp) {
			usage()
			return exitOK
		}
		return fail("%v\nRun 'reprise report --help' for usage.", err)
	}
	if f.help {
		usage()
		return exitOK
	}
	if fs.NArg() != 1 {
		return fail("want one RESULT.json, got %d arguments\nRun 'reprise report --help' for usage.", fs.NArg())
	}
	if err := outfile.CheckDir(f.output); err != nil {
		return fail("%v", err)
	}
	if !slices.Contains(report.Formats, f.format) {
		return fail("--format %q: want one of %s", f.format, strings.Join(report.Formats, ", "))
	}
	if f.top < 1 {
		return fail("--top must be at least 1, not %d", f.top)
	}
	if f.htmlPairs < 0 {
		return fail("--html-pairs must be 0 or more, not %d", f.htmlPairs)
	}
	res, err := report.ReadJSONFile(fs.Arg(0))
	if err != nil {
		return fail("%v", err)
	}
	if f.format == "html" {
		var unread, wanted int
		res.Texts, unread, wanted = scan.ReloadTexts(res, htmlPairsOption(f.htmlPairs), f.root)
		if unread > 0 {
			fmt.Fprintf(stderr, "reprise report: %d of the %d documents shown side by side could not be read again; "+
				"their paths are relative to the folder the scan ran in: run there, or give --root DIR\n", unread, wanted)
		}
	}
	color := f.output == "" && isTerminal(stdout) && os.Getenv("NO_COLOR") == ""
	opt := report.TextOptions{Top: f.top, Color: color, HTMLPairs: htmlPairsOption(f.htmlPairs)}
	if err := outfile.Write(ctx, f.output, stdout, func(w io.Writer) error { return report.Write(w, res, f.format, opt) }); err != nil {
		return fail("%v", err)
	}
	return exitOK
}

// htmlPairsOption maps the --html-pairs flag (0: no detail view) onto
// report.HTMLOptions.Pairs (0: the default; negative: none).
func htmlPairsOption(n int) int {
	if n == 0 {
		return -1
	}
	return n
}

// sideBySidePairs is how many top pairs the output shows side by side with
// their documents' texts: --html-pairs for the HTML page (0: none), no
// pair for the other formats.
func sideBySidePairs(format string, htmlPairs int) int {
	if format != "html" {
		return 0
	}
	switch n := htmlPairsOption(htmlPairs); {
	case n < 0:
		return 0
	case n == 0:
		return report.DefaultHTMLPairs
	default:
		return n
	}
}
