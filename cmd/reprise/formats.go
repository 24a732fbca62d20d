package main

import (
	"fmt"
	"time"

	"github.com/spf13/pflag"

	"reprise/corpus"
)

// formatLimits are the flags for reading untrusted document formats
// (containers, markup, PDF) and e-mail replies; they map one to one onto
// corpus.Options fields.
type formatLimits struct {
	maxContainer string
	maxMember    string
	maxMembers   int
	maxRatio     int
	maxDepth     int
	pdfTimeout   time.Duration
	fileTimeout  time.Duration
	skipQuoted   bool
}

func (l *formatLimits) register(fs *pflag.FlagSet) {
	fs.StringVar(&l.maxContainer, "max-container-size", "256MiB", "stop reading a ZIP, DOCX, ODT or EPUB after `SIZE` of uncompressed members")
	fs.StringVar(&l.maxMember, "max-member-size", "64MiB", "skip ZIP members larger than `SIZE` uncompressed; also caps the text taken from one document")
	fs.IntVar(&l.maxMembers, "max-members", corpus.DefaultMaxMembers, "skip ZIP archives with more than `N` members")
	fs.IntVar(&l.maxRatio, "max-ratio", corpus.DefaultMaxRatio, "skip ZIP members over 1 MiB that expand more than `N` times (ZIP bombs)")
	fs.IntVar(&l.maxDepth, "max-depth", corpus.DefaultMaxDepth, "skip HTML or XML nesting elements, RTF nesting groups, or e-mail nesting MIME parts more than `N` deep")
	fs.DurationVar(&l.pdfTimeout, "pdf-timeout", corpus.DefaultPDFTimeout, "skip a PDF when pdftotext takes longer than `DURATION`")
	fs.DurationVar(&l.fileTimeout, "file-timeout", corpus.DefaultFileTimeout, "skip a file whose text takes longer than `DURATION` to extract (a ZIP's members together; a JSON Lines line)")
	fs.BoolVar(&l.skipQuoted, "skip-quoted-replies", false, "leave out e-mail lines starting with '>' (quoted replies); a note says how many")
}

// options checks the flags and returns the corpus options they set.
func (l *formatLimits) options() (corpus.Options, error) {
	var o corpus.Options
	var err error
	if o.MaxContainerBytes, err = parseSize(l.maxContainer); err != nil {
		return o, fmt.Errorf("--max-container-size: %w", err)
	}
	if o.MaxMemberBytes, err = parseSize(l.maxMember); err != nil {
		return o, fmt.Errorf("--max-member-size: %w", err)
	}
	for _, c := range []struct {
		name string
		v    int
	}{{"--max-members", l.maxMembers}, {"--max-ratio", l.maxRatio}, {"--max-depth", l.maxDepth}} {
		if c.v < 1 {
			return o, fmt.Errorf("%s must be at least 1, not %d", c.name, c.v)
		}
	}
	if l.pdfTimeout <= 0 {
		return o, fmt.Errorf("--pdf-timeout must be positive, not %v", l.pdfTimeout)
	}
	if l.fileTimeout <= 0 {
		return o, fmt.Errorf("--file-timeout must be positive, not %v", l.fileTimeout)
	}
	o.FileTimeout = l.fileTimeout
	o.MaxMembers, o.MaxRatio, o.MaxDepth = l.maxMembers, l.maxRatio, l.maxDepth
	o.PDFTimeout, o.SkipQuotedReplies = l.pdfTimeout, l.skipQuoted
	return o, nil
}
