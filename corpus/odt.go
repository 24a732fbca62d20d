package corpus

import (
	"encoding/xml"
	"strconv"
)

// odtText reads OpenDocument text documents (OASIS OpenDocument 1.2/1.3).
// Only content.xml is read (Part 3 calls it the package's content
// stream; styles.xml holds headers and footers, left out as in DOCX).
// Inside office:text: paragraphs (text:p, Part 1 5.1.3) and headings
// (text:h, 5.1.2) end paragraphs, list items and table cells hold
// paragraphs, text:s (6.1.3) stands for text:c spaces (capped at one, as
// runs of spaces are collapsed anyway), text:tab and text:line-break
// (6.1.4, 6.1.5) are white space. Notes (text:note, 6.3.2) are kept apart
// and follow the body; their citation (the number in the text) is not
// text. Tracked changes (text:tracked-changes, 5.5.1) hold deleted text and
// annotations (office:annotation, 14.1) reviewers' comments: both are
// skipped.
type odtText struct{}

func (odtText) format() string         { return "odt" }
func (odtText) sniff(_ []byte) bool    { return false } // see zipKind
func (odtText) claims(ext string) bool { return ext == ".odt" || ext == ".ott" }

const (
	nsText   = "urn:oasis:names:tc:opendocument:xmlns:text:1.0"
	nsOffice = "urn:oasis:names:tc:opendocument:xmlns:office:1.0"
)

func (odtText) extract(in *input) (extraction, error) {
	if !isZip(in.raw) {
		return extraction{}, refuse("not an ODT file: no ZIP signature (the extension says ODT, the content does not)")
	}
	data, err := zipPart(in, "content.xml", "ODT")
	if err != nil {
		return extraction{}, err
	}
	body := &paraWriter{limit: int(in.opt.MaxMemberBytes)}
	var notes paraWriter
	w := body
	skip, noteBody, citation := 0, 0, 0
	err = xmlWalk(data, "content.xml", in.opt.MaxDepth, in.dl, func(tok xml.Token, depth int) error {
		switch t := tok.(type) {
		case xml.StartElement:
			if skip > 0 || citation > 0 {
				return nil
			}
			switch {
			case t.Name.Space == nsText && t.Name.Local == "tracked-changes",
				t.Name.Space == nsOffice && t.Name.Local == "annotation":
				skip = depth
				return nil
			case t.Name.Space != nsText:
				return nil
			}
			switch t.Name.Local {
			case "p", "h":
				w.endPara()
			case "s", "tab":
				w.spaceOut()
				if n, err := strconv.Atoi(attr(t, "c")); err == nil && n > 0 {
					w.spaceOut()
				}
			case "line-break":
				w.lineBreak()
			case "note-citation":
				citation = depth
			case "note-body":
				if noteBody == 0 {
					noteBody = depth
					notes.endPara()
					w = &notes
				}
			}
		case xml.EndElement:
			switch {
			case skip > 0:
				if depth == skip {
					skip = 0
				}
				return nil
			case citation > 0:
				if depth == citation {
					citation = 0
				}
				return nil
			}
			if t.Name.Space != nsText {
				return nil
			}
			switch t.Name.Local {
			case "p", "h":
				w.endPara()
			case "note-body":
				if depth == noteBody {
					noteBody = 0
					w.endPara()
					w = body
				}
			}
		case xml.CharData:
			if skip == 0 && citation == 0 {
				w.text(string(t))
			}
		}
		return nil
	})
	if err != nil {
		return extraction{}, err
	}
	body.append(&notes)
	return body.extraction("utf-8", nil)
}
