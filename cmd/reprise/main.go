// Command reprise finds documents that share passages.
//
// This package is the only place with side effects: it turns flags into a
// scan.Config, shows progress, handles signals, writes outputs atomically
// and chooses exit codes. The driver it calls (package scan) and the
// stages below it (corpus, shingle, pairs, report) neither print nor exit.
package main

import (
	"context"
	"fmt"
	"io"
	"os"
	"os/signal"
	"syscall"
)

// version is the program's version, printed by --version and recorded in
// every report's settings.
const version = "0.1.0"

// Exit codes.
const (
	exitOK     = 0 // done
	exitFailOn = 1 // a pair reached the --fail-on score
	exitUsage  = 2 // bad usage, or no readable document
	// exitInterrupted: stopped by Ctrl-C or SIGTERM, temporary files removed
	// (128 + SIGINT's number, as a shell reports it).
	exitInterrupted = 130
)

const mainUsage = `reprise finds documents that share passages, and shows which passages.

Usage:
  reprise scan [flags] PATH...     compare every document with every other
  reprise report [flags] RESULT    render a saved JSON result again (text, csv, html, ...)
  reprise compare --against REF... PATH...
                                   new documents against a reference set
  reprise archive COMMAND ...      a persistent archive: add, check, list, stats, remove, verify
  reprise help [COMMAND]           show help
  reprise --version                print the version

Run 'reprise scan --help' for the flags and examples.

Shared passages are leads for a human reviewer, not proof of misconduct.
`

func main() {
	os.Exit(runWithSignals(os.Args[1:], os.Stdout, os.Stderr))
}

// runWithSignals runs one command line as main does: Ctrl-C or SIGTERM
// cancels its context.
func runWithSignals(args []string, stdout, stderr io.Writer) int {
	// Ctrl-C or SIGTERM cancels ctx: the run stops at its next file, merge
	// step or pair, the code that made each temporary file removes it, and
	// the exit code is exitInterrupted. A second signal ends the process at
	// once.
	ctx, stop := signal.NotifyContext(context.Background(), os.Interrupt, syscall.SIGTERM)
	go func() {
		<-ctx.Done()
		stop()
	}()
	defer stop()
	return runContext(ctx, args, stdout, stderr)
}

// run executes one command line, never cancelled, and returns the exit code.
func run(args []string, stdout, stderr io.Writer) int {
	return runContext(context.Background(), args, stdout, stderr)
}

// runContext executes one command line under ctx and returns the exit code.
func runContext(ctx context.Context, args []string, stdout, stderr io.Writer) int {
	if len(args) == 0 {
		fmt.Fprint(stderr, mainUsage)
		return exitUsage
	}
	switch args[0] {
	case "scan":
		return runScan(ctx, args[1:], stdout, stderr)
	case "report":
		return runReport(ctx, args[1:], stdout, stderr)
	case "compare":
		return runCompare(ctx, args[1:], stdout, stderr)
	case "archive":
		return runArchive(ctx, args[1:], stdout, stderr)
	case "help", "-h", "--help":
		if len(args) > 1 && args[1] == "scan" {
			return runScan(ctx, []string{"--help"}, stdout, stderr)
		}
		if len(args) > 1 && args[1] == "report" {
			return runReport(ctx, []string{"--help"}, stdout, stderr)
		}
		if len(args) > 1 && (args[1] == "compare" || args[1] == "archive") {
			return runContext(ctx, []string{args[1], "--help"}, stdout, stderr)
		}
		if len(args) > 1 {
			fmt.Fprintf(stderr, "reprise: no help on %q: the commands are scan, compare, archive and report\n", args[1])
			return exitUsage
		}
		fmt.Fprint(stdout, mainUsage)
		return exitOK
	case "version", "--version":
		fmt.Fprintf(stdout, "reprise %s\n", version)
		return exitOK
	}
	fmt.Fprintf(stderr, "reprise: unknown command %q\n\n%s", args[0], mainUsage)
	return exitUsage
}
