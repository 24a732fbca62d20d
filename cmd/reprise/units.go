package main

import (
	"fmt"

	"github.com/spf13/pflag"

	"reprise/report"
	"reprise/scan"
	"reprise/shingle"
)

// Defaults of the word-shingle unit, chosen from the benchmark in
// EVALUATION.md (go run ./scripts/evaluate).
const (
	defaultShingleWords = 5  // K
	defaultWinnow       = 0  // W: no winnowing
	defaultGap          = 50 // G, in words
	defaultMinPassage   = 24 // words a word-unit passage needs to be shown
	wordsMinShared      = 12 // --min-shared for --unit words
	sentenceMinShared   = 2  // --min-shared for --unit sentence
	sentenceMinWords    = 5  // --min-words for --unit sentence
	rewordedMinShared   = 4  // --min-shared for --unit reworded (candidates the alignment confirms)
)

// Defaults of the sentence alignment of --unit reworded (EVALUATION.md).
const (
	defaultMinSimilarity = 0.4 // cosine and Dice a sentence pair needs to seed a passage
	defaultSentenceGap   = 5   // sentences
)

// unitFlags are the flags that choose the unit and what is left out.
type unitFlags struct {
	fs             *pflag.FlagSet
	unit           string
	words          int
	winnow         int
	gap            int
	minPassage     int
	skipQuoted     bool
	skipReferences bool
	minSimilarity  float64
	sentenceGap    int
}

func (u *unitFlags) register(fs *pflag.FlagSet) {
	u.fs = fs
	fs.StringVar(&u.unit, "unit", "sentence", "what is compared: sentence (whole sentences, exact after normalization),\nwords (every run of --words consecutive words; catches edited copies) or\nreworded (word runs find candidates, sentences sharing content words confirm them; catches reworded copies)")
	fs.IntVar(&u.words, "words", defaultShingleWords, "--unit words: `K`, the words in one shingle")
	fs.IntVar(&u.winnow, "winnow", defaultWinnow, "--unit words: keep only the minimum fingerprint of each window of `W` shingles\n(about 2/(W+1) of them; any shared run of W+K-1 words is still found; 0 keeps all)")
	fs.IntVar(&u.gap, "gap", defaultGap, "--unit words: matches merge into one passage across gaps of up to `G` words in both documents")
	fs.IntVar(&u.minPassage, "min-passage", defaultMinPassage, "--unit words: a passage of fewer than `N` words is not shown (unless it is the pair's largest)")
	fs.Float64Var(&u.minSimilarity, "min-similarity", defaultMinSimilarity, "--unit reworded: cosine and Dice of content words a sentence pair needs to seed a passage (0 to 1)")
	fs.IntVar(&u.sentenceGap, "sentence-gap", defaultSentenceGap, "--unit reworded: seeds within `N` sentences of each other in both documents join one passage")
	fs.BoolVar(&u.skipQuoted, "skip-quoted", false, "text inside quotation marks (\"…\", “…”, „…“, «…», ‚…‘, and '…' where unambiguous) gives no unit")
	fs.BoolVar(&u.skipReferences, "skip-references", false, "a trailing references / bibliography / works cited section, found by its heading, gives no unit")
}

// resolve checks the unit flags and fills --min-shared and --min-words
// when they were not given: their defaults depend on --unit.
func (u *unitFlags) resolve(f *scanFlags) error {
	switch u.unit {
	case "sentence", "words", "reworded":
	default:
		return fmt.Errorf("--unit %q: want sentence, words or reworded", u.unit)
	}
	reworded := u.unit == "reworded"
	words := u.unit == "words" || reworded
	for _, name := range []string{"words", "winnow", "min-passage"} {
		if !words && u.fs.Changed(name) {
			return fmt.Errorf("--%s applies to --unit words and reworded only", name)
		}
	}
	if u.unit != "words" && u.fs.Changed("gap") {
		return fmt.Errorf("--gap applies to --unit words only (--unit reworded: --sentence-gap)")
	}
	for _, name := range []string{"min-similarity", "sentence-gap"} {
		if !reworded && u.fs.Changed(name) {
			return fmt.Errorf("--%s applies to --unit reworded only", name)
		}
	}
	if words && u.fs.Changed("min-words") {
		return fmt.Errorf("--min-words applies to --unit sentence only (with --unit %s every unit has --words words)", u.unit)
	}
	if u.minSimilarity <= 0 || u.minSimilarity > 1 {
		return fmt.Errorf("--min-similarity must be above 0 and at most 1, not %g", u.minSimilarity)
	}
	if u.sentenceGap < 1 {
		return fmt.Errorf("--sentence-gap must be 1 or more, not %d", u.sentenceGap)
	}
	if u.words < 1 || u.words > 64 {
		return fmt.Errorf("--words must be between 1 and 64, not %d", u.words)
	}
	if u.winnow < 0 || u.winnow > 1000 {
		return fmt.Errorf("--winnow must be between 0 and 1000, not %d", u.winnow)
	}
	if u.gap < 0 {
		return fmt.Errorf("--gap must be 0 or more, not %d", u.gap)
	}
	if u.minPassage < 0 {
		return fmt.Errorf("--min-passage must be 0 or more, not %d", u.minPassage)
	}
	if !u.fs.Changed("min-shared") {
		f.minShared = sentenceMinShared
		if words {
			f.minShared = wordsMinShared
		}
		if reworded {
			f.minShared = rewordedMinShared
		}
	}
	if !u.fs.Changed("min-words") {
		f.minWords = sentenceMinWords
	}
	return nil
}

// apply puts the unit choice into the scan configuration.
func (u *unitFlags) apply(cfg *scan.Config) {
	cfg.Shingle.SkipQuoted = u.skipQuoted
	cfg.Shingle.SkipReferences = u.skipReferences
	if u.unit != "words" && u.unit != "reworded" {
		return
	}
	cfg.Shingle.Unit = shingle.UnitWords
	cfg.Shingle.ShingleWords = u.words
	cfg.Shingle.Winnow = u.winnow
	cfg.Chaining = &report.Chaining{Gap: u.gap, MinWords: u.minPassage}
	if u.unit == "reworded" {
		cfg.Chaining.Reworded = &report.Reworded{MinSimilarity: u.minSimilarity, Gap: u.sentenceGap}
	}
}
