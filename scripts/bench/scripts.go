package main

import (
	"encoding/json"
	"fmt"
	"os"
	"path/filepath"
	"slices"
	"strconv"
	"strings"
	"unicode"
)

// A script is a writing system the -scripts mode writes the corpus in:
// the 26 Latin letters each mapped to one letter of the script (capitals to
// the script's capitals where it has them), digits, spaces and
// punctuation kept. The corpus keeps its words, sentences and planted
// copies; only the letters change.
type script struct {
	name  string
	lower []rune // 26 letters for a to z
	upper []rune // 26 letters for A to Z; nil: the same as lower (no case)
}

// runRange returns the n code points from first, skipping those listed.
func runRange(first rune, n int, skip ...rune) []rune {
	var rs []rune
	for r := first; len(rs) < n; r++ {
		if !slices.Contains(skip, r) {
			rs = append(rs, r)
		}
	}
	return rs
}

// benchScripts are the scripts of the -scripts row, with spaces between
// words (alphabets, abjads, abugidas) and without (Han, kana, Thai: there
// each mapped letter is a syllable or an ideograph, and the corpus keeps
// its spaces, as text that mixes words and spaces would). The letters are
// consecutive blocks of the Unicode code charts (from memory; check tests
// each against unicode.IsLetter), skipping
// unassigned points and, for Greek, the final sigma (a letter whose
// lowercase form depends on its place); for the abugidas they are
// consonants, each a syllable with its inherent vowel.
var benchScripts = []script{
	{"Cyrillic", runRange(0x0430, 26), runRange(0x0410, 26)},
	{"Greek", append(runRange(0x03B1, 24, 0x03C2), 'ά', 'έ'), append(runRange(0x0391, 24, 0x03A2), 'Ά', 'Έ')},
	{"Armenian", runRange(0x0561, 26), runRange(0x0531, 26)},
	{"Georgian", runRange(0x10D0, 26), nil},
	{"Hebrew", runRange(0x05D0, 26), nil},
	{"Arabic", runRange(0x0628, 26, 0x063B, 0x063C, 0x063D, 0x063E, 0x063F, 0x0640), nil},
	{"Devanagari", runRange(0x0915, 26), nil},
	{"Bengali", runRange(0x0995, 26, 0x09A9, 0x09B1), nil},
	{"Tamil", []rune("கஙசஜஞடணதநனபமயரறலளழவஷஸஹஅஆஇஈ"), nil},
	{"Thai", runRange(0x0E01, 26), nil},
	{"Han", []rune("的一是不了人我在有他这中大来上国个到说们为子和你地出"), nil},
	{"Hiragana", runRange(0x3042, 26, 0x3043, 0x3045, 0x3047, 0x3049, 0x3063), nil},
	{"Katakana", runRange(0x30A2, 26, 0x30A3, 0x30A5, 0x30A7, 0x30A9, 0x30C3), nil},
	{"Hangul", stepRange(0xAC00, 26, 28), nil}, // 가, 개, 갸, …: syllables with no final consonant
}

// stepRange returns n code points from first, step apart.
func stepRange(first rune, n, step int) []rune {
	rs := make([]rune, n)
	for i := range rs {
		rs[i] = first + rune(i*step)
	}
	return rs
}

// check verifies that the script maps 26 letters to 26 distinct letters
// (unicode.IsLetter: the ranges above are from memory of the code charts,
// so they are checked against the standard library's tables).
func (s script) check() error {
	for _, set := range [][]rune{s.lower, s.upper} {
		if set == nil {
			continue
		}
		if len(set) != 26 {
			return fmt.Errorf("%s: %d letters, want 26", s.name, len(set))
		}
		seen := map[rune]bool{}
		for _, r := range set {
			if !unicode.IsLetter(r) || seen[r] {
				return fmt.Errorf("%s: %U is not a letter, or is listed twice", s.name, r)
			}
			seen[r] = true
		}
	}
	return nil
}

// transliterate returns text with its Latin letters mapped to the script.
func (s script) transliterate(text string) string {
	var b strings.Builder
	b.Grow(3 * len(text))
	for _, r := range text {
		switch {
		case 'a' <= r && r <= 'z':
			b.WriteRune(s.lower[r-'a'])
		case 'A' <= r && r <= 'Z' && s.upper != nil:
			b.WriteRune(s.upper[r-'A'])
		case 'A' <= r && r <= 'Z':
			b.WriteRune(s.lower[r-'A'])
		default:
			b.WriteRune(r)
		}
	}
	return b.String()
}

// measureScripts writes the corpus of n documents once in Latin letters
// and once in every script, then runs reprise scan on the Latin corpus and
// on each script's, alternately, o.runs times each, and prints the time
// per MB of each against the Latin one measured in the same rounds, and
// the pairs each scan found. These are the Latin corpus's where the
// script has capitals; where it has none they may differ a little: UAX #29
// does not end a sentence at a full stop followed by a lower-case word
// (rule SB8), and only cased scripts have lower-case letters.
func measureScripts(g *generator, bin string, o options, n int) error {
	latinDir := corpusDir(o, n)
	latinBytes, err := g.ensure(latinDir, n)
	if err != nil {
		return err
	}
	fmt.Printf("scripts: the corpus of %d documents (%.1f MB) with its letters mapped to each script; reprise scan --format json -q, %d runs each, alternating with the Latin corpus\n", n, float64(latinBytes)/1e6, o.runs)
	t, _, out, err := timed("sh", "-c", "find "+shellQuote(latinDir)+" -type f -exec cat {} + | wc -w")
	if err != nil {
		return err
	}
	fmt.Printf("  Latin corpus: cat | wc -w %.2f s (%s words), one run\n", t, strings.TrimSpace(out))
	latinPairs, err := scanPairs(bin, latinDir, o)
	if err != nil {
		return err
	}
	fmt.Printf("\n| script | MB | s per MB, script (median) | s per MB, Latin (median, same rounds) | script / Latin per MB | per document | pairs (Latin %d) |\n|---|---:|---:|---:|---:|---:|---:|\n", latinPairs)
	worst, wc := 0.0, t
	var allLatin []float64
	for _, sc := range benchScripts {
		if err := sc.check(); err != nil {
			return err
		}
		dir := latinDir + "-" + strings.ToLower(sc.name)
		size, err := writeTransliterated(latinDir, dir, n, g, sc)
		if err != nil {
			return err
		}
		args := []string{"scan", "--format", "json", "-o", os.DevNull, "-q"}
		if o.memory != "" {
			args = append(args, "--memory", o.memory)
		}
		args = append(args, o.extra...)
		var ts, tl []float64
		for range o.runs {
			a, _, _, err := timed(bin, append(args, dir)...)
			if err != nil {
				return err
			}
			b, _, _, err := timed(bin, append(args, latinDir)...)
			if err != nil {
				return err
			}
			ts, tl = append(ts, a), append(tl, b)
		}
		allLatin = append(allLatin, tl...)
		pairs, err := scanPairs(bin, dir, o)
		if err != nil {
			return err
		}
		perMBs, perMBl := median(ts)/(float64(size)/1e6), median(tl)/(float64(latinBytes)/1e6)
		ratio := perMBs / perMBl
		worst = max(worst, ratio)
		fmt.Printf("| %s | %.1f | %.4f | %.4f | %.2f | %.2f | %d |\n", sc.name, float64(size)/1e6, perMBs, perMBl, ratio, median(ts)/median(tl), pairs)
	}
	fmt.Printf("\nlargest script / Latin time per MB: %.2f (bound 2); Latin scan, median of all rounds, %.2f s: %.2f × the one cat | wc -w run; load average after the runs: %s\n", worst, median(allLatin), median(allLatin)/wc, loadAverage())
	return nil
}

// writeTransliterated writes the script's copy of the Latin corpus in
// latinDir into dir (once: a marker beside it says it is complete) and
// returns its size.
func writeTransliterated(latinDir, dir string, n int, g *generator, sc script) (int64, error) {
	marker := dir + ".done"
	if b, err := os.ReadFile(marker); err == nil {
		if size, err := strconv.ParseInt(strings.TrimSpace(string(b)), 10, 64); err == nil {
			return size, nil
		}
	}
	if err := os.RemoveAll(dir); err != nil {
		return 0, err
	}
	var size int64
	for i := range n {
		from, to := g.path(latinDir, i), g.path(dir, i)
		raw, err := os.ReadFile(from)
		if err != nil {
			return 0, err
		}
		if i%1000 == 0 {
			if err := os.MkdirAll(filepath.Dir(to), 0o755); err != nil {
				return 0, err
			}
		}
		text := sc.transliterate(string(raw))
		if err := os.WriteFile(to, []byte(text), 0o644); err != nil {
			return 0, err
		}
		size += int64(len(text))
	}
	return size, os.WriteFile(marker, []byte(strconv.FormatInt(size, 10)), 0o644)
}

// scanPairs runs reprise scan once with the JSON kept and returns the
// number of pairs it lists.
func scanPairs(bin, dir string, o options) (int, error) {
	out, err := os.CreateTemp("", "reprise-bench-*.json")
	if err != nil {
		return 0, err
	}
	out.Close()
	defer os.Remove(out.Name())
	args := []string{"scan", "--format", "json", "-o", out.Name(), "-q"}
	if o.memory != "" {
		args = append(args, "--memory", o.memory)
	}
	if _, _, _, err := timed(bin, append(append(args, o.extra...), dir)...); err != nil {
		return 0, err
	}
	raw, err := os.ReadFile(out.Name())
	if err != nil {
		return 0, err
	}
	var r struct {
		Summary struct {
			Pairs int `json:"pairs"`
		} `json:"summary"`
	}
	if err := json.Unmarshal(raw, &r); err != nil {
		return 0, err
	}
	return r.Summary.Pairs, nil
}
