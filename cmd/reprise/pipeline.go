package main

import (
	"errors"
	"fmt"
	"path/filepath"
	"slices"
	"sync"

	"reprise/corpus"
	"reprise/pairs"
	"reprise/report"
	"reprise/shingle"
)

// scanConfig is everything one scan needs, after flag parsing.
type scanConfig struct {
	Paths     []string
	Exclude   []string // template documents: their units never count
	Corpus    corpus.Options
	Shingle   shingle.Options
	Pairs     pairs.Options
	Jobs      int
	Progress  func(format string, args ...any) // nil: silent
	MaxDocsBy string                           // how MaxDocs was chosen, for the report
	Memory    int64                            // --memory in bytes, 0: no bound (scale.go)
	Temp      string                           // --temp: parent of the run's temporary folder
	Warn      func(format string, args ...any) // nil: silent (scale.go's budget warning)
	Chaining  *report.Chaining                 // word units: passage chaining (units.go); nil for sentences
	// KeepPairs, when set, may drop pairs, groups and clusters from the
	// engine's result before the report is built (compare.go).
	KeepPairs func(docs []corpus.Document, eng *pairs.Result)
}

// errNoDocuments means no input gave a readable document.
var errNoDocuments = errors.New("no readable document")

// scan runs the whole pipeline: corpus → shingle → pairs → report.
func scan(cfg scanConfig) (*report.Result, error) {
	progress := cfg.Progress
	if progress == nil {
		progress = func(string, ...any) {}
	}
	cfg.Corpus.Jobs = cfg.Jobs

	progress("reading %d inputs", len(cfg.Paths))
	docs, skipped, err := corpus.Read(cfg.Paths, cfg.Corpus)
	if err != nil {
		return nil, err
	}

	var templates []corpus.Document
	if len(cfg.Exclude) > 0 {
		var bad []corpus.Skipped
		// Templates are read with the scan's limits and format options, but
		// every one named is read: --include and --skip choose documents.
		topt := cfg.Corpus
		topt.Include, topt.Skip = nil, nil
		templates, bad, err = corpus.Read(cfg.Exclude, topt)
		if err != nil {
			return nil, err
		}
		if len(bad) > 0 {
			return nil, fmt.Errorf("template %s: %s", bad[0].Path, bad[0].Reason)
		}
		docs, skipped = setTemplatesAside(docs, skipped, templates)
	}
	if len(docs) == 0 {
		return nil, errNoDocuments
	}

	progress("splitting %d documents into units", len(docs))
	splitOpt := cfg.Shingle
	units, stats := shingleAll(docs, splitOpt, cfg.Jobs)
	effective := shingle.New(splitOpt).Options()
	// The engine gets what --memory leaves after the texts and units.
	held := heldBytes(docs, units)
	cfg.Pairs.MemoryBudget = engineBudget(cfg.Memory, held)
	if cfg.Memory > 0 && held > cfg.Memory && cfg.Warn != nil {
		cfg.Warn("the documents' text and units take about %d MiB, more than --memory %d MiB; the counting spills to disk, but the run holds more than the bound", held>>20, cfg.Memory>>20)
	}
	cfg.Pairs.Jobs = cfg.Jobs

	var excluded []uint64
	if len(templates) > 0 {
		tu, _ := shingleAll(templates, splitOpt, cfg.Jobs)
		for _, us := range tu {
			for _, u := range us {
				excluded = append(excluded, u.Hash)
			}
		}
		slices.Sort(excluded)
		excluded = slices.Compact(excluded)
	}

	in := pairs.Input{Docs: fingerprintSets(units), Excluded: excluded}

	progress("counting pairs among %d documents", len(docs))
	eng, err := pairs.Count(in, cfg.Pairs)
	if err != nil {
		return nil, err
	}
	if eng.Spill.Runs > 0 {
		progress("counted in %d sorted runs on disk (%d MiB written), %d ranges of pairs", eng.Spill.Runs, eng.Spill.BytesWritten>>20, eng.Spill.Ranges)
	}

	if cfg.KeepPairs != nil {
		cfg.KeepPairs(docs, eng)
	}

	progress("aligning %d pairs", len(eng.Pairs))
	rin := report.Input{
		Docs:      make([]report.Doc, len(docs)),
		Skipped:   make([]report.Skipped, len(skipped)),
		Engine:    eng,
		Excluded:  excluded,
		Templates: len(templates),
		Chaining:  cfg.Chaining,
		Settings: report.Settings{
			Version:      version,
			Unit:         "sentence",
			MinShared:    eng.MinShared,
			MinWords:     effective.MinWords,
			MaxDocs:      eng.MaxDocs,
			MaxDocsRule:  cfg.MaxDocsBy,
			MaxUnitBytes: effective.MaxUnitBytes,
			Exclude:      slices.Clone(cfg.Exclude),
			Include:      slices.Clone(cfg.Corpus.Include),
			Skip:         slices.Clone(cfg.Corpus.Skip),
			MaxFileSize:  cfg.Corpus.MaxFileSize,
			Read:         readSettings(cfg.Corpus),
		},
	}
	unitSettings(&rin.Settings, effective, cfg.Chaining)
	for i, d := range docs {
		rin.Docs[i] = reportDoc(d, units[i], stats[i], effective)
	}
	for i, s := range skipped {
		rin.Skipped[i] = report.Skipped{Path: s.Path, Reason: s.Reason}
	}
	return report.Build(rin)
}

// fingerprintSets gives the engine's view of each document: its distinct
// unit fingerprints, sorted (used by scan, compare and archive check).
func fingerprintSets(units [][]shingle.Unit) [][]uint64 {
	sets := make([][]uint64, len(units))
	for i, us := range units {
		set := make([]uint64, len(us))
		for k, u := range us {
			set[k] = u.Hash
		}
		slices.Sort(set)
		sets[i] = slices.Compact(set)
	}
	return sets
}

// reportDoc is a document as the report needs it, with the notes on how it
// was split (used by scan, compare and archive check).
func reportDoc(d corpus.Document, units []shingle.Unit, st shingle.Stats, effective shingle.Options) report.Doc {
	notes := slices.Clone(d.Notes)
	notes = append(notes, skipNotes(st, d.Text)...)
	if st.LineBreaks {
		notes = append(notes, "no sentence punctuation: split at line breaks")
	}
	if st.Cut > 0 {
		notes = append(notes, fmt.Sprintf("%d sentences longer than %d bytes were cut", st.Cut, effective.MaxUnitBytes))
	}
	return report.Doc{
		Path: d.Path, Format: d.Format, Encoding: d.Encoding, Notes: notes,
		Text: d.Text, Words: st.Words, Units: units, Marks: d.Marks,
	}
}

// setTemplatesAside removes from docs every file that is also a template,
// listing it as skipped, so a prompt kept beside the essays is not compared
// with them.
func setTemplatesAside(docs []corpus.Document, skipped []corpus.Skipped, templates []corpus.Document) ([]corpus.Document, []corpus.Skipped) {
	isTemplate := make(map[string]bool, len(templates))
	for _, t := range templates {
		isTemplate[absPath(t.Path)] = true
	}
	kept := docs[:0:0]
	for _, d := range docs {
		if isTemplate[absPath(d.Path)] {
			skipped = append(skipped, corpus.Skipped{Path: d.Path, Reason: "template (--exclude): not compared"})
			continue
		}
		kept = append(kept, d)
	}
	slices.SortStableFunc(skipped, func(a, b corpus.Skipped) int {
		switch {
		case a.Path < b.Path:
			return -1
		case a.Path > b.Path:
			return 1
		}
		return 0
	})
	for i := range kept {
		kept[i].ID = i
	}
	return kept, skipped
}

func absPath(p string) string {
	a, err := filepath.Abs(filepath.FromSlash(p))
	if err != nil {
		return p
	}
	return a
}

// shingleAll splits every document with jobs workers, one Splitter each.
// Results land at their document's index, so the order never depends on
// scheduling.
func shingleAll(docs []corpus.Document, opt shingle.Options, jobs int) ([][]shingle.Unit, []shingle.Stats) {
	units := make([][]shingle.Unit, len(docs))
	stats := make([]shingle.Stats, len(docs))
	jobs = max(1, min(jobs, len(docs)))
	next := make(chan int)
	var wg sync.WaitGroup
	for range jobs {
		wg.Add(1)
		go func() {
			defer wg.Done()
			sp := shingle.New(opt)
			for i := range next {
				units[i], stats[i] = sp.Units(docs[i].Text, nil)
			}
		}()
	}
	for i := range docs {
		next <- i
	}
	close(next)
	wg.Wait()
	return units, stats
}

// readSettings records the limits and options the documents were read
// with, defaults applied; nil if the options are invalid (Read has
// refused them before a report is built).
func readSettings(o corpus.Options) *report.ReadSettings {
	e, err := o.Effective()
	if err != nil {
		return nil
	}
	return &report.ReadSettings{
		MaxContainerSize:  e.MaxContainerBytes,
		MaxMemberSize:     e.MaxMemberBytes,
		MaxMembers:        e.MaxMembers,
		MaxRatio:          e.MaxRatio,
		MaxDepth:          e.MaxDepth,
		PDFTimeoutSeconds: e.PDFTimeout.Seconds(),
		SkipQuotedReplies: e.SkipQuotedReplies,
		JSONLID:           e.JSONLID,
		JSONLText:         e.JSONLText,
		MaxJSONLLine:      e.MaxJSONLLine,
	}
}
