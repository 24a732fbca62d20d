package corpus

import (
	"path/filepath"
	"testing"
)

// BenchmarkExtract measures extraction throughput per format on the
// committed essay fixtures (bytes of the file per second, as MB/s):
//
//	go test -run '^$' -bench BenchmarkExtract -benchtime 2s ./corpus
//
// The files are small (2 to 11 KB), so fixed costs (opening the ZIP
// directory, starting pdftotext) weigh more than they would on a long
// document.
func BenchmarkExtract(b *testing.B) {
	for _, ext := range []string{"txt", "docx", "odt", "epub", "html", "rtf", "pdf"} {
		b.Run(ext, func(b *testing.B) {
			if ext == "pdf" {
				needPDFToText(b)
			}
			path := fixture(b, filepath.Join("essay", "essay."+ext))
			raw := readFixture(b, filepath.Join("essay", "essay."+ext))
			opt := testOptions(b)
			b.SetBytes(int64(len(raw)))
			b.ReportAllocs()
			for b.Loop() {
				budget := opt.MaxContainerBytes
				ps := extractFile(path, &input{raw: raw, osPath: path, opt: opt, budget: &budget})
				if ps[0].reason != "" {
					b.Fatal(ps[0].reason)
				}
			}
		})
	}
	b.Run("zip", func(b *testing.B) {
		var ms []zipMember
		for _, ext := range []string{"txt", "docx", "odt", "epub", "html", "rtf"} {
			ms = append(ms, zipMember{name: "essay." + ext, data: readFixture(b, filepath.Join("essay", "essay."+ext))})
		}
		raw := zipOf(b, ms...)
		opt := testOptions(b)
		b.SetBytes(int64(len(raw)))
		b.ReportAllocs()
		for b.Loop() {
			for _, p := range extractBytes(b, "all.zip", raw, opt) {
				if p.reason != "" {
					b.Fatal(p.sub, p.reason)
				}
			}
		}
	})
}
