package corpus

import (
	"archive/zip"
	"encoding/xml"
)

// docxText reads Word documents (ECMA-376 Office Open XML, WordprocessingML).
// The main part word/document.xml is read as a stream of XML tokens:
// paragraphs (w:p, Part 1 17.3.1.22) in document order, table cells (w:tc,
// 17.4.66) as the paragraphs they hold, cell by cell; text runs' w:t
// (17.3.3.31); w:tab and w:ptab as white space, w:br and w:cr (17.3.3.1,
// 17.3.3.4) as line breaks. Fields (17.16) show their result runs, which
// are ordinary w:t; their instructions (w:instrText) and deleted text
// (w:delText) are not text a reader sees. mc:Fallback (Part 3, Markup
// Compatibility, 10.2) repeats a text box already read in mc:Choice, so it
// is skipped. Footnotes and endnotes (word/footnotes.xml,
// word/endnotes.xml, 17.11) follow the body as further paragraphs, without
// the separator notes. Headers and footers (word/header*.xml) are left
// out: they repeat on every page and are boilerplate.
//
// The part names are the ones Word and pandoc write (from memory, and
// checked on the pandoc fixtures); a package that names its main part
// differently in _rels/.rels is refused as having no word/document.xml.
type docxText struct{}

func (docxText) format() string         { return "docx" }
func (docxText) sniff(_ []byte) bool    { return false } // see zipKind
func (docxText) claims(ext string) bool { return ext == ".docx" || ext == ".docm" }

// Namespaces of WordprocessingML: transitional (ECMA-376 Part 4) and strict
// (Part 1), and of Markup Compatibility.
const (
	nsW       = "http://schemas.openxmlformats.org/wordprocessingml/2006/main"
	nsWStrict = "http://purl.oclc.org/ooxml/wordprocessingml/main"
	nsMC      = "http://schemas.openxmlformats.org/markup-compatibility/2006"
)

func (docxText) extract(in *input) (extraction, error) {
	if !isZip(in.raw) {
		return extraction{}, refuse("not a DOCX file: no ZIP signature (the extension says DOCX, the content does not)")
	}
	zr, err := openZip(in.raw, in.opt)
	if err != nil {
		return extraction{}, err
	}
	body := findMember(zr, "word/document.xml")
	if body == nil {
		return extraction{}, refuse("damaged DOCX: no word/document.xml in the package")
	}
	w := &paraWriter{limit: int(in.opt.MaxMemberBytes)}
	if err := docxPart(body, in, w); err != nil {
		return extraction{}, err
	}
	var notes paraWriter
	for _, name := range []string{"word/footnotes.xml", "word/endnotes.xml"} {
		if f := findMember(zr, name); f != nil {
			if err := docxPart(f, in, &notes); err != nil {
				return extraction{}, err
			}
		}
	}
	w.append(&notes)
	return w.extraction("utf-8", nil)
}

// docxPart adds the paragraphs of one WordprocessingML part to w.
func docxPart(f *zip.File, in *input, w *paraWriter) error {
	data, err := readMember(f, in)
	if err != nil {
		return err
	}
	inText := false
	skip := 0 // depth of the element whose subtree is skipped, 0 for none
	return xmlWalk(data, f.Name, in.opt.MaxDepth, in.dl, func(tok xml.Token, depth int) error {
		switch t := tok.(type) {
		case xml.StartElement:
			if skip > 0 {
				return nil
			}
			if t.Name.Space == nsMC && t.Name.Local == "Fallback" {
				skip = depth
				return nil
			}
			if t.Name.Space != nsW && t.Name.Space != nsWStrict {
				return nil
			}
			switch t.Name.Local {
			case "footnote", "endnote":
				if ty := attr(t, "type"); ty != "" && ty != "normal" {
					skip = depth // separator, continuationSeparator, continuationNotice
				}
			case "t":
				inText = true
			case "tab", "ptab":
				w.spaceOut()
			case "br", "cr":
				w.lineBreak()
			case "noBreakHyphen":
				w.text("-")
			case "p":
				w.endPara()
			}
		case xml.EndElement:
			if skip > 0 {
				if depth == skip {
					skip = 0
				}
				return nil
			}
			if t.Name.Space != nsW && t.Name.Space != nsWStrict {
				return nil
			}
			switch t.Name.Local {
			case "t":
				inText = false
			case "p", "tc":
				w.endPara()
			}
		case xml.CharData:
			if inText && skip == 0 {
				w.text(string(t))
			}
		}
		return nil
	})
}

// isZip reports whether raw starts with a ZIP signature.
func isZip(raw []byte) bool {
	s := string(raw[:min(len(raw), 4)])
	return s == zipLocalMagic || s == zipEmptyMagic
}
