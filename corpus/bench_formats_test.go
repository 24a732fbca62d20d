package corpus

import (
	"path/filepath"
	"strings"
	"testing"

	"reprise/internal/brown"
	"reprise/internal/refdata"
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
		benchExtractBytes(b, "all.zip", zipOf(b, ms...))
	})
	b.Run("eml", func(b *testing.B) {
		// A message of ordinary shape: seven header fields and a
		// multipart/alternative body of the essay as plain text and as HTML.
		var m strings.Builder
		m.WriteString("From: Ada Reviewer <ada@example.org>\r\nTo: Editors <desk@example.org>\r\n" +
			"Subject: Essay for the spring issue\r\nDate: Thu, 03 Dec 2026 09:30:00 +0000\r\n" +
			"Message-ID: <essay-1@example.org>\r\nMIME-Version: 1.0\r\n" +
			"Content-Type: multipart/alternative; boundary=\"part-boundary\"\r\n\r\n")
		for _, p := range []struct{ ext, media string }{{"txt", "text/plain"}, {"html", "text/html"}} {
			m.WriteString("--part-boundary\r\nContent-Type: " + p.media + "; charset=utf-8\r\n\r\n")
			m.Write(readFixture(b, filepath.Join("essay", "essay."+p.ext)))
			m.WriteString("\r\n")
		}
		m.WriteString("--part-boundary--\r\n")
		benchExtractBytes(b, "essay.eml", []byte(m.String()))
	})
}

// benchExtractBytes times extractBytes on raw as a file called name,
// failing on any part that is skipped.
func benchExtractBytes(b *testing.B, name string, raw []byte) {
	opt := testOptions(b)
	b.SetBytes(int64(len(raw)))
	b.ReportAllocs()
	for b.Loop() {
		for _, p := range extractBytes(b, name, raw, opt) {
			if p.reason != "" {
				b.Fatal(p.sub, p.reason)
			}
		}
	}
}

// brownTextFiles cuts the first samples of the Brown corpus (fetched by
// scripts/fetch-data.sh into .cache/data/brown; untagged by internal/brown)
// into files of about size bytes, each ending at a line end, until total
// bytes are collected. The files are the plain .txt a user would give: one
// sentence per line, blank lines between paragraphs, curly quotes (UTF-8).
func brownTextFiles(tb testing.TB, size, total int) [][]byte {
	tb.Helper()
	samples, err := brown.Load(refdata.Path(tb, "brown"))
	if err != nil {
		tb.Fatal(err)
	}
	var files [][]byte
	var cur []byte
	n := 0
	for _, s := range samples {
		for line := range strings.Lines(s.Text) {
			cur = append(cur, line...)
			if len(cur) >= size {
				files = append(files, cur)
				n += len(cur)
				cur = nil
				if n >= total {
					return files
				}
			}
		}
	}
	tb.Fatalf("the Brown corpus gave only %d bytes, want %d", n, total)
	return nil
}

// BenchmarkExtractBrownText measures what reading a corpus of plain .txt
// files costs per file once its bytes are in memory: 64 files of about
// 5.5 KB of Brown-corpus English (63 files, 351 KB), each through
// extractFile as Read does (format detection, then decoding), and the two
// stages alone:
//
//	go test -run '^$' -bench BenchmarkExtractBrownText -count 6 ./corpus
func BenchmarkExtractBrownText(b *testing.B) {
	files := brownTextFiles(b, 5500, 350_000)
	total := 0
	for _, f := range files {
		total += len(f)
	}
	opt := testOptions(b)
	b.Run("extractFile", func(b *testing.B) {
		b.SetBytes(int64(total))
		b.ReportAllocs()
		for b.Loop() {
			for _, raw := range files {
				budget := opt.MaxContainerBytes
				ps := extractFile("sample.txt", &input{raw: raw, opt: opt, budget: &budget})
				if len(ps) != 1 || ps[0].reason != "" || ps[0].format != "text" || len(ps[0].Text) != len(raw) {
					b.Fatalf("extractFile: %+v", ps)
				}
			}
		}
	})
	b.Run("choose", func(b *testing.B) {
		b.SetBytes(int64(total))
		b.ReportAllocs()
		for b.Loop() {
			for _, raw := range files {
				if x := choose("sample.txt", raw); x == nil || x.format() != "text" {
					b.Fatalf("choose: %v", x)
				}
			}
		}
	})
	b.Run("decode", func(b *testing.B) {
		b.SetBytes(int64(total))
		b.ReportAllocs()
		for b.Loop() {
			for _, raw := range files {
				if _, err := decode(raw, nil); err != nil {
					b.Fatal(err)
				}
			}
		}
	})
}
