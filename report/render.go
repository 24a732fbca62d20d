package report

import (
	"bufio"
	"encoding/csv"
	"encoding/json"
	"fmt"
	"io"
	"strconv"
	"strings"
	"unicode"
	"unicode/utf8"
)

// Formats lists the renderings Write knows, in the order --help shows them.
var Formats = []string{"text", "json", "ndjson", "csv", "html"}

// TextOptions shape the terminal rendering.
type TextOptions struct {
	Top      int  // pairs in the table (0 means 20)
	Passages int  // top pairs whose first passages are quoted (0 means 5)
	Color    bool // ANSI bold and dim, for a terminal

	HTMLPairs int // html: top pairs with a detail view (0 means DefaultHTMLPairs)
}

// Write renders r in the named format.
func Write(w io.Writer, r *Result, format string, opt TextOptions) error {
	switch format {
	case "text":
		return WriteText(w, r, opt)
	case "json":
		return WriteJSON(w, r)
	case "ndjson":
		return WriteNDJSON(w, r)
	case "csv":
		return WriteCSV(w, r)
	case "html":
		return WriteHTML(w, r, HTMLOptions{Pairs: opt.HTMLPairs, Groups: opt.Top})
	}
	return fmt.Errorf("report: unknown format %q (want one of %s)", format, strings.Join(Formats, ", "))
}

// WriteJSON writes the whole result as one indented JSON document: the
// bytes json.Encoder with SetIndent("", "  ") gives for r, written by the
// appenders of render_json.go. Nothing is written if r cannot be encoded.
func WriteJSON(w io.Writer, r *Result) error {
	if err := newJSONEncoder(w, true).writeResultJSON(r); err != nil {
		return fmt.Errorf("report: json: %w", err)
	}
	return nil
}

// WriteNDJSON writes one JSON object per line, each with a "type" field:
// first a "report" line (format, caution, settings, summary), then every
// set of near-copies ("near_copies"), document, skipped input, common unit, pair, group and cluster, in the order
// and with the fields of the JSON contract. Each line holds the bytes
// json.Marshal gives for its record, with "type" first. Nothing is written if
// a record cannot be encoded.
func WriteNDJSON(w io.Writer, r *Result) error {
	if r == nil {
		return fmt.Errorf("report: ndjson: no result")
	}
	head, err := json.Marshal(struct {
		Type     string   `json:"type"`
		Format   int      `json:"format"`
		Caution  string   `json:"caution"`
		Settings Settings `json:"settings"`
		Summary  Summary  `json:"summary"`
	}{"report", r.Format, r.Caution, r.Settings, r.Summary})
	if err != nil {
		return fmt.Errorf("report: ndjson: %w", err)
	}
	if kind, err := checkJSONFloats(r); err != nil {
		return fmt.Errorf("report: ndjson: %s: cannot encode as an object: %v", kind, err)
	}
	e := newJSONEncoder(w, false)
	e.buf = append(e.buf, head...)
	e.buf = append(e.buf, '\n')
	for i := range r.NearCopies {
		line, err := json.Marshal(struct {
			Type string `json:"type"`
			NearCopySet
		}{"near_copies", r.NearCopies[i]})
		if err != nil {
			return fmt.Errorf("report: ndjson: %w", err)
		}
		e.buf = append(e.buf, line...)
		e.buf = append(e.buf, '\n')
		e.maybeFlush()
	}
	for i := range r.Documents {
		typedLine(e, "document", &r.Documents[i], (*jsonEncoder).documentFields)
	}
	for i := range r.Skipped {
		typedLine(e, "skipped", &r.Skipped[i], (*jsonEncoder).skippedFields)
	}
	for i := range r.Common {
		typedLine(e, "common", &r.Common[i], (*jsonEncoder).commonFields)
	}
	for i := range r.Pairs {
		typedLine(e, "pair", &r.Pairs[i], (*jsonEncoder).pairFields)
	}
	for i := range r.Groups {
		typedLine(e, "group", &r.Groups[i], (*jsonEncoder).groupFields)
	}
	for i := range r.Clusters {
		typedLine(e, "cluster", &r.Clusters[i], (*jsonEncoder).clusterFields)
	}
	if err := compareNDJSON(e, r); err != nil {
		return fmt.Errorf("report: ndjson: %w", err)
	}
	if err := e.flush(); err != nil {
		return fmt.Errorf("report: ndjson: %w", err)
	}
	return nil
}

// csvHeader names the CSV columns. One table holds every record kind, told
// apart by the first column, so that nothing the other formats list (skipped
// files, common text, the caution) is missing from a spreadsheet.
var csvHeader = []string{"record", "rank", "score", "coverage_a", "coverage_b", "jaccard", "shared",
	"passages", "longest_words", "a", "b", "detail"}

// WriteCSV writes one row per member of each set of near-copies (record
// "near_copy": rank is the set's number, jaccard the member's resemblance
// to the representative, b the representative), then one per pair (record
// "pair", ranked), then one per group, common unit and skipped input, and a
// final "caution" row.
//
// Cells of text that a spreadsheet would run as a formula (starting with
// = + - @, tab or CR) get a leading apostrophe: file names and document text
// are untrusted (common practice, OWASP "CSV injection").
func WriteCSV(w io.Writer, r *Result) error {
	cw := csv.NewWriter(w)
	num := func(f float64) string { return strconv.FormatFloat(f, 'f', -1, 64) }
	rows := [][]string{csvHeader}
	for k, set := range r.NearCopies {
		for _, m := range set.Documents {
			rows = append(rows, []string{"near_copy", strconv.Itoa(k + 1), "", "", "", num(m.Resemblance), strconv.Itoa(m.Shared),
				"", "", safeCell(m.Path), safeCell(set.Representative),
				safeCell(fmt.Sprintf("set %d of %d documents, %d of its %d pairs listed; differs most: %s", k+1, len(set.Documents), set.PairsListed, set.Pairs, set.DiffersMost))})
		}
	}
	for i := range r.Pairs {
		p := &r.Pairs[i]
		rows = append(rows, []string{"pair", strconv.Itoa(i + 1), num(p.Score), num(p.CoverageA), num(p.CoverageB),
			num(p.Jaccard), strconv.Itoa(p.Shared), strconv.Itoa(len(p.Passages)), strconv.Itoa(p.LongestWords()),
			safeCell(p.A), safeCell(p.B), identicalCell(p.Identical)})
	}
	for _, g := range r.Groups {
		rows = append(rows, []string{"group", "", "", "", "", "", strconv.Itoa(g.Shared), "", "", "", "",
			safeCell(strings.Join(g.Documents, " | "))})
	}
	for _, c := range r.Common {
		rows = append(rows, []string{"common", "", "", "", "", "", "", "", "", "", "",
			safeCell(fmt.Sprintf("%d documents: %s", c.Documents, c.Text))})
	}
	rows = append(rows, compareCSV(r, num)...)
	for _, s := range r.Skipped {
		rows = append(rows, []string{"skipped", "", "", "", "", "", "", "", "", safeCell(s.Path), "", safeCell(s.Reason)})
	}
	rows = append(rows, []string{"caution", "", "", "", "", "", "", "", "", "", "", r.Caution})
	if err := cw.WriteAll(rows); err != nil {
		return fmt.Errorf("report: csv: %w", err)
	}
	return nil
}

func identicalCell(identical bool) string {
	if identical {
		return "identical text"
	}
	return ""
}

func safeCell(s string) string {
	if s != "" && strings.ContainsRune("=+-@\t\r", rune(s[0])) {
		return "'" + s
	}
	return s
}

// WriteText writes the terminal report: summary, caution, ranked table,
// quoted passages of the top pairs, groups, common text, skipped inputs.
func WriteText(w io.Writer, r *Result, opt TextOptions) error {
	if opt.Top <= 0 {
		opt.Top = 20
	}
	if opt.Passages <= 0 {
		opt.Passages = 5
	}
	t := &textWriter{w: bufio.NewWriter(w), color: opt.Color}
	s := r.Summary

	t.heading("Summary")
	t.linef("%s read (%s, %s counted), %d skipped.",
		plural(s.Documents, "document"), plural(s.Words, "word"), plural(s.Units, r.Settings.Unit), s.Skipped)
	t.linef("A pair needs %s of at least %s; a %s in more than %s is common text.",
		plural(r.Settings.MinShared, "shared "+r.Settings.Unit), plural(r.Settings.MinWords, "word"),
		r.Settings.Unit, plural(r.Settings.MaxDocs, "document"))
	if s.Templates > 0 {
		t.linef("%s: %d of their %ss occur in the documents and were not counted.",
			plural(s.Templates, "template document"), s.TemplateUnits, r.Settings.Unit)
	}
	if s.CommonUnits > 0 {
		t.linef("%s set aside (listed below): %s of the words read.", plural(s.CommonUnits, "common "+r.Settings.Unit), percent(s.CommonShare))
	}
	if s.NearCopyDocuments > 0 {
		t.linef("%s", nearCopySummary(s))
	}
	t.linef("%s passages; %s of three or more.", plural(s.Pairs, "pair shares", "pairs share"), plural(s.Groups, "group"))
	if s.PairsNotListed > 0 {
		t.linef("%s inside large sets of near-copies not listed: each set lists its representative's pairs with the members least like it (--near-copy-pairs).", plural(s.PairsNotListed, "pair"))
	}
	if s.GroupsNotListed > 0 {
		t.linef("%s inside sets of near-copies not listed (the set stands for them).", plural(s.GroupsNotListed, "group"))
	}
	if s.GroupsTruncated {
		t.linef("Group search stopped at its limit of %d steps: each group listed is maximal, but other groups may exist; see the pairs and clusters.", s.GroupStepLimit)
	}
	t.blank()
	t.wrapped(r.Caution)

	if len(r.NearCopies) > 0 {
		t.heading("Near-copies")
		const members = 12
		for k, set := range r.NearCopies {
			t.linef("%d. %d documents, %s listed of their %s; resemblance to the representative (counted %ss in common over those in either):",
				k+1, len(set.Documents), plural(set.PairsListed, "pair"), plural(set.Pairs, "pair"), r.Settings.Unit)
			for i, m := range set.Documents {
				if i == members {
					t.linef("   … and %d more (--format json lists all).", len(set.Documents)-members)
					break
				}
				role := ""
				switch {
				case m.Path == set.Representative:
					role = "  (representative)"
				case m.Path == set.DiffersMost:
					role = "  (differs most)"
				}
				t.linef("   %7s  %s%s", percent(m.Resemblance), clean(m.Path), role)
			}
			switch {
			case set.DiffersMost == "":
				t.linef("   Every member holds the same counted %ss.", r.Settings.Unit)
			case len(set.Documents) > members:
				t.linef("   differs most: %s", clean(set.DiffersMost))
			}
		}
	}

	if len(r.Pairs) > 0 {
		t.heading("Pairs")
		shown := min(opt.Top, len(r.Pairs))
		t.dimf("%4s  %7s  %7s  %7s  %6s  %7s  %s", "rank", "score", "cover A", "cover B", "shared", "longest", "documents (A, B)")
		for i := 0; i < shown; i++ {
			p := &r.Pairs[i]
			t.linef("%4d  %7s  %7s  %7s  %6d  %5d w  %s", i+1, percent(p.Score), percent(p.CoverageA),
				percent(p.CoverageB), p.Shared, p.LongestWords(), clean(p.A))
			t.linef("%4s  %7s  %7s  %7s  %6s  %7s  %s", "", "", "", "", "", "", clean(p.B))
		}
		if shown < len(r.Pairs) {
			t.linef("… and %d more pairs (--top N shows more; --format json lists all).", len(r.Pairs)-shown)
		}

		t.heading("Passages of the top pairs")
		for i := 0; i < min(opt.Passages, len(r.Pairs)); i++ {
			p := &r.Pairs[i]
			same := ""
			if p.Identical {
				same = "  (identical text)"
			}
			t.linef("%d. %s  ~  %s%s", i+1, clean(p.A), clean(p.B), same)
			for k, g := range p.Passages {
				if k == 2 {
					t.linef("   … and %s more.", plural(len(p.Passages)-k, "passage"))
					break
				}
				t.dimf("   A %s, B %s: %s, %s", g.AWhere, g.BWhere, plural(g.Units, r.Settings.Unit), plural(g.Words, "word"))
				if g.Explained != nil {
					writeExplained(t, &g)
					continue
				}
				t.linef("   “%s”", trim(clean(g.Text), 300))
			}
		}
	}

	writeCompareText(t, r)

	if len(r.Groups) > 0 {
		t.heading("Groups")
		for k, g := range r.Groups {
			if k == opt.Top {
				t.linef("… and %d more groups (--top N shows more; --format json lists all).", len(r.Groups)-k)
				break
			}
			t.linef("%d documents share %s:", len(g.Documents), plural(g.Shared, r.Settings.Unit))
			for i, d := range g.Documents {
				if i == groupMembersShown && len(g.Documents) > groupMembersShown+1 {
					t.linef("   … and %d more (--format json lists all).", len(g.Documents)-i)
					break
				}
				t.linef("   %s", clean(d))
			}
		}
	}

	if len(r.Common) > 0 {
		t.heading("Common text (not counted)")
		const shown = 10
		for k, c := range r.Common {
			if k == shown {
				t.linef("… and %d more (--format json lists all).", len(r.Common)-shown)
				break
			}
			counted := ""
			if c.CountedIn > 0 {
				counted = fmt.Sprintf(" (still counted in %d that are mostly common text)", c.CountedIn)
			}
			t.linef("%5d documents%s  “%s”", c.Documents, counted, trim(clean(c.Text), 120))
		}
	}

	var noted []Document
	for _, d := range r.Documents {
		if len(d.Notes) > 0 {
			noted = append(noted, d)
		}
	}
	if len(noted) > 0 {
		t.heading("Notes on documents")
		for _, d := range noted {
			t.linef("%s: %s", clean(d.Path), clean(strings.Join(d.Notes, "; ")))
		}
	}

	if len(r.Skipped) > 0 {
		t.heading("Skipped")
		for _, s := range r.Skipped {
			t.linef("%s: %s", clean(s.Path), clean(s.Reason))
		}
	}
	return t.flush()
}

// groupMembersShown is how many documents of a group the text report
// names; a larger group ends with a count of the others.
const groupMembersShown = 12

// nearCopySummary is the summary's one line on near-copies.
func nearCopySummary(s Summary) string {
	if s.NearCopySets == 1 {
		return fmt.Sprintf("%d documents are near-copies of each other (listed first).", s.NearCopyDocuments)
	}
	return fmt.Sprintf("%d documents are near-copies, in %d sets of documents that are near-copies of each other (listed first).", s.NearCopyDocuments, s.NearCopySets)
}

// textWriter keeps the first write error and the colour choice.
type textWriter struct {
	w     *bufio.Writer
	color bool
	err   error
	lines int
}

func (t *textWriter) put(prefix, suffix, format string, args ...any) {
	if t.err != nil {
		return
	}
	if t.color {
		_, t.err = t.w.WriteString(prefix)
	}
	if t.err == nil {
		_, t.err = fmt.Fprintf(t.w, format, args...)
	}
	if t.err == nil && t.color {
		_, t.err = t.w.WriteString(suffix)
	}
	if t.err == nil {
		t.err = t.w.WriteByte('\n')
	}
	t.lines++
}

func (t *textWriter) linef(format string, args ...any) { t.put("", "", format, args...) }
func (t *textWriter) dimf(format string, args ...any)  { t.put("\x1b[2m", "\x1b[0m", format, args...) }
func (t *textWriter) blank() {
	if t.err == nil {
		t.err = t.w.WriteByte('\n')
	}
}

func (t *textWriter) heading(title string) {
	if t.lines > 0 {
		t.blank()
	}
	t.put("\x1b[1m", "\x1b[0m", "%s", title)
}

// wrapped writes a paragraph folded at 78 columns.
func (t *textWriter) wrapped(text string) {
	line := ""
	for _, word := range strings.Fields(text) {
		if line != "" && utf8.RuneCountInString(line)+1+utf8.RuneCountInString(word) > 78 {
			t.linef("%s", line)
			line = ""
		}
		if line != "" {
			line += " "
		}
		line += word
	}
	if line != "" {
		t.linef("%s", line)
	}
}

func (t *textWriter) flush() error {
	if t.err != nil {
		return fmt.Errorf("report: text: %w", t.err)
	}
	if err := t.w.Flush(); err != nil {
		return fmt.Errorf("report: text: %w", err)
	}
	return nil
}

// plural writes n with the singular or plural form of a noun; the plural
// adds "s" unless given.
// Plural is n followed by one, or by many (default: one with an s), as
// every report and message of reprise counts things ("1 pair", "2 pairs").
func Plural(n int, one string, many ...string) string { return plural(n, one, many...) }

func plural(n int, one string, many ...string) string {
	if n == 1 {
		return "1 " + one
	}
	if len(many) > 0 {
		return strconv.Itoa(n) + " " + many[0]
	}
	return strconv.Itoa(n) + " " + one + "s"
}

func percent(f float64) string { return strconv.FormatFloat(f*100, 'f', 2, 64) + "%" }

// clean makes untrusted text safe and compact for a terminal: control
// characters (escape sequences among them) become spaces, runs of white
// space collapse to one.
func clean(s string) string {
	var b strings.Builder
	space := false
	for _, r := range s {
		if r == utf8.RuneError || unicode.IsControl(r) || unicode.IsSpace(r) || unicode.Is(unicode.Cf, r) {
			if !space && b.Len() > 0 {
				b.WriteByte(' ')
			}
			space = true
			continue
		}
		space = false
		b.WriteRune(r)
	}
	return strings.TrimRight(b.String(), " ")
}

// trim shortens s to at most n runes, ending with an ellipsis when cut.
func trim(s string, n int) string {
	if utf8.RuneCountInString(s) <= n {
		return s
	}
	runes := []rune(s)
	cut := string(runes[:n-1])
	if k := strings.LastIndexByte(cut, ' '); k > len(cut)/2 {
		cut = cut[:k]
	}
	return cut + " …"
}
