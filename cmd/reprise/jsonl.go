package main

import (
	"fmt"

	"github.com/spf13/pflag"

	"reprise/corpus"
)

// jsonlFlags name the fields of JSON Lines corpora (.jsonl files: one
// document per line, see corpus/jsonl.go) and bound one line; they map one
// to one onto corpus.Options fields.
type jsonlFlags struct {
	id, text string
	maxLine  string
}

func (j *jsonlFlags) register(fs *pflag.FlagSet) {
	fs.StringVar(&j.id, "jsonl-id", "id", ".jsonl files: the field of each line holding the document's id (a string or number); documents are named FILE.jsonl#ID")
	fs.StringVar(&j.text, "jsonl-text", "text", ".jsonl files: the field of each line holding the document's text (offsets are into this decoded text)")
	fs.StringVar(&j.maxLine, "jsonl-max-line", "", ".jsonl files: skip a line (one document) longer than `SIZE` (default: --max-file-size); the file itself is streamed and has no size limit")
}

// apply checks the flags and sets their corpus options.
func (j *jsonlFlags) apply(o *corpus.Options) error {
	if j.id == "" || j.text == "" {
		return fmt.Errorf("--jsonl-id and --jsonl-text must not be empty")
	}
	if j.id == j.text {
		return fmt.Errorf("--jsonl-id and --jsonl-text name the same field %q", j.id)
	}
	o.JSONLID, o.JSONLText = j.id, j.text
	if j.maxLine != "" {
		n, err := parseSize(j.maxLine)
		if err != nil {
			return fmt.Errorf("--jsonl-max-line: %w", err)
		}
		if n < 1 {
			return fmt.Errorf("--jsonl-max-line must be positive, not %s", j.maxLine)
		}
		o.MaxJSONLLine = n
	}
	return nil
}
