// Command reprise-beam runs the reprise engine as an Apache Beam pipeline:
// the same report as `reprise scan`, computed on Prism in-process or on a
// Flink or Spark job server. See reprise/beam/pipeline for the design.
package main

import (
	"bufio"
	"context"
	"errors"
	"flag"
	"fmt"
	"io"
	"log/slog"
	"os"
	"slices"
	"strings"

	"github.com/apache/beam/sdks/v2/go/pkg/beam"
	"github.com/apache/beam/sdks/v2/go/pkg/beam/runners"
	"github.com/spf13/pflag"

	_ "github.com/apache/beam/sdks/v2/go/pkg/beam/io/filesystem/local"
	_ "github.com/apache/beam/sdks/v2/go/pkg/beam/runners/flink"
	_ "github.com/apache/beam/sdks/v2/go/pkg/beam/runners/prism"
	_ "github.com/apache/beam/sdks/v2/go/pkg/beam/runners/spark"
	_ "github.com/apache/beam/sdks/v2/go/pkg/beam/runners/universal"

	"reprise/beam/pipeline"
	"reprise/internal/outfile"
	"reprise/report"
)

const version = "0.1.0"

const usage = `reprise-beam: find documents that share sentences, as an Apache Beam pipeline.

Usage:
  reprise-beam [flags] PATH...

The same report as 'reprise scan' (sentence units), computed by a Beam
runner: Prism in this process by default, or a Flink or Spark job server.

Examples:
  reprise-beam testdata/demo
  reprise-beam --format json -o result.json essays/
  reprise-beam --runner universal --endpoint localhost:8099 --work /shared/tmp essays/

Flags:
`

func main() {
	os.Exit(run(os.Args[1:], os.Stdout, os.Stderr))
}

func run(args []string, stdout, stderr io.Writer) int {
	fs := pflag.NewFlagSet("reprise-beam", pflag.ContinueOnError)
	fs.SetOutput(io.Discard)
	var (
		minShared, minWords, maxDocs int
		exclude                      []string
		format, output, work, from   string
		top                          int
		quiet, help                  bool
	)
	fs.IntVar(&minShared, "min-shared", 2, "support threshold: distinct sentences a pair must share to be reported")
	fs.IntVar(&minWords, "min-words", 5, "a sentence with fewer words does not count")
	fs.IntVar(&maxDocs, "max-docs", 0, "a sentence in more than N documents is common text, listed and not counted\n(default: half the documents, at least 5 and at most 1000)")
	fs.StringArrayVar(&exclude, "exclude", nil, "template `PATH` (prompt, disclaimer) whose sentences never count; repeatable")
	fs.StringVar(&format, "format", "text", "output format: text, json, ndjson or csv")
	fs.StringVarP(&output, "output", "o", "", "write the report to `FILE` (via a temporary file, then renamed) instead of standard output")
	fs.IntVar(&top, "top", 20, "pairs shown in the text table")
	fs.StringVar(&from, "files-from", "", "read more PATHs from `FILE`, one per line")
	fs.StringVar(&work, "work", "", "folder for the pipeline's stage outputs, readable and writable by every worker\n(default: a new temporary folder, removed afterwards)")
	fs.BoolVarP(&quiet, "quiet", "q", false, "no progress on standard error")
	fs.BoolVarP(&help, "help", "h", false, "show this help")
	// Beam's own flags (--runner, --endpoint, --environment_type, ...) are
	// standard-library flags; they are parsed here too.
	ownUsage := fs.FlagUsages()
	fs.AddGoFlagSet(flag.CommandLine)

	fail := func(err error) int {
		fmt.Fprintf(stderr, "reprise-beam: %v\nRun 'reprise-beam --help' for usage.\n", err)
		return 2
	}
	if err := fs.Parse(args); err != nil {
		return fail(err)
	}
	if help {
		beamFlags := pflag.NewFlagSet("beam", pflag.ContinueOnError)
		beamFlags.AddGoFlagSet(flag.CommandLine)
		fmt.Fprint(stdout, usage, ownUsage,
			"\nBeam's flags (most runs need only --runner, --endpoint and --environment_type):\n",
			beamFlags.FlagUsages(),
			"\nShared passages are leads for a human reviewer, not proof of misconduct.\n")
		return 0
	}
	if !slices.Contains([]string{"text", "json", "ndjson", "csv"}, format) {
		return fail(fmt.Errorf("--format %q: want text, json, ndjson or csv", format))
	}
	paths := fs.Args()
	if from != "" {
		listed, err := readList(from)
		if err != nil {
			return fail(err)
		}
		paths = append(paths, listed...)
	}
	if len(paths) == 0 {
		return fail(errors.New("no PATH given"))
	}
	beam.Init()
	slog.SetLogLoggerLevel(slog.LevelWarn) // Prism's and the SDK's progress lines

	if work == "" {
		dir, err := os.MkdirTemp("", "reprise-beam-")
		if err != nil {
			return fail(err)
		}
		defer os.RemoveAll(dir)
		work = dir
	}
	runner := *runners.Runner
	if runner == "" {
		runner = "prism"
	}
	cfg := pipeline.Config{
		Paths: paths, Exclude: exclude, MinShared: minShared, MinWords: minWords, MaxDocs: maxDocs,
		Runner: runner, WorkDir: work, Version: version,
	}
	if !quiet {
		cfg.Progress = func(f string, a ...any) { fmt.Fprintf(stderr, "reprise-beam: "+f+"\n", a...) }
	}
	res, err := pipeline.Run(context.Background(), cfg)
	if err != nil {
		if errors.Is(err, pipeline.ErrNoDocuments) {
			fmt.Fprintf(stderr, "reprise-beam: no readable document in %s\n", strings.Join(paths, " "))
			return 2
		}
		fmt.Fprintf(stderr, "reprise-beam: %v\n", err)
		return 2
	}
	if err := outfile.Write(context.Background(), output, stdout, func(w io.Writer) error {
		return report.Write(w, res, format, report.TextOptions{Top: top})
	}); err != nil {
		fmt.Fprintf(stderr, "reprise-beam: %v\n", err)
		return 2
	}
	return 0
}

// readList reads one path per line; empty lines are skipped.
func readList(name string) ([]string, error) {
	f, err := os.Open(name)
	if err != nil {
		return nil, fmt.Errorf("--files-from: %w", err)
	}
	defer f.Close()
	var out []string
	sc := bufio.NewScanner(f)
	for sc.Scan() {
		if l := strings.TrimSuffix(sc.Text(), "\r"); l != "" {
			out = append(out, l)
		}
	}
	if err := sc.Err(); err != nil {
		return nil, fmt.Errorf("--files-from %s: %w", name, err)
	}
	return out, nil
}
