package scan

import (
	"os"
	"path/filepath"
	"slices"
	"strconv"
	"strings"
	"time"

	"reprise/corpus"
	"reprise/report"
	"reprise/shingle"
)

// ReloadTexts reads again, by their recorded paths, the documents of the
// pairs the page details, and keeps a text only when it still matches the
// result: the same word count and, for every passage, the recorded text at
// the recorded offsets (A side) and offsets inside the text (B side).
//
// root, when set, is the folder relative paths are taken from. It also
// returns how many of the wanted documents could not be read again (no
// such file), of how many.
func ReloadTexts(res *report.Result, htmlPairs int, root string) (_ []report.SourceText, unread, wanted int) {
	texts := make([]report.SourceText, len(res.Documents))
	for i := range texts {
		texts[i].Missing = "not needed for the pairs shown side by side"
	}
	detailed := len(res.Pairs)
	switch {
	case htmlPairs < 0:
		detailed = 0
	case htmlPairs > 0:
		detailed = min(detailed, htmlPairs)
	default:
		detailed = min(detailed, report.DefaultHTMLPairs)
	}
	index := make(map[string]int, len(res.Documents))
	for i, d := range res.Documents {
		index[d.Path] = i
	}
	want := map[string]bool{}
	for _, p := range res.Pairs[:detailed] {
		want[p.A], want[p.B] = true, true
	}
	paths := make([]string, 0, len(want))
	for p := range want {
		paths = append(paths, p)
	}
	slices.Sort(paths)
	// Each wanted document under the name it is read by now: the recorded
	// path, or that path inside root when it is relative.
	rooted := func(p string) string {
		if root == "" || filepath.IsAbs(p) {
			return p
		}
		return filepath.Join(root, p)
	}
	byRead := make(map[string]string, len(paths)) // name read now -> recorded path
	for _, p := range paths {
		if _, ok := index[p]; !ok {
			continue
		}
		texts[index[p]].Missing = "the file could not be read again"
		byRead[rooted(p)] = p
	}
	defer func() {
		for _, p := range paths {
			if i, ok := index[p]; ok && strings.HasPrefix(texts[i].Missing, "the file could not be read again") {
				unread++
			}
		}
		wanted = len(byRead)
	}()
	if len(paths) == 0 {
		return texts, 0, 0
	}
	// A ZIP member or a JSON Lines line is read again from its file, with
	// the options the scan read it with.
	var outer []string
	for read := range byRead {
		outer = append(outer, outerFile(read))
	}
	slices.Sort(outer)
	outer = slices.Compact(outer)
	docs, skipped, err := corpus.Read(outer, recordedReadOptions(res.Settings))
	if err != nil {
		for _, p := range paths {
			if i, ok := index[p]; ok {
				texts[i].Missing = "the file could not be read again: " + err.Error()
			}
		}
		return texts, 0, 0
	}
	reasons := make(map[string]string, len(skipped))
	for _, s := range skipped {
		reasons[s.Path] = s.Reason
	}
	for read, p := range byRead {
		i := index[p]
		if r, ok := reasons[read]; ok {
			texts[i].Missing = "the file could not be read again (" + r + ")"
		} else if r, ok := reasons[outerFile(read)]; ok {
			texts[i].Missing = "the file could not be read again (" + r + ")"
		}
	}
	sp := shingle.New(shingle.Options{MinWords: res.Settings.MinWords, MaxUnitBytes: res.Settings.MaxUnitBytes})
	for _, d := range docs {
		p, ok := byRead[d.Path]
		if !ok {
			continue
		}
		i := index[p]
		_, st := sp.Sentences(d.Text, nil)
		if st.Words != res.Documents[i].Words {
			texts[i].Missing = "the file has changed since the scan (" + strconv.Itoa(st.Words) + " words now, " +
				strconv.Itoa(res.Documents[i].Words) + " recorded)"
			continue
		}
		if why := passagesMismatch(res, p, d.Text); why != "" {
			texts[i].Missing = why
			continue
		}
		texts[i] = report.SourceText{Text: d.Text}
	}
	return texts, 0, 0
}

// outerFile is the file on disk a recorded document path was read from:
// the archive of a ZIP member ("b.zip!/x.txt", nested ones included), the
// file of a JSON Lines line ("f.jsonl#id"), else the path itself. A path
// that names a file or folder on disk as it is stays whole.
func outerFile(p string) string {
	if _, err := os.Lstat(p); err == nil {
		return p
	}
	if i := strings.Index(p, "!/"); i > 0 {
		return p[:i]
	}
	if i := strings.Index(strings.ToLower(p), ".jsonl#"); i > 0 {
		return p[:i+len(".jsonl")]
	}
	return p
}

// recordedReadOptions are the corpus options the result was read with:
// its file size limit and its recorded reading settings (absent from
// older results, which then read with the defaults).
func recordedReadOptions(s report.Settings) corpus.Options {
	o := corpus.Options{MaxFileSize: s.MaxFileSize}
	if r := s.Read; r != nil {
		o.MaxContainerBytes = r.MaxContainerSize
		o.MaxMemberBytes = r.MaxMemberSize
		o.MaxMembers = r.MaxMembers
		o.MaxRatio = r.MaxRatio
		o.MaxDepth = r.MaxDepth
		o.PDFTimeout = time.Duration(r.PDFTimeoutSeconds * float64(time.Second))
		o.FileTimeout = time.Duration(r.FileTimeoutSeconds * float64(time.Second))
		o.SkipQuotedReplies = r.SkipQuotedReplies
		o.JSONLID, o.JSONLText = r.JSONLID, r.JSONLText
		o.MaxJSONLLine = r.MaxJSONLLine
	}
	return o
}

// passageAt reports whether a passage's recorded text is the text found at
// its offsets: all of it, or its start when the report cut it (text_cut).
func passageAt(found string, g report.Passage) bool {
	if g.TextCut {
		return strings.HasPrefix(found, g.Text)
	}
	return found == g.Text
}

// passagesMismatch says why text is not the one the result's passages
// point into, or "" when every passage fits.
func passagesMismatch(res *report.Result, path, text string) string {
	for _, p := range res.Pairs {
		for _, g := range p.Passages {
			if p.A == path {
				if g.AStart < 0 || g.AEnd > len(text) || g.AStart > g.AEnd || !passageAt(text[g.AStart:g.AEnd], g) {
					return "the file has changed since the scan (a passage is no longer at its recorded offsets)"
				}
			}
			if p.B == path && (g.BStart < 0 || g.BEnd > len(text) || g.BStart > g.BEnd) {
				return "the file has changed since the scan (a passage's offsets lie outside the text)"
			}
		}
	}
	return ""
}
