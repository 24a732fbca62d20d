package corpus

import (
	"strings"
	"testing"
	"unicode/utf8"

	"reprise/internal/hostile"
)

// Fuzz targets, one per extractor of untrusted input. Each is seeded with
// the committed fixtures (valid), a truncated and a bit-flipped copy of
// them (broken), the hostile cases of TestHostileFiles and the shapes of
// internal/hostile for its format (seedHostile), and checks what
// must hold for every input: no panic, no hang (bounded by the limits
// below), valid UTF-8 text, marks in order inside the text. Run one with
// e.g. go test -run '^$' -fuzz FuzzExtractDOCX -fuzztime 10s ./corpus;
// crashers found are kept under testdata/fuzz/ as regression cases.

// fuzzOptions are small limits, so that each input is cheap.
func fuzzOptions(t testing.TB) *Options {
	o := testOptions(t)
	o.MaxMemberBytes = 1 << 20
	o.MaxContainerBytes = 4 << 20
	o.MaxMembers = 200
	return o
}

// seedHostile adds the shapes of internal/hostile for a format: small (16
// repetitions), and those that must be refused just past the default
// depth limit.
func seedHostile(f *testing.F, format string) {
	for _, s := range hostile.Shapes() {
		if s.Format != format {
			continue
		}
		n := 16
		if s.Refused {
			n = DefaultMaxDepth + 44
		}
		raw, err := s.Make(n)
		if err != nil {
			f.Fatal(err)
		}
		f.Add(raw)
	}
}

func seed(f *testing.F, files ...string) {
	for _, name := range files {
		raw := readFixture(f, name)
		f.Add(raw)
		f.Add(raw[:len(raw)/2])
		flipped := []byte(string(raw))
		for i := 64; i < len(flipped); i += 97 {
			flipped[i] ^= 0x20
		}
		f.Add(flipped)
	}
}

// checkExtraction: the invariants of any extraction.
func checkExtraction(t *testing.T, x extraction, err error) {
	if err != nil {
		return
	}
	if !utf8.ValidString(x.Text) {
		t.Fatalf("text is not valid UTF-8: %q", x.Text)
	}
	for i, m := range x.Marks {
		if m.Offset < 0 || m.Offset > len(x.Text) || (i > 0 && m.Offset < x.Marks[i-1].Offset) {
			t.Fatalf("mark %d %+v out of order or outside the text (%d bytes)", i, m, len(x.Text))
		}
	}
}

func fuzzExtractor(f *testing.F, x extractor) {
	f.Fuzz(func(t *testing.T, raw []byte) {
		opt := fuzzOptions(t)
		budget := opt.MaxContainerBytes
		e, err := x.extract(&input{raw: raw, opt: opt, budget: &budget})
		checkExtraction(t, e, err)
	})
}

func FuzzExtractDOCX(f *testing.F) {
	seed(f, "essay/essay.docx", "policy/policy.docx")
	f.Add(nestedDocx(f, 300))
	f.Add(zipOf(f, zipMember{name: "word/document.xml", data: []byte(billionLaughs)}))
	seedHostile(f, "docx")
	fuzzExtractor(f, docxText{})
}

func FuzzExtractODT(f *testing.F) {
	seed(f, "essay/essay.odt", "policy/policy.odt")
	seedHostile(f, "odt")
	fuzzExtractor(f, odtText{})
}

func FuzzExtractEPUB(f *testing.F) {
	seed(f, "essay/essay.epub", "policy/policy.epub")
	seedHostile(f, "epub")
	fuzzExtractor(f, epubText{})
}

func FuzzExtractHTML(f *testing.F) {
	seed(f, "essay/essay.html", "policy/policy.html")
	f.Add([]byte("<!doctype html>" + strings.Repeat("<div>", 300)))
	f.Add([]byte("<meta charset=shift_jis><p>\x82\xa0</p>"))
	seedHostile(f, "html")
	fuzzExtractor(f, htmlText{})
}

func FuzzExtractRTF(f *testing.F) {
	seed(f, "essay/essay.rtf", "policy/policy.rtf")
	f.Add([]byte(`{\rtf1\ansi\ansicpg932\uc2 \u-3913\'82\'a0x\bin99999 {{{`))
	seedHostile(f, "rtf")
	fuzzExtractor(f, rtfText{})
}

func FuzzExtractEmail(f *testing.F) {
	f.Add([]byte("From: a@example.org\r\nDate: Mon, 4 Mar 2024 09:30:00 +0000\r\nSubject: =?utf-8?q?caf=C3=A9?=\r\n\r\nBody\r\n> quoted\r\n"))
	f.Add([]byte("From: a@example.org\r\nContent-Type: multipart/mixed; boundary=b\r\n\r\n--b\r\nContent-Type: text/html; charset=koi8-r\r\nContent-Transfer-Encoding: base64\r\n\r\nPHA+aGk8L3A+\r\n--b--\r\n"))
	f.Add([]byte("From: a@example.org\r\nContent-Type: multipart/mixed; boundary=b\r\n\r\n--b\r\nContent-Type: multipart/mixed; boundary=b\r\n\r\n--b\r\n"))
	seedHostile(f, "email")
	fuzzExtractor(f, emailText{})
}

// FuzzExtractPDF fuzzes what reprise itself parses of a PDF: the output of
// pdftotext (pages split on form feeds, paragraphs by blank lines and the
// short-line rule). PDF parsing is pdftotext's, not ours; running it per
// fuzz input would measure poppler, not this code.
func FuzzExtractPDF(f *testing.F) {
	f.Add([]byte("Title\nFirst line of text that is long enough to set the width.\nShort\nNext\f\fPage three\n"))
	f.Add([]byte("\f\f\f"))
	f.Add([]byte("a\xffb\n\nc\f"))
	f.Fuzz(func(t *testing.T, out []byte) {
		w := &paraWriter{limit: 1 << 20}
		pdfPages(w, out)
		x, err := w.extraction("utf-8", nil)
		if err == nil {
			x.Marks = pageMarks(x.Marks)
		}
		checkExtraction(t, x, err)
		if err == nil && strings.Count(string(out), "\f")+1 < x.Marks[len(x.Marks)-1].Page {
			t.Fatalf("page %d beyond the %d form feeds", x.Marks[len(x.Marks)-1].Page, strings.Count(string(out), "\f"))
		}
	})
}

func FuzzExtractZIP(f *testing.F) {
	seed(f, "essay/essay.docx")
	f.Add(zipOf(f, zipMember{name: "a.txt", data: []byte("The boat is back.")}, zipMember{name: "in.zip", data: zipOf(f, zipMember{name: "b.txt", data: []byte("words")})}))
	f.Add(zipOf(f, zipMember{name: "s.txt", data: []byte("secret"), flags: 1}))
	seedHostile(f, "zip")
	f.Fuzz(func(t *testing.T, raw []byte) {
		opt := fuzzOptions(t)
		budget := opt.MaxContainerBytes
		for _, p := range extractZip(&input{raw: raw, opt: opt, budget: &budget}) {
			if !strings.HasPrefix(p.sub, "!/") && p.sub != "" {
				t.Fatalf("member name %q does not start with !/", p.sub)
			}
			checkExtraction(t, p.extraction, nil)
		}
		if budget < 0 {
			t.Fatalf("container budget overrun: %d", budget)
		}
	})
}
