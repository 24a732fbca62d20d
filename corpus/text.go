package corpus

// plainText reads any file whose content is text: it is decoded (see
// decode) and kept as it is, so for UTF-8 files offsets into Text are
// offsets into the file.
type plainText struct{}

func (plainText) format() string         { return "text" }
func (plainText) sniff(_ []byte) bool    { return false } // text has no signature
func (plainText) claims(ext string) bool { return ext == ".txt" }

func (plainText) extract(in *input) (extraction, error) {
	d, err := decode(in.raw)
	if err != nil {
		return extraction{}, err
	}
	return extraction{Text: string(d.text), Encoding: d.encoding, Notes: d.notes()}, nil
}
