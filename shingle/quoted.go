package shingle

import (
	"strings"
	"unicode"
	"unicode/utf8"
)

// Quoted and cited text (Options.SkipQuoted, Options.SkipReferences).
//
// Text that a writer marks as somebody else's — a quotation, a reference
// list — is a legitimate reason to share words. With the options on, such
// spans are blanked (every byte but line breaks becomes a space) in a copy of
// the text before units are made, so offsets into the copy are offsets into
// the original and no unit is made from the blanked words. The blanked words
// still count as the document's words (coverage stays a share of the whole
// document), and Stats says how many were left out, so nothing disappears
// silently.
//
// Quotation marks recognised, always within one paragraph (a blank line
// ends every open quotation; an opening mark with no closing mark in its
// paragraph is not a quotation and nothing is left out):
//
//	“…”  English double            „…“ „…”  German, Polish, Hungarian double
//	«…»  French, Spanish, Russian  »…«      German, Danish (reversed guillemets)
//	‚…‘ ‚…’  German single         "…"      straight double (paired in order)
//	‘…’ '…'  English single, only where unambiguous: the opening mark follows
//	         a space, the start of the paragraph or an opening bracket or quote
//	         and comes before a letter or digit; the closing mark follows a
//	         letter, digit or punctuation and comes before a space,
//	         punctuation or the end. An apostrophe inside a word (don’t) is
//	         never a quotation mark.
//
// Known limit of the single-quote rule: a plural possessive inside a
// single-quoted span ('the boys' coats') closes it early, and an elided
// opening ('tis, '90s) may open one. Double quotes and guillemets have no
// such ambiguity. Nested quotations lie inside the outer one.
//
// A references section is recognised by its heading: a line of its own
// whose text, after an optional Markdown '#' marker, an optional number
// ("7.", "VII") and a trailing ':' or '.', is one of those isReferenceHeading
// knows (case folded). The last such line of the text starts the section, which runs to
// the end; a heading on the first line is ignored (it would be the title of
// a document that is all references, and leave nothing to compare).

// span is a byte range [start, end) of a text.
type span struct{ start, end int }

// isReferenceHeading reports whether folded is one of the headings that
// start a trailing references section (common practice in English, German,
// French, Spanish, Italian and Portuguese writing).
func isReferenceHeading(folded string) bool {
	switch folded {
	case "references", "reference list", "bibliography", "works cited", "literature cited",
		"cited works", "sources", "sources cited", "literatur", "literaturverzeichnis",
		"quellen", "quellenverzeichnis", "bibliographie", "références", "références bibliographiques",
		"referencias", "bibliografía", "bibliografia", "riferimenti bibliografici", "referências",
		"referências bibliográficas":
		return true
	}
	return false
}

// applySkips returns text with the spans that the options leave out
// blanked, and whether anything was blanked; it fills st's skip counts.
func (s *Splitter) applySkips(text string, st *Stats) (string, bool) {
	if !s.opt.SkipQuoted && !s.opt.SkipReferences {
		return text, false
	}
	s.skips = s.skips[:0]
	end := len(text)
	if s.opt.SkipReferences {
		if at, ok := referencesStart(text); ok {
			st.References, st.ReferencesStart = true, at
			st.ReferencesWords = s.countWords(text[at:])
			end = at
		}
	}
	if s.opt.SkipQuoted {
		s.skips = quotedSpans(s.skips, text[:end])
		for _, q := range s.skips {
			st.QuotedWords += s.countWords(text[q.start:q.end])
		}
	}
	if end < len(text) {
		s.skips = append(s.skips, span{end, len(text)})
	}
	if len(s.skips) == 0 {
		return text, false
	}
	s.mask = append(s.mask[:0], text...)
	for _, q := range s.skips {
		for i := q.start; i < q.end; i++ {
			if c := s.mask[i]; c != '\n' && c != '\r' {
				s.mask[i] = ' '
			}
		}
	}
	return string(s.mask), true
}

// SkippedSpans returns the byte spans of text that opt's SkipQuoted and
// SkipReferences leave out, in text order (for tests and reviewers' tools).
func SkippedSpans(text string, opt Options) [][2]int {
	var out [][2]int
	end := len(text)
	if opt.SkipReferences {
		if at, ok := referencesStart(text); ok {
			end = at
		}
	}
	if opt.SkipQuoted {
		for _, q := range quotedSpans(nil, text[:end]) {
			out = append(out, [2]int{q.start, q.end})
		}
	}
	if end < len(text) {
		out = append(out, [2]int{end, len(text)})
	}
	return out
}

// quotedSpans appends the spans of text inside quotation marks, marks
// included, in text order.
func quotedSpans(dst []span, text string) []span {
	for _, p := range paragraphSpans(text) {
		dst = quotedInParagraph(dst, text, p.start, p.end)
	}
	return dst
}

// paragraphSpans splits text at blank lines (two line breaks with only
// blanks between).
func paragraphSpans(text string) []span {
	var out []span
	start := 0
	for i := 0; i < len(text); i++ {
		if text[i] != '\n' && text[i] != '\r' {
			continue
		}
		j, breaks := i, 0
		for j < len(text) && (text[j] == '\n' || text[j] == '\r' || isBlankByte(text[j])) {
			if text[j] == '\n' || (text[j] == '\r' && (j+1 >= len(text) || text[j+1] != '\n')) {
				breaks++
			}
			j++
		}
		if breaks >= 2 {
			out = append(out, span{start, i})
			start = j
		}
		i = j - 1
	}
	return append(out, span{start, len(text)})
}

// closers returns the closing marks that end a quotation opened by r, or
// nil when r opens none.
func closers(r rune) []rune {
	switch r {
	case '“':
		return []rune{'”'}
	case '„':
		return []rune{'“', '”'}
	case '«':
		return []rune{'»'}
	case '»':
		return []rune{'«'}
	case '‚':
		return []rune{'‘', '’'}
	case '"':
		return []rune{'"'}
	case '‘':
		return []rune{'’'}
	case '\'':
		return []rune{'\''}
	}
	return nil
}

// isSingle reports whether r is a single quote whose use is ambiguous with
// the apostrophe.
func isSingle(r rune) bool { return r == '\'' || r == '‘' || r == '’' }

// quotedInParagraph appends the quotations of text[start:end].
func quotedInParagraph(dst []span, text string, start, end int) []span {
	for i := start; i < end; {
		r, size := utf8.DecodeRuneInString(text[i:end])
		cl := closers(r)
		if cl == nil || (isSingle(r) && !opensSingle(text, start, i, i+size, end)) {
			i += size
			continue
		}
		close := findCloser(text, i+size, end, start, cl, isSingle(r))
		if close < 0 {
			i += size
			continue
		}
		dst = append(dst, span{i, close})
		i = close
	}
	return dst
}

// findCloser returns the end of the first closing mark in text[from:end]
// among cl, or -1; single quotes must pass closesSingle.
func findCloser(text string, from, end, paraStart int, cl []rune, single bool) int {
	for j := from; j < end; {
		r, size := utf8.DecodeRuneInString(text[j:end])
		for _, c := range cl {
			if r == c && (!single || closesSingle(text, paraStart, j, j+size, end)) {
				return j + size
			}
		}
		j += size
	}
	return -1
}

// opensSingle: the single quote text[at:after] follows the paragraph start,
// a space or an opening bracket or quote, and precedes a letter or digit.
func opensSingle(text string, paraStart, at, after, end int) bool {
	if after >= end {
		return false
	}
	next, _ := utf8.DecodeRuneInString(text[after:end])
	if !isWordRune(next) {
		return false
	}
	if at == paraStart {
		return true
	}
	prev, _ := utf8.DecodeLastRuneInString(text[paraStart:at])
	return unicode.IsSpace(prev) || unicode.In(prev, unicode.Ps, unicode.Pi) || prev == '"'
}

// closesSingle: the single quote text[at:after] follows a letter, digit or
// punctuation and precedes a space, punctuation or the paragraph end.
func closesSingle(text string, paraStart, at, after, end int) bool {
	if at == paraStart {
		return false
	}
	prev, _ := utf8.DecodeLastRuneInString(text[paraStart:at])
	if !isWordRune(prev) && !unicode.IsPunct(prev) {
		return false
	}
	if after >= end {
		return true
	}
	next, _ := utf8.DecodeRuneInString(text[after:end])
	return unicode.IsSpace(next) || unicode.IsPunct(next)
}

// referencesStart returns the offset of the line that starts a trailing
// references section, if any (see the comment at the top of this file).
func referencesStart(text string) (int, bool) {
	end := len(text)
	for end > 0 {
		lineStart := strings.LastIndexByte(text[:end], '\n') + 1
		line := text[lineStart:end]
		if lineStart > 0 && isReferencesHeading(line) && strings.TrimSpace(text[:lineStart]) != "" {
			return lineStart, true
		}
		if lineStart == 0 {
			break
		}
		end = lineStart - 1
	}
	return 0, false
}

// isReferencesHeading reports whether line, alone, is a references heading.
func isReferencesHeading(line string) bool {
	t := strings.TrimSpace(line)
	if len(t) == 0 || len(t) > 60 {
		return false
	}
	t = strings.TrimSpace(strings.TrimLeft(t, "#"))
	// An optional section number: digits, or a Roman numeral, with an
	// optional dot.
	if k := strings.IndexByte(t, ' '); k > 0 {
		num := strings.TrimSuffix(t[:k], ".")
		if num != "" && strings.Trim(num, "0123456789") == "" || strings.Trim(num, "IVXLivxl") == "" && num != "" {
			t = strings.TrimSpace(t[k+1:])
		}
	}
	t = strings.TrimRight(t, ":. ")
	t = strings.Join(strings.Fields(t), " ")
	return isReferenceHeading(strings.ToLower(t))
}
