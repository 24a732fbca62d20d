package corpus

import (
	"fmt"
	"unsafe"
)

// plainText reads any file whose content is text: it is decoded (see
// decode) and kept as it is, so for UTF-8 files offsets into Text are
// offsets into the file.
type plainText struct{}

func (plainText) format() string         { return "text" }
func (plainText) sniff(_ []byte) bool    { return false } // text has no signature
func (plainText) claims(ext string) bool { return ext == ".txt" }

// extract costs, for a UTF-8 file, the binary test and one utf8.Valid:
// d.text is in.raw itself. When in.owned says the buffer is the file's own
// (readFile allocates one per file and nothing writes to it again), the
// text aliases it (unsafe.String) instead of copying it: for a corpus of
// small text files that copy and its garbage were a tenth of a scan's
// reading and splitting. A text that decoding made (UTF-16,
// Windows-1252) is that new buffer, not a copy of it. Only a text that is
// another caller's bytes (a ZIP member's, a fuzz input the engine reuses,
// a test's) is copied, as string(raw).
func (plainText) extract(in *input) (extraction, error) {
	d, err := decode(in.raw, in.scratch)
	if err != nil {
		return extraction{}, err
	}
	text := ""
	if in.owned || !overlaps(d.text, in.raw) {
		// The file's own buffer, or one decoding made: nothing else
		// holds it or writes to it.
		text = unsafe.String(unsafe.SliceData(d.text), len(d.text))
	} else {
		text = string(d.text)
	}
	notes := d.notes()
	if blanked, n := blankQuoteMarks(text); n >= minQuotedLines {
		text = blanked
		notes = append(notes, fmt.Sprintf("%d quoted reply lines (starting with >): their > marks read as spaces so that they match the text they quote", n))
	}
	return extraction{Text: text, Encoding: d.encoding, Notes: notes}, nil
}

// minQuotedLines is the number of lines starting with ">" from which a
// plain text's quote marks are read as spaces: a quoted reply, not a lone
// line that happens to start with ">".
const minQuotedLines = 2
