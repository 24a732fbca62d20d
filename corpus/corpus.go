package corpus

import (
	"fmt"
	"path"
	"runtime"
	"time"
)

// A Document is one readable input file, decoded to UTF-8 text.
type Document struct {
	ID       int    // index in the slice Read returns; documents are sorted by Path
	Path     string // as given on the command line, joined with the relative path inside a folder
	Format   string // "text", "markdown", "docx", "odt", "epub", "html", "pdf", "rtf", "email" or "jsonl"
	Encoding string // "utf-8", "utf-8-bom", "utf-16le", "utf-16be" or "windows-1252"; for other formats the source's character set
	Size     int64  // bytes on disk (for a ZIP member: its uncompressed size)
	// File is the file on disk the document came from, named as the walk
	// named it: Path itself, or for a ZIP member or a JSON Lines line the
	// archive's or the file's path (a prefix of Path). Reading File again
	// (as a path given to Read, without Include and Skip) names the
	// document Path again.
	File string
	// Text is the extracted text. For UTF-8 text files it is the file's bytes
	// unchanged (BOM and CR included), so offsets into Text are offsets into
	// the file. For Markdown, markup is replaced by spaces of the same byte
	// length, so offsets and lines still match the file.
	Text string
	// Notes say what was done to the text that a reader should know
	// (e.g. "not valid UTF-8: decoded as Windows-1252").
	Notes []string
	// Marks locate the numbered parts of formats that have them (pages,
	// chapters, paragraphs), sorted by Offset. Empty for text and Markdown,
	// whose locations are line numbers.
	Marks []Mark
}

// A Mark says that the part of Text from Offset on (up to the next Mark)
// lies on the given page, in the given chapter and paragraph. A zero field
// means the format has no such unit.
type Mark struct {
	Offset    int
	Page      int
	Chapter   int
	Paragraph int
}

// Skipped is an input that gave no document, with the reason in plain words.
type Skipped struct {
	Path   string
	Reason string
}

// Options control the walk. The zero value is usable.
type Options struct {
	// Include: when non-empty, only files whose base name matches one of
	// these globs (path.Match syntax) are read.
	Include []string
	// Skip: files or folders whose base name, or whose path as displayed
	// (as given or cleaned: "./docs/x" is also "docs/x"), matches one of
	// these globs are not read, and not listed as skipped.
	Skip []string
	// MaxFileSize: larger files are skipped with a reason (0 means 32 MiB).
	MaxFileSize int64
	// Jobs: files read and decoded at once (0 means runtime.NumCPU()).
	// Negative sizes and job counts are invalid options.
	Jobs int

	// Limits for untrusted containers and markup (see limits.go). Zero
	// means the default; negative values are invalid.

	// MaxContainerBytes: uncompressed bytes read from the members of one
	// container (ZIP, DOCX, ODT, EPUB, nested ZIPs included); 0 means
	// DefaultMaxContainerBytes.
	MaxContainerBytes int64
	// MaxMemberBytes: uncompressed size of one ZIP member; 0 means
	// DefaultMaxMemberBytes.
	MaxMemberBytes int64
	// MaxMembers: entries in one archive's directory; 0 means
	// DefaultMaxMembers.
	MaxMembers int
	// MaxRatio: uncompressed size over compressed size of one member of
	// more than MinRatioCheck bytes; 0 means DefaultMaxRatio.
	MaxRatio int
	// MaxDepth: element nesting in HTML and XML, group nesting in RTF,
	// part nesting in e-mail; 0 means DefaultMaxDepth.
	MaxDepth int
	// PDFTimeout: how long pdftotext may run on one PDF; 0 means
	// DefaultPDFTimeout.
	PDFTimeout time.Duration
	// FileTimeout: how long the extraction of one file may take (a ZIP
	// archive's members together, a PDF's pdftotext run included; for a
	// JSON Lines file, one line); a file that runs past it is skipped
	// with the reason. 0 means DefaultFileTimeout.
	FileTimeout time.Duration
	// SkipQuotedReplies: leave out the lines of an e-mail body that start
	// with ">" (quoted replies), with a Note saying how many. By default
	// they are kept and the Note says how many there are.
	SkipQuotedReplies bool
	// PDFToText: the pdftotext program; "" means "pdftotext" looked up on
	// PATH. Tests set it to check the behaviour when it is missing.
	PDFToText string
	// TempDir: the folder for the temporary copy of a PDF that is a ZIP
	// member (pdftotext reads files only); "" means os.TempDir(). A caller
	// that removes its own temporary folder on an interrupt sets it there.
	TempDir string

	// JSON Lines corpora (jsonl.go). JSONLID and JSONLText name the fields
	// holding each line's id and text ("" means "id" and "text").
	// MaxJSONLLine bounds one line, i.e. one document (0 means
	// MaxFileSize); MaxFileSize does not apply to a .jsonl file, which is
	// streamed.
	JSONLID, JSONLText string
	MaxJSONLLine       int64
}

// DefaultMaxFileSize is the size limit used when Options.MaxFileSize is 0.
const DefaultMaxFileSize = 32 << 20

// Effective returns o with every default applied, as Read uses it, so a
// report can record the limits a run really had; the error is Read's for
// invalid options.
func (o Options) Effective() (Options, error) { return o.withDefaults() }

// withDefaults validates o and fills in the defaults of its zero fields.
// It is the one place defaults are applied.
func (o Options) withDefaults() (Options, error) {
	for _, g := range o.Include {
		if _, err := path.Match(g, ""); err != nil {
			return o, fmt.Errorf("corpus: include glob %q: %w", g, err)
		}
	}
	for _, g := range o.Skip {
		if _, err := path.Match(g, ""); err != nil {
			return o, fmt.Errorf("corpus: skip glob %q: %w", g, err)
		}
	}
	switch {
	case o.MaxFileSize < 0:
		return o, fmt.Errorf("corpus: maximum file size %d is negative", o.MaxFileSize)
	case o.MaxFileSize == 0:
		o.MaxFileSize = DefaultMaxFileSize
	}
	if o.JSONLID == "" {
		o.JSONLID = "id"
	}
	if o.JSONLText == "" {
		o.JSONLText = "text"
	}
	switch {
	case o.MaxJSONLLine < 0:
		return o, fmt.Errorf("corpus: maximum JSON Lines line size %d is negative", o.MaxJSONLLine)
	case o.MaxJSONLLine == 0:
		o.MaxJSONLLine = o.MaxFileSize
	}
	if err := o.limitDefaults(); err != nil {
		return o, err
	}
	switch {
	case o.Jobs < 0:
		return o, fmt.Errorf("corpus: jobs %d is negative", o.Jobs)
	case o.Jobs == 0:
		o.Jobs = runtime.NumCPU()
	}
	return o, nil
}
