package pipeline

import (
	"bufio"
	"cmp"
	"context"
	"errors"
	"fmt"
	"os"
	"path/filepath"
	"slices"
	"strings"

	"github.com/apache/beam/sdks/v2/go/pkg/beam"
	"github.com/apache/beam/sdks/v2/go/pkg/beam/io/textio"
	"github.com/apache/beam/sdks/v2/go/pkg/beam/transforms/filter"
	"github.com/apache/beam/sdks/v2/go/pkg/beam/transforms/stats"

	"reprise/corpus"
	"reprise/pairs"
	"reprise/report"
	"reprise/scan"
	"reprise/shingle"
)

// Counter is what the summary's "counter" field says for a Beam run: pairs
// are counted by the runner's CombinePerKey, not by one of the engine's
// in-memory structures.
const Counter = "beam-combine"

// ErrNoDocuments means no input gave a readable document (the driver's
// error, so that one test serves both).
var ErrNoDocuments = scan.ErrNoDocuments

// Config is everything one run needs. Zero thresholds take the defaults
// of reprise scan.
type Config struct {
	Paths       []string // files and folders, as for reprise scan
	Exclude     []string // template documents: their sentences never count
	MinShared   int      // support threshold s (0: 2, as reprise scan)
	MinWords    int      // sentences with fewer words are not units (0: 5)
	MaxDocs     int      // common-text cap (0: pairs.DefaultMaxDocs of the document count)
	MaxFileSize int64    // larger files are skipped (0: corpus.DefaultMaxFileSize)
	// Runner is the Beam runner ("prism", "universal", "flink", ...).
	Runner string
	// WorkDir receives the stage outputs (JSON Lines); every worker must be
	// able to write there and the driver to read there (for a cluster: a
	// shared file system mounted at the same path).
	WorkDir  string
	Version  string                           // for the report's settings
	Progress func(format string, args ...any) // nil: silent
}

// The stage outputs, inside Config.WorkDir.
const (
	fileSkipped   = "skipped.jsonl"
	fileDocuments = "documents.jsonl"
	fileCommon    = "common.jsonl"
	filePairs     = "pairs.jsonl"
	filePaired    = "paired-documents.jsonl"
	fileTemplate  = "template-units.txt"
	filePruned    = "pruned.txt"
)

// Run builds and runs the pipeline (phase 1), then assembles the report
// from its outputs in the driver (phase 2).
func Run(ctx context.Context, cfg Config) (*report.Result, error) {
	progress := cfg.Progress
	if progress == nil {
		progress = func(string, ...any) {}
	}
	if cfg.MinShared == 0 {
		cfg.MinShared = 2
	}
	if cfg.MinWords == 0 {
		cfg.MinWords = shingle.DefaultMinWords
	}
	if cfg.MaxFileSize == 0 {
		cfg.MaxFileSize = corpus.DefaultMaxFileSize
	}
	switch {
	case cfg.MinShared < 1:
		return nil, fmt.Errorf("min-shared must be at least 1, not %d", cfg.MinShared)
	case cfg.MinWords < 1:
		return nil, fmt.Errorf("min-words must be at least 1, not %d", cfg.MinWords)
	case cfg.MaxDocs < 0 || cfg.MaxDocs == 1:
		return nil, fmt.Errorf("max-docs must be at least 2 (a sentence in one document pairs nothing), not %d", cfg.MaxDocs)
	case cfg.WorkDir == "":
		return nil, errors.New("no work folder for the stage outputs")
	}
	splitOpt := shingle.Options{MinWords: cfg.MinWords}

	templates, excluded, err := readTemplates(ctx, cfg, splitOpt)
	if err != nil {
		return nil, err
	}
	progress("listing %d inputs", len(cfg.Paths))
	files, skipped, err := listInputs(cfg.Paths, cfg.WorkDir)
	if err != nil {
		return nil, err
	}
	files, skipped = setTemplatesAside(files, skipped, templates)
	if len(files) == 0 {
		return nil, ErrNoDocuments
	}

	progress("running the pipeline on %d files (runner %s)", len(files), cfg.Runner)
	p := build(cfg, files, excluded, shingle.New(splitOpt).Options())
	if _, err := beam.Run(ctx, cfg.Runner, p); err != nil {
		return nil, fmt.Errorf("pipeline: %w", err)
	}
	progress("assembling the report")
	return assemble(cfg, skipped, templates, excluded)
}

// build lays out phase 1 (see the package documentation for the stages).
func build(cfg Config, files []string, excluded []uint64, opt shingle.Options) *beam.Pipeline {
	p, s := beam.NewPipelineWithRoot()
	out := func(name string) string { return filepath.Join(cfg.WorkDir, name) }

	paths := beam.CreateList(s, files)
	read := beam.ParDoN(s.Scope("read and split"), &readFn{MaxFileSize: cfg.MaxFileSize, MinWords: opt.MinWords,
		MaxUnitBytes: opt.MaxUnitBytes, Excluded: excluded}, paths)
	skipped, docs, summaries, entries, hits := read[0], read[1], read[2], read[3], read[4]

	documents := stats.CountElms(s, summaries)
	baskets := beam.GroupByKey(s.Scope("baskets"), entries)
	commonRefs, members := beam.ParDo2(s.Scope("cap"), &basketFn{MaxDocs: cfg.MaxDocs}, baskets, beam.SideInput{Input: documents})
	byDoc := beam.GroupByKey(s.Scope("baskets per document"), members)
	kept, pruned := beam.ParDo2(s.Scope("prune"), &pruneFn{MinShared: cfg.MinShared}, byDoc)
	prunedBaskets := beam.GroupByKey(s.Scope("pruned baskets"), kept)
	pairKeys := beam.ParDo(s.Scope("pairs per basket"), pairFn{}, prunedBaskets)
	counts := beam.CombinePerKey(s.Scope("count pairs"), sumInts, pairKeys)
	found, marks := beam.ParDo2(s.Scope("support"), &supportFn{MinShared: cfg.MinShared}, counts)
	joined := beam.CoGroupByKey(s.Scope("join back"), docs, commonRefs, marks)
	paired, common := beam.ParDo2(s.Scope("quote"), joinFn{}, joined)

	textio.Write(s, out(fileSkipped), skipped)
	textio.Write(s, out(fileDocuments), summaries)
	textio.Write(s, out(fileCommon), common)
	textio.Write(s, out(filePairs), found)
	textio.Write(s, out(filePaired), paired)
	textio.Write(s, out(fileTemplate), beam.ParDo(s, formatHash, filter.Distinct(s, hits)))
	textio.Write(s, out(filePruned), pruned)
	return p
}

// readTemplates reads the template documents as reprise scan does, and
// returns them and their fingerprints, sorted and distinct.
func readTemplates(ctx context.Context, cfg Config, opt shingle.Options) ([]corpus.Document, []uint64, error) {
	if len(cfg.Exclude) == 0 {
		return nil, nil, nil
	}
	templates, err := scan.ReadTemplates(ctx, cfg.Exclude, corpus.Options{MaxFileSize: cfg.MaxFileSize})
	if err != nil {
		return nil, nil, err
	}
	return templates, scan.TemplateUnits(templates, opt, 1), nil
}

// listInputs expands the paths into the files to read, with exactly the
// walk of corpus.Read (hidden names, symbolic links, duplicates, devices):
// it calls corpus.Read with a size limit of one byte, so every file longer
// than that is listed by its stat and never opened, under a reason
// calibrated here on a two-byte file. Files of at most one byte are read by
// that call; they are re-read by the pipeline like any other. Every other
// reason is final and returned as skipped.
func listInputs(paths []string, work string) ([]string, []corpus.Skipped, error) {
	probe := filepath.Join(work, "size-probe")
	if err := os.WriteFile(probe, []byte("ab"), 0o600); err != nil {
		return nil, nil, fmt.Errorf("list: %w", err)
	}
	_, calib, err := corpus.Read([]string{probe}, corpus.Options{MaxFileSize: 1})
	os.Remove(probe)
	if err != nil {
		return nil, nil, err
	}
	if len(calib) != 1 {
		return nil, nil, errors.New("list: corpus did not list a file over its size limit")
	}
	tooLarge := calib[0].Reason

	docs, listed, err := corpus.Read(paths, corpus.Options{MaxFileSize: 1})
	if err != nil {
		return nil, nil, err
	}
	var files []string
	var skipped []corpus.Skipped
	for _, d := range docs {
		files = append(files, d.Path)
	}
	for _, s := range listed {
		if s.Reason == tooLarge {
			files = append(files, s.Path)
			continue
		}
		skipped = append(skipped, s)
	}
	slices.Sort(files)
	return files, skipped, nil
}

// setTemplatesAside removes every file that is also a template, listing it
// as skipped, as reprise scan does.
func setTemplatesAside(files []string, skipped []corpus.Skipped, templates []corpus.Document) ([]string, []corpus.Skipped) {
	isTemplate := scan.IsTemplate(templates)
	kept := files[:0:0]
	for _, f := range files {
		if isTemplate(f) {
			skipped = append(skipped, corpus.Skipped{Path: f, Reason: scan.TemplateReason})
			continue
		}
		kept = append(kept, f)
	}
	return kept, skipped
}

// readLines reads one stage output; a missing file is an empty output
// (textio.Write writes nothing for an empty collection).
func readLines(dir, name string, each func(string) error) error {
	f, err := os.Open(filepath.Join(dir, name))
	if errors.Is(err, os.ErrNotExist) {
		return nil
	}
	if err != nil {
		return fmt.Errorf("stage output: %w", err)
	}
	defer f.Close()
	sc := bufio.NewScanner(f)
	sc.Buffer(make([]byte, 0, 1<<20), 1<<31-1)
	for sc.Scan() {
		if err := each(sc.Text()); err != nil {
			return fmt.Errorf("stage output %s: %w", name, err)
		}
	}
	if err := sc.Err(); err != nil {
		return fmt.Errorf("stage output %s: %w", name, err)
	}
	return nil
}

// assemble is phase 2: it reads the stage outputs, recounts the paired
// documents with the engine (giving groups and clusters, and checking phase
// 1's pairs), aligns them with report.Build and completes the report with
// the documents, common units and counts of the whole corpus.
func assemble(cfg Config, listSkipped []corpus.Skipped, templates []corpus.Document, templateUnits []uint64) (*report.Result, error) {
	dir := cfg.WorkDir
	var summaries []summaryRecord
	if err := readLines(dir, fileDocuments, func(l string) error {
		var r summaryRecord
		err := decode(l, &r)
		summaries = append(summaries, r)
		return err
	}); err != nil {
		return nil, err
	}
	slices.SortFunc(summaries, func(a, b summaryRecord) int { return strings.Compare(a.Path, b.Path) })
	for i := 1; i < len(summaries); i++ {
		if summaries[i].Path == summaries[i-1].Path {
			return nil, fmt.Errorf("two documents have the path %s", summaries[i].Path)
		}
	}
	if len(summaries) == 0 {
		return nil, ErrNoDocuments
	}

	skipped := make([]report.Skipped, 0, len(listSkipped))
	for _, s := range listSkipped {
		skipped = append(skipped, report.Skipped{Path: s.Path, Reason: s.Reason})
	}
	if err := readLines(dir, fileSkipped, func(l string) error {
		var r skippedRecord
		err := decode(l, &r)
		skipped = append(skipped, report.Skipped(r))
		return err
	}); err != nil {
		return nil, err
	}
	slices.SortStableFunc(skipped, func(a, b report.Skipped) int {
		return cmp.Or(strings.Compare(a.Path, b.Path), strings.Compare(a.Reason, b.Reason))
	})

	var common []commonRecord
	if err := readLines(dir, fileCommon, func(l string) error {
		var r commonRecord
		err := decode(l, &r)
		common = append(common, r)
		return err
	}); err != nil {
		return nil, err
	}
	slices.SortFunc(common, func(a, b commonRecord) int {
		return cmp.Or(cmp.Compare(b.Docs, a.Docs), strings.Compare(a.Text, b.Text), cmp.Compare(a.Hash, b.Hash))
	})

	found := map[[2]string]int{}
	if err := readLines(dir, filePairs, func(l string) error {
		var r pairRecord
		err := decode(l, &r)
		found[[2]string{r.A, r.B}] = r.Shared
		return err
	}); err != nil {
		return nil, err
	}

	var paired []docRecord
	if err := readLines(dir, filePaired, func(l string) error {
		var r docRecord
		err := decode(l, &r)
		paired = append(paired, r)
		return err
	}); err != nil {
		return nil, err
	}
	slices.SortFunc(paired, func(a, b docRecord) int { return strings.Compare(a.Path, b.Path) })

	hits, pruned := 0, 0
	if err := readLines(dir, fileTemplate, func(string) error { hits++; return nil }); err != nil {
		return nil, err
	}
	if err := readLines(dir, filePruned, func(string) error { pruned++; return nil }); err != nil {
		return nil, err
	}

	maxDocs := cfg.MaxDocs
	rule := "set by --max-docs"
	if maxDocs == 0 {
		maxDocs = pairs.DefaultMaxDocs(len(summaries))
		rule = "default: half the documents, at least 5, at most 1000"
	}

	// Recount the paired documents: common and template units never count.
	excluded := slices.Clone(templateUnits)
	for _, c := range common {
		excluded = append(excluded, c.Hash)
	}
	slices.Sort(excluded)
	excluded = slices.Compact(excluded)
	in := pairs.Input{Docs: make([][]uint64, len(paired)), Excluded: excluded}
	docs := make([]report.Doc, len(paired))
	for i, d := range paired {
		units, err := unpackUnits(d.Path, d.Units)
		if err != nil {
			return nil, err
		}
		set := make([]uint64, len(units))
		for k, u := range units {
			set[k] = u.Hash
		}
		slices.Sort(set)
		in.Docs[i] = slices.Compact(set)
		docs[i] = report.Doc{Path: d.Path, Format: d.Format, Encoding: d.Encoding, Notes: d.Notes,
			Text: d.Text, Words: d.Words, Units: units, Marks: d.Marks}
	}
	eng, err := pairs.Count(in, pairs.Options{MinShared: cfg.MinShared, MaxDocs: maxDocs})
	if err != nil {
		return nil, err
	}
	if err := samePairs(eng, docs, found); err != nil {
		return nil, err
	}

	settings := report.Settings{
		Version:      cfg.Version,
		Unit:         "sentence",
		MinShared:    cfg.MinShared,
		MinWords:     cfg.MinWords,
		MaxDocs:      maxDocs,
		MaxDocsRule:  rule,
		MaxUnitBytes: shingle.DefaultMaxUnitBytes,
		Exclude:      slices.Clone(cfg.Exclude),
		MaxFileSize:  cfg.MaxFileSize,
	}
	sub, err := report.Build(report.Input{Docs: docs, Engine: eng, Excluded: excluded, Templates: len(templates), Settings: settings})
	if err != nil {
		return nil, err
	}

	// The whole corpus: every document, every common unit, the counts.
	reused := make(map[string]float64, len(sub.Documents))
	for _, d := range sub.Documents {
		reused[d.Path] = d.Reused
	}
	res := *sub
	res.Skipped = skipped
	res.Documents = make([]report.Document, len(summaries))
	res.Texts = nil
	words, units := 0, 0
	for i, s := range summaries {
		res.Documents[i] = report.Document{Path: s.Path, Format: s.Format, Encoding: s.Encoding,
			Words: s.Words, Units: s.Units, Reused: reused[s.Path], Notes: s.Notes}
		words += s.Words
		units += s.Units
	}
	res.Common = make([]report.Common, len(common))
	for i, c := range common {
		res.Common[i] = report.Common{Text: c.Text, Documents: c.Docs}
	}
	res.Summary.Documents = len(summaries)
	res.Summary.Skipped = len(skipped)
	res.Summary.Words = words
	res.Summary.Units = units
	res.Summary.TemplateUnits = hits
	res.Summary.CommonUnits = len(common)
	res.Summary.CommonWords = report.CommonWords(res.Common)
	res.Summary.CommonShare = report.CommonShare(res.Common, words)
	res.Summary.Pruned = pruned
	res.Summary.Counter = Counter
	return &res, nil
}

// samePairs checks that the engine, run on the paired documents alone,
// finds exactly the pairs phase 1 found. A difference is a bug in one of
// them, never something to smooth over.
func samePairs(eng *pairs.Result, docs []report.Doc, found map[[2]string]int) error {
	if len(eng.Common) > 0 {
		return fmt.Errorf("consistency: %d units are common among the paired documents alone", len(eng.Common))
	}
	if len(eng.Pairs) != len(found) {
		return fmt.Errorf("consistency: the pipeline found %d pairs, the engine on the paired documents %d", len(found), len(eng.Pairs))
	}
	for _, p := range eng.Pairs {
		a, b := docs[p.A].Path, docs[p.B].Path
		shared, ok := found[[2]string{a, b}]
		if !ok || shared != int(p.Shared) {
			return fmt.Errorf("consistency: pair %s ~ %s shares %d units for the engine, %d for the pipeline", a, b, p.Shared, shared)
		}
	}
	return nil
}
