package corpus

import (
	"os"
	"path/filepath"
	"testing"
)

// benchFolder is the folder of many small files the walk benchmarks read:
// $REPRISE_BENCH_FOLDER when set, otherwise the 10^5-document corpus that
// `go run ./scripts/bench -work /tmp/rb` writes (100 sub-folders of 1,000
// files of about 6 KB). Without it the benchmarks skip: the corpus is 600
// MB, made by hand, never in CI.
func benchFolder(b *testing.B) string {
	b.Helper()
	dir := os.Getenv("REPRISE_BENCH_FOLDER")
	if dir == "" {
		dir = filepath.Join("/tmp", "rb", "corpus-100000-2026-0.1-v2")
	}
	if fi, err := os.Stat(dir); err != nil || !fi.IsDir() {
		b.Skipf("no benchmark folder %s (set REPRISE_BENCH_FOLDER, or run go run ./scripts/bench -work /tmp/rb -sizes 100000 -generate-only)", dir)
	}
	return dir
}

// BenchmarkReadEachFolder reads a whole folder with a digest that costs
// next to nothing (it sums the text's bytes and drops the text), so what
// is timed is the walk, the reads and the decoding. Run with -benchtime 1x
// and -count 5 or more: one iteration reads every file.
func BenchmarkReadEachFolder(b *testing.B) {
	dir := benchFolder(b)
	var files, size int64
	for b.Loop() {
		docs, sums, _, err := ReadEach([]string{dir}, Options{}, func(_ *Document, loan *Loan) uint64 {
			var s uint64
			text := loan.Text()
			for i := 0; i < len(text); i++ {
				s += uint64(text[i])
			}
			return s
		})
		if err != nil {
			b.Fatal(err)
		}
		files, size = int64(len(docs)), 0
		for i := range docs {
			size += docs[i].Size
		}
		if len(sums) != len(docs) {
			b.Fatalf("%d digests for %d documents", len(sums), len(docs))
		}
	}
	b.ReportMetric(float64(files), "docs")
	b.SetBytes(size)
}

// BenchmarkWalkFolder is the walk alone (list, lstat, sort, de-duplicate),
// the part of BenchmarkReadEachFolder that ReadEach overlaps with reading.
func BenchmarkWalkFolder(b *testing.B) {
	dir := benchFolder(b)
	opt, err := Options{}.withDefaults()
	if err != nil {
		b.Fatal(err)
	}
	n := 0
	for b.Loop() {
		w := walker{opt: opt}
		w.arg(dir)
		w.sortAndDedupe()
		n = len(w.entries)
	}
	b.ReportMetric(float64(n), "entries")
}
