package corpus

import (
	"strings"
	"unicode/utf8"
)

// A paraWriter builds the text of a structured document (DOCX, ODT, RTF,
// HTML, EPUB, PDF) paragraph by paragraph: paragraphs are separated by a
// blank line ("\n\n", which the sentence splitter takes as a paragraph
// break), runs of white space inside a paragraph become one space, and
// every paragraph that has text gets a Mark with its number (empty
// paragraphs are not counted, as a reader would not count them). One
// writer is used by one goroutine.
type paraWriter struct {
	b       strings.Builder
	marks   []Mark
	para    int  // paragraphs with text so far (in this chapter)
	chapter int  // 0 unless the format has chapters
	page    int  // 0 unless the format has pages
	open    bool // a paragraph has text and is not yet ended
	space   bool // white space is pending inside the open paragraph
	newline bool // the pending white space is a line break
	limit   int  // text bytes allowed; 0 means no limit
	full    bool // limit reached: further text is dropped
}

// text appends s to the current paragraph, collapsing white space.
func (w *paraWriter) text(s string) {
	for len(s) > 0 {
		r, n := utf8.DecodeRuneInString(s)
		if isSpaceRune(r) {
			if w.open {
				w.space = true
			}
			s = s[n:]
			continue
		}
		// a run of non-space bytes
		j := n
		for j < len(s) {
			r, m := utf8.DecodeRuneInString(s[j:])
			if isSpaceRune(r) {
				break
			}
			j += m
		}
		w.word(s[:j])
		s = s[j:]
	}
}

func (w *paraWriter) word(s string) {
	if w.full {
		return
	}
	if need := len(s) + 2; w.b.Cap()-w.b.Len() < need {
		// Builder.Grow makes the capacity twice the old one plus need:
		// doubled, as appendDoubling does, so that the text of a file twice
		// as long takes one more step, not one more or none.
		w.b.Grow(need)
	}
	if !w.open {
		if w.b.Len() > 0 {
			w.b.WriteString("\n\n")
		}
		w.para++
		w.marks = appendDoubling(w.marks, Mark{Offset: w.b.Len(), Page: w.page, Chapter: w.chapter, Paragraph: w.para})
		w.open = true
	} else if w.space {
		if w.newline {
			w.b.WriteByte('\n')
		} else {
			w.b.WriteByte(' ')
		}
	}
	w.space, w.newline = false, false
	w.b.WriteString(strings.ToValidUTF8(s, "\uFFFD"))
	if w.limit > 0 && w.b.Len() > w.limit {
		w.full = true
	}
}

// spaceOut adds white space (a tab, a soft break) inside the paragraph.
func (w *paraWriter) spaceOut() {
	if w.open {
		w.space = true
	}
}

// lineBreak adds a line break inside the paragraph (<br>, w:br): the
// sentence splitter reads it as a space, the reader sees the line.
func (w *paraWriter) lineBreak() {
	if w.open {
		w.space, w.newline = true, true
	}
}

// endPara ends the current paragraph, if it has text.
func (w *paraWriter) endPara() {
	w.open, w.space, w.newline = false, false, false
}

// newChapter ends the paragraph and numbers paragraphs from 1 again.
func (w *paraWriter) newChapter(n int) {
	w.endPara()
	w.chapter, w.para = n, 0
}

// newPage ends the paragraph and sets the page of the paragraphs to come;
// a paragraph running over a page break is cut there, so each part has
// its page.
func (w *paraWriter) newPage(n int) {
	w.endPara()
	w.page = n
}

// append adds the paragraphs of another writer (notes kept apart while
// the body was read) after this one's, numbered on.
func (w *paraWriter) append(o *paraWriter) {
	if o.b.Len() == 0 {
		return
	}
	w.endPara()
	off := w.b.Len()
	if off > 0 {
		w.b.WriteString("\n\n")
		off += 2
	}
	for _, m := range o.marks {
		m.Offset += off
		m.Paragraph += w.para
		w.marks = append(w.marks, m)
	}
	w.para += o.para
	w.b.WriteString(o.b.String())
}

// extraction returns the text and marks, or a refusal when there is no text.
func (w *paraWriter) extraction(encoding string, notes []string) (extraction, error) {
	if w.b.Len() == 0 {
		return extraction{}, refuse(reasonBlank)
	}
	if w.full {
		notes = append(notes, "text cut at the "+formatSize(int64(w.limit))+" limit (--max-member-size)")
	}
	return extraction{Text: w.b.String(), Encoding: encoding, Notes: notes, Marks: w.marks}, nil
}

// isSpaceRune is white space as HTML and XML text see it, plus the
// Unicode spaces word processors write (no-break space stays a space).
func isSpaceRune(r rune) bool {
	switch r {
	case ' ', '\t', '\n', '\r', '\f', '\v', 0x85, 0xA0, 0x2028, 0x2029, 0x3000:
		return true
	}
	return r >= 0x2000 && r <= 0x200A
}

// appendDoubling appends v to s, doubling the capacity when it is full.
// append grows a slice of more than 256 entries by about a quarter at a
// time, so a slice of one entry per paragraph of a large file (a 32-byte
// Mark) is allocated and copied about five times its final size in all;
// doubled, about twice. One read's allocations then grow in proportion to
// the file (BENCHMARKS.md, "Hostile inputs").
func appendDoubling[E any](s []E, v E) []E {
	if len(s) == cap(s) {
		// make, not slices.Grow: growslice would round 2*cap up by its own
		// steps, to between 2 and 2.5 times.
		grown := make([]E, len(s), max(2*cap(s), 16))
		copy(grown, s)
		s = grown
	}
	return append(s, v)
}
