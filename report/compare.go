package report

import (
	"encoding/json"
	"fmt"
	"strings"
)

// Reference-set sections. A compare run (new documents against a
// reference set) adds, for every new document, where its shared passages
// were found (Sources); a compare with master texts adds what each copy
// keeps of each master and the master passages it lacks (Masters). Both are
// computed from the pairs of the same Result, so they never disagree with
// them, and every renderer writes them: text, json, ndjson, csv and html.

// Sources lists the reference documents one new document shares passages
// with, in the order of the report's pairs (score, then shared units,
// then paths).
type Sources struct {
	Document string `json:"document"`
	// Reused is the share of the new document's words inside passages
	// it shares with any document of the report.
	Reused  float64  `json:"reused"`
	Sources []Source `json:"sources"`
}

// Source is one reference document of a new document, with the figures
// of their pair.
type Source struct {
	Path     string  `json:"path"`
	Score    float64 `json:"score"`
	Shared   int     `json:"shared"`
	Passages int     `json:"passages"`
	Words    int     `json:"words"` // words of the new document inside the passages
}

// MasterCoverage is one new document's view of one master text: how much
// of the master it keeps, and the master's passages it lacks, in order.
type MasterCoverage struct {
	Master   string           `json:"master"`
	Copy     string           `json:"copy"`
	Coverage float64          `json:"coverage"` // share of the master's words inside passages shared with the copy
	Unit     string           `json:"unit"`     // what Missing counts: "sentence" or "shingle"
	Missing  []MissingPassage `json:"missing"`
}

// MissingPassage is a run of consecutive master units the copy lacks;
// offsets are bytes of the master's extracted text.
type MissingPassage struct {
	Start int    `json:"start"`
	End   int    `json:"end"`
	Line  int    `json:"line"`
	Units int    `json:"units"`
	Words int    `json:"words"`
	Text  string `json:"text"`
}

// writeCompareText writes the reference-set sections of the text report.
func writeCompareText(t *textWriter, r *Result) {
	if len(r.Sources) > 0 {
		t.heading("Where each new document's shared passages were found")
		for _, s := range r.Sources {
			t.linef("  %s (%s of its words are in shared passages)", clean(s.Document), percent(s.Reused))
			for _, src := range s.Sources {
				t.linef("      in %s: %s, %s, score %s", clean(src.Path),
					plural(src.Passages, "passage"), plural(src.Words, "word"), percent(src.Score))
			}
		}
	}
	if len(r.Masters) > 0 {
		t.heading("What each copy keeps of its master")
		for _, c := range r.Masters {
			t.linef("  %s keeps %s of %s; %s of the master not in it", clean(c.Copy), percent(c.Coverage), clean(c.Master),
				plural(len(c.Missing), "passage"))
			for _, g := range c.Missing {
				t.linef("      line %d, %s: %s", g.Line, plural(g.Units, c.Unit), trim(clean(strings.Join(strings.Fields(g.Text), " ")), 160))
			}
		}
	}
}

// compareNDJSON appends the reference-set sections as lines of type
// "sources" and "master".
func compareNDJSON(e *jsonEncoder, r *Result) error {
	for i := range r.Sources {
		line, err := json.Marshal(struct {
			Type string `json:"type"`
			Sources
		}{"sources", r.Sources[i]})
		if err != nil {
			return err
		}
		e.buf = append(append(e.buf, line...), '\n')
		e.maybeFlush()
	}
	for i := range r.Masters {
		line, err := json.Marshal(struct {
			Type string `json:"type"`
			MasterCoverage
		}{"master", r.Masters[i]})
		if err != nil {
			return err
		}
		e.buf = append(append(e.buf, line...), '\n')
		e.maybeFlush()
	}
	return nil
}

// compareCSV gives the reference-set sections as CSV rows: one "source"
// row per new document and source (a: the new document, b: the source)
// and one "missing" row per master passage a copy lacks (a: the copy, b:
// the master, coverage_b: the copy's coverage of the master).
func compareCSV(r *Result, num func(float64) string) [][]string {
	var rows [][]string
	for _, s := range r.Sources {
		for k, src := range s.Sources {
			rows = append(rows, []string{"source", fmt.Sprint(k + 1), num(src.Score), num(s.Reused), "", "", fmt.Sprint(src.Shared),
				fmt.Sprint(src.Passages), "", safeCell(s.Document), safeCell(src.Path), fmt.Sprintf("%d words in shared passages", src.Words)})
		}
	}
	for _, c := range r.Masters {
		if len(c.Missing) == 0 {
			rows = append(rows, []string{"missing", "", "", "", num(c.Coverage), "", "", "0", "", safeCell(c.Copy), safeCell(c.Master), "nothing of the master is missing"})
		}
		for k, g := range c.Missing {
			rows = append(rows, []string{"missing", fmt.Sprint(k + 1), "", "", num(c.Coverage), "", "", "", fmt.Sprint(g.Words), safeCell(c.Copy), safeCell(c.Master),
				safeCell(fmt.Sprintf("line %d, %s: %s", g.Line, plural(g.Units, c.Unit), strings.Join(strings.Fields(g.Text), " ")))})
		}
	}
	return rows
}
