package scan

import (
	"fmt"
	"slices"
	"strings"

	"github.com/cespare/xxhash/v2"

	"reprise/corpus"
	"reprise/report"
	"reprise/shingle"
)

// SplitNotes are a document's reading notes followed by what splitting it
// set aside or had to do.
func SplitNotes(readNotes []string, st shingle.Stats, text string, effective shingle.Options) []string {
	notes := slices.Clone(readNotes)
	notes = append(notes, skipNotes(st, text)...)
	if st.LineBreaks {
		notes = append(notes, "no sentence punctuation: split at line breaks")
	}
	if st.Cut > 0 {
		notes = append(notes, fmt.Sprintf("%s longer than %d bytes %s cut", report.Plural(st.Cut, "sentence"), effective.MaxUnitBytes, map[bool]string{true: "was", false: "were"}[st.Cut == 1]))
	}
	return notes
}

// reportDoc is a document as the report needs it, with the notes on how it
// was split (used by compare's master coverage and archive check).
func reportDoc(d corpus.Document, units []shingle.Unit, st shingle.Stats, effective shingle.Options) report.Doc {
	return report.Doc{
		Path: d.Path, Format: d.Format, Encoding: d.Encoding, Notes: SplitNotes(d.Notes, st, d.Text, effective),
		Text: d.Text, Words: st.Words, Units: units, Marks: d.Marks,
		Digest: xxhash.Sum64String(d.Text), Size: len(d.Text),
	}
}

// ReadSettings records the limits and options the documents were read
// with, defaults applied; nil if the options are invalid (Read has
// refused them before a report is built).
func ReadSettings(o corpus.Options) *report.ReadSettings {
	e, err := o.Effective()
	if err != nil {
		return nil
	}
	return &report.ReadSettings{
		MaxContainerSize:   e.MaxContainerBytes,
		MaxMemberSize:      e.MaxMemberBytes,
		MaxMembers:         e.MaxMembers,
		MaxRatio:           e.MaxRatio,
		MaxDepth:           e.MaxDepth,
		PDFTimeoutSeconds:  e.PDFTimeout.Seconds(),
		FileTimeoutSeconds: e.FileTimeout.Seconds(),
		SkipQuotedReplies:  e.SkipQuotedReplies,
		JSONLID:            e.JSONLID,
		JSONLText:          e.JSONLText,
		MaxJSONLLine:       e.MaxJSONLLine,
	}
}

// UnitSettings records the unit's effective settings in the report.
func UnitSettings(s *report.Settings, opt shingle.Options, ch *report.Chaining) {
	s.Unit = opt.Unit.String()
	s.SkipQuoted = opt.SkipQuoted
	s.SkipReferences = opt.SkipReferences
	if opt.Unit == shingle.UnitWords {
		s.MinWords = opt.ShingleWords // every shingle has K words
		s.Shingles = &report.ShingleSettings{Words: opt.ShingleWords, Winnow: opt.Winnow, Gap: ch.Gap, MinPassage: ch.MinWords, Reworded: ch.Reworded}
	}
}

// skipNotes says, for one document, what --skip-quoted and
// --skip-references left out.
func skipNotes(st shingle.Stats, text string) []string {
	var notes []string
	if st.QuotedWords > 0 {
		notes = append(notes, fmt.Sprintf("%s inside quotation marks not compared (--skip-quoted)", report.Plural(st.QuotedWords, "word")))
	}
	if st.References {
		line := strings.Count(text[:st.ReferencesStart], "\n") + 1
		notes = append(notes, fmt.Sprintf("references section from line %d (%s) not compared (--skip-references)", line, report.Plural(st.ReferencesWords, "word")))
	}
	return notes
}

// fingerprintSets gives the engine's view of each document: its distinct
// unit fingerprints, sorted (used by scan, compare and archive check).
func fingerprintSets(units [][]shingle.Unit) [][]uint64 {
	sets := make([][]uint64, len(units))
	for i, us := range units {
		set := make([]uint64, len(us))
		for k, u := range us {
			set[k] = u.Hash
		}
		slices.Sort(set)
		sets[i] = slices.Compact(set)
	}
	return sets
}
