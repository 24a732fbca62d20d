package corpus

import (
	"bytes"
	"fmt"
	"math/rand/v2"
	"os"
	"path/filepath"
	"testing"
	"unicode"
	"unicode/utf8"

	"reprise/internal/hostile"
)

// mdRefBlanker is the Markdown blanker as it was before the changes that
// made it linear on hostile input (isRule, closingBackticks, find,
// closeBracket and emphasis had superlinear paths), kept as the reference
// the current one must agree with byte for byte
// (TestMarkdownMatchesReference, FuzzMarkdownMatchesReference). Only the
// methods and the two functions that changed are copied; the helpers they
// share with markdown.go are called from there.
// mdRefBlanker removes Markdown markup in place. It is not a CommonMark
// parser: it makes one pass over the lines for block structure (front
// matter, fences, containers, headings, rules, tables, definitions, HTML
// comment blocks) and one pass over each paragraph for inline markup
// (escapes, code spans, autolinks, HTML, links and images, emphasis). Its
// slices are scratch space reused between paragraphs; a blanker is used by
// one goroutine.
type mdRefBlanker struct {
	lines    []mdLine
	delims   []mdDelim
	brackets []mdBracket
	// noClose[k] >= 0 means that closer k (see closers) does not occur in
	// the current paragraph at or after that offset, so that a paragraph
	// of many unclosed "<!--" costs linear time, not quadratic.
	noClose [len(closers)]int
}

// find returns the index of closer k in b[i:e] (as an offset into b), or
// -1, remembering failures for the rest of the paragraph.
func (m *mdRefBlanker) find(b []byte, i, e, k int) int {
	if m.noClose[k] >= 0 && i >= m.noClose[k] {
		return -1
	}
	j := bytes.Index(b[i:e], []byte(closers[k]))
	if j < 0 {
		m.noClose[k] = i
		return -1
	}
	return i + j
}

func (m *mdRefBlanker) splitLines(b []byte) {
	m.lines = m.lines[:0]
	start := 0
	if bytes.HasPrefix(b, []byte(bomUTF8)) {
		start = len(bomUTF8) // the mark stays; markup detection starts after it
	}
	for i := start; i < len(b); i++ {
		switch b[i] {
		case '\n':
			m.lines = append(m.lines, mdLine{start: start, end: i})
			start = i + 1
		case '\r':
			m.lines = append(m.lines, mdLine{start: start, end: i})
			if i+1 < len(b) && b[i+1] == '\n' {
				i++
			}
			start = i + 1
		}
	}
	if start < len(b) {
		m.lines = append(m.lines, mdLine{start: start, end: len(b)})
	}
}

// blank removes the markup of the Markdown text b in place.
func (m *mdRefBlanker) blank(b []byte) {
	m.splitLines(b)
	first := m.frontMatter(b)
	m.blocks(b, first)
	for i := 0; i < len(m.lines); {
		switch m.lines[i].kind {
		case lineSolo:
			m.inline(b, m.lines[i].start, m.lines[i].end)
			i++
		case lineText:
			j := i
			for j+1 < len(m.lines) && m.lines[j+1].kind == lineText {
				j++
			}
			m.inline(b, m.lines[i].start, m.lines[j].end)
			i = j + 1
		default:
			i++
		}
	}
}

// frontMatter blanks a YAML front matter block ("---" on the first line up
// to a closing "---" or "...") and returns the index of the first line
// after it. Without a closing line there is no front matter.
func (m *mdRefBlanker) frontMatter(b []byte) int {
	if len(m.lines) == 0 || !lineIs(b, m.lines[0], "---") {
		return 0
	}
	for j := 1; j < len(m.lines); j++ {
		if lineIs(b, m.lines[j], "---") || lineIs(b, m.lines[j], "...") {
			for k := 0; k <= j; k++ {
				blankRange(b, m.lines[k].start, m.lines[k].end)
				m.lines[k].kind = lineGone
			}
			return j + 1
		}
	}
	return 0
}

// blocks classifies lines from first on and blanks block-level markup.
func (m *mdRefBlanker) blocks(b []byte, first int) {
	var (
		fenceChar  byte // '`' or '~' inside a fenced code block, else 0
		fenceLen   int
		inComment  bool // inside an HTML comment that started a block
		paraOpen   bool // the previous line is paragraph text
		paraInList bool // that paragraph began in a list item
		tableOpen  bool // the previous line is a table row
	)
	for i := first; i < len(m.lines); i++ {
		l := &m.lines[i]
		s, e := l.start, l.end
		if fenceChar != 0 {
			q := skipBlank(b, s, e)
			n := runOf(b, q, e, fenceChar)
			if n >= fenceLen && skipBlank(b, q+n, e) == e {
				blankRange(b, s, e)
				l.kind = lineGone
				fenceChar = 0
			} else {
				l.kind = lineCode
			}
			continue
		}
		if inComment {
			k := bytes.Index(b[s:e], []byte("-->"))
			if k < 0 {
				blankRange(b, s, e)
				l.kind = lineGone
				continue
			}
			blankRange(b, s, s+k+3)
			inComment = false
			l.start, l.kind = s+k+3, lineSolo
			paraOpen, tableOpen = false, false
			continue
		}
		if skipBlank(b, s, e) == e {
			l.kind = lineBlank
			paraOpen, tableOpen = false, false
			continue
		}
		if tableOpen {
			blankPipes(b, s, e)
			l.kind = lineSolo
			continue
		}

		// Containers: block quote marks and list markers, any number of
		// them, in any order ("> 1. - text").
		p := s
		inList := false
		for {
			q := skipBlank(b, p, e)
			if q < e && b[q] == '>' {
				b[q] = ' '
				p = q + 1
				continue
			}
			if refIsRule(b, q, e) {
				break
			}
			if n := listMarker(b, q, e, paraOpen && !paraInList); n > 0 {
				blankRange(b, q, q+n)
				p = q + n
				inList = true
				continue
			}
			break
		}
		q := skipBlank(b, p, e)
		if q == e { // only container marks ("-", ">")
			l.kind = lineGone
			paraOpen = false
			continue
		}
		if c := b[q]; c == '`' || c == '~' {
			if n := runOf(b, q, e, c); n >= 3 && (c == '~' || bytes.IndexByte(b[q+n:e], '`') < 0) {
				blankRange(b, q, e) // the fence and its info string
				fenceChar, fenceLen = c, n
				l.kind = lineGone
				paraOpen = false
				continue
			}
		}
		if bytes.HasPrefix(b[q:e], []byte("<!--")) {
			paraOpen = false
			if k := bytes.Index(b[q+4:e], []byte("-->")); k >= 0 {
				end := q + 4 + k + 3
				blankRange(b, q, end)
				l.start, l.kind = end, lineSolo
				continue
			}
			blankRange(b, q, e)
			inComment = true
			l.kind = lineGone
			continue
		}
		if q-p <= 3 && b[q] == '#' {
			if n := runOf(b, q, e, '#'); n <= 6 && (q+n == e || isBlankByte(b[q+n])) {
				blankRange(b, q, q+n)
				blankClosingHashes(b, q+n, e)
				l.kind = lineSolo
				if skipBlank(b, s, e) == e {
					l.kind = lineGone
				}
				paraOpen = false
				continue
			}
		}
		if paraOpen && (b[q] == '=' || b[q] == '-') {
			if n := runOf(b, q, e, b[q]); skipBlank(b, q+n, e) == e {
				blankRange(b, q, e) // setext heading underline
				l.kind = lineGone
				paraOpen = false
				continue
			}
		}
		if refIsRule(b, q, e) {
			blankRange(b, q, e)
			l.kind = lineGone
			paraOpen = false
			continue
		}
		if paraOpen && i > 0 && m.lines[i-1].kind == lineText && isDelimiterRow(b, q, e) {
			h := &m.lines[i-1]
			if hasPipe(b, h.start, h.end) {
				blankRange(b, q, e)
				blankPipes(b, h.start, h.end)
				h.kind = lineSolo
				l.kind = lineGone
				paraOpen, tableOpen = false, true
				continue
			}
		}
		if !paraOpen && b[q] == '[' && isReferenceDefinition(b, q, e) {
			blankRange(b, q, e)
			l.kind = lineGone
			continue
		}
		l.kind = lineText
		if !paraOpen {
			paraInList = inList
		} else if inList {
			paraInList = true
		}
		paraOpen = true
	}
}

// isRule reports whether b[q:e] is a thematic break: three or more of the
// same '*', '-' or '_', with only blanks between.
func refIsRule(b []byte, q, e int) bool {
	if q >= e || (b[q] != '*' && b[q] != '-' && b[q] != '_') {
		return false
	}
	c, n := b[q], 0
	for k := q; k < e; k++ {
		switch {
		case b[k] == c:
			n++
		case isBlankByte(b[k]):
		default:
			return false
		}
	}
	return n >= 3
}

// inline removes inline markup from b[s:e], one paragraph (which may span
// several lines) or one heading or table row.
func (m *mdRefBlanker) inline(b []byte, s, e int) {
	m.delims = m.delims[:0]
	m.brackets = m.brackets[:0]
	for k := range m.noClose {
		m.noClose[k] = -1
	}
	for i := s; i < e; {
		switch c := b[i]; c {
		case '\\':
			if i+1 < e && isASCIIPunct(b[i+1]) {
				b[i] = ' '
				i += 2
				continue
			}
			if i+1 < e && (b[i+1] == '\n' || b[i+1] == '\r') {
				b[i] = ' ' // hard line break
			}
			i++
		case '`':
			n := runOf(b, i, e, '`')
			if k := refClosingBackticks(b, i+n, e, n); k >= 0 {
				blankRange(b, i, i+n)
				blankRange(b, k, k+n)
				i = k + n
			} else {
				i += n
			}
		case '<':
			if end := autolinkEnd(b, i, e); end > 0 {
				b[i], b[end-1] = ' ', ' ' // the address is the visible text
				i = end
			} else if end := m.htmlEnd(b, i, e); end > 0 {
				blankRange(b, i, end)
				i = end
			} else {
				i++
			}
		case '!':
			if i+1 < e && b[i+1] == '[' {
				m.brackets = append(m.brackets, mdBracket{pos: i, image: true})
				i += 2
			} else {
				i++
			}
		case '[':
			m.brackets = append(m.brackets, mdBracket{pos: i})
			i++
		case ']':
			i = m.closeBracket(b, i, e)
		case '*', '_', '~':
			n := runOf(b, i, e, c)
			m.addDelim(b, s, e, i, n)
			i += n
		default:
			i++
		}
	}
	m.emphasis(b)
}

// closeBracket handles the ']' at b[i]: with an inline destination
// "(url "title")" or a reference "[label]" after it, the brackets and the
// destination are blanked and the text kept. It returns where scanning
// goes on.
func (m *mdRefBlanker) closeBracket(b []byte, i, e int) int {
	if len(m.brackets) == 0 {
		return i + 1
	}
	o := m.brackets[len(m.brackets)-1]
	m.brackets = m.brackets[:len(m.brackets)-1]
	end := -1
	if i+1 < e && b[i+1] == '(' {
		end = m.inlineLinkEnd(b, i+1, e)
	} else if i+1 < e && b[i+1] == '[' {
		end = referenceEnd(b, i+1, e)
	}
	if end < 0 {
		return i + 1 // "[text]" alone: kept as it is
	}
	if o.image {
		blankRange(b, o.pos, o.pos+2)
	} else {
		b[o.pos] = ' '
		// Links cannot contain links: earlier '[' can no longer open one.
		k := 0
		for _, br := range m.brackets {
			if br.image {
				m.brackets[k] = br
				k++
			}
		}
		m.brackets = m.brackets[:k]
	}
	blankRange(b, i, end)
	return end
}

// closingBackticks returns the start of the next run of exactly n
// backticks in b[i:e], or -1.
func refClosingBackticks(b []byte, i, e, n int) int {
	for i < e {
		k := bytes.IndexByte(b[i:e], '`')
		if k < 0 {
			return -1
		}
		i += k
		r := runOf(b, i, e, '`')
		if r == n {
			return i
		}
		i += r
	}
	return -1
}

// inlineLinkEnd parses "(destination "title")" at b[i] == '(' and
// returns the index after ')', or -1.
func (m *mdRefBlanker) inlineLinkEnd(b []byte, i, e int) int {
	k := skipSpace(b, i+1, e)
	if k < e && b[k] == '<' {
		for k++; k < e && b[k] != '>'; k++ {
			switch b[k] {
			case '\\':
				k++
			case '<', '\n', '\r':
				return -1
			}
		}
		if k >= e {
			return -1
		}
		k++
	} else {
		depth := 0
	dest:
		for ; k < e; k++ {
			switch c := b[k]; {
			case c == '\\':
				k++
			case c == '(':
				depth++
				if depth > 32 {
					return -1
				}
			case c == ')':
				if depth == 0 {
					break dest
				}
				depth--
			case c <= ' ' || c == 0x7F:
				break dest
			}
		}
		if depth != 0 || k > e {
			return -1
		}
	}
	t := skipSpace(b, k, e)
	if t < e && t > k && (b[t] == '"' || b[t] == '\'' || b[t] == '(') {
		k := closerIndex(b[t])
		for t++; ; t++ {
			if t = m.find(b, t, e, k); t < 0 {
				return -1
			}
			if !escaped(b, t) {
				break
			}
		}
		t = skipSpace(b, t+1, e)
	}
	if t < e && b[t] == ')' {
		return t + 1
	}
	return -1
}

// htmlEnd parses an HTML comment, tag, declaration or processing
// instruction at b[i] == '<' and returns the index after it, or -1.
func (m *mdRefBlanker) htmlEnd(b []byte, i, e int) int {
	rest := b[i:e]
	var start, k int
	switch {
	case bytes.HasPrefix(rest, []byte("<!--")):
		start, k = i+4, closeComment
	case bytes.HasPrefix(rest, []byte("<?")):
		start, k = i+2, closePI
	case bytes.HasPrefix(rest, []byte("<![CDATA[")):
		start, k = i+9, closeCDATA
	case len(rest) > 2 && rest[1] == '!' && isASCIILetter(rest[2]):
		start, k = i+2, closeDecl
	default:
		return m.tagEnd(b, i, e)
	}
	if j := m.find(b, start, e, k); j >= 0 {
		return j + len(closers[k])
	}
	return -1
}

// tagEnd parses an opening or closing HTML tag at b[i] == '<'.
func (m *mdRefBlanker) tagEnd(b []byte, i, e int) int {
	k := i + 1
	closing := k < e && b[k] == '/'
	if closing {
		k++
	}
	if k >= e || !isASCIILetter(b[k]) {
		return -1
	}
	for k < e && (isASCIIAlnum(b[k]) || b[k] == '-') {
		k++
	}
	if k < e && b[k] != '>' && b[k] != '/' && !isBlankByte(b[k]) && b[k] != '\n' && b[k] != '\r' {
		return -1
	}
	if closing {
		k = skipSpace(b, k, e)
		if k < e && b[k] == '>' {
			return k + 1
		}
		return -1
	}
	for ; k < e; k++ {
		switch c := b[k]; c {
		case '>':
			return k + 1
		case '<':
			return -1
		case '"', '\'':
			j := bytes.IndexByte(b[k+1:e], c)
			if j < 0 {
				return -1
			}
			k += j + 1
		}
	}
	return -1
}

// addDelim records the run b[i:i+n] of '*', '_' or '~' if it can open or
// close emphasis, following CommonMark's flanking rules; s and e bound the
// paragraph (outside it counts as white space).
func (m *mdRefBlanker) addDelim(b []byte, s, e, i, n int) {
	c := b[i]
	if c == '~' && n > 2 {
		return // strikethrough is ~ or ~~ only
	}
	prev, next := ' ', ' '
	if i > s {
		prev, _ = utf8.DecodeLastRune(b[s:i])
	}
	if i+n < e {
		next, _ = utf8.DecodeRune(b[i+n : e])
	}
	prevSpace, nextSpace := unicode.IsSpace(prev), unicode.IsSpace(next)
	prevPunct, nextPunct := isPunctOrSymbol(prev), isPunctOrSymbol(next)
	left := !nextSpace && (!nextPunct || prevSpace || prevPunct)
	right := !prevSpace && (!prevPunct || nextSpace || nextPunct)
	open, close := left, right
	if c == '_' {
		open = left && (!right || prevPunct)
		close = right && (!left || nextPunct)
	}
	if open || close {
		m.delims = append(m.delims, mdDelim{pos: i, n: n, orig: n, c: c, open: open, close: close})
	}
}

// emphasis pairs the recorded delimiter runs, closer by closer with the
// nearest matching opener before it, and blanks the matched characters;
// unmatched ones are literal text and stay. It follows CommonMark's
// process-emphasis procedure (including the rule of three), with a floor
// per kind of closer so that unmatched runs cost linear time.
func (m *mdRefBlanker) emphasis(b []byte) {
	d := m.delims
	var floor [18]int // per (char, closer can open, closer length mod 3): no opener below this index
	for ci := range d {
		if !d[ci].close {
			continue
		}
		for d[ci].n > 0 {
			key := delimKey(d[ci])
			oi := ci - 1
			for ; oi >= floor[key]; oi-- {
				o := &d[oi]
				if o.n == 0 || !o.open || o.c != d[ci].c {
					continue
				}
				if o.c == '~' {
					if o.n == d[ci].n {
						break
					}
					continue
				}
				if (o.close || d[ci].open) && (o.orig+d[ci].orig)%3 == 0 && (o.orig%3 != 0 || d[ci].orig%3 != 0) {
					continue
				}
				break
			}
			if oi < floor[key] {
				floor[key] = ci
				break
			}
			o := &d[oi]
			use := 1
			if o.n >= 2 && d[ci].n >= 2 {
				use = 2
			}
			if o.c == '~' {
				use = o.n
			}
			blankRange(b, o.pos+o.n-use, o.pos+o.n)
			o.n -= use
			blankRange(b, d[ci].pos, d[ci].pos+use)
			d[ci].pos += use
			d[ci].n -= use
			for k := oi + 1; k < ci; k++ {
				d[k].n = 0 // runs between a matched pair can no longer match
			}
		}
	}
}

// mdSameAsReference fails the test when the blanker and the reference
// give different bytes for in.
func mdSameAsReference(t *testing.T, sc *scratch, in []byte) {
	t.Helper()
	got, want := bytes.Clone(in), bytes.Clone(in)
	sc.blanker(nil).blank(got)
	var r mdRefBlanker
	r.blank(want)
	if !bytes.Equal(got, want) {
		for i := range got {
			if got[i] != want[i] {
				lo, hi := max(0, i-40), min(len(in), i+40)
				whole := ""
				if len(in) <= 2000 {
					whole = fmt.Sprintf("\nwhole input %q", in)
				}
				t.Fatalf("byte %d differs from the reference:\nin   %q\ngot  %q\nwant %q%s", i, in[lo:hi], got[lo:hi], want[lo:hi], whole)
			}
		}
	}
}

// mdAlphabet is what the random documents of TestMarkdownMatchesReference
// are made of: every character some rule looks at, words and line ends.
var mdAlphabet = []string{
	"*", "**", "_", "__", "~", "~~", "`", "``", "```", "[", "]", "![", "(", ")", "<", ">", "\\", "\"", "'",
	"-", "- ", "+ ", "1. ", "# ", "|", "---", "=", ":", "!", "<!--", "-->", "<a href=\"x\">", "</a>",
	"<http://e.org>", "a@b.c", "word", "two words", " ", " ", "\n", "\n", "\n\n", "\t", "é", "“",
}

// TestMarkdownMatchesReference: on the demo corpus's Markdown, on random
// documents made of markup characters and on every hostile Markdown shape
// at a small size, the blanker gives exactly the bytes the reference
// (the blanker before it was made linear) gives.
func TestMarkdownMatchesReference(t *testing.T) {
	files, _ := filepath.Glob(filepath.Join("..", "testdata", "*", "*.md"))
	more, _ := filepath.Glob(filepath.Join("testdata", "formats", "*", "*.md"))
	files = append(files, more...)
	if len(files) == 0 {
		t.Fatal("no Markdown files found under testdata")
	}
	// One worker's scratch serves every document in turn, as in a scan:
	// nothing one text leaves in the blanker may change the next one's.
	var sc scratch
	for _, f := range files {
		raw, err := os.ReadFile(f)
		if err != nil {
			t.Fatal(err)
		}
		mdSameAsReference(t, &sc, raw)
	}
	rng := rand.New(rand.NewPCG(17, 1))
	for range 20000 {
		var b []byte
		for range 1 + rng.IntN(60) {
			b = append(b, mdAlphabet[rng.IntN(len(mdAlphabet))]...)
		}
		mdSameAsReference(t, &sc, b)
	}
	for _, s := range hostile.Shapes() {
		if s.Format == "markdown" {
			raw, err := s.Make(s.Base / 64)
			if err != nil {
				t.Fatal(err)
			}
			mdSameAsReference(t, &sc, raw)
		}
	}
}

func FuzzMarkdownMatchesReference(f *testing.F) {
	f.Add([]byte("*a *b **c d** e* f*\n> - - - x\n`` ` ``` ` ``\n![a [b](c) ![d](e)](f)\n"))
	for _, s := range hostile.Shapes() {
		if s.Format == "markdown" {
			if raw, err := s.Make(8); err == nil {
				f.Add(raw)
			}
		}
	}
	f.Fuzz(func(t *testing.T, in []byte) { mdSameAsReference(t, nil, in) })
}
