package corpus

import (
	"bytes"
	"unicode"
	"unicode/utf8"
	"unsafe"
)

// markdown reads Markdown (.md, .markdown). The file is decoded like plain
// text (see decode), then its markup is replaced, byte for byte, by ASCII
// spaces: Text keeps the file's length, every visible word keeps its
// offset, and line ends are never touched, so line numbers still match the
// file. See the package documentation for what counts as markup and for
// the limits of this approach.
type markdown struct{}

func (markdown) format() string { return "markdown" }

// sniff is false: Markdown has no signature, only its extension says so.
func (markdown) sniff(_ []byte) bool { return false }

func (markdown) claims(ext string) bool { return ext == ".md" || ext == ".markdown" }

// extract blanks the markup in place, in the decoded text when decoding
// made a new buffer and in the file's own buffer when in.owned says that
// nothing reads it afterwards (readEntry), and the text is that buffer
// (unsafe.String): nothing writes to it once blanked. Only the bytes of a
// caller that may use them again (a ZIP member's, a test's) are copied
// first. A Markdown file thus costs no copy of its size beyond the read,
// which for a batch of large files also means no fresh pages per file.
func (markdown) extract(in *input) (extraction, error) {
	d, err := decode(in.raw, in.scratch)
	if err != nil {
		return extraction{}, err
	}
	b := d.text
	if !in.owned && overlaps(b, in.raw) {
		b = bytes.Clone(b)
	}
	m := in.scratch.blanker(in.dl)
	if err := m.blank(b); err != nil {
		return extraction{}, err
	}
	if onlySpace(b) {
		return extraction{}, refuse(reasonMarkupOnly)
	}
	return extraction{Text: unsafe.String(unsafe.SliceData(b), len(b)), Encoding: d.encoding, Notes: d.notes()}, nil
}

// overlaps reports whether a and b share any byte of memory.
func overlaps(a, b []byte) bool {
	if len(a) == 0 || len(b) == 0 {
		return false
	}
	a0, b0 := uintptr(unsafe.Pointer(unsafe.SliceData(a))), uintptr(unsafe.Pointer(unsafe.SliceData(b)))
	return a0 < b0+uintptr(len(b)) && b0 < a0+uintptr(len(a))
}

// mdBlanker removes Markdown markup in place. It is not a CommonMark
// parser: it makes one pass over the lines for block structure (front
// matter, fences, containers, headings, rules, tables, definitions, HTML
// comment blocks) and one pass over each paragraph for inline markup
// (escapes, code spans, autolinks, HTML, links and images, emphasis). Its
// slices are scratch space reused between paragraphs; a blanker is used by
// one goroutine.
type mdBlanker struct {
	dl       *deadline // asked once per line and once per paragraph
	lines    []mdLine
	delims   []mdDelim
	brackets []mdBracket
	// jump[k] < k says the delimiter runs jump[k]+1 to k are used up
	// (emphasis): the search for an opener leaps over them.
	jump []int
	// noClose[k] >= 0 means that closer k (see closers) does not occur in
	// the current paragraph at or after that offset, so that a paragraph
	// of many unclosed "<!--" costs linear time, not quadratic; found[k]
	// is the offset of the first closer k at or after an earlier search's
	// start, the answer for any later search starting at or before it
	// (the bytes ahead of the scan are never changed before it gets
	// there), so that many "[a](b (" before one far ")" are linear too.
	noClose [len(closers)]int
	found   [len(closers)]int
	// ticks and ticksAll remember the backtick runs seen ahead of the
	// scan by closingBackticks: ticks[n] is the start of the last run of
	// exactly n backticks seen, and ticksAll says the search went to the
	// paragraph's end, so that an opener whose length has no run left
	// fails at once instead of scanning the rest again.
	ticks    map[int]int
	ticksAll bool
	// linkFloor: the brackets below this index that are not images can
	// no longer open a link (a link closed above them: links cannot
	// contain links); they are dropped when they come to the top.
	linkFloor int
	// rule caches the last failed thematic-break test of the current
	// line: from any position before ruleFail whose byte is ruleChar the
	// test fails at ruleFail again. Only lines of many list markers ("- -
	// - - x") ask it repeatedly.
	ruleChar byte
	ruleFail int
}

// closers are the strings some inline constructs search ahead for.
var closers = [...]string{"-->", "?>", "]]>", ">", `"`, "'", ")"}

const (
	closeComment = iota
	closePI
	closeCDATA
	closeDecl
)

// find returns the index of closer k in b[i:e] (as an offset into b), or
// -1, remembering failures for the rest of the paragraph.
func (m *mdBlanker) find(b []byte, i, e, k int) int {
	if m.noClose[k] >= 0 && i >= m.noClose[k] {
		return -1
	}
	if m.found[k] >= i {
		return m.found[k]
	}
	j := bytes.Index(b[i:e], []byte(closers[k]))
	if j < 0 {
		m.noClose[k] = i
		return -1
	}
	m.found[k] = i + j
	return i + j
}

func closerIndex(c byte) int {
	switch c {
	case '"':
		return 4
	case '\'':
		return 5
	}
	return 6
}

// mdLine is one line of the file: content b[start:end], line end excluded.
type mdLine struct {
	start, end int
	kind       uint8
}

const (
	lineBlank uint8 = iota // only white space in the file
	lineGone               // all markup, now only spaces
	lineCode               // inside a fenced code block: kept verbatim
	lineText               // paragraph text: inline markup removed across the paragraph
	lineSolo               // heading, table row: inline markup removed on this line alone
)

// mdDelim is a run of emphasis characters that may open or close emphasis.
type mdDelim struct {
	pos, n, orig int // remaining bytes at b[pos:pos+n]; orig is the run's first length
	c            byte
	open, close  bool
}

// mdBracket is a '[' or "![" waiting for its ']'.
type mdBracket struct {
	pos   int
	image bool
}

// blankRange replaces b[s:e] by spaces, line ends excepted. Every caller
// passes bounds that sit on ASCII bytes, so valid UTF-8 stays valid.
func blankRange(b []byte, s, e int) {
	for k := s; k < e; k++ {
		if b[k] != '\n' && b[k] != '\r' {
			b[k] = ' '
		}
	}
}

func isBlankByte(c byte) bool { return c == ' ' || c == '\t' || c == '\f' || c == '\v' }

// skipBlank returns the first index in [i, e) that is not a blank byte.
func skipBlank(b []byte, i, e int) int {
	for i < e && isBlankByte(b[i]) {
		i++
	}
	return i
}

// trimBlankEnd returns e moved back over trailing blank bytes, not below s.
func trimBlankEnd(b []byte, s, e int) int {
	for e > s && isBlankByte(b[e-1]) {
		e--
	}
	return e
}

func (m *mdBlanker) splitLines(b []byte) {
	// One allocation: at most one line per line end, and a last one.
	m.lines = reuse(m.lines, bytes.Count(b, []byte{'\n'})+bytes.Count(b, []byte{'\r'})+1)
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

// blank removes the markup of the Markdown text b in place. The error is
// the deadline's, when it passed.
func (m *mdBlanker) blank(b []byte) error {
	m.splitLines(b)
	first := m.frontMatter(b)
	if !m.blocks(b, first) {
		return m.dl.err()
	}
	for i := 0; i < len(m.lines); {
		if m.dl.passed() {
			return m.dl.err()
		}
		switch m.lines[i].kind {
		case lineSolo:
			if !m.inline(b, m.lines[i].start, m.lines[i].end) {
				return m.dl.err()
			}
			i++
		case lineText:
			j := i
			for j+1 < len(m.lines) && m.lines[j+1].kind == lineText {
				j++
			}
			if !m.inline(b, m.lines[i].start, m.lines[j].end) {
				return m.dl.err()
			}
			i = j + 1
		default:
			i++
		}
	}
	return nil
}

// frontMatter blanks a YAML front matter block ("---" on the first line up
// to a closing "---" or "...") and returns the index of the first line
// after it. Without a closing line there is no front matter.
func (m *mdBlanker) frontMatter(b []byte) int {
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

func lineIs(b []byte, l mdLine, s string) bool {
	return string(b[l.start:trimBlankEnd(b, l.start, l.end)]) == s
}

// blocks classifies lines from first on and blanks block-level markup. It
// returns false when the deadline passed before the end.
func (m *mdBlanker) blocks(b []byte, first int) bool {
	var (
		fenceChar  byte // '`' or '~' inside a fenced code block, else 0
		fenceLen   int
		inComment  bool // inside an HTML comment that started a block
		paraOpen   bool // the previous line is paragraph text
		paraInList bool // that paragraph began in a list item
		tableOpen  bool // the previous line is a table row
	)
	for i := first; i < len(m.lines); i++ {
		if m.dl.passed() {
			return false
		}
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
		m.ruleFail = -1
		for {
			q := skipBlank(b, p, e)
			if q < e && b[q] == '>' {
				b[q] = ' '
				p = q + 1
				continue
			}
			if m.isRule(b, q, e) {
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
		if m.isRule(b, q, e) {
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
	return true
}

// runOf returns how many bytes equal to c start at b[i], up to e.
func runOf(b []byte, i, e int, c byte) int {
	n := 0
	for i+n < e && b[i+n] == c {
		n++
	}
	return n
}

// listMarker returns the length of a list marker at b[q:e] ("-", "+",
// "*", "1." or "1)" with up to 9 digits, followed by white space or the
// line end), or 0. When the line would interrupt a paragraph, CommonMark
// allows only non-empty items and, for numbered ones, only the number 1:
// a wrapped sentence whose line starts "1984. The" stays text.
func listMarker(b []byte, q, e int, interrupting bool) int {
	if q >= e {
		return 0
	}
	n := 0
	switch c := b[q]; {
	case c == '-' || c == '+' || c == '*':
		n = 1
	case c >= '0' && c <= '9':
		d := 0
		for q+d < e && d < 10 && b[q+d] >= '0' && b[q+d] <= '9' {
			d++
		}
		if d > 9 || q+d >= e || (b[q+d] != '.' && b[q+d] != ')') {
			return 0
		}
		if interrupting && string(b[q:q+d]) != "1" {
			return 0
		}
		n = d + 1
	default:
		return 0
	}
	if q+n == e {
		if interrupting {
			return 0
		}
		return n
	}
	if !isBlankByte(b[q+n]) {
		return 0
	}
	if interrupting && skipBlank(b, q+n, e) == e {
		return 0
	}
	return n
}

// isRule reports whether b[q:e] is a thematic break: three or more of the
// same '*', '-' or '_', with only blanks between. A failed test is
// remembered (ruleChar, ruleFail; the caller resets ruleFail to -1 at each
// line): the bytes from q to the failing one are all the rule's character
// or blanks, so a test from any later q before it, at the same character,
// fails there too. A line of n list markers then costs n steps, not n².
func (m *mdBlanker) isRule(b []byte, q, e int) bool {
	if q >= e || (b[q] != '*' && b[q] != '-' && b[q] != '_') {
		return false
	}
	c, n := b[q], 0
	if q < m.ruleFail && c == m.ruleChar {
		return false
	}
	for k := q; k < e; k++ {
		switch {
		case b[k] == c:
			n++
		case isBlankByte(b[k]):
		default:
			m.ruleChar, m.ruleFail = c, k
			return false
		}
	}
	return n >= 3
}

// blankClosingHashes blanks the optional closing sequence of an ATX
// heading whose text is b[s:e]: trailing '#'s preceded by a blank.
func blankClosingHashes(b []byte, s, e int) {
	t := trimBlankEnd(b, s, e)
	k := t
	for k > s && b[k-1] == '#' {
		k--
	}
	if k < t && (k == s || isBlankByte(b[k-1])) {
		blankRange(b, k, t)
	}
}

// isDelimiterRow reports whether b[q:e] is a table delimiter row such as
// "|---|:--:|" or "--- | ---": cells of -, with optional colons, at least
// one pipe.
func isDelimiterRow(b []byte, q, e int) bool {
	e = trimBlankEnd(b, q, e)
	if !hasPipe(b, q, e) {
		return false
	}
	if b[q] == '|' {
		q++
	}
	if e > q && b[e-1] == '|' && (e-2 < q || b[e-2] != '\\') {
		e--
	}
	for cell := q; cell <= e; {
		end := cell
		for end < e && b[end] != '|' {
			end++
		}
		cs, ce := skipBlank(b, cell, end), trimBlankEnd(b, cell, end)
		if cs < ce && b[cs] == ':' {
			cs++
		}
		if ce > cs && b[ce-1] == ':' {
			ce--
		}
		if cs >= ce || runOf(b, cs, ce, '-') != ce-cs {
			return false
		}
		cell = end + 1
	}
	return true
}

func hasPipe(b []byte, s, e int) bool {
	for k := s; k < e; k++ {
		if b[k] == '|' && (k == s || b[k-1] != '\\') {
			return true
		}
	}
	return false
}

// blankPipes blanks the cell separators of a table row (pipes not escaped
// with a backslash; the escape itself goes in the inline pass).
func blankPipes(b []byte, s, e int) {
	for k := s; k < e; k++ {
		if b[k] == '|' && (k == s || b[k-1] != '\\') {
			b[k] = ' '
		}
	}
}

// isReferenceDefinition reports whether b[q:e] is a one-line link
// reference definition: [label]: destination, optionally followed by a
// title in double quotes, single quotes or parentheses. Footnote labels
// ([^1]) are not: their text is text.
func isReferenceDefinition(b []byte, q, e int) bool {
	k := q + 1
	if k < e && b[k] == '^' {
		return false
	}
	label := false
	for ; k < e && b[k] != ']'; k++ {
		switch c := b[k]; {
		case c == '\\':
			k++
		case c == '[':
			return false
		case !isBlankByte(c):
			label = true
		}
	}
	if k+1 >= e || !label || k-q > 1000 || b[k+1] != ':' {
		return false
	}
	k = skipBlank(b, k+2, e)
	if k == e {
		return false // destination on the next line: not handled, left as text
	}
	if b[k] == '<' {
		j := bytes.IndexByte(b[k:e], '>')
		if j < 0 {
			return false
		}
		k += j + 1
	} else {
		for k < e && !isBlankByte(b[k]) {
			k++
		}
	}
	t := skipBlank(b, k, e)
	if t == e {
		return true
	}
	if t == k {
		return false // the title must be set off by a blank
	}
	closer := b[t]
	switch closer {
	case '"', '\'':
	case '(':
		closer = ')'
	default:
		return false
	}
	end := trimBlankEnd(b, t, e)
	return end-t >= 2 && b[end-1] == closer
}

// inlineAsk is how many bytes of a paragraph inline goes through between
// two questions to the deadline.
const inlineAsk = 1 << 10

// inline removes inline markup from b[s:e], one paragraph (which may span
// several lines) or one heading or table row. It returns false when the
// deadline passed before the end.
func (m *mdBlanker) inline(b []byte, s, e int) bool {
	// The delimiter runs and brackets are at most the paragraph's '*',
	// '_', '~' and '[' bytes: room for that many at once costs one
	// allocation of the final size, where growing by append allocated
	// about five times it (a paragraph of 10^5 runs: 50 MiB for 1 MiB).
	p := b[s:e]
	m.delims = reuse(m.delims, bytes.Count(p, []byte("*"))+bytes.Count(p, []byte("_"))+bytes.Count(p, []byte("~")))
	m.brackets = reuse(m.brackets, bytes.Count(p, []byte("[")))
	m.linkFloor = 0
	for k := range m.noClose {
		m.noClose[k], m.found[k] = -1, -1
	}
	clear(m.ticks)
	m.ticksAll = false
	ask := s + inlineAsk
	for i := s; i < e; {
		if i >= ask {
			if m.dl.passed() {
				return false
			}
			ask = i + inlineAsk
		}
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
			if k := m.closingBackticks(b, i+n, e, n); k >= 0 {
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
	return true
}

// closeBracket handles the ']' at b[i]: with an inline destination
// "(url "title")" or a reference "[label]" after it, the brackets and the
// destination are blanked and the text kept. It returns where scanning
// goes on.
func (m *mdBlanker) closeBracket(b []byte, i, e int) int {
	// Brackets below linkFloor that are not images were taken out of the
	// stack when a link closed above them; they go now, as they surface.
	for len(m.brackets) > 0 && len(m.brackets)-1 < m.linkFloor && !m.brackets[len(m.brackets)-1].image {
		m.brackets = m.brackets[:len(m.brackets)-1]
	}
	if len(m.brackets) == 0 {
		m.linkFloor = 0
		return i + 1
	}
	o := m.brackets[len(m.brackets)-1]
	m.brackets = m.brackets[:len(m.brackets)-1]
	m.linkFloor = min(m.linkFloor, len(m.brackets))
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
		// They are dropped lazily (above), not by filtering the stack
		// here, which made n image openers before n links cost n².
		m.linkFloor = len(m.brackets)
	}
	blankRange(b, i, end)
	return end
}

// closingBackticks returns the start of the next run of exactly n
// backticks in b[i:e], or -1. Every run it passes is recorded in ticks;
// once a search has reached e, an opener with no run of its length at or
// after i fails without scanning (openers of ever longer runs would
// otherwise each scan the rest of the paragraph: n^1.5 for n bytes). A
// successful search ends where the scan goes on, so the successful ones
// cover each byte once.
func (m *mdBlanker) closingBackticks(b []byte, i, e, n int) int {
	if m.ticksAll {
		if last, ok := m.ticks[n]; !ok || last < i {
			return -1
		}
	}
	if m.ticks == nil {
		m.ticks = make(map[int]int)
	}
	for i < e {
		k := bytes.IndexByte(b[i:e], '`')
		if k < 0 {
			break
		}
		i += k
		r := runOf(b, i, e, '`')
		if last, ok := m.ticks[r]; !ok || last < i {
			m.ticks[r] = i
		}
		if r == n {
			return i
		}
		i += r
	}
	m.ticksAll = true
	return -1
}

// inlineLinkEnd parses "(destination "title")" at b[i] == '(' and
// returns the index after ')', or -1.
func (m *mdBlanker) inlineLinkEnd(b []byte, i, e int) int {
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

// referenceEnd parses "[label]" at b[i] == '[' (the label may be empty)
// and returns the index after ']', or -1.
func referenceEnd(b []byte, i, e int) int {
	for k := i + 1; k < e && k-i <= 1000; k++ {
		switch b[k] {
		case '\\':
			k++
		case '[':
			return -1
		case ']':
			return k + 1
		}
	}
	return -1
}

// escaped reports whether b[k] is preceded by an odd number of backslashes.
func escaped(b []byte, k int) bool {
	n := 0
	for k-n-1 >= 0 && b[k-n-1] == '\\' {
		n++
	}
	return n%2 == 1
}

// skipSpace skips blanks and line ends.
func skipSpace(b []byte, i, e int) int {
	for i < e && (isBlankByte(b[i]) || b[i] == '\n' || b[i] == '\r') {
		i++
	}
	return i
}

// autolinkEnd parses "<scheme:address>" or "<name@host>" at b[i] == '<'
// and returns the index after '>', or -1.
func autolinkEnd(b []byte, i, e int) int {
	k := i + 1
	for k < e && k-i <= 33 && (isASCIIAlnum(b[k]) || (k > i+1 && (b[k] == '+' || b[k] == '.' || b[k] == '-'))) {
		k++
	}
	if k < e && b[k] == ':' && k-i >= 3 && isASCIILetter(b[i+1]) {
		for k++; k < e; k++ {
			switch c := b[k]; {
			case c == '>':
				return k + 1
			case c <= ' ' || c == '<' || c == 0x7F:
				return -1
			}
		}
		return -1
	}
	at := false
	for k = i + 1; k < e; k++ {
		switch c := b[k]; {
		case c == '@':
			if at || k == i+1 {
				return -1
			}
			at = true
		case c == '>':
			if at && b[k-1] != '@' {
				return k + 1
			}
			return -1
		case isASCIIAlnum(c) || c == '.' || c == '-' || c == '_' || c == '+':
		default:
			return -1
		}
	}
	return -1
}

// htmlEnd parses an HTML comment, tag, declaration or processing
// instruction at b[i] == '<' and returns the index after it, or -1.
func (m *mdBlanker) htmlEnd(b []byte, i, e int) int {
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
func (m *mdBlanker) tagEnd(b []byte, i, e int) int {
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
func (m *mdBlanker) addDelim(b []byte, s, e, i, n int) {
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
// per kind of closer so that unmatched runs cost linear time, and jumps
// over the runs a match used up (CommonMark removes them from its
// delimiter list), so that n nested openers and their n closers
// ("*a *a ... a* a*") cost linear time too, not n².
func (m *mdBlanker) emphasis(b []byte) {
	d := m.delims
	m.jump = reuse(m.jump, len(d))
	for k := range d {
		m.jump = append(m.jump, k)
	}
	var floor [18]int // per (char, closer can open, closer length mod 3): no opener below this index
	for ci := range d {
		if !d[ci].close {
			continue
		}
		for d[ci].n > 0 {
			key := delimKey(d[ci])
			oi := ci - 1
			for ; oi >= floor[key]; oi-- {
				if m.jump[oi] != oi {
					oi = m.live(oi) + 1 // the loop's oi-- lands on it
					continue
				}
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
			// Runs between a matched pair can no longer match; those a
			// jump leaps over are used up already (a jump never leaps
			// below a live opener, which would then have been between
			// an earlier pair).
			for k := ci - 1; k > oi; {
				if r := m.live(k); r != k {
					k = r
					continue
				}
				d[k].n = 0
				k--
			}
			if oi+1 < ci {
				m.jump[ci-1] = oi
			}
		}
	}
}

// live returns the first index at or below k that no jump leaps over,
// shortening the jumps it followed (path compression, as in union-find),
// so that every used-up run is passed over a bounded number of times.
func (m *mdBlanker) live(k int) int {
	r := k
	for m.jump[r] != r {
		r = m.jump[r]
	}
	for m.jump[k] != k {
		m.jump[k], k = r, m.jump[k]
	}
	return r
}

func delimKey(d mdDelim) int {
	k := 0
	switch d.c {
	case '_':
		k = 6
	case '~':
		k = 12
	}
	if d.open {
		k += 3
	}
	return k + d.orig%3
}

func isASCIILetter(c byte) bool { return (c|0x20) >= 'a' && (c|0x20) <= 'z' }

func isASCIIAlnum(c byte) bool { return isASCIILetter(c) || (c >= '0' && c <= '9') }

func isASCIIPunct(c byte) bool {
	return (c >= '!' && c <= '/') || (c >= ':' && c <= '@') || (c >= '[' && c <= '`') || (c >= '{' && c <= '~')
}

func isPunctOrSymbol(r rune) bool {
	if r < utf8.RuneSelf {
		return isASCIIPunct(byte(r))
	}
	return unicode.In(r, unicode.P, unicode.S)
}
