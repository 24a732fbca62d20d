package main

import (
	"cmp"
	"context"
	"errors"
	"fmt"
	"github.com/cespare/xxhash/v2"
	"io"
	"os"
	"runtime"
	"slices"
	"strconv"
	"strings"
	"text/tabwriter"
	"time"

	"github.com/spf13/pflag"

	"reprise/archive"
	"reprise/corpus"
	"reprise/pairs"
	"reprise/report"
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
2 bad usage or an error.

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

func runArchive(args []string, stdout, stderr io.Writer) int {
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
		err = archiveAdd(ar, &f, paths, sopt, stdout)
	case "check":
		code, err = archiveCheck(ar, &f, paths, sopt, stdout, stderr, warn)
	case "list":
		err = archiveList(ar, f.format, stdout)
	case "stats":
		err = archiveStats(ar, f.format, stdout)
	case "remove":
		err = archiveRemove(ar, paths, stdout)
	case "verify":
		var problems []string
		problems, err = ar.Verify(f.resplit)
		if err == nil {
			for _, p := range problems {
				fmt.Fprintln(stdout, p)
			}
			if len(problems) > 0 {
				fmt.Fprintf(stdout, "%d problems found\n", len(problems))
				code = exitFailOn
			} else {
				n, _ := ar.Count()
				fmt.Fprintf(stdout, "archive is whole: %d documents verified\n", n)
			}
		}
	}
	if cerr := ar.Close(); err == nil && cerr != nil {
		err = cerr
	}
	if err != nil {
		return fail(err)
	}
	return code
}

// cutsUnits reports whether the archive command splits text into sentences,
// so that its --min-words must match the archive's.
func cutsUnits(cmd string, resplit bool) bool {
	return cmd == "add" || cmd == "check" || (cmd == "verify" && resplit)
}

// readBatch reads and splits the documents under paths; with ar, it leaves
// out (and counts in unchanged) those archived with the same path and content.
func readBatch(f *archiveFlags, paths []string, sopt shingle.Options, ar *archive.Archive, unchanged *int) ([]corpus.Document, []corpus.Skipped, [][]shingle.Unit, []shingle.Stats, error) {
	size, err := parseSize(f.maxFileSize)
	if err != nil {
		return nil, nil, nil, nil, fmt.Errorf("--max-file-size: %w", err)
	}
	if f.jobs < 1 {
		return nil, nil, nil, nil, fmt.Errorf("--jobs must be at least 1, not %d", f.jobs)
	}
	docs, skipped, err := corpus.Read(paths, corpus.Options{Include: f.include, Skip: f.skip, MaxFileSize: size, Jobs: f.jobs})
	if err != nil {
		return nil, nil, nil, nil, err
	}
	if ar != nil {
		// Documents already archived under the same path with the same
		// content need no splitting: a resumed add skips them quickly.
		kept := docs[:0]
		for _, d := range docs {
			id, ok, err := ar.FindHash(archive.ContentHash(d.Text))
			if err != nil {
				return nil, nil, nil, nil, err
			}
			if ok {
				if m, err := ar.Meta(id); err == nil && m.Path == d.Path {
					*unchanged++
					continue
				}
			}
			kept = append(kept, d)
		}
		docs = kept
	}
	units, stats := shingleAll(docs, sopt, f.jobs)
	return docs, skipped, units, stats, nil
}

// addAll adds docs one atomic batch each, syncing every 1000 documents and
// at the end; it writes a line per document to each (io.Discard for none)
// and a summary line to out.
func addAll(ar *archive.Archive, docs []corpus.Document, units [][]shingle.Unit, stats []shingle.Stats, each, out io.Writer) error {
	now := time.Now()
	counts := map[archive.Outcome]int{}
	for i, d := range docs {
		r, err := ar.Add(archive.Doc{
			Path: d.Path, Format: d.Format, Encoding: d.Encoding, Size: d.Size,
			Words: stats[i].Words, Notes: d.Notes, Marks: d.Marks, Text: d.Text, UnitList: units[i],
		}, now)
		if err != nil {
			return err
		}
		counts[r.Outcome]++
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
		if (i+1)%1000 == 0 {
			if err := ar.Sync(); err != nil {
				return err
			}
		}
	}
	if err := ar.Sync(); err != nil {
		return err
	}
	fmt.Fprintf(out, "%d added, %d replaced, %d unchanged, %d duplicates\n",
		counts[archive.Added], counts[archive.Replaced], counts[archive.Unchanged], counts[archive.Duplicate])
	return nil
}

func archiveAdd(ar *archive.Archive, f *archiveFlags, paths []string, sopt shingle.Options, stdout io.Writer) error {
	unchanged := 0
	docs, skipped, units, stats, err := readBatch(f, paths, sopt, ar, &unchanged)
	if err != nil {
		return err
	}
	for _, s := range skipped {
		fmt.Fprintf(stdout, "skipped    -\t%s: %s\n", s.Path, s.Reason)
	}
	if len(docs)+unchanged == 0 {
		return noDocumentError("document", paths, f.include)
	}
	if unchanged > 0 {
		fmt.Fprintf(stdout, "unchanged  %d documents already archived with the same path and content\n", unchanged)
	}
	return addAll(ar, docs, units, stats, quietWriter(f.quiet, stdout), stdout)
}

// archivedName is how an archived document is named in a check's report,
// so it never collides with a new document of the same path.
func archivedName(path string) string { return "archive:" + path }

func archiveCheck(ar *archive.Archive, f *archiveFlags, paths []string, sopt shingle.Options, stdout, stderr io.Writer, warn func(string, ...any)) (int, error) {
	if !slices.Contains(report.Formats, f.format) {
		return exitUsage, fmt.Errorf("--format %q: want one of %s", f.format, strings.Join(report.Formats, ", "))
	}
	if f.minShared < 1 || f.top < 1 || f.maxDocs < 0 || f.maxDocs == 1 {
		return exitUsage, errors.New("--min-shared and --top must be at least 1, --max-docs at least 2")
	}
	if err := checkOutputDir(f.output); err != nil {
		return exitUsage, err
	}
	failOn := -1.0
	if f.failOn != "" {
		var err error
		if failOn, err = parseScore(f.failOn); err != nil {
			return exitUsage, fmt.Errorf("--fail-on: %w", err)
		}
	}
	docs, skipped, units, stats, err := readBatch(f, paths, sopt, nil, nil)
	if err != nil {
		return exitUsage, err
	}
	var excluded []uint64
	if len(f.exclude) > 0 {
		templates, bad, err := corpus.Read(f.exclude, corpus.Options{Jobs: f.jobs})
		if err != nil {
			return exitUsage, err
		}
		if len(bad) > 0 {
			return exitUsage, fmt.Errorf("template %s: %s", bad[0].Path, bad[0].Reason)
		}
		docs, skipped, _ = setTemplatesAside(docs, skipped, templates)
		units, stats = shingleAll(docs, sopt, f.jobs)
		tu, _ := shingleAll(templates, sopt, f.jobs)
		for _, us := range tu {
			for _, u := range us {
				excluded = append(excluded, u.Hash)
			}
		}
		slices.Sort(excluded)
		excluded = slices.Compact(excluded)
	}
	if len(docs) == 0 {
		return exitUsage, noDocumentError("document", paths, f.include)
	}
	res, err := checkAgainst(ar, docs, skipped, units, stats, excluded, f, sopt)
	if err != nil {
		return exitUsage, err
	}
	color := f.output == "" && isTerminal(stdout) && os.Getenv("NO_COLOR") == ""
	if err := writeOutput(f.output, stdout, func(w io.Writer) error {
		return report.Write(w, res, f.format, report.TextOptions{Top: f.top, Color: color})
	}); err != nil {
		return exitUsage, err
	}
	if f.add {
		// The list of what was added goes to standard error: standard
		// output holds the report.
		if err := addAll(ar, docs, units, stats, quietWriter(f.quiet, stderr), quietWriter(f.quiet, stderr)); err != nil {
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

// checkAgainst builds the report of the new documents against the archive.
//
// A unit's document frequency is its posting length plus the new documents
// holding it; above the cap it is common text, over the whole archive. An
// archived document is a candidate when it shares at least --min-shared
// counted units with some new document. The engine then counts the new
// documents and the candidates together, with the archive-wide common units
// excluded and no further cap, and only pairs with one side new and the
// other archived (and, with --within, pairs of new documents) are kept —
// the same rule as compare.
func checkAgainst(ar *archive.Archive, docs []corpus.Document, skipped []corpus.Skipped, units [][]shingle.Unit,
	stats []shingle.Stats, excluded []uint64, f *archiveFlags, sopt shingle.Options) (*report.Result, error) {
	newSets := fingerprintSets(units)
	batchDF := map[uint64]int{}
	firstDoc := map[uint64]int{}
	for i, set := range newSets {
		for _, fp := range set {
			if _, ok := slices.BinarySearch(excluded, fp); ok {
				continue
			}
			if batchDF[fp] == 0 {
				firstDoc[fp] = i
			}
			batchDF[fp]++
		}
	}
	archived, err := ar.Count()
	if err != nil {
		return nil, err
	}
	maxDocs, rule := f.maxDocs, "set by --max-docs"
	if maxDocs == 0 {
		maxDocs = pairs.DefaultMaxDocs(archived + len(docs))
		rule = "default: half the documents of the archive and the batch, at least 5, at most 1000"
	}
	fps := make([]uint64, 0, len(batchDF))
	for fp := range batchDF {
		fps = append(fps, fp)
	}
	slices.Sort(fps)
	postings := make(map[uint64][]uint64, len(fps))
	dfs := make(map[uint64]int, len(fps))
	for _, fp := range fps {
		ids, err := ar.Postings(fp, nil)
		if err != nil {
			return nil, err
		}
		dfs[fp] = len(ids) + batchDF[fp]
		if len(ids) > 0 {
			postings[fp] = ids
		}
	}
	frequent := func(fp uint64) bool { return dfs[fp] > maxDocs }
	// The automatic cap's rule, as in scan: in a new document more than
	// half of whose units are common text, common units still count.
	mostlyNew := make([]bool, len(newSets))
	if f.maxDocs == 0 {
		for i, set := range newSets {
			mostlyNew[i] = mostlyFrequent(set, frequent)
		}
	}
	keptIn := map[uint64]int{} // common unit -> mostly-common new documents holding it
	for i, set := range newSets {
		if mostlyNew[i] {
			for _, fp := range set {
				if frequent(fp) {
					keptIn[fp]++
				}
			}
		}
	}
	var commonFPs []uint64
	for _, fp := range fps {
		if frequent(fp) {
			commonFPs = append(commonFPs, fp)
			if keptIn[fp] == 0 {
				delete(postings, fp) // set aside in every new document
			}
		}
	}
	// A new document's counted set: common units are left out unless it is
	// mostly common text.
	countedSets := make([][]uint64, len(newSets))
	for i, set := range newSets {
		countedSets[i] = set
		if !mostlyNew[i] && len(commonFPs) > 0 {
			countedSets[i] = slices.DeleteFunc(slices.Clone(set), frequent)
		}
	}
	// A new document archived before under the same path with the same
	// content is the same document: it is not compared with itself.
	self := make([]int64, len(docs))
	for i, d := range docs {
		self[i] = -1
		if id, ok, err := ar.FindHash(archive.ContentHash(d.Text)); err != nil {
			return nil, err
		} else if ok {
			if m, err := ar.Meta(id); err == nil && m.Path == d.Path {
				self[i] = int64(id)
			}
		}
	}
	// Candidates: archived documents sharing enough counted units with a new one.
	candidate := map[uint64]bool{}
	shared := map[uint64]int{}
	for i, set := range countedSets {
		clear(shared)
		for _, fp := range set {
			for _, id := range postings[fp] {
				shared[id]++
			}
		}
		for id, n := range shared {
			if n >= f.minShared && int64(id) != self[i] {
				candidate[id] = true
			}
		}
	}
	ids := make([]uint64, 0, len(candidate))
	for id := range candidate {
		ids = append(ids, id)
	}
	slices.Sort(ids)

	// All documents of the report: the archived ones first, then the new
	// ones, each sorted by name, so that in every pair with an archived
	// document that document is A and the passage text is the archived
	// side's. isRef marks archived ones.
	type entry struct {
		doc    report.Doc
		set    []uint64
		isRef  bool
		mostly bool  // mostly common text: common units count in it
		batch  int   // index among the new documents, -1 for archived ones
		id     int64 // archived ID, or the ID of the new document's own archived version, or -1
	}
	eff := shingle.New(sopt).Options()
	all := make([]entry, 0, len(docs)+len(ids))
	for i, d := range docs {
		rd := reportDoc(d, units[i], stats[i], eff)
		if self[i] >= 0 {
			rd.Notes = append(rd.Notes, fmt.Sprintf("already archived as document %d (same path and content): not compared with itself", self[i]))
		}
		all = append(all, entry{doc: rd, set: countedSets[i], batch: i, id: self[i], mostly: mostlyNew[i]})
	}
	for _, id := range ids {
		d, err := ar.Load(id)
		if err != nil {
			return nil, err
		}
		notes := slices.Clone(d.Notes)
		notes = append(notes, fmt.Sprintf("archived document %d, added %s", d.ID, d.Added.Format("2006-01-02")))
		set := fingerprintSets([][]shingle.Unit{d.UnitList})[0]
		mostly := f.maxDocs == 0 && mostlyFrequent(set, frequent)
		if !mostly && len(commonFPs) > 0 {
			set = slices.DeleteFunc(set, frequent)
		}
		all = append(all, entry{
			doc: report.Doc{Path: archivedName(d.Path), Format: d.Format, Encoding: d.Encoding, Notes: notes,
				Text: d.Text, Words: d.Words, Units: d.UnitList, Marks: d.Marks,
				Digest: xxhash.Sum64String(d.Text), Size: len(d.Text)},
			set: set, isRef: true, batch: -1, id: int64(d.ID), mostly: mostly,
		})
	}
	slices.SortStableFunc(all, func(x, y entry) int {
		if x.isRef != y.isRef {
			if x.isRef {
				return -1
			}
			return 1
		}
		return strings.Compare(x.doc.Path, y.doc.Path)
	})
	at := make([]int, len(docs)) // new document index → report index
	in := pairs.Input{Docs: make([][]uint64, len(all))}
	isRef := make([]bool, len(all))
	rdocs := make([]report.Doc, len(all))
	for k, e := range all {
		in.Docs[k], isRef[k], rdocs[k] = e.set, e.isRef, e.doc
		if e.batch >= 0 {
			at[e.batch] = k
		}
	}
	// Common units, each set aside in the documents that are not mostly
	// common text; Kept counts the mostly-common ones of this check that
	// hold it (new, and archived candidates).
	var common []pairs.CommonUnit
	var shares []pairs.CommonShare
	for k, e := range all {
		if e.mostly {
			shares = append(shares, pairs.CommonShare{Doc: uint32(k), Mostly: true})
			if e.isRef {
				for _, fp := range e.set {
					if frequent(fp) {
						keptIn[fp]++
					}
				}
			}
		}
	}
	for _, fp := range commonFPs {
		if keptIn[fp] < dfs[fp] {
			common = append(common, pairs.CommonUnit{Hash: fp, Docs: uint32(dfs[fp]), First: uint32(at[firstDoc[fp]]), Kept: uint32(keptIn[fp])})
		}
	}
	slices.SortFunc(common, func(x, y pairs.CommonUnit) int {
		return cmp.Or(cmp.Compare(y.Docs, x.Docs), cmp.Compare(x.Hash, y.Hash))
	})
	in.Excluded = excluded
	eng, err := pairs.Count(in, pairs.Options{MinShared: f.minShared, MaxDocs: max(2, len(all))})
	if err != nil {
		return nil, err
	}
	keepCrossPairs(eng, isRef, f.within, func(a, b uint32) bool {
		return isRef[a] != isRef[b] && all[a].id >= 0 && all[a].id == all[b].id
	})
	eng.NearCopies = pairs.NearCopiesOf(in, eng, 0)
	eng.Common = common
	eng.CommonShares = shares
	eng.MaxDocs = maxDocs
	eng.Stats.ExcludedHits = countHits(newSets, excluded)

	rin := report.Input{
		Docs:      rdocs,
		Skipped:   make([]report.Skipped, len(skipped)),
		Engine:    eng,
		Excluded:  excluded,
		Templates: len(f.exclude),
		Settings: report.Settings{
			Version: version, Unit: "sentence", MinShared: eng.MinShared, MinWords: eff.MinWords,
			MaxDocs: maxDocs, MaxDocsRule: rule, MaxUnitBytes: eff.MaxUnitBytes,
			Exclude: slices.Clone(f.exclude), Include: slices.Clone(f.include), Skip: slices.Clone(f.skip),
		},
	}
	rin.Settings.MaxFileSize, _ = parseSize(f.maxFileSize)
	unitSettings(&rin.Settings, eff, nil)
	for i, s := range skipped {
		rin.Skipped[i] = report.Skipped{Path: s.Path, Reason: s.Reason}
	}
	return report.Build(rin)
}

// mostlyFrequent reports whether more than half of a document's distinct
// units are common text (the automatic cap's rule, pairs.CommonShare).
func mostlyFrequent(set []uint64, frequent func(uint64) bool) bool {
	n := 0
	for _, fp := range set {
		if frequent(fp) {
			n++
		}
	}
	return n > 0 && 2*n > len(set)
}

// countHits counts the distinct excluded fingerprints found in the sets.
func countHits(sets [][]uint64, excluded []uint64) int {
	hit := map[uint64]bool{}
	for _, set := range sets {
		for _, fp := range set {
			if _, ok := slices.BinarySearch(excluded, fp); ok {
				hit[fp] = true
			}
		}
	}
	return len(hit)
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

// removeOne removes one archived document; tests replace it to make a
// removal fail.
var removeOne = (*archive.Archive).Remove

// archiveRemove removes documents named by archived path or by ID, then
// compacts the store so that their text leaves every file of the folder.
// Every target is resolved first: when one names no archived document,
// all such targets are reported and nothing is removed. A document named
// twice (by path and by ID, say) is removed once. Once one removal has
// succeeded the compaction always runs, even when a later removal fails,
// so no removed document stays in the folder's files; the error is still
// returned.
func archiveRemove(ar *archive.Archive, targets []string, stdout io.Writer) (err error) {
	var ids []uint64
	seen := map[uint64]bool{}
	var unknown []string
	for _, t := range targets {
		id, ok, err := ar.FindPath(t)
		if err != nil {
			return err
		}
		if !ok {
			n, perr := strconv.ParseUint(t, 10, 64)
			if perr == nil {
				if _, merr := ar.Meta(n); merr == nil {
					id, ok = n, true
				}
			}
		}
		switch {
		case !ok:
			if !slices.Contains(unknown, t) {
				unknown = append(unknown, t)
			}
		case !seen[id]:
			seen[id] = true
			ids = append(ids, id)
		}
	}
	if len(unknown) > 0 {
		return fmt.Errorf("no archived document has the path or ID %s (see 'reprise archive list'); nothing was removed",
			quoteList(unknown))
	}
	removed := 0
	defer func() {
		if removed == 0 {
			return
		}
		if eerr := ar.Erase(context.Background()); eerr != nil {
			err = errors.Join(err, eerr)
			return
		}
		fmt.Fprintln(stdout, "compacted: the removed text is gone from the archive's files")
	}()
	var errs []error
	for _, id := range ids {
		d, err := ar.Meta(id)
		if err == nil {
			err = removeOne(ar, id)
		}
		if err != nil {
			errs = append(errs, fmt.Errorf("document %d: %w", id, err))
			continue
		}
		removed++
		fmt.Fprintf(stdout, "removed    %d\t%s\n", id, d.Path)
	}
	return errors.Join(errs...)
}

// quoteList joins quoted strings with commas.
func quoteList(s []string) string {
	q := make([]string, len(s))
	for i, x := range s {
		q[i] = strconv.Quote(x)
	}
	return strings.Join(q, ", ")
}
