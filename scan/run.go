package scan

import (
	"context"
	"errors"
	"fmt"
	"os"
	"runtime/debug"
	"slices"
	"strings"
	"sync"
	"sync/atomic"

	"github.com/cespare/xxhash/v2"

	"reprise/corpus"
	"reprise/pairs"
	"reprise/report"
	"reprise/shingle"
)

// Config is everything one run needs. Zero values mean the defaults of
// the stages (corpus, shingle, pairs, report).
type Config struct {
	Paths   []string       // files and folders to read
	Exclude []string       // template documents: their units never count
	Corpus  corpus.Options // how files are read (Jobs and TempDir are set by the run)
	Shingle shingle.Options
	Pairs   pairs.Options // the engine (Jobs, TempDir and MemoryBudget are set by the run)
	// Chaining joins word units into passages (nil for sentences).
	Chaining *report.Chaining
	Jobs     int   // documents read and split at once, pair ranges counted at once (0: 1)
	Memory   int64 // bound on what the run holds, in bytes; 0: no bound
	// TempDir is the parent of the run's own temporary folder ("" for the
	// system's); the run removes its folder when it returns, cancelled or not.
	TempDir string
	// MaxDocsRule says how Pairs.MaxDocs was chosen, for the report's settings.
	MaxDocsRule   string
	NearCopyPairs int // report.Input.NearCopyPairs
	PassageText   int // report.Input.PassageText
	// TextPairs: the texts of the documents of the first TextPairs ranked
	// pairs are given in the Result (the HTML page's side-by-side views).
	TextPairs int
	Version   string // recorded in the report's settings
	// Progress, when set, is told how each stage goes; it may be called
	// from several goroutines at once.
	Progress func(Progress)
	// Warn, when set, is told what the caller should know but does not
	// stop the run (a bound that cannot hold).
	Warn func(format string, args ...any)

	// Set by Compare: keepText names the documents whose text stays in
	// the corpus.Document handed to keepPairs (the masters); sideA names
	// the documents that are side A of their pairs with documents it does
	// not name (the references); keepPairs may drop pairs, groups and
	// clusters from the engine's result before the report is built.
	keepText  func(path string) bool
	sideA     func(path string) bool
	keepPairs func(docs []corpus.Document, eng *pairs.Result)
}

// Stage names a step of a run, as Progress reports it.
type Stage string

// The stages of a run, in order.
const (
	StageRead   Stage = "read"   // reading and splitting documents; Total is not known (0)
	StageCount  Stage = "count"  // counting pairs; Total is the number of documents
	StageReread Stage = "reread" // reading again the documents the report quotes
	StageAlign  Stage = "align"  // aligning pairs into passages; Done of Total pairs
)

// Progress is one report of how a stage goes.
type Progress struct {
	Stage       Stage
	Done, Total int    // Total 0: not known
	Detail      string // a fact about the stage worth showing, or ""
}

// ErrNoDocuments means no input gave a readable document.
var ErrNoDocuments = errors.New("no readable document")

// Run reads, splits and counts the documents under cfg.Paths and builds
// the report: corpus → shingle → pairs → report.
//
// Documents are split as they are read, and of each only its digest is
// kept (its distinct fingerprints for the engine, its counts and notes),
// its units going to a temporary file (unitSpool): the run never holds
// every text. Once the engine has found the pairs, the documents the
// report quotes (those in a pair, and the first holder of each common
// unit) are read again for their texts; a text that is not the one first
// read stops the run rather than misplace a passage.
//
// Cancelling ctx stops the run at the next file read, merge step of the
// engine or pair aligned; Run then returns ctx's error, having removed
// every temporary file it made.
func Run(ctx context.Context, cfg Config) (*report.Result, error) {
	tmp, err := os.MkdirTemp(cfg.TempDir, "reprise-")
	if err != nil {
		return nil, fmt.Errorf("temporary folder: %w", err)
	}
	defer os.RemoveAll(tmp)
	cfg.Pairs.TempDir, cfg.Corpus.TempDir = tmp, tmp
	res, err := run(ctx, cfg)
	if err == nil {
		err = ctx.Err()
	}
	if err != nil {
		return nil, err
	}
	return res, nil
}

func run(ctx context.Context, cfg Config) (*report.Result, error) {
	progress := cfg.Progress
	if progress == nil {
		progress = func(Progress) {}
	}
	cfg.Jobs = max(cfg.Jobs, 1)
	cfg.Corpus.Jobs = cfg.Jobs
	splitOpt := cfg.Shingle
	effective := shingle.New(splitOpt).Options()

	var read atomic.Int64
	splitters := newSplitterPool(splitOpt)
	spool, err := newUnitSpool(cfg.Pairs.TempDir)
	if err != nil {
		return nil, err
	}
	defer spool.close()
	docs, digests, skipped, err := corpus.ReadEachContext(ctx, cfg.Paths, cfg.Corpus, func(d *corpus.Document, text *corpus.Loan) *docDigest {
		g := splitters.digest(d, text, effective, cfg.keepText, spool)
		progress(Progress{Stage: StageRead, Done: int(read.Add(1))})
		return g
	})
	if err != nil {
		return nil, err
	}
	if err := spool.done(); err != nil {
		return nil, err
	}
	docs, digests, skipped = setReportsAside(docs, digests, skipped)

	var templates []corpus.Document
	if len(cfg.Exclude) > 0 {
		// Templates are read with the scan's limits and format options, but
		// every one named is read: --include and --skip choose documents.
		topt := cfg.Corpus
		topt.Include, topt.Skip = nil, nil
		templates, err = ReadTemplates(ctx, cfg.Exclude, topt)
		if err != nil {
			return nil, err
		}
		var kept []int
		docs, skipped, kept = setTemplatesAside(docs, skipped, templates)
		for k, i := range kept {
			digests[k] = digests[i]
		}
		digests = digests[:len(kept)]
	}
	if len(docs) == 0 {
		return nil, &NoDocumentsError{What: "document", Paths: cfg.Paths}
	}

	// The engine gets what --memory leaves after the documents' digests.
	held := heldBytes(docs, digests)
	cfg.Pairs.MemoryBudget = engineBudget(cfg.Memory, held)
	if cfg.Memory > 0 && held > cfg.Memory && cfg.Warn != nil {
		cfg.Warn("the documents' names and fingerprints take about %d MiB, more than the memory bound of %d MiB; the counting spills to disk, but the run holds more than the bound", held>>20, cfg.Memory>>20)
	}
	cfg.Pairs.Jobs = cfg.Jobs

	excluded := TemplateUnits(templates, splitOpt, cfg.Jobs)
	templateCount := len(templates)
	templates = nil // their fingerprints are all the run needs of them

	in := pairs.Input{Docs: make([][]uint64, len(docs)), Excluded: excluded}
	for i := range digests {
		in.Docs[i] = digests[i].set
	}

	progress(Progress{Stage: StageCount, Total: len(docs)})
	letGo(cfg.Memory)
	eng, err := pairs.CountContext(ctx, in, cfg.Pairs)
	if err != nil {
		return nil, err
	}
	if cfg.keepPairs != nil {
		cfg.keepPairs(docs, eng)
		eng.NearCopies = pairs.NearCopiesOf(in, eng, cfg.Pairs.NearCopy)
	}
	in = pairs.Input{}
	for i := range digests {
		digests[i].set = nil // the engine's view is no longer needed
	}
	if eng.Spill.Runs > 0 {
		progress(Progress{Stage: StageCount, Done: len(docs), Total: len(docs),
			Detail: fmt.Sprintf("counted in %d sorted runs on disk (%d MiB written), %d ranges of pairs", eng.Spill.Runs, eng.Spill.BytesWritten>>20, eng.Spill.Ranges)})
	}

	letGo(cfg.Memory) // the fingerprints and the engine's buffers, before the report's documents come
	quoted := quotedDocuments(eng, len(docs), cfg.NearCopyPairs)
	progress(Progress{Stage: StageReread, Total: len(quoted)})
	store, err := newQuotedStore(cfg.Pairs.TempDir, quotedFit(cfg.Memory, reportHeldBytes(docs, digests), digests, quoted))
	if err != nil {
		return nil, err
	}
	defer store.close()
	if err := readAgain(ctx, cfg, docs, digests, quoted, spool, store); err != nil {
		return nil, err
	}

	rin := report.Input{
		Docs:          make([]report.Doc, len(docs)),
		Skipped:       make([]report.Skipped, len(skipped)),
		Engine:        eng,
		Excluded:      excluded,
		Templates:     templateCount,
		Chaining:      cfg.Chaining,
		Jobs:          cfg.Jobs,
		Load:          store.load,
		NearCopyPairs: cfg.NearCopyPairs,
		Progress:      func(done, total int) { progress(Progress{Stage: StageAlign, Done: done, Total: total}) },
		PassageText:   cfg.PassageText,
		Settings: report.Settings{
			Version:      cfg.Version,
			Unit:         "sentence",
			MinShared:    eng.MinShared,
			MinWords:     effective.MinWords,
			MaxDocs:      eng.MaxDocs,
			MaxDocsRule:  cfg.MaxDocsRule,
			MaxUnitBytes: effective.MaxUnitBytes,
			Exclude:      slices.Clone(cfg.Exclude),
			Include:      slices.Clone(cfg.Corpus.Include),
			Skip:         slices.Clone(cfg.Corpus.Skip),
			MaxFileSize:  cfg.Corpus.MaxFileSize,
			Read:         ReadSettings(cfg.Corpus),
		},
	}
	UnitSettings(&rin.Settings, effective, cfg.Chaining)
	for i, d := range docs {
		g := digests[i]
		rin.Docs[i] = report.Doc{
			Path: d.Path, Format: d.Format, Encoding: d.Encoding, Notes: g.notes(),
			Words: int(g.words), UnitCount: int(g.units), Marks: d.Marks,
			Digest: g.sum, Size: int(g.size),
		}
	}
	// The report's documents hold all it needs of docs and digests from
	// here on (at 10^6 documents they take some 230 MB).
	docs, digests = nil, nil
	rin.SideA = sideA(cfg.sideA, rin.Docs)
	for i, s := range skipped {
		rin.Skipped[i] = report.Skipped{Path: s.Path, Reason: s.Reason}
	}
	res, err := report.BuildContext(ctx, rin)
	if err != nil {
		return nil, err
	}
	if err := giveTexts(res, store, cfg.TextPairs); err != nil {
		return nil, err
	}
	return res, nil
}

// letGo collects the garbage of the stage that ended and returns it to
// the system before the next stage makes its large buffers, when the run
// has a memory bound (memory > 0). Without it the reading's garbage (its
// per-file results and the walk's names, some 300 MB at 10^6 documents)
// was still held when the engine made its sorting buffers (another 300
// MB): with the heap at the runtime's soft limit, the collector lagged
// and the peak RSS went 65 MiB over a bound of 1 GiB; the same holds for
// the fingerprints and the engine's buffers when the report's documents
// come. It costs one full collection (about a second at 10^6 documents).
func letGo(memory int64) {
	if memory > 0 {
		debug.FreeOSMemory()
	}
}

// giveTexts fills res.Texts for the documents of the first pairs ranked
// pairs (the HTML page's side-by-side views), from the store; the other
// documents' texts are marked as not needed.
func giveTexts(res *report.Result, store *quotedStore, pairs int) error {
	res.Texts = make([]report.SourceText, len(res.Documents))
	for i := range res.Texts {
		res.Texts[i].Missing = "not needed for the pairs shown side by side"
	}
	if pairs <= 0 {
		return nil
	}
	id := make(map[string]int)
	for _, p := range res.Pairs[:min(pairs, len(res.Pairs))] {
		id[p.A], id[p.B] = -1, -1
	}
	for i := range res.Documents { // in the order of the run's documents
		p := res.Documents[i].Path
		if _, ok := id[p]; ok {
			id[p] = i
		}
	}
	for _, i := range id {
		if i < 0 || !store.has(i) {
			continue
		}
		text, _, err := store.load(i)
		if err != nil {
			return err
		}
		res.Texts[i] = report.SourceText{Text: text}
	}
	return nil
}

// docDigest is what a scan keeps of a document after splitting it.
// It is held for every document from the reading to the report (64
// bytes), so what few documents have is behind a pointer; and it is
// handed to the reading by pointer, which holds it twice at its end (once
// per file, then in the run's order: 8 bytes each, not 64).
type docDigest struct {
	set   []uint64 // distinct unit fingerprints, sorted: the engine's view
	sum   uint64   // xxhash64 of the text, to know it when it is read again
	spool int64    // where the units are in the run's unitSpool
	size  uint32   // bytes of text (32 bits, as a unit's offsets into it are: shingle.Unit)
	words int32
	units int32 // units in text order
	// spooled is how many bytes the units take in the unitSpool.
	spooled uint32
	rare    *digestRare // nil: no notes, not a report
}

// digestRare is what a digest holds for few documents.
type digestRare struct {
	notes []string
	// report: the text holds the caution every reprise report carries:
	// an earlier report, not a document (setReportsAside).
	report bool
}

// notes are the document's notes (SplitNotes).
func (g *docDigest) notes() []string {
	if g.rare == nil {
		return nil
	}
	return g.rare.notes
}

// isReport reports whether the text is an earlier report of reprise.
func (g *docDigest) isReport() bool { return g.rare != nil && g.rare.report }

// splitterPool lends each reading worker a Splitter and a unit buffer.
type splitterPool struct{ pool sync.Pool }

type splitterBuf struct {
	sp    *shingle.Splitter
	units []shingle.Unit
	enc   []byte // units encoded for the spool
}

func newSplitterPool(opt shingle.Options) *splitterPool {
	p := &splitterPool{}
	p.pool.New = func() any { return &splitterBuf{sp: shingle.New(opt)} }
	return p
}

// units splits text into the buffer of a pooled Splitter; the caller
// copies what it keeps and gives the buffer back with put.
func (p *splitterPool) units(text string) (*splitterBuf, []shingle.Unit, shingle.Stats) {
	b := p.pool.Get().(*splitterBuf)
	var st shingle.Stats
	b.units, st = b.sp.Units(text, b.units)
	return b, b.units, st
}

func (p *splitterPool) put(b *splitterBuf) { p.pool.Put(b) }

// digest splits d's lent text and returns what the scan keeps of it, with
// its units written to spool; the text is kept only when keepText asks.
func (p *splitterPool) digest(d *corpus.Document, loan *corpus.Loan, effective shingle.Options, keepText func(path string) bool, spool *unitSpool) *docDigest {
	text := loan.Text()
	b, units, st := p.units(text)
	set := make([]uint64, len(units))
	for k, u := range units {
		set[k] = u.Hash
	}
	at, spooled := spool.add(units, &b.enc)
	p.put(b)
	slices.Sort(set)
	if set = slices.Compact(set); len(set) < cap(set) {
		set = slices.Clone(set) // the allocation heldBytes charges, not the units'
	}
	g := &docDigest{
		set: set, sum: xxhash.Sum64String(text), size: uint32(len(text)),
		words: int32(st.Words), units: int32(len(units)), spool: at, spooled: spooled,
	}
	notes, isReport := SplitNotes(d.Notes, st, text, effective), isRepriseReport(text)
	if notes != nil || isReport {
		g.rare = &digestRare{notes: notes, report: isReport}
	}
	if keepText != nil && keepText(d.Path) {
		loan.Keep()
	} else {
		// Only the quoted documents need their text and marks, and
		// readAgain gives them back; the notes live on in g.
		d.Marks, d.Notes = nil, nil
	}
	return g
}

// quotedDocuments lists, sorted, the documents whose text the report
// quotes: both of every pair it lists (report.ListedPairs), and the first
// holder of each common unit.
func quotedDocuments(eng *pairs.Result, n, nearCopyPairs int) []int {
	want := make([]bool, n)
	for _, p := range report.ListedPairs(eng, nearCopyPairs) {
		want[p.A], want[p.B] = true, true
	}
	for _, c := range eng.Common {
		if int(c.First) < n {
			want[c.First] = true
		}
	}
	var ids []int
	for i, w := range want {
		if w {
			ids = append(ids, i)
		}
	}
	return ids
}

// readAgain reads the files of the documents ids once more, with the
// scan's options, and puts their texts in store with the units the first
// reading wrote to spool. A document whose text is not the one first read
// (it changed, vanished or became unreadable during the run) is an error:
// its passages' offsets would point into another text.
func readAgain(ctx context.Context, cfg Config, docs []corpus.Document, digests []*docDigest, ids []int, spool *unitSpool, store *quotedStore) error {
	if len(ids) == 0 {
		return store.done()
	}
	type name struct{ file, path string } // a path alone may name two documents (a file "a.jsonl#x" beside a.jsonl)
	byName := make(map[name]int, len(ids))
	var files []string
	for _, i := range ids {
		byName[name{docs[i].File, docs[i].Path}] = i
		files = append(files, docs[i].File)
	}
	slices.Sort(files)
	files = slices.Compact(files)
	// Named one by one, the files are read without a walk of the folders;
	// --include and --skip still apply, as they choose a ZIP archive's
	// members too (and named so, a file gets the first walk's decisions).
	var mu sync.Mutex
	differs := map[string]bool{} // read again, but not the text first read
	var failed []error
	var done atomic.Int64
	_, _, skipped, err := corpus.ReadEachContext(ctx, files, cfg.Corpus, func(d *corpus.Document, loan *corpus.Loan) struct{} {
		i, ok := byName[name{d.File, d.Path}]
		text := loan.Text() // put copies it
		if !ok {
			return struct{}{}
		}
		if cfg.Progress != nil {
			cfg.Progress(Progress{Stage: StageReread, Done: int(done.Add(1)), Total: len(ids)})
		}
		g := digests[i]
		if len(text) != int(g.size) || xxhash.Sum64String(text) != g.sum {
			mu.Lock()
			differs[d.Path] = true
			mu.Unlock()
			return struct{}{}
		}
		docs[i].Marks = d.Marks // each i once: the digest let them go
		units, err := spool.read(g.spool, g.spooled)
		if err == nil {
			err = store.put(i, text, units)
		}
		if err != nil {
			mu.Lock()
			failed = append(failed, err)
			mu.Unlock()
		}
		return struct{}{}
	})
	if err != nil {
		return err
	}
	if err := errors.Join(failed...); err != nil {
		return err
	}
	if err := store.done(); err != nil {
		return err
	}
	reasons := make(map[string]string, len(skipped))
	for _, sk := range skipped {
		reasons[sk.Path] = sk.Reason
	}
	var changed []string
	file := make(map[string]string)
	for _, i := range ids {
		if !store.has(i) {
			changed = append(changed, docs[i].Path)
			file[docs[i].Path] = docs[i].File
		}
	}
	if len(changed) == 0 {
		return nil
	}
	slices.Sort(changed)
	first := changed[0]
	why := "it is no longer there"
	if differs[first] {
		why = "its text is not the one first read"
	} else if r, ok := reasons[first]; ok {
		why = "reading it again: " + r
	} else if r, ok := reasons[file[first]]; ok {
		why = "reading it again: " + r
	}
	return fmt.Errorf("%s changed, moved or became unreadable while it was being scanned (%s; %d such documents in all): its passages cannot be shown; run the scan again", first, why, len(changed))
}

// sideA turns a test on paths into report.Input.SideA (nil for nil).
func sideA(byPath func(string) bool, docs []report.Doc) func(int) bool {
	if byPath == nil {
		return nil
	}
	return func(id int) bool { return byPath(docs[id].Path) }
}

// isRepriseReport reports whether text holds the caution that every report
// of reprise carries, in any format, with any line wrapping (the text
// report folds it): near the start of JSON, NDJSON, text reports and of
// the review page's text, at the end of the CSV. Only the first 64 KiB and
// the last 4 KiB are searched, and only for the caution's first words
// unless they are there, so that the check costs nothing next to splitting.
func isRepriseReport(text string) bool {
	const head, tail = 64 << 10, 4 << 10
	if len(text) > head+tail {
		return isRepriseReport(text[:head]) || isRepriseReport(text[len(text)-tail:])
	}
	start := report.Caution[:strings.Index(report.Caution, " for ")]
	at := strings.Index(text, start)
	if at < 0 {
		return false
	}
	folded := strings.Join(strings.Fields(text[at:min(len(text), at+2*len(report.Caution))]), " ")
	return strings.HasPrefix(folded, report.Caution)
}

// setReportsAside moves the documents that are reports of reprise (an
// earlier run's -o file inside the scanned folder) to the skipped inputs,
// with the reason, and renumbers the others.
func setReportsAside(docs []corpus.Document, digests []*docDigest, skipped []corpus.Skipped) ([]corpus.Document, []*docDigest, []corpus.Skipped) {
	if !slices.ContainsFunc(digests, (*docDigest).isReport) {
		return docs, digests, skipped
	}
	k := 0
	for i := range docs {
		if digests[i].isReport() {
			skipped = append(skipped, corpus.Skipped{Path: docs[i].Path, Reason: "a report written by reprise (it holds the report's caution): not read as a document"})
			continue
		}
		docs[k], digests[k] = docs[i], digests[i]
		docs[k].ID = k
		k++
	}
	slices.SortStableFunc(skipped, func(a, b corpus.Skipped) int { return strings.Compare(a.Path, b.Path) })
	return docs[:k], digests[:k], skipped
}
