package corpus

import (
	"fmt"
	"time"
)

// Defaults of the limits on untrusted input (Options fields of the same
// names). They are generous for real documents (a 300-page DOCX is about
// 2 MiB of XML) and small enough that a hostile file costs a bounded
// amount of memory and time.
const (
	DefaultMaxContainerBytes = 256 << 20
	DefaultMaxMemberBytes    = 64 << 20
	DefaultMaxMembers        = 10000
	DefaultMaxRatio          = 100
	DefaultMaxDepth          = 256
	DefaultPDFTimeout        = 30 * time.Second
	DefaultFileTimeout       = 60 * time.Second
)

// MinRatioCheck: members of at most this many uncompressed bytes are not
// held to MaxRatio. A small member cannot be a bomb, and small XML parts
// (styles, settings) often compress more than a hundredfold.
const MinRatioCheck = 1 << 20

// limitDefaults checks the limit fields and fills in their defaults.
func (o *Options) limitDefaults() error {
	type lim struct {
		name string
		v    *int64
		def  int64
	}
	for _, l := range []lim{
		{"maximum container size", &o.MaxContainerBytes, DefaultMaxContainerBytes},
		{"maximum member size", &o.MaxMemberBytes, DefaultMaxMemberBytes},
	} {
		switch {
		case *l.v < 0:
			return fmt.Errorf("corpus: %s %d is negative", l.name, *l.v)
		case *l.v == 0:
			*l.v = l.def
		}
	}
	type ilim struct {
		name string
		v    *int
		def  int
	}
	for _, l := range []ilim{
		{"maximum members", &o.MaxMembers, DefaultMaxMembers},
		{"maximum compression ratio", &o.MaxRatio, DefaultMaxRatio},
		{"maximum nesting depth", &o.MaxDepth, DefaultMaxDepth},
	} {
		switch {
		case *l.v < 0:
			return fmt.Errorf("corpus: %s %d is negative", l.name, *l.v)
		case *l.v == 0:
			*l.v = l.def
		}
	}
	switch {
	case o.PDFTimeout < 0:
		return fmt.Errorf("corpus: pdftotext timeout %v is negative", o.PDFTimeout)
	case o.PDFTimeout == 0:
		o.PDFTimeout = DefaultPDFTimeout
	}
	switch {
	case o.FileTimeout < 0:
		return fmt.Errorf("corpus: file timeout %v is negative", o.FileTimeout)
	case o.FileTimeout == 0:
		o.FileTimeout = DefaultFileTimeout
	}
	if o.PDFToText == "" {
		o.PDFToText = "pdftotext"
	}
	return nil
}
