package corpus

import (
	"bytes"
	"fmt"
	"io"
	"unicode/utf8"

	"golang.org/x/net/html"
	"golang.org/x/net/html/atom"
	"golang.org/x/net/html/charset"
)

// htmlText reads HTML and XHTML (WHATWG HTML Living Standard). The
// character set comes from a byte-order mark, the transport's
// Content-Type (for a part of an e-mail) or a <meta> charset declaration,
// in that order, else Windows-1252 as the standard's fallback for the
// Western locales (13.2.3.2, "determining the character encoding", via
// x/net/html/charset). The text is read with the x/net/html tokenizer,
// not its parser: the tokenizer decodes character references (13.2.5.72)
// and needs no tree, so a huge or deeply nested page costs one pass and
// no memory beyond its text. Nesting is tracked on a stack of open
// elements, where a start tag of an element whose end tag may be omitted
// (p, li, td, ...) closes an open one of the same name first, and an end
// tag closes back to its element, an approximation of the tree
// construction rules (13.2.6) good enough to bound depth. Only visible
// text is kept: not script, style, template, head, title or noscript;
// block elements (p, div, headings, li, table cells, ...) end paragraphs,
// <br> is a line break.
type htmlText struct{}

func (htmlText) format() string { return "html" }

func (htmlText) claims(ext string) bool {
	return ext == ".html" || ext == ".htm" || ext == ".xhtml" || ext == ".xht"
}

// sniff recognises a document that starts, after a byte-order mark, white
// space and comments, with a doctype naming html or an <html> tag, or an
// XML declaration followed by one within the first bytes.
func (htmlText) sniff(head []byte) bool {
	h := bytes.TrimPrefix(head, []byte(bomUTF8))
	h = bytes.TrimLeft(h, " \t\r\n")
	if len(h) > 1024 {
		h = h[:1024]
	}
	l := bytes.ToLower(h)
	if bytes.HasPrefix(l, []byte("<?xml")) {
		return bytes.Contains(l, []byte("<html"))
	}
	for bytes.HasPrefix(l, []byte("<!--")) {
		end := bytes.Index(l, []byte("-->"))
		if end < 0 {
			return false
		}
		l = bytes.TrimLeft(l[end+3:], " \t\r\n")
	}
	return bytes.HasPrefix(l, []byte("<!doctype html")) || bytes.HasPrefix(l, []byte("<html"))
}

func (htmlText) extract(in *input) (extraction, error) {
	w := &paraWriter{limit: int(in.opt.MaxMemberBytes)}
	enc, err := htmlInto(w, in.raw, "", in.opt.MaxDepth, in.dl)
	if err != nil {
		return extraction{}, err
	}
	return w.extraction(enc, nil)
}

// htmlInto adds the visible text of one HTML document to w and returns
// the name of the character set it was decoded from. It asks dl at every
// token.
func htmlInto(w *paraWriter, raw []byte, contentType string, maxDepth int, dl *deadline) (string, error) {
	var r io.Reader = bytes.NewReader(raw)
	_, name, _ := charset.DetermineEncoding(raw[:min(len(raw), 1024)], contentType)
	if !(name == "utf-8" && utf8.Valid(raw)) {
		cr, err := charset.NewReaderLabel(name, bytes.NewReader(raw))
		if err != nil {
			return "", refuse(fmt.Sprintf("HTML in an unknown character set %q", name))
		}
		r = cr
	} else if bytes.HasPrefix(raw, []byte(bomUTF8)) {
		r = bytes.NewReader(raw[3:])
	}
	z := html.NewTokenizer(r)
	var stack []atom.Atom
	hidden := 0 // open elements whose text is not shown
	for {
		if dl.passed() {
			return "", dl.err()
		}
		tt := z.Next()
		switch tt {
		case html.ErrorToken:
			if z.Err() == io.EOF {
				return name, nil
			}
			return "", refuse("unreadable HTML: " + z.Err().Error())
		case html.TextToken:
			if hidden == 0 {
				w.text(string(z.Text()))
			}
		case html.StartTagToken, html.SelfClosingTagToken:
			tn, _ := z.TagName()
			a := atom.Lookup(tn)
			if a == atom.Br {
				if hidden == 0 {
					w.lineBreak()
				}
				continue
			}
			if isBlock(a) {
				w.endPara()
			}
			if a == atom.Body { // an unclosed <head> ends here
				for i, b := range stack {
					if b == atom.Head {
						for _, c := range stack[i:] {
							if isHidden(c) {
								hidden--
							}
						}
						stack = stack[:i]
						break
					}
				}
			}
			if tt == html.SelfClosingTagToken || isVoid(a) {
				continue
			}
			if impliedEnd(a) && len(stack) > 0 && stack[len(stack)-1] == a {
				stack = stack[:len(stack)-1]
				if isHidden(a) {
					hidden--
				}
			}
			stack = append(stack, a)
			if len(stack) > maxDepth {
				return "", refuse(fmt.Sprintf("HTML nests elements more than %d deep (--max-depth)", maxDepth))
			}
			if isHidden(a) {
				hidden++
			}
		case html.EndTagToken:
			tn, _ := z.TagName()
			a := atom.Lookup(tn)
			if isBlock(a) {
				w.endPara()
			}
			for i := len(stack) - 1; i >= 0; i-- {
				if stack[i] == a {
					for _, b := range stack[i:] {
						if isHidden(b) {
							hidden--
						}
					}
					stack = stack[:i]
					break
				}
			}
		}
	}
}

func isHidden(a atom.Atom) bool {
	switch a {
	case atom.Script, atom.Style, atom.Template, atom.Head, atom.Title, atom.Noscript, atom.Iframe, atom.Object:
		return true
	}
	return false
}

func isVoid(a atom.Atom) bool {
	switch a {
	case atom.Area, atom.Base, atom.Br, atom.Col, atom.Embed, atom.Hr, atom.Img, atom.Input,
		atom.Link, atom.Meta, atom.Source, atom.Track, atom.Wbr:
		return true
	}
	return false
}

// impliedEnd: elements whose end tag may be omitted (WHATWG HTML 13.1.2.4).
func impliedEnd(a atom.Atom) bool {
	switch a {
	case atom.P, atom.Li, atom.Dt, atom.Dd, atom.Tr, atom.Td, atom.Th, atom.Option,
		atom.Thead, atom.Tbody, atom.Tfoot, atom.Rt, atom.Rp, atom.Optgroup, atom.Colgroup, atom.Caption:
		return true
	}
	return false
}

func isBlock(a atom.Atom) bool {
	switch a {
	case atom.P, atom.Div, atom.H1, atom.H2, atom.H3, atom.H4, atom.H5, atom.H6,
		atom.Li, atom.Ul, atom.Ol, atom.Dl, atom.Dt, atom.Dd, atom.Table, atom.Tr, atom.Td, atom.Th,
		atom.Caption, atom.Blockquote, atom.Pre, atom.Section, atom.Article, atom.Header, atom.Footer,
		atom.Nav, atom.Aside, atom.Main, atom.Figure, atom.Figcaption, atom.Form, atom.Fieldset,
		atom.Address, atom.Hr, atom.Details, atom.Summary, atom.Body, atom.Html, atom.Legend:
		return true
	}
	return false
}
