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
		templates, bad, err = corpus.Read(cfg.Exclude, corpus.Options{MaxFileSize: cfg.Corpus.MaxFileSize, Jobs: cfg.Jobs})
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

	in := pairs.Input{Docs: make([][]uint64, len(docs)), Excluded: excluded}
	for i, us := range units {
		set := make([]uint64, len(us))
		for k, u := range us {
			set[k] = u.Hash
		}
		slices.Sort(set)
		in.Docs[i] = slices.Compact(set)
	}

	progress("counting pairs among %d documents", len(docs))
	eng, err := pairs.Count(in, cfg.Pairs)
	if err != nil {
		return nil, err
	}

	progress("aligning %d pairs", len(eng.Pairs))
	rin := report.Input{
		Docs:      make([]report.Doc, len(docs)),
		Skipped:   make([]report.Skipped, len(skipped)),
		Engine:    eng,
		Excluded:  excluded,
		Templates: len(templates),
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
		},
	}
	for i, d := range docs {
		notes := slices.Clone(d.Notes)
		if stats[i].LineBreaks {
			notes = append(notes, "no sentence punctuation: split at line breaks")
		}
		if stats[i].Cut > 0 {
			notes = append(notes, fmt.Sprintf("%d sentences longer than %d bytes were cut", stats[i].Cut, effective.MaxUnitBytes))
		}
		rin.Docs[i] = report.Doc{
			Path: d.Path, Format: d.Format, Encoding: d.Encoding, Notes: notes,
			Text: d.Text, Words: stats[i].Words, Units: units[i], Marks: d.Marks,
		}
	}
	for i, s := range skipped {
		rin.Skipped[i] = report.Skipped{Path: s.Path, Reason: s.Reason}
	}
	return report.Build(rin)
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
				units[i], stats[i] = sp.Sentences(docs[i].Text, nil)
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
