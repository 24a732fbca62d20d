package scan

import (
	"context"
	"errors"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"slices"
	"strings"
	"unicode"

	"reprise/corpus"
	"reprise/pairs"
	"reprise/report"
	"reprise/shingle"
)

// CompareConfig is a compare run: new documents (Config.Paths) against a
// reference set.
type CompareConfig struct {
	Config
	References []string // reference files and folders
	// Masters are reference files the new documents are copies of (a
	// master policy): the report says what each copy keeps of each master
	// and which of its passages the copy lacks. They are references too.
	Masters []string
	// Within also reports pairs of two new documents.
	Within bool
	// MaxDocsSet says that Config.Pairs.MaxDocs was chosen by the caller;
	// otherwise, with Masters, the common-text cap is lifted (the copies
	// share most of the master, which must not become common text).
	MaxDocsSet bool
}

// NoDocumentsError says that a set of inputs gave no readable document.
// It matches ErrNoDocuments with errors.Is.
type NoDocumentsError struct {
	What  string   // "document", "reference document", "new document"
	Paths []string // the inputs that gave none
}

func (e *NoDocumentsError) Error() string {
	return fmt.Sprintf("no readable %s in %s", e.What, strings.Join(e.Paths, " "))
}

// Is makes errors.Is(err, ErrNoDocuments) true.
func (e *NoDocumentsError) Is(target error) bool { return target == ErrNoDocuments }

// Compare reads the references and the new documents in one run and
// reports only pairs with one side in each (and, with Within, pairs of two
// new documents), the reference on side A; the Result's Sources list each
// new document's references, and Masters what each copy keeps of each
// master. A reference set or a batch that gives no document is an error
// (a *NoDocumentsError), never an empty report: "0 pairs" would read as an
// all-clear.
func Compare(ctx context.Context, cc CompareConfig) (*report.Result, error) {
	refs := slices.Concat(cc.References, cc.Masters)
	if len(refs) == 0 {
		return nil, errors.New("no reference set")
	}
	if len(cc.Paths) == 0 {
		return nil, errors.New("no new documents")
	}
	cfg := cc.Config
	newPaths := cfg.Paths
	cfg.Paths = slices.Concat(refs, newPaths)
	// With masters the copies share most of the master's sentences, so the
	// default cap (half the documents) would call the whole master common
	// text as soon as more than half the documents are copies. Unless the
	// caller set one, the cap is lifted: it is the number of documents, so
	// no unit is common text.
	liftCap := len(cc.Masters) > 0 && !cc.MaxDocsSet
	if liftCap {
		cfg.Pairs.MaxDocs = math.MaxInt32
		cfg.MaxDocsRule = "--master without --max-docs: the number of documents (no sentence is common text)"
	}
	// The masters' documents are taken from the run itself, so their text
	// is the one the passages' offsets point into (same read options, same
	// templates set aside).
	masterDocs := make([][]corpus.Document, len(cc.Masters))
	if len(cc.Masters) > 0 {
		cfg.keepText = func(path string) bool { return UnderAny(path, cc.Masters) }
	}
	// The reference is side A of its pairs, as the archived document is in
	// an archive check: the same pair reads the same way in both.
	cfg.sideA = func(path string) bool { return UnderAny(path, refs) }
	refsRead, newRead := 0, 0
	cfg.keepPairs = func(docs []corpus.Document, eng *pairs.Result) {
		isRef := make([]bool, len(docs))
		for i, d := range docs {
			isRef[i] = UnderAny(d.Path, refs)
			if isRef[i] {
				refsRead++
			} else {
				newRead++
			}
			for k, m := range cc.Masters {
				if UnderAny(d.Path, []string{m}) {
					masterDocs[k] = append(masterDocs[k], d)
				}
			}
		}
		keepCrossPairs(eng, isRef, cc.Within, nil)
		if liftCap {
			eng.MaxDocs = max(2, len(docs))
		}
	}
	res, err := Run(ctx, cfg)
	if errors.Is(err, ErrNoDocuments) {
		return nil, &NoDocumentsError{What: "document", Paths: cfg.Paths}
	}
	if err != nil {
		return nil, err
	}
	if refsRead == 0 {
		return nil, fmt.Errorf("reference set: %w", &NoDocumentsError{What: "reference document", Paths: refs})
	}
	if newRead == 0 {
		return nil, fmt.Errorf("new documents: %w", &NoDocumentsError{What: "new document", Paths: newPaths})
	}
	res.Sources = newSources(res, refs)
	for k, m := range cc.Masters {
		c, err := masterReport(m, masterDocs[k], res, refs, cfg.Shingle)
		if err != nil {
			return nil, err
		}
		res.Masters = append(res.Masters, c...)
	}
	return res, nil
}

// UnderAny reports whether path is one of roots or inside one. Documents
// are named by the path as given joined with the path inside a folder
// (root/a.txt), a ZIP archive (root!/a.txt) or a JSON Lines file
// (root#id). The last two count only when the root is a file, and a
// root#id that is itself a file on disk is not inside the root.
func UnderAny(path string, roots []string) bool {
	for _, r := range roots {
		r = strings.TrimSuffix(filepath.ToSlash(r), "/")
		p := filepath.ToSlash(path)
		for _, pr := range [][2]string{{p, r}, {filepath.ToSlash(filepath.Clean(p)), filepath.ToSlash(filepath.Clean(r))}} {
			p, r := pr[0], pr[1]
			if p == r || strings.HasPrefix(p, r+"/") {
				return true
			}
			if !strings.HasPrefix(p, r+"!/") && !strings.HasPrefix(p, r+"#") {
				continue
			}
			if st, err := os.Stat(filepath.FromSlash(r)); err != nil || st.IsDir() {
				continue
			}
			if strings.HasPrefix(p, r+"!/") {
				return true
			}
			if _, err := os.Lstat(filepath.FromSlash(p)); errors.Is(err, os.ErrNotExist) {
				return true
			}
		}
	}
	return false
}

// keepCrossPairs keeps only the engine's pairs with one reference and one
// new document (and, with within, pairs of two new documents), the groups
// holding a new document and — unless within — a reference one, and
// recomputes the clusters from the kept pairs.
//
// Reference–reference pairs are counted by the engine and dropped here:
// the cost is bounded by the reference set's own overlap, which is small
// for typical reference sets (published articles, a master text), and the
// result is the same as counting cross pairs only.
//
// same, when not nil, names pairs that are one document twice (a new
// document and its own archived version): those are dropped too.
func keepCrossPairs(eng *pairs.Result, isRef []bool, within bool, same func(a, b uint32) bool) {
	keep := func(a, b uint32) bool {
		if same != nil && same(a, b) {
			return false
		}
		if isRef[a] != isRef[b] {
			return true
		}
		return within && !isRef[a]
	}
	eng.Pairs = slices.DeleteFunc(eng.Pairs, func(p pairs.Pair) bool { return !keep(p.A, p.B) })
	eng.Groups = slices.DeleteFunc(eng.Groups, func(g pairs.Group) bool {
		refs := 0
		for _, d := range g.Docs {
			if isRef[d] {
				refs++
			}
		}
		return refs == len(g.Docs) || (refs == 0 && !within)
	})
	eng.Clusters = pairs.Clusters(eng.Pairs, len(isRef))
}

// newSources lists, for every new document with a reported pair, its
// sources; every number comes from the report's pairs.
func newSources(res *report.Result, refs []string) []report.Sources {
	var out []report.Sources
	for _, d := range res.Documents {
		if UnderAny(d.Path, refs) {
			continue
		}
		s := report.Sources{Document: d.Path, Reused: d.Reused}
		for i := range res.Pairs {
			p := &res.Pairs[i]
			other := ""
			switch d.Path {
			case p.A:
				other = p.B
			case p.B:
				other = p.A
			default:
				continue
			}
			words := 0
			for _, g := range p.Passages {
				words += g.Words
			}
			s.Sources = append(s.Sources, report.Source{Path: other, Score: p.Score, Shared: p.Shared, Passages: len(p.Passages), Words: words})
		}
		if len(s.Sources) > 0 {
			out = append(out, s)
		}
	}
	return out
}

// masterReport lists, for every new document, the master's units outside
// the passages the two share. docs are the run's documents under the
// master's path (the report holds passages, not texts); the master is split
// with the run's options, so its units are the run's and their offsets
// point into the text the passages do.
func masterReport(path string, docs []corpus.Document, res *report.Result, refs []string, sopt shingle.Options) ([]report.MasterCoverage, error) {
	if len(docs) != 1 {
		reason := "not one document"
		if len(docs) == 0 {
			reason = "not read as a document in this run"
			for _, s := range res.Skipped {
				if UnderAny(s.Path, []string{path}) {
					reason = s.Reason
					break
				}
			}
		}
		return nil, fmt.Errorf("master %s: %s", path, reason)
	}
	m := docs[0]
	units, _ := shingle.New(sopt).Units(m.Text, nil)
	unitName := "sentence"
	if sopt.Unit == shingle.UnitWords {
		unitName = "shingle"
	}
	var out []report.MasterCoverage
	for _, d := range res.Documents {
		if UnderAny(d.Path, refs) {
			continue
		}
		c := report.MasterCoverage{Master: m.Path, Copy: d.Path, Missing: []report.MissingPassage{}, Unit: unitName}
		var covered [][2]int
		for _, p := range res.Pairs {
			switch {
			case p.A == m.Path && p.B == d.Path:
				c.Coverage = p.CoverageA
				for _, g := range p.Passages {
					covered = append(covered, [2]int{g.AStart, g.AEnd})
				}
			case p.B == m.Path && p.A == d.Path:
				c.Coverage = p.CoverageB
				for _, g := range p.Passages {
					covered = append(covered, [2]int{g.BStart, g.BEnd})
				}
			}
		}
		inside := func(u shingle.Unit) bool {
			for _, s := range covered {
				if int(u.Start) >= s[0] && int(u.End) <= s[1] {
					return true
				}
			}
			return false
		}
		var run *report.MissingPassage
		for _, u := range units {
			if inside(u) {
				run = nil
				continue
			}
			if run == nil {
				c.Missing = append(c.Missing, report.MissingPassage{Start: int(u.Start)})
				run = &c.Missing[len(c.Missing)-1]
			}
			run.End = int(u.End)
			run.Units++
		}
		for k := range c.Missing {
			g := &c.Missing[k]
			// Word shingles overlap: a missing run may begin or end inside a
			// shared passage. Only the text outside the passages is missing.
			// The text left then starts after the passage's last word: at its
			// punctuation and space, which are skipped.
			clipped := false
			for _, s := range covered {
				if s[0] <= g.Start && g.Start < s[1] && s[1] < g.End {
					g.Start, clipped = s[1], true
				}
				if g.Start < s[0] && s[0] < g.End && g.End <= s[1] {
					g.End = s[0]
				}
			}
			if clipped {
				if k := strings.IndexFunc(m.Text[g.Start:g.End], func(r rune) bool { return unicode.IsLetter(r) || unicode.IsDigit(r) }); k > 0 {
					g.Start += k
				}
			}
			g.Line = 1 + strings.Count(m.Text[:g.Start], "\n")
			g.Text = m.Text[g.Start:g.End]
			g.Words = shingle.CountWords(g.Text)
		}
		out = append(out, c)
	}
	return out, nil
}
