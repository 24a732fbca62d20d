package corpus

import (
	"bytes"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// billionLaughs is the classic entity-expansion attack (as described in
// the W3C XML 1.0 security discussion and CVE-2003-1564), cut to three
// levels: each level would expand ten times the one below it.
const billionLaughs = `<?xml version="1.0"?>
<!DOCTYPE lolz [
 <!ENTITY lol "lol">
 <!ENTITY lol2 "&lol;&lol;&lol;&lol;&lol;&lol;&lol;&lol;&lol;&lol;">
 <!ENTITY lol3 "&lol2;&lol2;&lol2;&lol2;&lol2;&lol2;&lol2;&lol2;&lol2;&lol2;">
]>
<w:document xmlns:w="http://schemas.openxmlformats.org/wordprocessingml/2006/main"><w:body><w:p><w:r><w:t>&lol3;</w:t></w:r></w:p></w:body></w:document>`

// nestedDocx is a DOCX whose document.xml nests w:p's children n deep.
func nestedDocx(t testing.TB, n int) []byte {
	x := `<w:document xmlns:w="` + nsW + `"><w:body><w:p>` + strings.Repeat("<w:r>", n) + `<w:t>deep</w:t>` + strings.Repeat("</w:r>", n) + `</w:p></w:body></w:document>`
	return zipOf(t, zipMember{name: "[Content_Types].xml", data: []byte("<Types/>")}, zipMember{name: "word/document.xml", data: []byte(x)})
}

// TestHostileFiles: every bad file is skipped with a reason that says what
// was wrong (checked by a phrase of it), and never stops the others.
func TestHostileFiles(t *testing.T) {
	docx := readFixture(t, "essay/essay.docx")
	bomb := zipOf(t, zipMember{name: "zeros.txt", data: make([]byte, 8<<20)}) // deflates about 1000:1
	tests := []struct {
		name, file string
		raw        []byte
		pdf        bool
		reason     string
	}{
		{"truncated ZIP", "half.zip", docx[:len(docx)/2], false, "damaged ZIP archive: not a valid ZIP file"},
		{"truncated DOCX", "half.docx", docx[:len(docx)/2], false, "damaged ZIP archive: not a valid ZIP file"},
		{"ZIP bomb is refused unread", "bomb.zip", bomb, false, "compression ratio 1"},
		{"DOCX without document.xml", "empty.docx", zipOf(t, zipMember{name: "[Content_Types].xml", data: []byte("<Types/>")}), false, "damaged DOCX: no word/document.xml"},
		{"billion laughs in a DOCX", "lol.docx", zipOf(t, zipMember{name: "word/document.xml", data: []byte(billionLaughs)}), false, "declares entities"},
		{"XML nested too deep", "deep.docx", nestedDocx(t, 1000), false, "nests elements more than 256 deep"},
		{"HTML nested too deep", "deep.html", []byte("<!doctype html>" + strings.Repeat("<div>", 100000)), false, "HTML nests elements more than 256 deep"},
		{"RTF nested too deep", "deep.rtf", []byte(`{\rtf1 ` + strings.Repeat("{", 10000)), false, "RTF nests groups more than 256 deep"},
		{"PDF that pdftotext rejects", "broken.pdf", []byte("%PDF-1.4\nthis is not a PDF body\n"), true, "pdftotext could not read this PDF (exit status 1"},
		{"text named .docx", "notes.docx", []byte("Just some words.\n"), false, "not a DOCX file: no ZIP signature"},
		{"text named .epub", "notes.epub", []byte("Just some words.\n"), false, "not an EPUB file"},
		{"password-protected ZIP member", "locked.zip", zipOf(t, zipMember{name: "secret.txt", data: []byte("hidden words"), flags: 0x1}), false, reasonEncrypted},
		{"zero-byte file", "empty.pdf", nil, false, reasonEmpty},
		{"zero-byte DOCX", "empty2.docx", []byte{}, false, reasonEmpty},
		{"malformed e-mail header", "bad.eml", []byte("From a@example.org\nno colon here\n"), false, "malformed e-mail"},
		{"EPUB without container.xml", "book.epub", zipOf(t, zipMember{name: "mimetype", data: []byte("application/epub+zip"), store: true}), false, "damaged EPUB: no META-INF/container.xml"},
	}
	dir := t.TempDir()
	for _, tc := range tests {
		if err := os.WriteFile(filepath.Join(dir, tc.file), tc.raw, 0o644); err != nil {
			t.Fatal(err)
		}
	}
	good := readFixture(t, "memo/memo.docx")
	if err := os.WriteFile(filepath.Join(dir, "zz-good.docx"), good, 0o644); err != nil {
		t.Fatal(err)
	}
	docs, skipped, err := Read([]string{dir}, Options{})
	if err != nil {
		t.Fatal(err)
	}
	if len(docs) != 1 || !strings.HasSuffix(docs[0].Path, "zz-good.docx") {
		t.Fatalf("documents %v, want only zz-good.docx", docs)
	}
	reasons := map[string]string{}
	for _, s := range skipped {
		reasons[filepath.Base(strings.SplitN(s.Path, "!/", 2)[0])] = s.Reason
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			if tc.pdf {
				needPDFToText(t)
			}
			got, ok := reasons[tc.file]
			if !ok {
				t.Fatalf("%s not listed as skipped", tc.file)
			}
			if !strings.Contains(got, tc.reason) {
				t.Fatalf("reason %q, want it to contain %q", got, tc.reason)
			}
		})
	}
}

// TestMissingPDFToText: without pdftotext each PDF is skipped, the reason
// naming the Debian package to install.
func TestMissingPDFToText(t *testing.T) {
	opt := testOptions(t)
	opt.PDFToText = filepath.Join(t.TempDir(), "no-such-pdftotext")
	for _, p := range extractBytes(t, "essay.pdf", readFixture(t, "essay/essay.pdf"), opt) {
		if p.reason != reasonNoPDFToText || !strings.Contains(p.reason, "poppler-utils") {
			t.Fatalf("reason %q, want %q", p.reason, reasonNoPDFToText)
		}
	}
}

// TestArchiveLimits: each limit refuses what exceeds it, with its flag
// named, and lets through what does not.
func TestArchiveLimits(t *testing.T) {
	kib := bytes.Repeat([]byte("The crew rowed out past the harbour wall. "), 50) // 2100 bytes
	three := zipOf(t, zipMember{name: "a.txt", data: kib}, zipMember{name: "b.txt", data: kib}, zipMember{name: "c.txt", data: kib})
	tests := []struct {
		name   string
		set    func(*Options)
		read   int    // documents expected
		reason string // in every skipped part, "" for none
	}{
		{"defaults read all three", func(*Options) {}, 3, ""},
		{"members limit refuses the archive", func(o *Options) { o.MaxMembers = 2 }, 0, "3 members, more than the limit of 2 (--max-members)"},
		{"member size limit", func(o *Options) { o.MaxMemberBytes = 2048 }, 0, "larger than the 2 KiB limit (--max-member-size)"},
		{"container budget stops after two", func(o *Options) { o.MaxContainerBytes = 5000 }, 2, "(--max-container-size)"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			opt := testOptions(t)
			tc.set(opt)
			read := 0
			for _, p := range extractBytes(t, "three.zip", three, opt) {
				if p.reason == "" {
					read++
					continue
				}
				if tc.reason == "" || !strings.Contains(p.reason, tc.reason) {
					t.Errorf("%s: reason %q, want %q", p.sub, p.reason, tc.reason)
				}
			}
			if read != tc.read {
				t.Fatalf("%d documents read, want %d", read, tc.read)
			}
		})
	}
}

// TestZipMembers: members are named archive!/path, nested archives one
// level deep, in name order; folders give nothing; hidden members and
// second members of one name are listed, not read; members are never
// written to disk (the archive's folder is unchanged).
func TestZipMembers(t *testing.T) {
	text := []byte("The loan book stays on the desk by the door.\n")
	inner := zipOf(t, zipMember{name: "deep/note.txt", data: text},
		zipMember{name: "deeper.zip", data: zipOf(t, zipMember{name: "x.txt", data: text})})
	outer := zipOf(t,
		zipMember{name: "sub/", data: nil},
		zipMember{name: "sub/memo.docx", data: readFixture(t, "memo/memo.docx")},
		zipMember{name: "a.txt", data: text},
		zipMember{name: "a.txt", data: []byte("a second member of the same name")},
		zipMember{name: "__MACOSX/._a.txt", data: []byte{0, 5, 22, 7}},
		zipMember{name: "inner.zip", data: inner},
		zipMember{name: "../escape.txt", data: text},
	)
	dir := t.TempDir()
	for name, raw := range map[string][]byte{"b.zip": outer, "b.zip.txt": text, "a.txt": text} {
		if err := os.WriteFile(filepath.Join(dir, name), raw, 0o644); err != nil {
			t.Fatal(err)
		}
	}
	d := filepath.ToSlash(dir)
	// The folder and the archive itself: the archive is read once.
	docs, skipped, err := Read([]string{dir, filepath.Join(dir, "b.zip")}, Options{})
	if err != nil {
		t.Fatal(err)
	}
	var got []string
	for i, doc := range docs {
		if doc.ID != i {
			t.Errorf("document %s has ID %d at index %d", doc.Path, doc.ID, i)
		}
		got = append(got, strings.TrimPrefix(filepath.ToSlash(doc.Path), d+"/")+" "+doc.Format)
	}
	want := []string{
		"a.txt text",
		"b.zip!/../escape.txt text",
		"b.zip!/a.txt text",
		"b.zip!/inner.zip!/deep/note.txt text",
		"b.zip!/sub/memo.docx docx",
		"b.zip.txt text",
	}
	if strings.Join(got, "\n") != strings.Join(want, "\n") {
		t.Fatalf("documents:\n%s\nwant:\n%s", strings.Join(got, "\n"), strings.Join(want, "\n"))
	}
	var gotSkip []string
	for _, s := range skipped {
		gotSkip = append(gotSkip, strings.TrimPrefix(filepath.ToSlash(s.Path), d+"/")+": "+s.Reason)
	}
	wantSkip := []string{
		"b.zip!/__MACOSX/._a.txt: " + reasonZipHidden,
		"b.zip!/a.txt: " + reasonZipDup,
		"b.zip!/inner.zip!/deeper.zip: " + reasonZipDeep,
	}
	if strings.Join(gotSkip, "\n") != strings.Join(wantSkip, "\n") {
		t.Fatalf("skipped:\n%s\nwant:\n%s", strings.Join(gotSkip, "\n"), strings.Join(wantSkip, "\n"))
	}
	ents, _ := os.ReadDir(dir)
	if len(ents) != 3 {
		t.Fatalf("the archive's folder now has %d entries, want the 3 written", len(ents))
	}
	if _, err := os.Stat(filepath.Join(filepath.Dir(dir), "escape.txt")); err == nil {
		t.Fatal("a member was written outside the folder")
	}
}

// TestPDFInZip: a PDF member goes to pdftotext through a private temporary
// file, which is removed afterwards.
func TestPDFInZip(t *testing.T) {
	needPDFToText(t)
	tmp := t.TempDir()
	t.Setenv("TMPDIR", tmp)
	opt := testOptions(t)
	parts := extractBytes(t, "a.zip", zipOf(t, zipMember{name: "essay.pdf", data: readFixture(t, "essay/essay.pdf")}), opt)
	if len(parts) != 1 || parts[0].reason != "" || parts[0].format != "pdf" {
		t.Fatalf("parts %+v, want one PDF", parts)
	}
	if m := markAt(parts[0].Marks, strings.Index(parts[0].Text, "A roof is a harsh place")); m.Page != 2 {
		t.Fatalf("planted paragraph on page %d, want 2", m.Page)
	}
	if ents, _ := os.ReadDir(tmp); len(ents) != 0 {
		t.Fatalf("temporary files left behind: %v", ents)
	}
}
