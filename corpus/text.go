package corpus

// plainText reads any file whose content is text: it is decoded (see
// decode) and kept as it is, so for UTF-8 files offsets into Text are
// offsets into the file.
type plainText struct{}

func (plainText) format() string         { return "text" }
func (plainText) sniff(_ []byte) bool    { return false } // text has no signature
func (plainText) claims(ext string) bool { return ext == ".txt" }

// extract costs, for a UTF-8 file, the binary test, one utf8.Valid and
// one copy: string(d.text), where d.text is in.raw itself. The text could
// alias in.raw instead (unsafe.String) only if nothing ever wrote to that
// buffer again while a Document lives, and this package does not own it:
// readFile (read.go) happens to allocate one per file, but nothing in its
// contract stops a caller that streams documents from reusing one per
// worker; a ZIP member's bytes come from io.ReadAll, with spare capacity
// an alias would keep alive; the fuzz engine reuses its inputs. The copy
// runs at memory speed and allocates exactly the text's size. It is still
// about a fifth of what is left of extracting a plain UTF-8 file
// (BenchmarkExtractBrownText, measured with an aliasing variant), which is
// the price of not making every caller keep that rule.
func (plainText) extract(in *input) (extraction, error) {
	d, err := decode(in.raw)
	if err != nil {
		return extraction{}, err
	}
	return extraction{Text: string(d.text), Encoding: d.encoding, Notes: d.notes()}, nil
}
