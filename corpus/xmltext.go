package corpus

import (
	"bytes"
	"encoding/xml"
	"errors"
	"fmt"
	"io"
)

// xmlWalk streams the tokens of one XML part (a ZIP member of DOCX, ODT or
// EPUB) to fn, with the element depth. It never builds a tree, so memory
// is bounded by the part's size, and it refuses:
//
//   - a document type declaration with an internal subset that declares
//     entities: encoding/xml expands none beyond the five predefined ones
//     (XML 1.0, 4.6), so a "billion laughs" block cannot expand, but the
//     entity references that follow would fail as syntax errors; naming
//     the cause is clearer;
//   - nesting deeper than maxDepth elements;
//   - any syntax error (with the decoder's line number);
//   - going on past the deadline dl, asked at every token.
//
// part names the member in the reasons.
func xmlWalk(data []byte, part string, maxDepth int, dl *deadline, fn func(tok xml.Token, depth int) error) error {
	d := xml.NewDecoder(bytes.NewReader(data))
	depth := 0
	for {
		if dl.passed() {
			return dl.err()
		}
		tok, err := d.Token()
		if err == io.EOF {
			return nil
		}
		if err != nil {
			var se *xml.SyntaxError
			if errors.As(err, &se) {
				return refuse(fmt.Sprintf("malformed XML in %s: line %d: %s", part, se.Line, se.Msg))
			}
			return refuse(fmt.Sprintf("malformed XML in %s: %v", part, err))
		}
		switch t := tok.(type) {
		case xml.Directive:
			if bytes.Contains(t, []byte("<!ENTITY")) || bytes.Contains(t, []byte("ENTITY ")) {
				return refuse(fmt.Sprintf("XML in %s declares entities (a DTD internal subset, as in a billion-laughs attack): not read", part))
			}
		case xml.StartElement:
			depth++
			if depth > maxDepth {
				return refuse(fmt.Sprintf("XML in %s nests elements more than %d deep (--max-depth)", part, maxDepth))
			}
		}
		if err := fn(tok, depth); err != nil {
			return err
		}
		if _, ok := tok.(xml.EndElement); ok {
			depth--
		}
	}
}

// attr returns the value of the attribute with that local name (any
// namespace), or "".
func attr(e xml.StartElement, local string) string {
	for _, a := range e.Attr {
		if a.Name.Local == local {
			return a.Value
		}
	}
	return ""
}

// zipPart reads the named member of a document package, or refuses saying
// which part is missing.
func zipPart(in *input, name, format string) ([]byte, error) {
	zr, err := openZip(in.raw, in.opt)
	if err != nil {
		return nil, err
	}
	f := findMember(zr, name)
	if f == nil {
		return nil, refuse(fmt.Sprintf("damaged %s: no %s in the package", format, name))
	}
	return readMember(f, in)
}
