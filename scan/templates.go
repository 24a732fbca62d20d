package scan

import (
	"context"
	"fmt"
	"path/filepath"
	"slices"
	"sync"

	"reprise/corpus"
	"reprise/shingle"
)

// ReadTemplates reads the template documents named by paths (a prompt, a
// disclaimer: text whose units never count) with opt, all of them: a
// template that gives no document is an error.
func ReadTemplates(ctx context.Context, paths []string, opt corpus.Options) ([]corpus.Document, error) {
	templates, _, bad, err := corpus.ReadEachContext(ctx, paths, opt, keepAll)
	if err != nil {
		return nil, err
	}
	if len(bad) > 0 {
		return nil, fmt.Errorf("template %s: %s", bad[0].Path, bad[0].Reason)
	}
	return templates, nil
}

// TemplateUnits splits the templates with opt on jobs workers and returns
// their fingerprints, sorted and distinct: the engine's excluded units.
func TemplateUnits(templates []corpus.Document, opt shingle.Options, jobs int) []uint64 {
	if len(templates) == 0 {
		return nil
	}
	var excluded []uint64
	units, _ := shingleAll(templates, opt, jobs)
	for _, us := range units {
		for _, u := range us {
			excluded = append(excluded, u.Hash)
		}
	}
	slices.Sort(excluded)
	return slices.Compact(excluded)
}

// IsTemplate returns a test of whether a path names the same file as one
// of the templates, so that a prompt kept beside the essays is not
// compared with them.
func IsTemplate(templates []corpus.Document) func(path string) bool {
	is := make(map[string]bool, len(templates))
	for _, t := range templates {
		is[absPath(t.Path)] = true
	}
	return func(path string) bool { return is[absPath(path)] }
}

// TemplateReason is the reason a document that is also a template is
// listed as skipped.
const TemplateReason = "template (--exclude): not compared"

// setTemplatesAside removes from docs every file that is also a template,
// listing it as skipped. kept lists the original index of each document kept.
func setTemplatesAside(docs []corpus.Document, skipped []corpus.Skipped, templates []corpus.Document) (_ []corpus.Document, _ []corpus.Skipped, kept []int) {
	isTemplate := IsTemplate(templates)
	out := docs[:0:0]
	for i, d := range docs {
		if isTemplate(d.Path) {
			skipped = append(skipped, corpus.Skipped{Path: d.Path, Reason: TemplateReason})
			continue
		}
		out = append(out, d)
		kept = append(kept, i)
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
	for i := range out {
		out[i].ID = i
	}
	return out, skipped, kept
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

// keepAll is a digest that keeps every document's text (corpus.Read's).
func keepAll(_ *corpus.Document, text *corpus.Loan) struct{} {
	text.Keep()
	return struct{}{}
}
