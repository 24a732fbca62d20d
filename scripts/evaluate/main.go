// Command evaluate measures reprise's detection quality on a labelled
// benchmark built from the Brown corpus (fetched by scripts/fetch-data.sh),
// to choose and justify the defaults of both units. It prints the Markdown
// tables that EVALUATION.md holds.
//
// # The benchmark
//
// For each obfuscation level (none, format, light, heavy) a separate corpus
// is generated, deterministically from -seed: -cases suspicious documents
// (Brown samples), each holding one passage of 2 to 15 consecutive sentences
// taken from its own source document (another Brown sample) and obfuscated
// at the level, inserted as a paragraph of its own; -cases source
// documents; -clean documents with no reuse; and the same invented template
// text (a notice every document carries) at the start of every document.
// Every sample is used once across all levels. The truth is the pair of
// character spans (Unicode code points) of each case: the passage in its
// source and the obfuscated copy in its suspicious document.
//
//   - none: the passage verbatim.
//   - format: each paragraph hard-wrapped at 48 to 72 columns, long words hyphenated at the
//     line end ("exam-\nple"), extra spaces and tabs between words, some
//     words in capitals or title case and some sentences all in capitals,
//     commas and semicolons dropped or swapped, straight and typographic
//     quotes exchanged. Sentence-initial capitals and sentence ends are kept
//     (a lower-case letter after a full stop would join two sentences under
//     UAX #29; that is an edit of the text, not of its format).
//   - light: in each sentence about 10% of the words (rounded at random, so
//     10% on average) replaced by, or preceded by, a word drawn from the
//     corpus's vocabulary, or deleted; one of the three at random.
//   - heavy: the same at about 30%, and the sentences shuffled within the
//     passage.
//
// # The measures
//
// Pair level: a reported pair is right when it is a case's (source,
// suspicious) pair; precision, recall and F1 over pairs. Passage level: the
// PAN measures (internal/pan): character precision, recall, granularity and
// plagdet, every reported passage a detection. Template: passages that
// overlap a template span, and pairs reported that are not cases.
//
// The reprise binary is built once and run on each corpus with --format
// json; --min-shared is swept by filtering the pairs of one run at the
// lowest threshold (a pair's passages and shared count do not depend on the
// threshold), so the sweep costs one run per unit setting and level.
//
//	go run ./scripts/evaluate [-data DIR] [-seed N] [-cases N] [-clean N] [-quick]
package main

import (
	"bytes"
	"encoding/json"
	"flag"
	"fmt"
	"math/rand/v2"
	"os"
	"os/exec"
	"path/filepath"
	"slices"
	"strings"
	"time"
	"unicode"
	"unicode/utf8"

	"reprise/internal/brown"
	"reprise/internal/pan"
	"reprise/report"
	"reprise/shingle"
)

func main() {
	if err := run(); err != nil {
		fmt.Fprintln(os.Stderr, "evaluate:", err)
		os.Exit(1)
	}
}

// levels are the obfuscation levels; the first four draw their samples
// from one permutation (each sample used once), the rewrite level from a
// second one of its own, so that adding it changed none of the others.
var levels = []string{"none", "format", "light", "heavy", "rewrite"}

// template is the invented notice every generated document starts with.
const template = `Submitted to the Harrowgate Review Board under the terms of the standing
submission policy. The board keeps every submission confidential and reads it
only for the purpose stated in the call. By submitting, the author confirms
that the work is their own and that any quoted material is marked as such.`

// doc is one generated document.
type doc struct {
	name string
	text string
}

// truth is one case, in byte offsets of the generated documents.
type truth struct {
	susp, src          int // document indices
	suspStart, suspEnd int
	srcStart, srcEnd   int
	sentences          int
}

// corpusOf is one level's generated corpus.
type corpusOf struct {
	level string
	dir   string
	docs  []doc
	cases []truth
	tmpl  int // bytes of the template prefix (template + blank line)
}

func run() error {
	data := flag.String("data", filepath.Join(".cache", "data"), "folder filled by scripts/fetch-data.sh")
	seed := flag.Uint64("seed", 1, "seed of the generator")
	nCases := flag.Int("cases", 40, "cases (suspicious/source document pairs) per level")
	nClean := flag.Int("clean", 40, "documents without reuse per level")
	quick := flag.Bool("quick", false, "only the default settings of each unit")
	keep := flag.String("keep", "", "write the generated corpora under this folder and keep them")
	try := flag.String("try", "", "only score these reprise scan flags (e.g. '--unit words --gap 40') at each level, for exploring")
	check := flag.Bool("check", false, "-try: exit with status 1 when at any level a pair is reported that is not a case (pair precision under 0.99) or the shared template is reported (the invariants CI checks on a small corpus)")
	misses := flag.Bool("misses", false, "-try: also list each case not matched exactly (its reported spans against the truth, in bytes)")
	flag.Parse()

	samples, err := brown.Load(filepath.Join(*data, "brown"))
	if err != nil {
		return err
	}
	need := (len(levels) - 1) * (2**nCases + *nClean)
	if need > len(samples) {
		return fmt.Errorf("%d samples needed (-cases %d, -clean %d), the corpus has %d", need, *nCases, *nClean, len(samples))
	}
	rng := rand.New(rand.NewPCG(*seed, 0x5eed))
	order := rng.Perm(len(samples))
	vocab := vocabulary(samples)
	syn, err := loadSynonyms(wordnetDir)
	if err != nil {
		return err
	}

	work := *keep
	if work == "" {
		if work, err = os.MkdirTemp("", "reprise-evaluate-"); err != nil {
			return err
		}
		defer os.RemoveAll(work)
	}
	bin := filepath.Join(work, "reprise")
	if out, err := exec.Command("go", "build", "-o", bin, "./cmd/reprise").CombinedOutput(); err != nil {
		return fmt.Errorf("go build: %v\n%s", err, out)
	}

	var corpora []*corpusOf
	next := 0
	for _, level := range levels {
		if level == "rewrite" {
			// Its own generator and order of samples: the other levels'
			// corpora are those they were before it was added.
			rng = rand.New(rand.NewPCG(*seed, 0x4e3d17e))
			order, next = rng.Perm(len(samples)), 0
		}
		take := func(n int) []brown.Sample {
			out := make([]brown.Sample, n)
			for i := range out {
				out[i] = samples[order[next]]
				next++
			}
			return out
		}
		c, err := generate(level, filepath.Join(work, level), take(*nCases), take(*nCases), take(*nClean), vocab, syn, rng)
		if err != nil {
			return err
		}
		corpora = append(corpora, c)
	}
	words := 0
	for _, c := range corpora {
		for _, d := range c.docs {
			words += shingle.CountWords(d.text)
		}
	}
	fmt.Printf("Benchmark: seed %d; per level %d cases (2-15 sentences), %d source and %d clean documents, "+
		"all %d documents carrying the template; %d documents, %d words in all.\n\n",
		*seed, *nCases, *nCases, *nClean, 2**nCases+*nClean, len(corpora)*(2**nCases+*nClean), words)

	ev := &evaluator{bin: bin, corpora: corpora}
	if *try != "" {
		return ev.try(strings.Fields(*try), *misses, *check)
	}
	if !*quick {
		if err := ev.sweeps(); err != nil {
			return err
		}
	}
	return ev.defaults()
}

// setting is one way of running reprise.
type setting struct {
	name string
	args []string
}

func sentenceSetting(minWords int) setting {
	return setting{fmt.Sprintf("sentence, min-words %d", minWords), []string{"--unit", "sentence", "--min-words", fmt.Sprint(minWords)}}
}

func wordsSetting(k, w, g, mp int) setting {
	return setting{fmt.Sprintf("words K=%d W=%d G=%d P=%d", k, w, g, mp),
		[]string{"--unit", "words", "--words", fmt.Sprint(k), "--winnow", fmt.Sprint(w), "--gap", fmt.Sprint(g),
			"--min-passage", fmt.Sprint(mp)}}
}

func rewordedSetting(k int, sim float64, gap int) setting {
	return setting{fmt.Sprintf("reworded K=%d similarity %.2g sentence gap %d", k, sim, gap),
		[]string{"--unit", "reworded", "--words", fmt.Sprint(k), "--min-similarity", fmt.Sprint(sim), "--sentence-gap", fmt.Sprint(gap)}}
}

type evaluator struct {
	bin     string
	corpora []*corpusOf
}

// outcome is one run of one setting on one level's corpus.
type outcome struct {
	res     *report.Result
	elapsed time.Duration
}

func (ev *evaluator) runOne(c *corpusOf, s setting, minShared int) (outcome, error) {
	args := append([]string{"scan", "-q", "--format", "json", "--jobs", "2", "--min-shared", fmt.Sprint(minShared)}, s.args...)
	args = append(args, c.dir)
	var out, errs bytes.Buffer
	cmd := exec.Command(ev.bin, args...)
	cmd.Stdout, cmd.Stderr = &out, &errs
	t0 := time.Now()
	if err := cmd.Run(); err != nil {
		return outcome{}, fmt.Errorf("reprise %s: %v\n%s", strings.Join(args, " "), err, errs.String())
	}
	elapsed := time.Since(t0)
	var res report.Result
	if err := json.Unmarshal(out.Bytes(), &res); err != nil {
		return outcome{}, err
	}
	return outcome{&res, elapsed}, nil
}

// measures are every figure of one setting, threshold and level.
type measures struct {
	pairs, right            int
	pairP, pairR, pairF1    float64
	pan                     pan.Scores
	templatePassages, wrong int
}

func (m measures) meets(level string) bool { return m.pan.Plagdet >= target(level) && m.pairP >= 0.98 }

// rewordedTarget is the plagdet the reworded mode is asked for at a level
// (issue 15), with pair precision of at least 0.99.
func rewordedTarget(level string) float64 {
	switch level {
	case "light":
		return 0.95
	case "heavy", "rewrite":
		return 0.75
	}
	return 0.98
}

// measure scores the pairs of o with at least minShared shared units.
func (c *corpusOf) measure(o outcome, minShared int) measures {
	index := map[string]int{}
	for i, d := range c.docs {
		index[filepath.ToSlash(filepath.Join(c.dir, d.name))] = i
	}
	caseOf := map[[2]int]int{}
	for k, t := range c.cases {
		caseOf[[2]int{min(t.susp, t.src), max(t.susp, t.src)}] = k
	}
	chars := make([][]int32, len(c.docs)) // byte offset -> code point offset, built on use
	at := func(d, off int) int {
		if chars[d] == nil {
			text := c.docs[d].text
			chars[d] = make([]int32, len(text)+1)
			n := int32(0)
			for i := 0; i < len(text); i++ {
				chars[d][i] = n
				if utf8.RuneStart(text[i]) {
					n++
				}
			}
			chars[d][len(text)] = n
		}
		return int(chars[d][off])
	}
	var m measures
	var dets []pan.Passage
	for _, p := range o.res.Pairs {
		if p.Shared < minShared {
			continue
		}
		a, b := index[p.A], index[p.B]
		m.pairs++
		k, ok := caseOf[[2]int{min(a, b), max(a, b)}]
		if ok {
			m.right++
		} else {
			m.wrong++
		}
		for _, g := range p.Passages {
			suspDoc, srcDoc := a, b
			ss, se, os_, oe := g.AStart, g.AEnd, g.BStart, g.BEnd
			if ok && c.cases[k].susp == b {
				suspDoc, srcDoc = b, a
				ss, se, os_, oe = g.BStart, g.BEnd, g.AStart, g.AEnd
			}
			if ss < c.tmpl || os_ < c.tmpl {
				m.templatePassages++
			}
			dets = append(dets, pan.Passage{
				Susp: c.docs[suspDoc].name, Src: c.docs[srcDoc].name,
				SuspSpan: pan.Span{Start: at(suspDoc, ss), End: at(suspDoc, se)},
				SrcSpan:  pan.Span{Start: at(srcDoc, os_), End: at(srcDoc, oe)},
			})
		}
	}
	cases := make([]pan.Passage, len(c.cases))
	for k, t := range c.cases {
		cases[k] = pan.Passage{
			Susp: c.docs[t.susp].name, Src: c.docs[t.src].name,
			SuspSpan: pan.Span{Start: at(t.susp, t.suspStart), End: at(t.susp, t.suspEnd)},
			SrcSpan:  pan.Span{Start: at(t.src, t.srcStart), End: at(t.src, t.srcEnd)},
		}
	}
	m.pan = pan.Evaluate(cases, dets)
	m.pairP, m.pairR = ratio(m.right, m.pairs, 1), ratio(m.right, len(c.cases), 1)
	if m.pairP+m.pairR > 0 {
		m.pairF1 = 2 * m.pairP * m.pairR / (m.pairP + m.pairR)
	}
	return m
}

func ratio(a, b int, empty float64) float64 {
	if b == 0 {
		return empty
	}
	return float64(a) / float64(b)
}

// target is the plagdet the issue asks for at a level (words mode).
func target(level string) float64 {
	switch level {
	case "light":
		return 0.85
	case "heavy", "rewrite":
		return 0.5
	}
	return 0.95
}

// sweeps prints the tables behind the defaults.
func (ev *evaluator) sweeps() error {
	header := func(title string) {
		fmt.Println("### " + title)
		fmt.Println()
		fmt.Println("| setting | --min-shared | plagdet none | format | light | heavy | rewrite | pair precision (lowest level) | pair recall (lowest level) | template passages |")
		fmt.Println("|---|---|---|---|---|---|---|---|---|---|")
	}
	header("Sentence units: --min-words and --min-shared")
	for _, mw := range []int{3, 5, 7} {
		if err := ev.sweepRow(sentenceSetting(mw), []int{1, 2, 3, 4}); err != nil {
			return err
		}
	}
	fmt.Println()
	header(fmt.Sprintf("Word shingles: K and --min-shared (W=0, G=%d, P=%d)", defaultG, defaultP))
	for _, k := range []int{3, 4, 5, 6, 8} {
		if err := ev.sweepRow(wordsSetting(k, 0, defaultG, defaultP), []int{4, 8, 12, 16, 24, 32}); err != nil {
			return err
		}
	}
	fmt.Println()
	header(fmt.Sprintf("Word shingles: gap G (K=%d, W=0, P=%d)", defaultK, defaultP))
	for _, g := range []int{0, 10, 20, 30, 50, 80} {
		if err := ev.sweepRow(wordsSetting(defaultK, 0, g, defaultP), []int{defaultMinShared}); err != nil {
			return err
		}
	}
	fmt.Println()
	header(fmt.Sprintf("Word shingles: --min-passage P (K=%d, W=0, G=%d)", defaultK, defaultG))
	for _, p := range []int{0, 8, 16, 24, 32, 48} {
		if err := ev.sweepRow(wordsSetting(defaultK, 0, defaultG, p), []int{defaultMinShared}); err != nil {
			return err
		}
	}
	fmt.Println()
	header(fmt.Sprintf("Reworded: K and --min-shared (similarity %.2g, sentence gap %d, P=%d)", rewordedSimilarity, rewordedGap, defaultP))
	for _, k := range []int{4, 5, 6} {
		if err := ev.sweepRow(rewordedSetting(k, rewordedSimilarity, rewordedGap), []int{2, 3, 4, 6, 8, 12}); err != nil {
			return err
		}
	}
	fmt.Println()
	header(fmt.Sprintf("Reworded: --min-similarity and --sentence-gap (K=%d, min-shared %d, P=%d)", defaultK, rewordedMinShared, defaultP))
	for _, sim := range []float64{0.3, 0.4, 0.5} {
		for _, g := range []int{2, 3, 5, 8} {
			if err := ev.sweepRow(rewordedSetting(defaultK, sim, g), []int{rewordedMinShared}); err != nil {
				return err
			}
		}
	}
	fmt.Println()
	header(fmt.Sprintf("Word shingles: winnowing W (K=%d, G=%d, P=%d; --min-shared scaled by about 2/(W+1))", defaultK, defaultG, defaultP))
	for _, w := range []int{2, 4, 8} {
		ms := []int{max(1, defaultMinShared*2/(w+1)), defaultMinShared}
		if err := ev.sweepRow(wordsSetting(defaultK, w, defaultG, defaultP), slices.Compact(ms)); err != nil {
			return err
		}
	}
	fmt.Println()
	return nil
}

// The defaults this benchmark chose (they mirror cmd/reprise/units.go; the
// sweeps show why).
const (
	defaultK         = 5
	defaultG         = 50
	defaultP         = 24
	defaultMinShared = 12

	rewordedMinShared  = 4
	rewordedSimilarity = 0.4
	rewordedGap        = 5
)

func (ev *evaluator) sweepRow(s setting, thresholds []int) error {
	outs := make([]outcome, len(ev.corpora))
	for i, c := range ev.corpora {
		o, err := ev.runOne(c, s, thresholds[0])
		if err != nil {
			return err
		}
		outs[i] = o
	}
	for _, t := range thresholds {
		cells := []string{s.name, fmt.Sprint(t)}
		minP, minR, tmpl := 1.0, 1.0, 0
		for i, c := range ev.corpora {
			m := c.measure(outs[i], t)
			cells = append(cells, fmt.Sprintf("%.3f", m.pan.Plagdet))
			minP, minR = min(minP, m.pairP), min(minR, m.pairR)
			tmpl += m.templatePassages
		}
		cells = append(cells, fmt.Sprintf("%.3f", minP), fmt.Sprintf("%.3f", minR), fmt.Sprint(tmpl))
		fmt.Println("| " + strings.Join(cells, " | ") + " |")
	}
	return nil
}

// defaults prints the full table at each unit's default settings, the
// targets, and the cost of each unit.
func (ev *evaluator) defaults() error {
	fmt.Println("## At the defaults")
	fmt.Println()
	fmt.Println("| unit (defaults) | level | pairs | pair P | pair R | pair F1 | char P | char R | granularity | plagdet | target | met | template passages | wrong pairs |")
	fmt.Println("|---|---|---|---|---|---|---|---|---|---|---|---|---|---|")
	type cost struct {
		name  string
		units int
		docs  int
		best  time.Duration
	}
	var costs []cost
	for _, s := range []struct {
		set       setting
		minShared int
		words     bool
		reworded  bool
	}{
		{setting{"sentence (min-shared 2, min-words 5)", []string{"--unit", "sentence"}}, 0, false, false},
		{setting{fmt.Sprintf("words (K=%d, W=0, G=%d, P=%d, min-shared %d)", defaultK, defaultG, defaultP, defaultMinShared), []string{"--unit", "words"}}, 0, true, false},
		{setting{fmt.Sprintf("reworded (K=%d, P=%d, min-shared %d, similarity %.2g, sentence gap %d)", defaultK, defaultP, rewordedMinShared, rewordedSimilarity, rewordedGap), []string{"--unit", "reworded"}}, 0, false, true},
	} {
		cs := cost{name: s.set.name}
		for _, c := range ev.corpora {
			var best outcome
			for rep := 0; rep < 3; rep++ { // best of three: the machine is shared
				o, err := ev.runDefault(c, s.set)
				if err != nil {
					return err
				}
				if rep == 0 || o.elapsed < best.elapsed {
					best = o
				}
			}
			m := c.measure(best, 0)
			tgt, met := "—", "—"
			if s.reworded {
				tgt = fmt.Sprintf("plagdet ≥ %.2f, pair P ≥ 0.99", rewordedTarget(c.level))
				met = "no"
				if m.pan.Plagdet >= rewordedTarget(c.level) && m.pairP >= 0.99 && m.templatePassages == 0 {
					met = "yes"
				}
			} else if s.words || c.level == "none" || c.level == "format" {
				tgt = fmt.Sprintf("plagdet ≥ %.2f, pair P ≥ 0.98", target(c.level))
				met = "no"
				if m.meets(c.level) && m.templatePassages == 0 {
					met = "yes"
				}
			} else {
				tgt = "pair P ≥ 0.98"
				met = "no"
				if m.pairP >= 0.98 && m.templatePassages == 0 {
					met = "yes"
				}
			}
			fmt.Printf("| %s | %s | %d | %.3f | %.3f | %.3f | %.3f | %.3f | %.3f | %.3f | %s | %s | %d | %d |\n",
				s.set.name, c.level, m.pairs, m.pairP, m.pairR, m.pairF1, m.pan.Precision, m.pan.Recall,
				m.pan.Granularity, m.pan.Plagdet, tgt, met, m.templatePassages, m.wrong)
			cs.units += best.res.Summary.Units
			cs.docs += best.res.Summary.Documents
			cs.best += best.elapsed
		}
		costs = append(costs, cs)
	}
	fmt.Println()
	fmt.Println("## Cost (all four corpora, best of three runs each, --jobs 2)")
	fmt.Println()
	fmt.Println("| unit | documents | units per document | wall time, four corpora |")
	fmt.Println("|---|---|---|---|")
	for _, c := range costs {
		fmt.Printf("| %s | %d | %.0f | %.2f s |\n", c.name, c.docs, float64(c.units)/float64(c.docs), c.best.Seconds())
	}
	return nil
}

// runDefault runs a setting with reprise's own default --min-shared.
func (ev *evaluator) runDefault(c *corpusOf, s setting) (outcome, error) {
	args := append([]string{"scan", "-q", "--format", "json", "--jobs", "2"}, s.args...)
	args = append(args, c.dir)
	var out, errs bytes.Buffer
	cmd := exec.Command(ev.bin, args...)
	cmd.Stdout, cmd.Stderr = &out, &errs
	t0 := time.Now()
	if err := cmd.Run(); err != nil {
		return outcome{}, fmt.Errorf("reprise %s: %v\n%s", strings.Join(args, " "), err, errs.String())
	}
	elapsed := time.Since(t0)
	var res report.Result
	if err := json.Unmarshal(out.Bytes(), &res); err != nil {
		return outcome{}, err
	}
	return outcome{&res, elapsed}, nil
}

// vocabulary returns the distinct lower-case alphabetic words of the
// samples, sorted: the words edits draw from.
func vocabulary(samples []brown.Sample) []string {
	seen := map[string]bool{}
	for _, s := range samples {
		for _, w := range strings.Fields(s.Text) {
			if len(w) >= 2 && isLowerWord(w) {
				seen[w] = true
			}
		}
	}
	out := make([]string, 0, len(seen))
	for w := range seen {
		out = append(out, w)
	}
	slices.Sort(out)
	return out
}

func isLowerWord(w string) bool {
	for _, r := range w {
		if r < 'a' || r > 'z' {
			return false
		}
	}
	return true
}

// generate writes one level's corpus to dir.
func generate(level, dir string, susp, src, clean []brown.Sample, vocab []string, syn synonyms, rng *rand.Rand) (*corpusOf, error) {
	c := &corpusOf{level: level, dir: dir, tmpl: len(template) + 2}
	sp := shingle.New(shingle.Options{MinWords: 1})
	add := func(name, body string) int {
		c.docs = append(c.docs, doc{name: name, text: template + "\n\n" + body})
		return len(c.docs) - 1
	}
	for i := range susp {
		srcText := src[i].Text
		units, _ := sp.Sentences(srcText, nil)
		if len(units) < 16 {
			return nil, fmt.Errorf("sample %s has %d sentences", src[i].Name, len(units))
		}
		n := 2 + rng.IntN(14)
		first := rng.IntN(len(units) - n + 1)
		start, end := int(units[first].Start), int(units[first+n-1].End)
		var sentences []string
		for _, u := range units[first : first+n] {
			sentences = append(sentences, srcText[u.Start:u.End])
		}
		copied := obfuscate(level, srcText[start:end], sentences, vocab, syn, rng)

		body := susp[i].Text
		paras := paragraphEnds(body)
		at := paras[rng.IntN(len(paras))]
		body = body[:at] + "\n\n" + copied + body[at:]
		si := add(fmt.Sprintf("susp-%02d-%s.txt", i, susp[i].Name), body)
		oi := add(fmt.Sprintf("src-%02d-%s.txt", i, src[i].Name), srcText)
		c.cases = append(c.cases, truth{
			susp: si, src: oi, sentences: n,
			suspStart: c.tmpl + at + 2, suspEnd: c.tmpl + at + 2 + len(copied),
			srcStart: c.tmpl + start, srcEnd: c.tmpl + end,
		})
	}
	for _, s := range clean {
		add(fmt.Sprintf("clean-%s.txt", s.Name), s.Text)
	}
	if err := os.MkdirAll(dir, 0o755); err != nil {
		return nil, err
	}
	for _, d := range c.docs {
		if err := os.WriteFile(filepath.Join(dir, d.name), []byte(d.text), 0o644); err != nil {
			return nil, err
		}
	}
	return c, nil
}

// paragraphEnds returns the offsets where the paragraphs of text end.
func paragraphEnds(text string) []int {
	var out []int
	for i := 0; i+1 < len(text); i++ {
		if text[i] != '\n' && text[i+1] == '\n' {
			if i+2 < len(text) && text[i+2] == '\n' {
				out = append(out, i+1)
			}
		}
	}
	return append(out, len(strings.TrimRight(text, "\n")))
}

// obfuscate rewrites a passage (its text, and its sentences) at level.
func obfuscate(level, passage string, sentences []string, vocab []string, syn synonyms, rng *rand.Rand) string {
	switch level {
	case "none":
		return passage
	case "format":
		var paras []string
		for _, p := range strings.Split(passage, "\n\n") {
			// Brown text has one sentence per line.
			paras = append(paras, reformat(strings.Split(p, "\n"), rng))
		}
		return strings.Join(paras, "\n\n")
	case "light":
		return edit(sentences, 0.10, false, vocab, rng)
	case "heavy":
		return edit(sentences, 0.30, true, vocab, rng)
	case "rewrite":
		return rewrite(sentences, vocab, syn, rng)
	}
	return passage // levels are fixed above; an unknown one copies verbatim
}

// reformat changes the format of one paragraph's sentences only (see the
// package comment); paragraph breaks stay where they were.
func reformat(sentences []string, rng *rand.Rand) string {
	var words []string
	for _, s := range sentences {
		upper := rng.Float64() < 0.1
		toks := strings.Fields(s)
		for i, w := range toks {
			w = swapQuotes(w, rng)
			switch {
			case upper:
				w = strings.ToUpper(w)
			case i > 0 && rng.Float64() < 0.1:
				w = strings.ToUpper(w)
			case i > 0 && rng.Float64() < 0.1:
				w = title(w)
			}
			if i < len(toks)-1 {
				if strings.HasSuffix(w, ",") && rng.Float64() < 0.5 {
					w = strings.TrimSuffix(w, ",")
				} else if strings.HasSuffix(w, ";") && rng.Float64() < 0.5 {
					w = strings.TrimSuffix(w, ";") + ","
				}
			}
			words = append(words, w)
		}
	}
	width := 48 + rng.IntN(25)
	var b strings.Builder
	col := 0
	for i, w := range words {
		if i > 0 {
			if col+1+len(w) > width {
				// Hyphenate a long lower-case word at the line end.
				if n := len(w); n >= 8 && isLowerWord(w) && rng.Float64() < 0.5 {
					cut := n / 2
					b.WriteString(" " + w[:cut] + "-\n" + w[cut:])
					col = n - cut
					continue
				}
				b.WriteString("\n")
				col = 0
			} else {
				sep := " "
				switch r := rng.Float64(); {
				case r < 0.08:
					sep = "  "
				case r < 0.12:
					sep = " \t"
				}
				b.WriteString(sep)
				col += len(sep)
			}
		}
		b.WriteString(w)
		col += len(w)
	}
	return b.String()
}

func swapQuotes(w string, rng *rand.Rand) string {
	if rng.Float64() < 0.5 {
		return w
	}
	r := strings.NewReplacer("“", `"`, "”", `"`, "‘", "'", "’", "'")
	if !strings.ContainsAny(w, "“”‘’") {
		r = strings.NewReplacer(`"`, "“", "'", "’")
	}
	return r.Replace(w)
}

func title(w string) string {
	r, size := utf8.DecodeRuneInString(w)
	return string(unicode.ToUpper(r)) + w[size:]
}

// edit changes about rate of the words of every sentence (replace, insert
// or delete, at random) and, if shuffle, reorders the sentences.
func edit(sentences []string, rate float64, shuffle bool, vocab []string, rng *rand.Rand) string {
	out := make([]string, 0, len(sentences))
	for _, s := range sentences {
		toks, tail := wordsAndTail(s)
		x := rate * float64(len(toks))
		n := int(x)
		if rng.Float64() < x-float64(n) {
			n++
		}
		for range n {
			if len(toks) == 0 {
				break
			}
			i := rng.IntN(len(toks))
			switch rng.IntN(3) {
			case 0:
				toks[i] = vocab[rng.IntN(len(vocab))]
			case 1:
				toks = slices.Insert(toks, i, vocab[rng.IntN(len(vocab))])
			default:
				if len(toks) > 1 {
					toks = slices.Delete(toks, i, i+1)
				}
			}
		}
		if len(toks) == 0 {
			continue
		}
		toks[0] = title(toks[0])
		out = append(out, strings.Join(toks, " ")+tail)
	}
	if shuffle {
		rng.Shuffle(len(out), func(i, j int) { out[i], out[j] = out[j], out[i] })
	}
	return strings.Join(out, " ")
}

// try prints every measure of one set of flags at each level.
// With misses, each case whose pair is not reported, or whose passages
// do not cover its two spans exactly, is listed after the level's row.
//
// With check, it returns an error when at any level the pair precision is
// under 0.99 or a template passage is reported: the targets of every
// level that do not depend on the corpus's size.
func (ev *evaluator) try(args []string, misses, check bool) error {
	var failed []string
	fmt.Println("| level | pairs | pair P | pair R | char P | char R | granularity | plagdet | template passages |")
	fmt.Println("|---|---|---|---|---|---|---|---|---|")
	for _, c := range ev.corpora {
		o, err := ev.runDefault(c, setting{"try", args})
		if err != nil {
			return err
		}
		m := c.measure(o, 0)
		fmt.Printf("| %s | %d | %.3f | %.3f | %.3f | %.3f | %.3f | %.3f | %d |\n", c.level, m.pairs, m.pairP, m.pairR,
			m.pan.Precision, m.pan.Recall, m.pan.Granularity, m.pan.Plagdet, m.templatePassages)
		if misses {
			c.listMisses(o)
		}
		if check && (m.pairP < 0.99 || m.templatePassages > 0) {
			failed = append(failed, fmt.Sprintf("%s: pair precision %.3f, %d template passages", c.level, m.pairP, m.templatePassages))
		}
	}
	if len(failed) > 0 {
		return fmt.Errorf("-check: %s", strings.Join(failed, "; "))
	}
	return nil
}

// listMisses prints the cases of c that o does not match exactly: the
// truth's spans (suspicious, source) and the reported passages' spans of
// the pair in the same order, in bytes, and the start of the copied text.
func (c *corpusOf) listMisses(o outcome) {
	index := map[string]int{}
	for i, d := range c.docs {
		index[filepath.ToSlash(filepath.Join(c.dir, d.name))] = i
	}
	for _, t := range c.cases {
		var got [][4]int
		for _, p := range o.res.Pairs {
			a, b := index[p.A], index[p.B]
			if min(a, b) != min(t.susp, t.src) || max(a, b) != max(t.susp, t.src) {
				continue
			}
			for _, g := range p.Passages {
				if a == t.susp {
					got = append(got, [4]int{g.AStart, g.AEnd, g.BStart, g.BEnd})
				} else {
					got = append(got, [4]int{g.BStart, g.BEnd, g.AStart, g.AEnd})
				}
			}
		}
		want := [4]int{t.suspStart, t.suspEnd, t.srcStart, t.srcEnd}
		if len(got) == 1 && got[0] == want {
			continue
		}
		copied := c.docs[t.susp].text[t.suspStart:t.suspEnd]
		fmt.Printf("  - %s: %d sentences, %d words, truth %v, reported %v: %q\n", c.docs[t.susp].name, t.sentences,
			shingle.CountWords(copied), want, got, firstBytes(copied, 100))
	}
}

func firstBytes(s string, n int) string {
	if len(s) <= n {
		return s
	}
	return s[:n] + "…"
}

// rewrite is the rewrite level: in every sentence about a third of the
// words edited (half of the edits a WordNet synonym for a word that has
// one, a quarter deletions, a quarter insertions of a corpus word; a
// synonym edit with no word to replace deletes instead), then some long
// sentences split in two and some neighbours joined into one, then every
// sentence shuffled.
func rewrite(sentences []string, vocab []string, syn synonyms, rng *rand.Rand) string {
	type sentence struct {
		toks []string
		tail string
	}
	var out []sentence
	for _, s := range sentences {
		toks, tail := wordsAndTail(s)
		x := float64(len(toks)) / 3
		n := int(x)
		if rng.Float64() < x-float64(n) {
			n++
		}
		for range n {
			if len(toks) == 0 {
				break
			}
			switch r := rng.IntN(4); {
			case r < 2:
				// A synonym for one of the words that have one.
				var can []int
				for i, w := range toks {
					if len(syn[strings.ToLower(w)]) > 0 {
						can = append(can, i)
					}
				}
				if len(can) > 0 {
					i := can[rng.IntN(len(can))]
					vs := syn[strings.ToLower(toks[i])]
					v := vs[rng.IntN(len(vs))]
					if first, _ := utf8.DecodeRuneInString(toks[i]); unicode.IsUpper(first) {
						v = title(v)
					}
					toks[i] = v
					continue
				}
				fallthrough
			case r == 2:
				if len(toks) > 1 {
					i := rng.IntN(len(toks))
					toks = slices.Delete(toks, i, i+1)
				}
			default:
				i := rng.IntN(len(toks) + 1)
				toks = slices.Insert(toks, i, vocab[rng.IntN(len(vocab))])
			}
		}
		if len(toks) == 0 {
			continue
		}
		if tail == "" {
			tail = "."
		}
		// Split a long sentence in two, a quarter of the time.
		if len(toks) >= 14 && rng.Float64() < 0.25 {
			cut := 5 + rng.IntN(len(toks)-9)
			first := slices.Clone(toks[:cut])
			first[len(first)-1] = strings.TrimRight(first[len(first)-1], ",;:")
			out = append(out, sentence{first, "."})
			toks = toks[cut:]
		}
		out = append(out, sentence{toks, tail})
	}
	// Join a sentence to the one before it, a fifth of the time.
	var joined []sentence
	for _, s := range out {
		if n := len(joined); n > 0 && rng.Float64() < 0.2 {
			prev := &joined[n-1]
			w := s.toks[0]
			if w != "I" && !strings.HasPrefix(w, "I'") {
				r, size := utf8.DecodeRuneInString(w)
				s.toks[0] = string(unicode.ToLower(r)) + w[size:]
			}
			prev.toks[len(prev.toks)-1] += ","
			prev.toks = append(append(prev.toks, "and"), s.toks...)
			prev.tail = s.tail
			continue
		}
		joined = append(joined, s)
	}
	rng.Shuffle(len(joined), func(i, j int) { joined[i], joined[j] = joined[j], joined[i] })
	parts := make([]string, len(joined))
	for i, s := range joined {
		s.toks[0] = title(s.toks[0])
		parts[i] = strings.Join(s.toks, " ") + s.tail
	}
	return strings.Join(parts, " ")
}

// wordsAndTail splits a sentence into its words, the sentence's final
// punctuation taken off the last word and returned apart (so that edits
// keep it at the end).
func wordsAndTail(s string) (toks []string, tail string) {
	toks = strings.Fields(s)
	last := toks[len(toks)-1]
	tail = last
	if k := strings.LastIndexFunc(last, func(r rune) bool { return unicode.IsLetter(r) || unicode.IsDigit(r) }); k >= 0 {
		_, size := utf8.DecodeRuneInString(last[k:])
		tail = last[k+size:]
		toks[len(toks)-1] = last[:k+size]
	} else {
		toks = toks[:len(toks)-1]
	}
	return toks, tail
}
