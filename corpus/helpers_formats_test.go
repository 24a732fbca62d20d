package corpus

import (
	"archive/zip"
	"bytes"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"testing"
	"unicode"
)

// fixture is a committed file under testdata/formats, made by
// scripts/make-fixtures.sh (pandoc 2.17.1.1; PDFs through pandoc -t ms,
// GNU groff 1.22.4 and Ghostscript 10.00.0).
func fixture(t testing.TB, name string) string {
	t.Helper()
	return filepath.Join("testdata", "formats", name)
}

// needPDFToText fails the test in CI and skips it elsewhere when
// pdftotext (Debian package poppler-utils) is not installed.
func needPDFToText(t testing.TB) {
	t.Helper()
	if _, err := exec.LookPath("pdftotext"); err != nil {
		if os.Getenv("CI") != "" {
			t.Fatalf("pdftotext missing (.ci/run installs poppler-utils): %v", err)
		}
		t.Skip("pdftotext missing: apt-get install poppler-utils to run this test")
	}
}

// testOptions are the default options, defaults applied.
func testOptions(t testing.TB) *Options {
	t.Helper()
	o, err := Options{}.withDefaults()
	if err != nil {
		t.Fatal(err)
	}
	return &o
}

// extractBytes runs the whole extraction of one file's bytes, as Read does.
func extractBytes(t testing.TB, name string, raw []byte, opt *Options) []part {
	t.Helper()
	budget := opt.MaxContainerBytes
	return extractFile(name, &input{raw: raw, opt: opt, budget: &budget})
}

// extractOne extracts a file expected to give exactly one document.
func extractOne(t testing.TB, path string, opt *Options) part {
	t.Helper()
	raw, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	budget := opt.MaxContainerBytes
	parts := extractFile(filepath.Base(path), &input{raw: raw, osPath: path, opt: opt, budget: &budget})
	if len(parts) != 1 {
		t.Fatalf("%s: %d parts, want 1: %+v", path, len(parts), parts)
	}
	if parts[0].reason != "" {
		t.Fatalf("%s: skipped: %s", path, parts[0].reason)
	}
	return parts[0]
}

// words is the comparison form of a text: lower-case runs of letters and
// digits, numbers left out (list numbers and page numbers are written
// out by some tools and not by others).
func words(s string) []string {
	var out []string
	for _, f := range strings.FieldsFunc(strings.ToLower(s), func(r rune) bool {
		return !unicode.IsLetter(r) && !unicode.IsDigit(r)
	}) {
		if strings.IndexFunc(f, func(r rune) bool { return !unicode.IsDigit(r) }) >= 0 {
			out = append(out, f)
		}
	}
	return out
}

// zipOf builds a ZIP archive in memory with archive/zip (the reference
// writer of PKWARE APPNOTE 6.3.x in the Go standard library).
func zipOf(t testing.TB, members ...zipMember) []byte {
	t.Helper()
	var buf bytes.Buffer
	zw := zip.NewWriter(&buf)
	for _, m := range members {
		h := &zip.FileHeader{Name: m.name, Method: zip.Deflate}
		if m.store {
			h.Method = zip.Store
		}
		h.Flags = m.flags
		w, err := zw.CreateHeader(h)
		if err != nil {
			t.Fatal(err)
		}
		if _, err := w.Write(m.data); err != nil {
			t.Fatal(err)
		}
	}
	if err := zw.Close(); err != nil {
		t.Fatal(err)
	}
	return buf.Bytes()
}

type zipMember struct {
	name  string
	data  []byte
	store bool
	flags uint16
}

func readFixture(t testing.TB, name string) []byte {
	t.Helper()
	b, err := os.ReadFile(fixture(t, name))
	if err != nil {
		t.Fatal(err)
	}
	return b
}
