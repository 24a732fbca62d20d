package main

import (
	"cmp"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"math"
	"os"
	"path/filepath"
	"slices"
	"strings"
	"unicode"

	"github.com/spf13/pflag"

	"reprise/corpus"
	"reprise/pairs"
	"reprise/report"
	"reprise/shingle"
)

const compareUsage = `Usage: reprise compare --against REF_PATH... [flags] PATH...

Compares new documents (PATH...) with a reference set (--against, repeatable:
files or folders) and reports only pairs with one side in each; --within also
reports pairs among the new documents. Each pair lists its shared passages
with their lines; a new document's sources are its pairs, ranked by score,
and its "reused" share is the share of its words inside those passages.

With --master FILE (a reference that new documents are copies of, such as a
master policy), the report also gives, for every new document, the share of
the master it covers and the master's passages it lacks, in order, with
their lines: what the copy dropped or changed.

Takes every flag of 'reprise scan' as well (--min-shared, --min-words,
--exclude, --format, ...). The common-text cap counts reference and new
documents together; with --master and no --max-docs there is none (the
copies share most of the master, which must not become common text).

Examples:
  reprise compare --against published/ submissions/
  reprise compare --master policy/master.md departments/
  reprise compare --against sources/ --within --format json -o out.json essays/

Shared passages are leads for a human reviewer, not proof of misconduct.

Flags:
`

func runCompare(args []string, stdout, stderr io.Writer) int {
	var f scanFlags
	fs := newScanFlagSet(&f, stderr)
	fs.Init("compare", pflag.ContinueOnError)
	var against, masters []string
	var within bool
	fs.StringArrayVar(&against, "against", nil, "reference `PATH` (file or folder); repeatable")
	fs.StringArrayVar(&masters, "master", nil, "a reference `FILE` the new documents are copies of: report its coverage and missing passages; repeatable")
	fs.BoolVar(&within, "within", false, "also report pairs among the new documents")
	fs.Usage = func() {}
	fail := func(err error) int {
		fmt.Fprintf(stderr, "reprise compare: %v\nRun 'reprise compare --help' for usage.\n", err)
		return exitUsage
	}
	if err := fs.Parse(args); err != nil {
		if errors.Is(err, pflag.ErrHelp) {
			f.help = true
		} else {
			return fail(err)
		}
	}
	if f.help {
		fmt.Fprint(stdout, compareUsage)
		fmt.Fprint(stdout, fs.FlagUsages())
		return exitOK
	}
	refs := slices.Concat(against, masters)
	if len(refs) == 0 {
		return fail(errors.New("no reference set: give --against PATH or --master FILE"))
	}
	// The new documents are the positional paths and those --files-from
	// lists: every path config returns after the references.
	cfg, failOn, err := f.config(slices.Concat(refs, fs.Args()))
	if err != nil {
		return fail(err)
	}
	if len(cfg.Paths) <= len(refs) {
		return fail(errors.New("no PATH of new documents given (as arguments or with --files-from)"))
	}
	// With --master the copies share most of the master's sentences, so the
	// default cap (half the documents) would call the whole master common
	// text as soon as more than half the documents are copies. Unless
	// --max-docs is given, the cap is lifted: it is the number of documents,
	// so no unit is common text (the engine gets no cap, and the report
	// records the number of documents read).
	liftCap := len(masters) > 0 && !fs.Changed("max-docs")
	if liftCap {
		cfg.Pairs.MaxDocs = math.MaxInt32
		cfg.MaxDocsBy = "--master without --max-docs: the number of documents (no sentence is common text)"
	}
	if len(masters) > 0 && f.format != "text" && f.format != "ndjson" {
		return fail(fmt.Errorf("--master coverage is written in the text and ndjson formats, not %s", f.format))
	}
	guard, err := newTempGuard(cfg.Temp, stderr, os.Exit)
	if err != nil {
		return fail(err)
	}
	defer guard.Close()
	useTempDir(&cfg, guard)
	defer setMemoryLimit(cfg.Memory)()
	cfg.Warn = func(format string, args ...any) {
		if !f.quiet {
			fmt.Fprintf(stderr, "reprise: "+format+"\n", args...)
		}
	}
	var prog *progress
	if !f.quiet && isTerminal(stderr) {
		prog = &progress{w: stderr}
		cfg.Progress = prog.show
	}
	// The masters' documents are taken from the run itself, so their text
	// is the one the passages' offsets point into (same read options, same
	// templates set aside).
	masterDocs := make([][]corpus.Document, len(masters))
	if len(masters) > 0 {
		cfg.KeepText = func(path string) bool { return underAny(path, masters) }
	}
	// The reference is side A of its pairs, as the archived document is in
	// archive check: the same pair reads the same way in both.
	cfg.SideA = func(path string) bool { return underAny(path, refs) }
	refsRead, newRead := 0, 0
	cfg.KeepPairs = func(docs []corpus.Document, eng *pairs.Result) {
		isRef := make([]bool, len(docs))
		for i, d := range docs {
			isRef[i] = underAny(d.Path, refs)
			if isRef[i] {
				refsRead++
			} else {
				newRead++
			}
			for k, m := range masters {
				if underAny(d.Path, []string{m}) {
					masterDocs[k] = append(masterDocs[k], d)
				}
			}
		}
		keepCrossPairs(eng, isRef, within, nil)
		if liftCap {
			eng.MaxDocs = max(2, len(docs))
		}
	}
	cfg.TextPairs = sideBySidePairs(f.format, f.htmlPairs)
	res, err := scan(cfg)
	prog.done()
	if err != nil {
		if errors.Is(err, errNoDocuments) {
			return fail(noDocumentError("document", cfg.Paths, cfg.Corpus.Include))
		}
		return fail(err)
	}
	// A reference set or a batch that gave no document is an error, never
	// an empty report: "0 pairs" would read as an all-clear.
	if refsRead == 0 {
		return fail(fmt.Errorf("reference set: %w", noDocumentError("reference document", refs, cfg.Corpus.Include)))
	}
	if newRead == 0 {
		return fail(fmt.Errorf("new documents: %w", noDocumentError("new document", cfg.Paths[len(refs):], cfg.Corpus.Include)))
	}
	var cover []masterCoverage
	for k, m := range masters {
		c, err := masterReport(m, masterDocs[k], res, refs, cfg.Shingle)
		if err != nil {
			return fail(err)
		}
		cover = append(cover, c...)
	}
	color := f.output == "" && isTerminal(stdout) && os.Getenv("NO_COLOR") == ""
	opt := report.TextOptions{Top: f.top, Color: color, HTMLPairs: htmlPairsOption(f.htmlPairs)}
	err = writeOutput(f.output, stdout, func(w io.Writer) error {
		if err := report.Write(w, res, f.format, opt); err != nil {
			return err
		}
		if err := writeSources(w, f.format, newSources(res, refs)); err != nil {
			return err
		}
		return writeMasterCoverage(w, f.format, cover)
	})
	if err != nil {
		return fail(err)
	}
	if p := firstAtOrAbove(res, failOn); p != nil {
		if !f.quiet {
			fmt.Fprintf(stderr, "reprise: pair %s ~ %s has score %.4f, at or above --fail-on %s\n", p.A, p.B, p.Score, f.failOn)
		}
		return exitFailOn
	}
	return exitOK
}

// underAny reports whether path is one of roots or inside one. Documents
// are named by the path as given joined with the path inside a folder
// (root/a.txt), a ZIP archive (root!/a.txt) or a JSON Lines file
// (root#id). The last two count only when the root is a file, and a
// root#id that is itself a file on disk is not inside the root.
func underAny(path string, roots []string) bool {
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
// Reference–reference pairs are counted by the engine and dropped here.
// Counting only cross pairs inside the engine (skipping them per basket)
// would save that work, but touches every counting path of package pairs
// while its spilling rework is under way; the cost here is bounded by the
// reference set's own overlap, which is small for typical reference sets
// (published articles, a master text), and the result is the same.
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

// sources is one new document's reuse and its sources ranked: its pairs,
// in the report's order (score, then shared, then paths).
type sources struct {
	Type     string   `json:"type"` // "sources" in ndjson
	Document string   `json:"document"`
	Reused   float64  `json:"reused"`
	Sources  []source `json:"sources"`
}

type source struct {
	Path   string  `json:"path"`
	Score  float64 `json:"score"`
	Shared int     `json:"shared"`
}

// newSources lists, for every new document with a reported pair, its
// sources; every number comes from the report.
func newSources(res *report.Result, refs []string) []sources {
	var out []sources
	for _, d := range res.Documents {
		if underAny(d.Path, refs) {
			continue
		}
		s := sources{Type: "sources", Document: d.Path, Reused: d.Reused}
		for _, p := range res.Pairs {
			switch d.Path {
			case p.A:
				s.Sources = append(s.Sources, source{p.B, p.Score, p.Shared})
			case p.B:
				s.Sources = append(s.Sources, source{p.A, p.Score, p.Shared})
			}
		}
		if len(s.Sources) > 0 {
			out = append(out, s)
		}
	}
	return out
}

// writeSources appends the per-document sources: a text section, or one
// "sources" line per document in ndjson; the other formats carry the same
// facts in their pairs and documents.
func writeSources(w io.Writer, format string, list []sources) error {
	switch format {
	case "ndjson":
		enc := json.NewEncoder(w)
		enc.SetEscapeHTML(false)
		for _, s := range list {
			if err := enc.Encode(s); err != nil {
				return err
			}
		}
	case "text":
		fmt.Fprintf(w, "\nSources of each new document (reused: share of its words in passages it shares with them)\n")
		for _, s := range list {
			fmt.Fprintf(w, "\n  %s: %.2f%% reused\n", s.Document, 100*s.Reused)
			for k, src := range s.Sources {
				fmt.Fprintf(w, "    %d. %s (score %.2f%%, %d shared)\n", k+1, src.Path, 100*src.Score, src.Shared)
			}
		}
	}
	return nil
}

// masterCoverage is one new document's view of one master text.
type masterCoverage struct {
	Type     string           `json:"type"` // "master" in ndjson
	Master   string           `json:"master"`
	Copy     string           `json:"copy"`
	Coverage float64          `json:"coverage"` // share of the master's words inside passages shared with the copy
	Missing  []missingPassage `json:"missing"`  // master passages absent from the copy, in order
	unitName string           // "sentences" or "shingles", for the text format
}

// missingPassage is a run of consecutive master units (sentences, or word
// shingles with --unit words) the copy lacks.
type missingPassage struct {
	Start int    `json:"start"` // byte offsets into the master's extracted text
	End   int    `json:"end"`
	Line  int    `json:"line"`
	Units int    `json:"units"`
	Words int    `json:"words"`
	Text  string `json:"text"`
}

// masterReport lists, for every new document, the master's units outside
// the passages the two share. docs are the run's documents under the
// master's path (the report holds passages, not texts); the master is split
// with the run's options, so its units are the run's and their offsets
// point into the text the passages do.
func masterReport(path string, docs []corpus.Document, res *report.Result, refs []string, sopt shingle.Options) ([]masterCoverage, error) {
	if len(docs) != 1 {
		reason := "not one document"
		if len(docs) == 0 {
			reason = "not read as a document in this run"
			for _, s := range res.Skipped {
				if underAny(s.Path, []string{path}) {
					reason = s.Reason
					break
				}
			}
		}
		return nil, fmt.Errorf("--master %s: %s", path, reason)
	}
	m := docs[0]
	units, _ := shingle.New(sopt).Units(m.Text, nil)
	unitName := "sentences"
	if sopt.Unit == shingle.UnitWords {
		unitName = "shingles"
	}
	var out []masterCoverage
	for _, d := range res.Documents {
		if underAny(d.Path, refs) {
			continue
		}
		c := masterCoverage{Type: "master", Master: m.Path, Copy: d.Path, Missing: []missingPassage{}, unitName: unitName}
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
		var run *missingPassage
		for _, u := range units {
			if inside(u) {
				run = nil
				continue
			}
			if run == nil {
				c.Missing = append(c.Missing, missingPassage{Start: int(u.Start)})
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

// writeMasterCoverage appends the master section: a text section, or one
// "master" line per copy in ndjson.
func writeMasterCoverage(w io.Writer, format string, cover []masterCoverage) error {
	if len(cover) == 0 {
		return nil
	}
	if format == "ndjson" {
		enc := json.NewEncoder(w)
		enc.SetEscapeHTML(false)
		for _, c := range cover {
			if err := enc.Encode(c); err != nil {
				return err
			}
		}
		return nil
	}
	fmt.Fprintf(w, "\nMaster coverage (what each copy keeps of the master, and the master passages it lacks)\n")
	for _, c := range cover {
		fmt.Fprintf(w, "\n  %s: covers %.1f%% of %s; %d passages of the master missing\n", c.Copy, 100*c.Coverage, c.Master, len(c.Missing))
		for _, g := range c.Missing {
			text := strings.Join(strings.Fields(g.Text), " ")
			if len(text) > 160 {
				cut := 157
				for cut > 0 && text[cut]&0xC0 == 0x80 {
					cut--
				}
				text = text[:cut] + "..."
			}
			fmt.Fprintf(w, "    line %d (%d %s): %s\n", g.Line, g.Units, cmp.Or(c.unitName, "sentences"), text)
		}
	}
	return nil
}

// writeJSON writes v as indented JSON.
func writeJSON(w io.Writer, v any) error {
	enc := json.NewEncoder(w)
	enc.SetEscapeHTML(false)
	enc.SetIndent("", "  ")
	return enc.Encode(v)
}
