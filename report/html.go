package report

// The HTML review page.
//
// # Design
//
// One file that a reviewer opens straight from disk, offline: the style
// sheet and the script are embedded in the binary (html/page.css,
// html/page.js) and written inline; the two pictures are inline SVG whose
// geometry Go computes (svg.go); there are no fonts, images, frames or
// requests of any kind. A Content-Security-Policy <meta> allows exactly the
// one inline style sheet and the one inline script, by their SHA-256 hashes,
// and nothing else: even if an escaping mistake let document text become
// markup, an injected script or a request to anywhere would be refused by
// the browser.
//
// Everything derived from input (file names, document text, notes, reasons)
// goes through html/template's contextual escaping; the only trusted values
// (template.CSS, template.JS) are the embedded files. Numbers are formatted
// from the Result's fields, never recomputed, so the page says what the JSON
// says. The script sorts, filters, shows one pair at a time and adds rows
// from the page's data (see "Scale"); it never builds markup from strings.
// Without the script the first screen's details are shown one after the
// other, so the page still reads (and prints).
//
// # Size
//
// A page for a big corpus must stay openable. Only the top Pairs pairs
// (HTMLOptions.Pairs, default 200) get a detail view; every pair is a row of
// the table (written out on the first screen, else kept as data: "Scale"). A detail view shows a document whole when its text is at most
// htmlFullText bytes ("short"); a longer document ("long") shows each passage
// with htmlContext bytes of context either side, a passage longer than
// htmlWindowMax bytes shown by its head and tail, and at most htmlSideBudget
// bytes of text per side; at most htmlMaxPassages passages per pair are
// marked and listed. HTMLSizeBound turns these caps into a bound on the
// file's size that the tests check; the README states it.
//
// # Scale
//
// A page of 10⁵ pairs written as HTML rows (and a documents table to match)
// is tens of megabytes of markup that Chromium did not lay out in two
// minutes. So the page writes as HTML only a first screen: the first Screen
// rows of each long list (HTMLOptions.Screen, default 50: pair rows, the
// side-by-side views of those pairs, document rows, groups, sets of
// near-copies), which is what a reader without the script sees. Everything
// else travels in the same file as data, never as markup: one JSON block
// (<script type="application/json" id="page-data">: every pair's row as a
// compact array that names documents by their index in a table of paths,
// the remaining documents, groups and sets), read by the script only when
// the reader asks for more, sorts or filters; and one JSON block per
// remaining side-by-side view (id pair-data-N) with its segments and list
// already cut and formatted by Go, parsed only when that pair is opened.
// A data block is not run (its type is not a script type), so the policy
// needs no hash for it; html/template writes it through its JSON escaper
// (<, > and & as \u003c, \u003e, \u0026), so no text can close it. The
// script builds rows and views with createElement and textContent, element
// by element as the template writes them (a browser test compares the
// two), and formats nothing but the table's percentages, with toFixed(2) on
// the same four-decimal fractions Go's percent formats.
//
// # Rejected alternatives
//
// The rest of the rows as <template> elements would keep all markup in
// html/template but costs several times the bytes of the data and is still
// parsed, as an inert tree, at load; passage texts inside <template>
// elements would be parsed into nodes before anyone asks for them.
//
// One page per pair in a folder would keep each page small but is no
// longer one file to mail or archive; a client-side renderer fed with the
// JSON (templates in JavaScript) would move escaping into the browser,
// where html/template's contextual escaping is not available, and would
// need the JSON inline anyway. A charting library in the browser is neither
// offline-safe to fetch nor deterministic; Go draws the SVG.

import (
	"bytes"
	"cmp"
	"crypto/sha256"
	_ "embed"
	"encoding/base64"
	"encoding/json"
	"fmt"
	"html/template"
	"io"
	"math"
	"path"
	"slices"
	"strconv"
	"strings"
	"unicode/utf8"
)

// Limits of the detail views (see "Size" above).
const (
	// DefaultHTMLPairs is the number of top pairs given a detail view.
	DefaultHTMLPairs = 200
	// htmlFullText: a document of at most this many bytes is shown whole.
	htmlFullText = 24 << 10
	// htmlContext: bytes of context shown either side of a passage in a long document.
	htmlContext = 320
	// htmlWindowMax: a passage window longer than this is shown by its head and tail.
	htmlWindowMax = 4 << 10
	// htmlSideBudget: bytes of document text shown per side of a long document.
	htmlSideBudget = 24 << 10
	// htmlMaxPassages: passages marked and listed per detailed pair.
	htmlMaxPassages = 200
	// htmlMaxPartners: partners listed per document in the documents table.
	htmlMaxPartners = 8
)

// HTMLOptions shape the HTML page.
type HTMLOptions struct {
	Pairs  int // top pairs with a detail view (0 means DefaultHTMLPairs; negative means none)
	Groups int // groups listed (0 means DefaultHTMLGroups); the JSON lists all
	// Screen is how many items of each long list (pair rows and their
	// detail views, document rows, groups, sets of near-copies) are written
	// as HTML; the script renders the rest from the page's data on demand
	// (0 means DefaultHTMLScreen).
	Screen int
}

// DefaultHTMLScreen is the length of the first screen of each list.
const DefaultHTMLScreen = 50

func (o HTMLOptions) screen() int {
	if o.Screen <= 0 {
		return DefaultHTMLScreen
	}
	return o.Screen
}

// DefaultHTMLGroups is the number of groups the page lists by default.
const DefaultHTMLGroups = 200

func (o HTMLOptions) detailed(total int) int {
	n := o.Pairs
	if n == 0 {
		n = DefaultHTMLPairs
	}
	return max(0, min(n, total))
}

// SourceText is one document's extracted text, kept beside the Result for
// renderers that show passages in context. It is not part of the JSON
// contract: a Result read back from JSON has no texts until the caller
// supplies them.
type SourceText struct {
	Text    string
	Missing string // why Text is not available ("" when it is)
}

//go:embed html/page.tmpl
var pageTemplate string

//go:embed html/page.css
var pageCSS string

//go:embed html/page.js
var pageJS string

var pageTmpl = template.Must(template.New("page").Funcs(template.FuncMap{
	"pct":         percent,
	"num":         func(f float64) string { return strconv.FormatFloat(f, 'f', -1, 64) },
	"plural":      plural,
	"bytes":       formatBytes[int64],
	"inc":         func(n int) int { return n + 1 },
	"explainHead": explainHead,
}).Parse(pageTemplate))

// cspFor is the page's Content-Security-Policy: nothing from anywhere, except
// the one inline style sheet and the one inline script, named by hash.
func cspFor(css, js string) string {
	h := func(s string) string {
		sum := sha256.Sum256([]byte(s))
		return "'sha256-" + base64.StdEncoding.EncodeToString(sum[:]) + "'"
	}
	return "default-src 'none'; style-src " + h(css) + "; script-src " + h(js) +
		"; img-src 'none'; font-src 'none'; connect-src 'none'; media-src 'none'; object-src 'none'; " +
		"frame-src 'none'; worker-src 'none'; manifest-src 'none'; form-action 'none'; base-uri 'none'"
}

// WriteHTML writes the self-contained review page.
func WriteHTML(w io.Writer, r *Result, opt HTMLOptions) error {
	data, err := buildPage(r, opt)
	if err != nil {
		return fmt.Errorf("report: html: %w", err)
	}
	var buf bytes.Buffer
	if err := pageTmpl.Execute(&buf, data); err != nil {
		return fmt.Errorf("report: html: %w", err)
	}
	if _, err := w.Write(buf.Bytes()); err != nil {
		return fmt.Errorf("report: html: %w", err)
	}
	return nil
}

// The page's view model: everything the template shows, already formatted
// or ready for a format function; nothing in it is computed anew.
type page struct {
	CSS        template.CSS
	JS         template.JS
	CSP        string
	R          *Result
	Title      string
	Detailed   int
	Undetailed int       // pairs in the table only
	Rows       []pairRow // the first screen's rows
	Details    []pairDetail
	Later      []laterDetail // detail views rendered by the script when opened
	Docs       []docRow      // the first screen's document rows
	DocsTotal  int           // documents in some pair
	Quiet      int           // documents in no reported pair
	Noted      []Document
	Groups     []Group    // the first screen's groups
	GroupsOut  int        // groups listed (HTMLOptions.Groups), on the screen or in the data
	MoreGroups int        // groups the page does not list
	Near       []nearView // the first screen's sets
	NearTotal  int
	NearLine   string // the summary's line on near-copies
	Hist       histogram
	Net        network
	Screen     int             // HTMLOptions.screen()
	Data       json.RawMessage // the page's data block (pageData)
}

// laterDetail is one detail view kept as data: its JSON (detailData).
type laterDetail struct {
	ID   string
	Data json.RawMessage
}

// htmlMaxNearCopies is the number of members of one set of near-copies the
// page lists; the JSON report lists them all.
const htmlMaxNearCopies = 50

// nearView is one set of near-copies as the page lists it.
type nearView struct {
	N     int
	Set   *NearCopySet
	Shown []NearCopy
	More  int
}

type pairRow struct {
	Rank     int
	ID       string // detail section id, "" when the pair has no detail view
	P        *Pair
	Longest  int
	Passages int
}

type pairDetail struct {
	Rank     int
	ID       string
	P        *Pair
	Longest  int
	Items    []passageItem
	More     int // passages neither marked nor listed (htmlMaxPassages)
	A, B     side
	Unit     string
	Previous string // id of the previous and next detail, for keyboard paging
	Next     string
}

type passageItem struct {
	N       int
	G       *Passage
	AID     string // id of the passage's first mark in each column ("" when not shown)
	BID     string
	Excerpt string
	Explain *explainView // a reworded passage: both sides, shared words marked
}

// explainView is a reworded passage's two sides as pieces of text, each
// marked when its word's term the other side also has.
type explainView struct {
	Terms, ATerms, BTerms int
	A, B                  []wordPiece
}

type wordPiece struct {
	T string // text
	S bool   // a shared word
}

// htmlExplainText bounds the bytes of each side of an explanation.
const htmlExplainText = 600

func explainOf(g *Passage) *explainView {
	e := g.Explained
	if e == nil {
		return nil
	}
	pieces := func(text string, marks [][2]int) []wordPiece {
		cut, _ := cutText(text, htmlExplainText)
		var out []wordPiece
		at := 0
		for _, m := range marks {
			if m[0] < at || m[1] > len(cut) || m[0] > m[1] {
				continue
			}
			if m[0] > at {
				out = append(out, wordPiece{T: clean(cut[at:m[0]]) + sep(cut[at:m[0]])})
			}
			out = append(out, wordPiece{T: cut[m[0]:m[1]], S: true})
			at = m[1]
		}
		if at < len(cut) {
			out = append(out, wordPiece{T: clean(cut[at:])})
		}
		if len(cut) < len(text) {
			out = append(out, wordPiece{T: " …"})
		}
		return out
	}
	return &explainView{Terms: e.Terms, ATerms: e.ATerms, BTerms: e.BTerms,
		A: pieces(g.Text, e.AShared), B: pieces(e.BText, e.BShared)}
}

// sep keeps the space that clean drops at the end of a piece between words.
func sep(s string) string {
	if n := len(s); n > 0 && (s[n-1] == ' ' || s[n-1] == '\n' || s[n-1] == '\t') && clean(s) != "" {
		return " "
	}
	return ""
}

type side struct {
	Label    string // "A" or "B"
	Path     string
	Missing  string // why the text cannot be shown
	Segments []segment
	Short    bool // shown whole
}

// A segment is a run of shown text: plain, inside passages, or a gap.
type segment struct {
	Text  string
	Marks string // passage numbers covering the run, space separated ("" for plain text)
	Label int    // passage number starting here, 0 when none
	ID    string // id of the passage's first mark, with Label
	Gap   string // when set, the segment is a gap with this explanation
}

type docRow struct {
	D        *Document
	Partners []partner
	More     int
}

type partner struct {
	Path string
	Rank int
	ID   string
}

func buildPage(r *Result, opt HTMLOptions) (*page, error) {
	screen := opt.screen()
	p := &page{
		CSS:      template.CSS(pageCSS),
		JS:       template.JS(pageJS),
		CSP:      cspFor(pageCSS, pageJS),
		R:        r,
		Detailed: opt.detailed(len(r.Pairs)),
		Noted:    notedDocuments(r),
		Screen:   screen,
	}
	p.Undetailed = len(r.Pairs) - p.Detailed
	groups := opt.Groups
	if groups <= 0 {
		groups = DefaultHTMLGroups
	}
	listed := r.Groups[:min(groups, len(r.Groups))]
	p.GroupsOut = len(listed)
	p.Groups = listed[:min(screen, len(listed))]
	p.MoreGroups = len(r.Groups) - len(listed)
	var near []nearView
	for k := range r.NearCopies {
		set := &r.NearCopies[k]
		shown := set.Documents[:min(len(set.Documents), htmlMaxNearCopies)]
		near = append(near, nearView{N: k + 1, Set: set, Shown: shown, More: len(set.Documents) - len(shown)})
	}
	p.NearTotal = len(near)
	p.Near = near[:min(screen, len(near))]
	if r.Summary.NearCopyDocuments > 0 {
		p.NearLine = nearCopySummary(r.Summary)
	}
	p.Title = "reprise: " + plural(r.Summary.Pairs, "pair", "pairs") + " among " + plural(r.Summary.Documents, "document")
	p.Rows = make([]pairRow, min(screen, len(r.Pairs)))
	for i := range p.Rows {
		pr := &r.Pairs[i]
		p.Rows[i] = pairRow{Rank: i + 1, P: pr, Longest: pr.LongestWords(), Passages: len(pr.Passages)}
		if i < p.Detailed {
			p.Rows[i].ID = pairID(i + 1)
		}
	}
	texts := textIndex(r)
	for i := 0; i < p.Detailed; i++ {
		d := buildDetail(r, i, texts)
		if i > 0 {
			d.Previous = pairID(i)
		}
		if i+1 < p.Detailed {
			d.Next = pairID(i + 2)
		}
		if i < screen {
			p.Details = append(p.Details, d)
			continue
		}
		raw, err := json.Marshal(detailDataOf(&d, r))
		if err != nil {
			return nil, fmt.Errorf("pair %d: %w", i+1, err)
		}
		p.Later = append(p.Later, laterDetail{ID: "pair-data-" + strconv.Itoa(i+1), Data: raw})
	}
	docs, quiet := documentRows(r, p.Detailed)
	p.DocsTotal, p.Quiet = len(docs), quiet
	p.Docs = docs[:min(screen, len(docs))]
	p.Hist = buildHistogram(r)
	p.Net = buildNetwork(r, p.Detailed)
	raw, err := pageDataOf(r, p, docs[len(p.Docs):], listed[len(p.Groups):], near[len(p.Near):])
	if err != nil {
		return nil, err
	}
	p.Data = raw
	return p, nil
}

func pairID(rank int) string { return "pair-" + strconv.Itoa(rank) }

func notedDocuments(r *Result) []Document {
	var out []Document
	for _, d := range r.Documents {
		if len(d.Notes) > 0 {
			out = append(out, d)
		}
	}
	return out
}

// textIndex maps each document path to its text, or to why there is none.
func textIndex(r *Result) map[string]SourceText {
	m := make(map[string]SourceText, len(r.Documents))
	for i, d := range r.Documents {
		if i < len(r.Texts) {
			m[d.Path] = r.Texts[i]
		} else {
			m[d.Path] = SourceText{Missing: "the document's text is not part of this result"}
		}
	}
	return m
}

func buildDetail(r *Result, i int, texts map[string]SourceText) pairDetail {
	pr := &r.Pairs[i]
	rank := i + 1
	d := pairDetail{Rank: rank, ID: pairID(rank), P: pr, Longest: pr.LongestWords(), Unit: r.Settings.Unit}
	shown := min(len(pr.Passages), htmlMaxPassages)
	d.More = len(pr.Passages) - shown
	aSpans := make([]span, shown)
	bSpans := make([]span, shown)
	for k := 0; k < shown; k++ {
		g := &pr.Passages[k]
		aSpans[k] = span{g.AStart, g.AEnd}
		bSpans[k] = span{g.BStart, g.BEnd}
	}
	prefix := "p" + strconv.Itoa(rank)
	var aFirst, bFirst []string
	d.A, aFirst = buildSide("A", pr.A, texts[pr.A], aSpans, prefix+"a")
	d.B, bFirst = buildSide("B", pr.B, texts[pr.B], bSpans, prefix+"b")
	for k := 0; k < shown; k++ {
		d.Items = append(d.Items, passageItem{N: k + 1, G: &pr.Passages[k], AID: aFirst[k], BID: bFirst[k],
			Excerpt: trim(clean(pr.Passages[k].Text), 160), Explain: explainOf(&pr.Passages[k])})
	}
	return d
}

// buildSide cuts one document's text into the segments a column shows, and
// returns for each passage the id of its first mark ("" when not shown).
func buildSide(label, docPath string, src SourceText, spans []span, idPrefix string) (side, []string) {
	s := side{Label: label, Path: docPath}
	first := make([]string, len(spans))
	text := src.Text
	if src.Missing != "" {
		s.Missing = src.Missing
		return s, first
	}
	for _, sp := range spans {
		if sp.start < 0 || sp.end > len(text) || sp.start > sp.end {
			s.Missing = "the passages' offsets do not fit this text"
			return s, first
		}
	}
	windows := sideWindows(text, spans)
	s.Short = len(windows) == 1 && windows[0] == span{0, len(text)}
	lines := &lineIndex{}
	pos := 0
	for _, w := range windows {
		if w.start > pos {
			s.Segments = append(s.Segments, segment{Gap: gapText(text, lines, pos, w.start)})
		}
		s.Segments = appendMarked(s.Segments, text, w, spans, idPrefix, first)
		pos = w.end
	}
	if pos < len(text) {
		s.Segments = append(s.Segments, segment{Gap: gapText(text, lines, pos, len(text))})
	}
	return s, first
}

// sideWindows chooses the parts of text a column shows, in order and
// disjoint: all of a short text; for a long one, each passage with its
// context, long windows by head and tail, within htmlSideBudget bytes.
func sideWindows(text string, spans []span) []span {
	if len(text) <= htmlFullText {
		return []span{{0, len(text)}}
	}
	ws := make([]span, 0, len(spans))
	for _, sp := range spans {
		ws = append(ws, span{runeStart(text, max(0, sp.start-htmlContext)), runeStart(text, min(len(text), sp.end+htmlContext))})
	}
	slices.SortFunc(ws, func(x, y span) int { return cmp.Or(cmp.Compare(x.start, y.start), cmp.Compare(x.end, y.end)) })
	var merged []span
	for _, w := range ws {
		if n := len(merged); n > 0 && w.start <= merged[n-1].end {
			merged[n-1].end = max(merged[n-1].end, w.end)
			continue
		}
		merged = append(merged, w)
	}
	var out []span
	budget := htmlSideBudget
	for _, w := range merged {
		parts := []span{w}
		if w.end-w.start > htmlWindowMax {
			half := htmlWindowMax / 2
			parts = []span{{w.start, runeStart(text, w.start+half)}, {runeStart(text, w.end-half), w.end}}
		}
		for _, p := range parts {
			n := p.end - p.start
			if n > budget {
				return out
			}
			budget -= n
			out = append(out, p)
		}
	}
	return out
}

// runeStart moves i back to the start of the UTF-8 sequence it falls in.
func runeStart(text string, i int) int {
	for i > 0 && i < len(text) && !utf8.RuneStart(text[i]) {
		i--
	}
	return i
}

func gapText(text string, lines *lineIndex, from, to int) string {
	la := lines.line(text, from)
	lb := lines.line(text, max(from, to-1))
	where := "line " + strconv.Itoa(la)
	if lb > la {
		where = "lines " + strconv.Itoa(la) + "–" + strconv.Itoa(lb)
	}
	return "… " + formatBytes(to-from) + " not shown (" + where + ") …"
}

// appendMarked cuts window w of text at every passage edge inside it; each
// piece lists the passages covering it.
func appendMarked(segs []segment, text string, w span, spans []span, idPrefix string, first []string) []segment {
	cuts := []int{w.start, w.end}
	for _, sp := range spans {
		for _, c := range []int{sp.start, sp.end} {
			if c > w.start && c < w.end {
				cuts = append(cuts, c)
			}
		}
	}
	slices.Sort(cuts)
	cuts = slices.Compact(cuts)
	var nums []string
	for c := 0; c+1 < len(cuts); c++ {
		from, to := cuts[c], cuts[c+1]
		nums = nums[:0]
		label, id := 0, ""
		for k, sp := range spans {
			if sp.start <= from && to <= sp.end && sp.start < sp.end {
				nums = append(nums, strconv.Itoa(k+1))
				if first[k] == "" {
					first[k] = idPrefix + "-" + strconv.Itoa(k+1)
					if label == 0 {
						label, id = k+1, first[k]
					} else {
						// Two passages start in the same piece: the second's
						// jump lands on the first's mark, which covers it.
						first[k] = id
					}
				}
			}
		}
		segs = append(segs, segment{Text: text[from:to], Marks: strings.Join(nums, " "), Label: label, ID: id})
	}
	return segs
}

// documentRows lists the documents that take part in a reported pair, each
// with its reused share and its partners in rank order; quiet counts the rest.
func documentRows(r *Result, detailed int) ([]docRow, int) {
	idx := make(map[string]int, len(r.Documents))
	for i, d := range r.Documents {
		idx[d.Path] = i
	}
	partners := make([][]partner, len(r.Documents))
	for i := range r.Pairs {
		pr := &r.Pairs[i]
		id := ""
		if i < detailed {
			id = pairID(i + 1)
		}
		if a, ok := idx[pr.A]; ok {
			partners[a] = append(partners[a], partner{Path: pr.B, Rank: i + 1, ID: id})
		}
		if b, ok := idx[pr.B]; ok {
			partners[b] = append(partners[b], partner{Path: pr.A, Rank: i + 1, ID: id})
		}
	}
	var rows []docRow
	quiet := 0
	for i := range r.Documents {
		if len(partners[i]) == 0 {
			quiet++
			continue
		}
		shown := min(len(partners[i]), htmlMaxPartners)
		rows = append(rows, docRow{D: &r.Documents[i], Partners: partners[i][:shown], More: len(partners[i]) - shown})
	}
	slices.SortStableFunc(rows, func(x, y docRow) int {
		return cmp.Or(cmp.Compare(y.D.Reused, x.D.Reused), strings.Compare(x.D.Path, y.D.Path))
	})
	return rows, quiet
}

// formatBytes writes a byte count for a reader: 812 bytes, 4.2 KiB, 1.5 MiB.
func formatBytes[N int | int64](n N) string {
	switch {
	case n < 1<<10:
		return plural(int(n), "byte")
	case n < 1<<20:
		return strconv.FormatFloat(float64(n)/(1<<10), 'f', 1, 64) + " KiB"
	}
	return strconv.FormatFloat(float64(n)/(1<<20), 'f', 1, 64) + " MiB"
}

// baseName is the last element of a slash path, for short labels.
func baseName(p string) string { return path.Base(p) }

// Size bound constants: the most markup the template writes around each
// element, with a margin, and the most bytes html/template's escaping turns
// one byte of text into ("&#39;" is five bytes; six leaves room).
const (
	boundFixed   = 96 << 10 // head, style sheet, script, headings, summary, legend, both pictures' frames
	boundEscape  = 6
	boundRow     = 1 << 10 // markup of one table row
	boundDocRow  = 1 << 10 // markup of one documents-table row
	boundPartner = 256     // markup of one partner link
	boundItem    = 1 << 10 // markup of one passage in a detail's list
	// boundExplain: one passage's explanation, both sides (escaped text,
	// and markup of at most one mark per two bytes).
	boundExplain  = 2 * (boundEscape*htmlExplainText + htmlExplainText/2*48)
	boundSegment  = 160     // markup of one marked piece or gap
	boundDetail   = 4 << 10 // markup of one detail view around its texts and list
	boundNode     = 512     // one network node with its title and label
	boundEdge     = 256     // one network edge with its title
	boundListItem = 512     // one skipped, common, note, group or cluster entry

	boundDataRow     = 160 // one pair's row in the page's data, but for its two locations
	boundDataDoc     = 96  // one document's row in the page's data, but for its partners
	boundDataPartner = 32  // one partner in the page's data
	boundDataPath    = 8   // quotes and comma around one path in the paths table
)

// HTMLSizeBound is an upper bound on the size in bytes of the page WriteHTML
// writes for r, from the caps in this file: fixed parts; per pair, its row in
// the page's data (numbers, two escaped locations); per table row and
// document row written as HTML (the first screen), markup plus the escaped
// paths; per other document, its data row; each path once in the data's
// table of paths; per detailed pair (markup or data), at most two sides of
// shown text (escaped), at most htmlMaxPassages listed passages, and their
// marks; the network's nodes and edges; and every listed note, reason and
// common sentence, escaped. L is the longest path. The escaping of
// html/template and of the JSON writer both turn a byte into at most six.
func HTMLSizeBound(r *Result, opt HTMLOptions) int64 {
	longest := 0
	for _, d := range r.Documents {
		longest = max(longest, len(d.Path))
	}
	for _, s := range r.Skipped {
		longest = max(longest, len(s.Path))
	}
	L := int64(boundEscape * longest)
	n := int64(boundFixed)
	screen := int64(opt.screen())
	pairsN, docsN := int64(len(r.Pairs)), int64(len(r.Documents))
	n += min(screen, pairsN) * (boundRow + 2*L + 2*whereBound(r))
	n += pairsN * (boundDataRow + 2*whereBound(r))
	n += min(screen, docsN) * (boundDocRow + L + htmlMaxPartners*(boundPartner+L))
	n += docsN * (boundDataDoc + htmlMaxPartners*boundDataPartner)
	n += int64(len(pathTable(r))) * (L + boundDataPath)
	detailed := int64(opt.detailed(len(r.Pairs)))
	sideText := int64(max(htmlFullText, htmlSideBudget))
	perDetail := boundDetail + 2*L +
		2*(boundEscape*sideText+(4*htmlMaxPassages+2)*boundSegment) +
		htmlMaxPassages*(boundItem+2*whereBound(r)+boundEscape*4*160+int64(explainBound(r)))
	n += detailed * int64(perDetail)
	nodes := min(int64(len(r.Documents)), maxNetworkNodes)
	n += nodes*(boundNode+2*L) + min(int64(len(r.Pairs)), maxNetworkEdges)*(boundEdge+2*L)
	text := 0
	for _, s := range r.Skipped {
		text += len(s.Reason)
	}
	for _, c := range r.Common {
		text += len(c.Text) + 16
	}
	for _, d := range r.Documents {
		for _, note := range d.Notes {
			text += len(note)
		}
	}
	settings := 0
	for _, s := range slices.Concat(r.Settings.Exclude, r.Settings.Include, r.Settings.Skip) {
		settings += len(s)
	}
	items := int64(len(r.Skipped) + len(r.Common) + len(r.Documents) + len(r.Groups) + len(r.Clusters) + len(r.Settings.Exclude) + len(r.Settings.Include) + len(r.Settings.Skip))
	n += items*(boundListItem+L) + int64(boundEscape*(text+settings+len(r.Settings.MaxDocsRule)+len(r.Settings.Version)+len(r.Caution)))
	for _, g := range r.Groups {
		n += int64(len(g.Documents)) * (L + 16)
	}
	for _, c := range r.Clusters {
		n += int64(len(c.Documents)) * (L + 16)
	}
	for _, set := range r.NearCopies {
		n += boundListItem + 2*L + int64(min(len(set.Documents), htmlMaxNearCopies))*(boundListItem+L)
	}
	return n
}

// explainBound is boundExplain when some passage has an explanation.
func explainBound(r *Result) int {
	for i := range r.Pairs {
		for _, g := range r.Pairs[i].Passages {
			if g.Explained != nil {
				return boundExplain
			}
		}
	}
	return 0
}

// whereBound is the longest escaped location string of any passage.
func whereBound(r *Result) int64 {
	w := 0
	for i := range r.Pairs {
		for _, g := range r.Pairs[i].Passages {
			w = max(w, len(g.AWhere), len(g.BWhere))
		}
	}
	return int64(boundEscape * w)
}

// The page's data (see "Scale"). pageDataOf writes it by hand, as compact
// arrays, with the JSON renderer's appenders (jsonString escapes <, > and &,
// as html/template's JSON escaper then keeps them):
//
//	{"paths": [path, ...],          every path named below, by index
//	 "detailed": D, "unit": "sentence",
//	 "rows": [[score, cover A, cover B, shared, longest words, A, B, A where, B where], ...],
//	                                 every pair in rank order (the wheres of its
//	                                 first passage; a pair without one stops at B)
//	 "docs": [[path, words, reused, [[partner, rank], ...], more partners], ...],
//	 "groups": [[heading, [path, ...]], ...],
//	 "near": [[set number, members, pairs listed, pairs, representative,
//	           differs most or -1, [[path, resemblance], ...], more members], ...]}
//
// docs, groups and near hold only the items after the first screen.
func pageDataOf(r *Result, p *page, docs []docRow, groups []Group, near []nearView) (json.RawMessage, error) {
	index := make(map[string]int, len(r.Documents))
	var paths []string
	id := func(path string) int {
		if k, ok := index[path]; ok {
			return k
		}
		index[path] = len(paths)
		paths = append(paths, path)
		return len(paths) - 1
	}
	for _, d := range r.Documents {
		id(d.Path)
	}
	var body []byte
	num := func(f float64) error {
		if math.IsNaN(f) || math.IsInf(f, 0) {
			return fmt.Errorf("a fraction is %v", f)
		}
		body = jsonFloat(body, f)
		return nil
	}
	put := func(n int) { body = strconv.AppendInt(body, int64(n), 10) }
	body = append(body, `,"rows":[`...)
	for i := range r.Pairs {
		pr := &r.Pairs[i]
		if i > 0 {
			body = append(body, ',')
		}
		body = append(body, '[')
		for _, f := range []float64{pr.Score, pr.CoverageA, pr.CoverageB} {
			if err := num(f); err != nil {
				return nil, fmt.Errorf("pair %d: %w", i+1, err)
			}
			body = append(body, ',')
		}
		put(pr.Shared)
		body = append(body, ',')
		put(pr.LongestWords())
		body = append(body, ',')
		put(id(pr.A))
		body = append(body, ',')
		put(id(pr.B))
		if len(pr.Passages) > 0 {
			body = append(body, ',')
			body = jsonString(body, pr.Passages[0].AWhere)
			body = append(body, ',')
			body = jsonString(body, pr.Passages[0].BWhere)
		}
		body = append(body, ']')
	}
	body = append(body, `],"docs":[`...)
	for i, d := range docs {
		if i > 0 {
			body = append(body, ',')
		}
		body = append(body, '[')
		put(id(d.D.Path))
		body = append(body, ',')
		put(d.D.Words)
		body = append(body, ',')
		if err := num(d.D.Reused); err != nil {
			return nil, fmt.Errorf("document %s: %w", d.D.Path, err)
		}
		body = append(body, ",["...)
		for k, pt := range d.Partners {
			if k > 0 {
				body = append(body, ',')
			}
			body = append(body, '[')
			put(id(pt.Path))
			body = append(body, ',')
			put(pt.Rank)
			body = append(body, ']')
		}
		body = append(body, "],"...)
		put(d.More)
		body = append(body, ']')
	}
	body = append(body, `],"groups":[`...)
	for i, g := range groups {
		if i > 0 {
			body = append(body, ',')
		}
		body = append(body, '[')
		body = jsonString(body, strconv.Itoa(len(g.Documents))+" documents share "+plural(g.Shared, r.Settings.Unit))
		body = append(body, ",["...)
		for k, d := range g.Documents {
			if k > 0 {
				body = append(body, ',')
			}
			put(id(d))
		}
		body = append(body, "]]"...)
	}
	body = append(body, `],"near":[`...)
	for i, v := range near {
		if i > 0 {
			body = append(body, ',')
		}
		body = append(body, '[')
		for _, n := range []int{v.N, len(v.Set.Documents), v.Set.PairsListed, v.Set.Pairs, id(v.Set.Representative)} {
			put(n)
			body = append(body, ',')
		}
		if v.Set.DiffersMost == "" {
			put(-1)
		} else {
			put(id(v.Set.DiffersMost))
		}
		body = append(body, ",["...)
		for k, m := range v.Shown {
			if k > 0 {
				body = append(body, ',')
			}
			body = append(body, '[')
			put(id(m.Path))
			body = append(body, ',')
			if err := num(m.Resemblance); err != nil {
				return nil, fmt.Errorf("set %d: %w", v.N, err)
			}
			body = append(body, ']')
		}
		body = append(body, "],"...)
		put(v.More)
		body = append(body, ']')
	}
	body = append(body, "]}"...)
	// The paths table comes first but is known only now.
	head := []byte(`{"paths":[`)
	for k, s := range paths {
		if k > 0 {
			head = append(head, ',')
		}
		head = jsonString(head, s)
	}
	head = append(head, `],"detailed":`...)
	head = strconv.AppendInt(head, int64(p.Detailed), 10)
	head = append(head, `,"unit":`...)
	head = jsonString(head, r.Settings.Unit)
	return append(head, body...), nil
}

// detailData is one detail view as the script renders it: every string
// already formatted as the template would show it.
type detailData struct {
	Rank     int         `json:"rank"`
	Facts    [7]string   `json:"facts"` // score, cover A, cover B, Jaccard, shared, passages, longest passage
	Unit     string      `json:"unit"`
	Items    []itemData  `json:"items"`
	More     int         `json:"more"`
	Sides    [2]sideData `json:"sides"`
	Previous string      `json:"prev"`
	Next     string      `json:"next"`
}

type itemData struct {
	X       *explainData `json:"x,omitempty"` // a reworded passage's explanation
	N       int          `json:"n"`
	AWhere  string       `json:"aw"`
	BWhere  string       `json:"bw"`
	AID     string       `json:"aid"`
	BID     string       `json:"bid"`
	Size    string       `json:"size"` // "3 sentences, 45 words"
	Excerpt string       `json:"q"`
}

type sideData struct {
	Label    string    `json:"label"`
	Path     string    `json:"path"`
	Missing  string    `json:"missing"` // the template's whole sentence on a missing text`
	Short    bool      `json:"short"`
	Segments []segData `json:"segs"`
}

// segData is a segment: G set for a gap; else T, marked when M is set.
type segData struct {
	T string `json:"t,omitempty"`
	M string `json:"m,omitempty"`
	L int    `json:"l,omitempty"`
	I string `json:"i,omitempty"`
	G string `json:"g,omitempty"`
}

// explainData is an explanation as the script renders it: its heading, and
// each side's pieces as [text, 1 when shared].
type explainData struct {
	Head string   `json:"h"`
	A    [][2]any `json:"a"`
	B    [][2]any `json:"b"`
}

func explainHead(x *explainView) string {
	return fmt.Sprintf("Shared content words marked: %d, of A's %d and B's %d.", x.Terms, x.ATerms, x.BTerms)
}

func explainDataOf(x *explainView) *explainData {
	if x == nil {
		return nil
	}
	side := func(ps []wordPiece) [][2]any {
		out := make([][2]any, len(ps))
		for k, p := range ps {
			out[k] = [2]any{p.T, b2i(p.S)}
		}
		return out
	}
	return &explainData{Head: explainHead(x), A: side(x.A), B: side(x.B)}
}

func detailDataOf(d *pairDetail, r *Result) detailData {
	out := detailData{Rank: d.Rank, Unit: d.Unit, More: d.More, Previous: d.Previous, Next: d.Next,
		Facts: [7]string{percent(d.P.Score), percent(d.P.CoverageA), percent(d.P.CoverageB), percent(d.P.Jaccard),
			strconv.Itoa(d.P.Shared), strconv.Itoa(len(d.P.Passages)), plural(d.Longest, "word")}}
	for _, it := range d.Items {
		out.Items = append(out.Items, itemData{N: it.N, AWhere: it.G.AWhere, BWhere: it.G.BWhere, AID: it.AID, BID: it.BID,
			Size: plural(it.G.Units, r.Settings.Unit) + ", " + plural(it.G.Words, "word"), Excerpt: it.Excerpt, X: explainDataOf(it.Explain)})
	}
	for k, s := range []side{d.A, d.B} {
		sd := sideData{Label: s.Label, Path: s.Path, Short: s.Short}
		if s.Missing != "" {
			sd.Missing = "The text is not shown: " + s.Missing + ". The passages are listed above with their locations."
		}
		for _, g := range s.Segments {
			sd.Segments = append(sd.Segments, segData{T: g.Text, M: g.Marks, L: g.Label, I: g.ID, G: g.Gap})
		}
		out.Sides[k] = sd
	}
	return out
}

// pathTable is every path the page's data can name: a bound on its table
// of paths.
func pathTable(r *Result) map[string]struct{} {
	m := make(map[string]struct{}, len(r.Documents))
	for _, d := range r.Documents {
		m[d.Path] = struct{}{}
	}
	for i := range r.Pairs {
		m[r.Pairs[i].A] = struct{}{}
		m[r.Pairs[i].B] = struct{}{}
	}
	for _, g := range r.Groups {
		for _, d := range g.Documents {
			m[d] = struct{}{}
		}
	}
	for _, set := range r.NearCopies {
		m[set.Representative] = struct{}{}
		m[set.DiffersMost] = struct{}{}
		for _, d := range set.Documents {
			m[d.Path] = struct{}{}
		}
	}
	return m
}
