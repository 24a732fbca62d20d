package scan

import (
	"context"
	"os"
	"path/filepath"
	"syscall"
	"testing"
	"time"

	"reprise/archive"
	"reprise/corpus"
	"reprise/shingle"
)

// BenchmarkAddFolder reads, splits and adds the folder named by
// REPRISE_BENCH_ARCHIVE_CORPUS (a corpus of scripts/bench-archive, say) to
// a new archive, as `reprise archive add` does, and reports the phases'
// wall and CPU seconds; it is skipped without the variable. For a CPU
// profile of an add (BENCHMARKS.md):
//
//	REPRISE_BENCH_ARCHIVE_CORPUS=/tmp/rba/corpus-100000-2026 \
//	  go test -run '^$' -bench AddFolder -benchtime 1x -cpuprofile cpu.prof ./scan
func BenchmarkAddFolder(b *testing.B) {
	dir := os.Getenv("REPRISE_BENCH_ARCHIVE_CORPUS")
	if dir == "" {
		b.Skip("REPRISE_BENCH_ARCHIVE_CORPUS names no corpus folder")
	}
	cpu := func() float64 {
		var ru syscall.Rusage
		syscall.Getrusage(syscall.RUSAGE_SELF, &ru)
		return float64(ru.Utime.Nano()+ru.Stime.Nano()) / 1e9
	}
	sopt := shingle.Options{}
	for i := range b.N {
		ar, err := archive.Open(filepath.Join(b.TempDir(), "ar", string(rune('a'+i%26))), archive.Options{Settings: archive.SettingsFor(sopt), Create: true})
		if err != nil {
			b.Fatal(err)
		}
		c0, t0 := cpu(), time.Now()
		batch, err := ReadBatch(context.Background(), []string{dir}, corpus.Options{Jobs: 2}, sopt, ar)
		if err != nil {
			b.Fatal(err)
		}
		c1, t1 := cpu(), time.Now()
		if _, err := AddBatch(context.Background(), ar, batch, nil); err != nil {
			b.Fatal(err)
		}
		c2, t2 := cpu(), time.Now()
		if err := ar.Close(); err != nil {
			b.Fatal(err)
		}
		b.ReportMetric(t1.Sub(t0).Seconds(), "read-s")
		b.ReportMetric(t2.Sub(t1).Seconds(), "add-s")
		b.ReportMetric(time.Since(t2).Seconds(), "close-s")
		b.ReportMetric(c1-c0, "read-cpu-s")
		b.ReportMetric(c2-c1, "add-cpu-s")
		b.ReportMetric(cpu()-c2, "close-cpu-s")
	}
}
