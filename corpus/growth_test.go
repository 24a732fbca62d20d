package corpus

import (
	"bytes"
	"fmt"
	"runtime"
	"slices"
	"strings"
	"testing"
	"time"

	"reprise/internal/hostile"
)

// The growth check: every extractor on every shape of internal/hostile at
// n, 2n and 4n repetitions. It is a benchmark, not a timed test (the
// machine's load says nothing about the code). BenchmarkHostileGrowth has
// one sub-benchmark per shape and size, for ns/op and B/op as usual;
// BenchmarkHostileRatios measures the three sizes of a shape in
// alternation, round after round, and reports the growth per doubling
// (medians over the rounds) as metrics, which is what go run
// ./scripts/hostile -table runs several times and prints (BENCHMARKS.md,
// "Hostile inputs"): linear code shows 2x, and 2.5x is the bound the table
// checks. Measuring the sizes one after the other instead made the ratios
// follow the load of the shared machine more than the code. It measures
// each shape at two scales, past the caches and within them (see
// BenchmarkHostileRatios); the instructions, which no load changes, are
// counted by go run ./scripts/hostile -instructions.
//
//	go test -run '^$' -bench BenchmarkHostileGrowth -benchtime 10x -count 5 ./corpus
//	go test -run '^$' -bench BenchmarkHostileRatios -benchtime 9x -count 5 ./corpus

// extractShape reads one hostile file as Read does (a .jsonl file
// streamed line by line; otherwise a copy of raw, as readFile reads a file
// into a buffer of its own, owned by the extraction: a plain text is that
// buffer, a Markdown text that buffer blanked in place), under the
// deadline dl. raw itself is never written to.
func extractShape(tb testing.TB, s hostile.Shape, raw []byte, opt *Options, dl *deadline) []part {
	tb.Helper()
	if s.Format == "jsonl" {
		parts, _, err := scanJSONL(bytes.NewReader(raw), opt)
		if err != nil {
			tb.Fatal(err)
		}
		return parts
	}
	budget := opt.MaxContainerBytes
	return extractFile("hostile"+s.Ext, &input{raw: bytes.Clone(raw), opt: opt, budget: &budget, dl: dl, owned: true})
}

func makeShape(tb testing.TB, s hostile.Shape, n int) []byte {
	tb.Helper()
	raw, err := s.Make(n)
	if err != nil {
		tb.Fatalf("%s: %v", s.Name, err)
	}
	return raw
}

func BenchmarkHostileGrowth(b *testing.B) {
	opt := testOptions(b)
	for _, s := range hostile.Shapes() {
		for _, mult := range []int{1, 2, 4} {
			n := s.Base * mult
			b.Run(fmt.Sprintf("%s/n=%d", s.Name, n), func(b *testing.B) {
				raw := makeShape(b, s, n)
				b.SetBytes(int64(len(raw)))
				b.ReportAllocs()
				for b.Loop() {
					extractShape(b, s, raw, opt, newDeadline(opt.FileTimeout))
				}
			})
		}
	}
}

// BenchmarkHostileRatios reports, per shape, t2n/n and t4n/2n (time of
// one read at 2n over n, 4n over 2n: medians over the rounds, the reads
// run with the collector on, as reprise runs them; see hostileRatios), the
// time per input byte at each size (nsB-n, nsB-2n, nsB-4n), a2n/n and
// a4n/2n (bytes allocated by one read, counted by the runtime) and
// faults-at-4n (page faults of the process during one 4n read, Linux). The
// time is the processor time of the whole process (processTime; the wall
// clock where there is none), so that the collection a read's garbage
// costs is charged to it: on a shared machine the wall clock also counts
// the time other work held the processor, which made single ratios swing
// from 0.5 to 6 between runs.
//
// Each shape is measured at two scales. "big" is n = Shape.Base, files of
// 0.5 to 2.5 MiB at n that allocate up to 55 MiB at 4n: past the caches,
// where each doubling can also move the work further out (the shapes whose
// reads build a map or a slice of one entry per element: a header field, a
// namespace, a paragraph's mark) and the time per byte grows with the
// size although the instructions do not (scripts/hostile -instructions
// counts them). "cache" is the largest n = Base/2^k at which the 4n
// read's input and allocations together stay within cacheFootprint, so
// that all three sizes run from the processor's second-level cache and a
// ratio above 2 can only come from the code. Both are in BENCHMARKS.md.
func BenchmarkHostileRatios(b *testing.B) {
	opt := testOptions(b)
	for _, s := range hostile.Shapes() {
		b.Run(s.Name, func(b *testing.B) {
			big := makeShape(b, s, s.Base)
			runtime.GC()
			footprint := float64(len(big)) + allocOf(b, s, big, opt)
			small := s.Base
			for small > 1 && 4*footprint*float64(small)/float64(s.Base) > cacheFootprint {
				small /= 2
			}
			b.Run("big", func(b *testing.B) { hostileRatios(b, s, s.Base, opt) })
			b.Run("cache", func(b *testing.B) { hostileRatios(b, s, small, opt) })
		})
	}
}

// cacheFootprint is the most input and allocated bytes the 4n read of the
// "cache" scale may touch: half the 1 MiB second-level cache of one core of
// the development machine (AMD EPYC, lscpu), the rest left to the
// program, its stack and the runtime.
const cacheFootprint = 512 << 10

// allocOf returns the bytes one read of raw allocates.
func allocOf(tb testing.TB, s hostile.Shape, raw []byte, opt *Options) float64 {
	var m0, m1 runtime.MemStats
	runtime.ReadMemStats(&m0)
	extractShape(tb, s, raw, opt, newDeadline(opt.FileTimeout))
	runtime.ReadMemStats(&m1)
	return float64(m1.TotalAlloc - m0.TotalAlloc)
}

// hostileRatios measures shape s at n, 2n and 4n, in alternation, b.N
// rounds, and reports the metrics of BenchmarkHostileRatios.
func hostileRatios(b *testing.B, s hostile.Shape, n int, opt *Options) {
	clock := func() time.Duration {
		if t, ok := processTime(); ok {
			return t
		}
		return time.Duration(time.Now().UnixNano())
	}
	var raws [3][]byte
	for k := range raws {
		raws[k] = makeShape(b, s, n<<k)
	}
	var alloc [3]float64
	for k, raw := range raws {
		runtime.GC()
		alloc[k] = allocOf(b, s, raw, opt)
	}
	var times, faults [3][]float64
	// The reads run as reprise runs them, with the collector on and no
	// collection forced between them. A collection forced before every
	// read (and the collector off during it, as an earlier version did)
	// made the largest size of every shape 1.5 to 4 times slower per byte
	// than the two smaller ones, even for reads of a few kilobytes that
	// run from the cache: the largest read had to take its memory back
	// from the runtime each time, which is the harness's cost, not the
	// extractor's. With the collector on, a read may pay for collecting an
	// earlier read's garbage, and a heap sized for the previous, smaller
	// read must grow again: each timed read follows an untimed one of the
	// same size, so that it starts from the heap a run of such files
	// settles at. The sizes are read in a rotating order (round r starts
	// at size r mod 3), so that each follows each of the others equally
	// often, and the median over the rounds is taken.
	round := 0
	for b.Loop() {
		for j := range raws {
			k := (round + j) % len(raws)
			extractShape(b, s, raws[k], opt, newDeadline(opt.FileTimeout)) // the heap settles at this size
			f0 := processFaults()
			start := clock()
			extractShape(b, s, raws[k], opt, newDeadline(opt.FileTimeout))
			times[k] = append(times[k], float64(clock()-start))
			faults[k] = append(faults[k], float64(processFaults()-f0))
		}
		round++
	}
	median := func(v []float64) float64 {
		slices.Sort(v)
		return v[len(v)/2]
	}
	var med, flt [3]float64
	for k := range times {
		med[k], flt[k] = median(times[k]), median(faults[k])
	}
	b.ReportMetric(med[0]/1e6, "ms-at-n")
	b.ReportMetric(med[1]/med[0], "t2n/n")
	b.ReportMetric(med[2]/med[1], "t4n/2n")
	for k, name := range []string{"nsB-n", "nsB-2n", "nsB-4n"} {
		b.ReportMetric(med[k]/float64(len(raws[k])), name)
	}
	b.ReportMetric(alloc[0], "alloc-at-n")
	b.ReportMetric(alloc[1]/alloc[0], "a2n/n")
	b.ReportMetric(alloc[2]/alloc[1], "a4n/2n")
	b.ReportMetric(flt[2], "faults-at-4n")
	b.ReportMetric(float64(len(raws[0])), "bytes-at-n")
	b.ReportMetric(float64(n), "n")
}

// wantFormat is the format of the documents a shape gives: a ZIP archive's
// members are text files.
func wantFormat(s hostile.Shape) string {
	if s.Format == "zip" {
		return "text"
	}
	return s.Format
}

// testN is the repetition count the tests read a shape at: a 64th of the
// growth check's, but the full count for a shape that must be refused
// (its nesting must pass the depth limit).
func testN(s hostile.Shape) int {
	if s.Refused {
		return s.Base
	}
	return max(1, s.Base/64)
}

// TestHostileShapes: each shape at its test size is read as its format
// (documents of that format, no skipped part) or, when it must be refused,
// skipped with a reason naming the limit; and each extractor asks the
// deadline as it goes: under one that has already passed it stops at the
// first question and the file is skipped saying so, where a live one is
// asked at every step.
func TestHostileShapes(t *testing.T) {
	opt := testOptions(t)
	for _, s := range hostile.Shapes() {
		t.Run(s.Name, func(t *testing.T) {
			raw := makeShape(t, s, testN(s))
			if n2 := len(makeShape(t, s, 2*testN(s))); n2 < 2*len(raw)*8/10 || n2 > 2*len(raw)*12/10 {
				t.Errorf("size at 2n is %d bytes, at n %d: the shape does not grow linearly", n2, len(raw))
			}
			live := newDeadline(time.Hour)
			parts := extractShape(t, s, raw, opt, live)
			docs := 0
			for _, p := range parts {
				switch {
				case s.Refused && p.reason == "":
					t.Fatalf("%s gave a document, want it refused", p.sub)
				case s.Refused && !strings.Contains(p.reason, "(--max-depth)"):
					t.Fatalf("refused for %q, want the depth limit", p.reason)
				case !s.Refused && p.reason != "":
					t.Fatalf("%s skipped: %s", p.sub, p.reason)
				case p.reason == "":
					docs++
					if p.format != wantFormat(s) {
						t.Fatalf("%s read as %s, want %s", p.sub, p.format, wantFormat(s))
					}
				}
			}
			if !s.Refused && docs == 0 {
				t.Fatal("no document")
			}
			if s.Format == "jsonl" {
				return // per-line deadlines: TestFileTimeoutSkips
			}
			past := &deadline{at: time.Now().Add(-time.Second), timeout: time.Nanosecond}
			for _, p := range extractShape(t, s, raw, opt, past) {
				if p.reason != timedOutReason(time.Nanosecond) {
					t.Fatalf("%s under a passed deadline: reason %q", p.sub, p.reason)
				}
			}
			if past.calls > 1 {
				t.Errorf("the extractor asked a passed deadline %d times, want it to stop at the first", past.calls)
			}
			// Every extractor asks at each step of its own (a line, a
			// token, a group, a member), at least once per 128 KiB, but
			// two: plain text is one pass of the runtime's byte loops,
			// asked once done (extractFile), and an e-mail's header is one
			// call of net/mail, asked per MIME part.
			if s.Format != "text" && s.Format != "email" && !s.Refused && int(live.calls) < max(2, len(raw)>>17) {
				t.Errorf("the extractor asked a live deadline %d times for %d bytes, want it asked as it goes", live.calls, len(raw))
			}
		})
	}
}
