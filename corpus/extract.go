package corpus

import (
	"bytes"
	"errors"
	"path"
	"strings"
)

// An extractor turns the raw bytes of one file of its format into a
// document's text. Each format lives in its own file (text.go,
// markdown.go) and is listed in extractors; a later task adds DOCX, ODT,
// PDF, HTML, EPUB, RTF, e-mail and ZIP the same way.
//
// An extractor is stateless: it may be used by several workers at once, so
// scratch memory it needs lives in the extraction it returns or on the
// stack, never in the extractor.
type extractor interface {
	// format is the name stored in Document.Format.
	format() string
	// sniff reports whether head (the first bytes of the file, up to
	// sniffLen) carries this format's signature. Content is asked first,
	// so a PDF named notes.txt is still a PDF.
	sniff(head []byte) bool
	// claims reports whether a lower-case file name extension such as
	// ".md" belongs to this format. It is asked when no signature matched.
	claims(ext string) bool
	// extract returns the document text of raw. A file that gives no text
	// returns a *refusal saying why in plain words; any other error means
	// the file is damaged and is reported as such.
	extract(raw []byte) (extraction, error)
}

// An extraction is what an extractor hands back. It is a struct rather
// than a bare string so that formats with structure can say more later:
// the DOCX, ODT and PDF extractors will add here the locations (paragraph,
// page) that map byte offsets of Text back to places a reader can find.
type extraction struct {
	Text     string   // UTF-8 text; see Document.Text
	Encoding string   // see Document.Encoding
	Notes    []string // see Document.Notes
	Marks    []Mark   // see Document.Marks
}

// sniffLen is how much of a file the signatures and the binary test look at.
const sniffLen = 8 << 10

// extractors are the formats read, in the order their signatures are
// tried. plainText is the fallback for any other file whose content is
// text and so claims only ".txt" here.
var extractors = [...]extractor{markdown{}, plainText{}}

// A refusal is an expected reason for a file to give no document
// ("empty file", "binary file (not text)"). It is an error so extractors
// can return it like any other, and a plain string so it reads well in the
// Skipped list.
type refusal struct{ reason string }

func (r *refusal) Error() string { return r.reason }

func refuse(reason string) error { return &refusal{reason} }

// reasonOf turns an extraction error into the Reason of a Skipped entry.
func reasonOf(err error) string {
	var r *refusal
	if errors.As(err, &r) {
		return r.reason
	}
	return "could not extract text: " + err.Error()
}

// A refusedFormat is a format that is known not to be plain text even
// though its bytes often look like text (it is markup a later task will
// extract). Reading it as text would fill the corpus with markup, so such
// files are skipped with reasonUnsupported. Binary formats (DOCX, ODT,
// EPUB, ZIP, images) need no entry: the binary test already refuses them.
// Keep this list short: every entry is a format users will ask for.
type refusedFormat struct {
	magic string   // signature at the start of the file, "" if none
	exts  []string // lower-case extensions, with the dot
}

var refusedFormats = [...]refusedFormat{
	{magic: "%PDF-", exts: []string{".pdf"}},
	{magic: "%!PS", exts: []string{".ps", ".eps"}},
	{magic: `{\rtf`, exts: []string{".rtf"}},
	{exts: []string{".html", ".htm", ".xhtml"}},
	{exts: []string{".svg"}},
}

// choose picks the extractor for a file named name whose first bytes are
// head: content first (signatures of read and of refused formats), then
// the extension, then plain text for anything else. It returns nil when
// the format is one this package refuses.
func choose(name string, head []byte) extractor {
	for _, x := range extractors {
		if x.sniff(head) {
			return x
		}
	}
	for _, r := range refusedFormats {
		if r.magic != "" && bytes.HasPrefix(head, []byte(r.magic)) {
			return nil
		}
	}
	ext := strings.ToLower(path.Ext(name))
	for _, x := range extractors {
		if x.claims(ext) {
			return x
		}
	}
	for _, r := range refusedFormats {
		for _, e := range r.exts {
			if e == ext {
				return nil
			}
		}
	}
	return plainText{}
}

// extractFile chooses the extractor for one file and runs it. A refused
// format is reported as binary when its content is binary (that is the
// more useful fact) and as unsupported otherwise.
func extractFile(name string, raw []byte) (string, extraction, error) {
	head := raw[:min(len(raw), sniffLen)]
	x := choose(name, head)
	if x == nil {
		if len(raw) == 0 {
			return "", extraction{}, refuse(reasonEmpty)
		}
		if looksBinary(raw) {
			return "", extraction{}, refuse(reasonBinary)
		}
		return "", extraction{}, refuse(reasonUnsupported)
	}
	e, err := x.extract(raw)
	return x.format(), e, err
}
