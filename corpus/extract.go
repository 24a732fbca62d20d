package corpus

import (
	"archive/zip"
	"bytes"
	"errors"
	"path"
	"strings"
)

// An extractor turns the raw bytes of one file of its format into a
// document's text. Each format lives in its own file (text.go,
// markdown.go, docx.go, odt.go, epub.go, html.go, pdf.go, rtf.go,
// email.go) and is listed in extractors; ZIP archives (zip.go) are the
// one container, handled by extractFile because one archive gives many
// documents.
//
// An extractor is stateless: it may be used by several workers at once, so
// scratch memory it needs lives in the extraction it returns or on the
// stack, never in the extractor.
type extractor interface {
	// format is the name stored in Document.Format.
	format() string
	// sniff reports whether head (the first bytes of the file, up to
	// sniffLen) carries this format's signature. Content is asked first,
	// so a PDF named notes.txt is still a PDF. Formats stored in a ZIP
	// (DOCX, ODT, EPUB) are recognised by zipKind from the member names
	// instead, and their sniff is false.
	sniff(head []byte) bool
	// claims reports whether a lower-case file name extension such as
	// ".md" belongs to this format. It is asked when no signature matched.
	claims(ext string) bool
	// extract returns the document text of in.raw. A file that gives no
	// text returns a *refusal saying why in plain words; any other error
	// means the file is damaged and is reported as such.
	extract(in *input) (extraction, error)
}

// An input is one file (or ZIP member) to extract, with what the
// extractors need beside its bytes.
type input struct {
	raw    []byte
	osPath string   // a file on disk holding raw, "" for a ZIP member
	opt    *Options // defaults applied
	budget *int64   // uncompressed container bytes still allowed (see readMember)
	depth  int      // ZIP nesting: 0 for a file on disk, 1 inside a ZIP, ...
	// owned: raw is the buffer readFile read this one file into, and
	// nothing reads it once the file is extracted, so a text may be that
	// buffer (text.go), its markup blanked in place (markdown.go).
	owned bool
	// dl is the file's deadline (deadline.go), shared by the members of
	// a ZIP archive; nil for none.
	dl *deadline
	// scratch is the reading worker's reusable memory (scratch.go),
	// shared by the members of a ZIP archive; nil for none.
	scratch *scratch
}

// An extraction is what an extractor hands back.
type extraction struct {
	Text     string   // UTF-8 text; see Document.Text
	Encoding string   // see Document.Encoding
	Notes    []string // see Document.Notes
	Marks    []Mark   // see Document.Marks
}

// A part is one outcome of extracting a file: a document, or the reason
// there is none. A plain file gives one part; a ZIP archive one per member.
type part struct {
	sub    string // appended to the file's display path: "" or "!/inner/path"
	format string
	size   int64
	extraction
	reason string
}

// sniffLen is how much of a file the signatures and the binary test look at.
const sniffLen = 8 << 10

// extractors are the formats read, in the order their signatures are
// tried: signatures that cannot be confused first (PDF, RTF), then the
// text-like ones (HTML, e-mail), whose tests look at the first line.
// plainText is the fallback for any other file whose content is text and
// so claims only ".txt" here.
var extractors = [...]extractor{
	pdfText{}, rtfText{}, htmlText{}, emailText{},
	docxText{}, odtText{}, epubText{},
	markdown{}, plainText{},
}

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
// though its bytes often look like text. Reading it as text would fill the
// corpus with markup, so such files are skipped with reasonUnsupported.
type refusedFormat struct {
	magic string   // signature at the start of the file, "" if none
	exts  []string // lower-case extensions, with the dot
}

var refusedFormats = [...]refusedFormat{
	{magic: "%!PS", exts: []string{".ps", ".eps"}},
	{exts: []string{".svg"}},
}

// Signatures of ZIP archives (PKWARE APPNOTE 6.3.10, 4.3.7 local file
// header and 4.3.16 end of central directory record, for an empty archive).
const (
	zipLocalMagic = "PK\x03\x04"
	zipEmptyMagic = "PK\x05\x06"
)

// choose picks the extractor for a file named name whose bytes are raw:
// content first (ZIP member names, then signatures), then the extension,
// then plain text for anything else. It returns nil when the format is one
// this package refuses, and archive for a ZIP archive.
func choose(name string, raw []byte) extractor {
	head := raw[:min(len(raw), sniffLen)]
	if bytes.HasPrefix(head, []byte(zipLocalMagic)) || bytes.HasPrefix(head, []byte(zipEmptyMagic)) {
		if x := zipKind(raw); x != nil {
			return x
		}
	}
	tag := startsWithTag(head)
	for _, x := range extractors {
		if _, html := x.(htmlText); html && !tag {
			continue
		}
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
	if ext == ".zip" {
		return archive{}
	}
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

// startsWithTag reports whether head starts, after a UTF-8 byte-order
// mark and ASCII white space, with "<". htmlText.sniff is true only for
// such a head (a doctype, <html>, a comment or an XML declaration comes
// first), and it lowers up to 1 KiB of head to look further, which made
// it a third of the cost of choosing the format of a plain text file, so
// choose asks it only when this holds. TestChooseMatchesReference checks
// choose against the loop that asks every sniffer.
func startsWithTag(head []byte) bool {
	h := bytes.TrimLeft(bytes.TrimPrefix(head, []byte(bomUTF8)), " \t\r\n")
	return len(h) > 0 && h[0] == '<'
}

// zipKind tells the formats stored as ZIP archives apart by their members
// (checked in the central directory, which zip.NewReader reads): DOCX has
// word/document.xml or [Content_Types].xml (ECMA-376 Part 2, Open
// Packaging Conventions, 10.1.2.1); ODT and EPUB have a "mimetype" member
// naming their media type (OpenDocument 1.2 Part 3, 3.3; EPUB 3 OCF,
// 4.2.2), ODT also content.xml, EPUB also META-INF/container.xml. Any
// other ZIP, and one whose directory cannot be read, is an archive.
func zipKind(raw []byte) extractor {
	zr, err := zip.NewReader(bytes.NewReader(raw), int64(len(raw)))
	if err != nil && !errors.Is(err, zip.ErrInsecurePath) {
		return archive{}
	}
	var docx, odt, epub bool
	for _, f := range zr.File {
		switch f.Name {
		case "word/document.xml", "[Content_Types].xml":
			docx = true
		case "content.xml":
			odt = true
		case "META-INF/container.xml":
			epub = true
		case "mimetype":
			if f.UncompressedSize64 < 200 {
				if b, err := readSmall(f, 200); err == nil {
					switch {
					case bytes.HasPrefix(b, []byte("application/vnd.oasis.opendocument.text")):
						odt = true
					case bytes.Equal(bytes.TrimSpace(b), []byte("application/epub+zip")):
						epub = true
					}
				}
			}
		}
	}
	switch {
	case epub:
		return epubText{}
	case odt:
		return odtText{}
	case docx:
		return docxText{}
	}
	return archive{}
}

// extractFile chooses the extractor for one file and runs it. A refused
// format is reported as binary when its content is binary (that is the
// more useful fact) and as unsupported otherwise.
func extractFile(name string, in *input) []part {
	raw := in.raw
	x := choose(name, raw)
	if x == nil {
		reason := reasonUnsupported
		switch {
		case len(raw) == 0:
			reason = reasonEmpty
		case looksBinary(raw):
			reason = reasonBinary
		}
		return []part{{reason: reason}}
	}
	if _, ok := x.(archive); ok {
		return extractZip(in)
	}
	if len(raw) == 0 {
		return []part{{reason: reasonEmpty}}
	}
	e, err := x.extract(in)
	if err == nil && in.dl.check() { // finished, but late: skipped all the same
		err = in.dl.err()
	}
	if err != nil {
		return []part{{reason: reasonOf(err)}}
	}
	return []part{{format: x.format(), size: int64(len(raw)), extraction: e}}
}
