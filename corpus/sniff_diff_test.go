package corpus

import (
	"bytes"
	"errors"
	"io/fs"
	"math/rand/v2"
	"os"
	"path"
	"path/filepath"
	"strings"
	"testing"
	"unicode/utf8"

	"golang.org/x/text/encoding/unicode"
)

// Differential tests of the cheap e-mail sniff and binary test against the
// versions they replaced, kept here verbatim as references: refEmailSniff
// lowered the whole head with bytes.ToLower (Go standard library) and
// searched it; refLooksBinary counted control bytes one at a time;
// refDecode is decode calling refLooksBinary. The new code must take the
// same decision on every input, so the references are run on generated
// header-like inputs, on the Brown corpus (fetched by
// scripts/fetch-data.sh), and in fuzz targets.

// refEmailStarts and refEmailSniff are emailStarts and emailText.sniff as
// they were before sniff stopped lowering head.
var refEmailStarts = []string{"received:", "return-path:", "from:", "date:", "message-id:", "mime-version:", "delivered-to:", "subject:", "to:", "x-"}

func refEmailSniff(head []byte) bool {
	l := bytes.ToLower(head)
	ok := false
	for _, s := range refEmailStarts {
		if bytes.HasPrefix(l, []byte(s)) {
			ok = true
			break
		}
	}
	if !ok {
		return false
	}
	end := bytes.Index(l, []byte("\n\n"))
	if e := bytes.Index(l, []byte("\r\n\r\n")); e >= 0 && (end < 0 || e < end) {
		end = e
	}
	if end < 0 {
		end = len(l)
	}
	h := append([]byte("\n"), l[:end]...)
	return bytes.Contains(h, []byte("\nfrom:")) && (bytes.Contains(h, []byte("\ndate:")) || bytes.Contains(h, []byte("\nsubject:")))
}

func refLooksBinary(b []byte) bool {
	if bytes.IndexByte(b, 0) >= 0 {
		return true
	}
	head := b[:min(len(b), sniffLen)]
	controls := 0
	for _, c := range head {
		if (c < 0x20 && c != '\t' && c != '\n' && c != '\f' && c != '\r') || c == 0x7F {
			controls++
		}
	}
	return controls*binaryControlShare > len(head)
}

func refDecode(raw []byte) (decoded, error) {
	if len(raw) == 0 {
		return decoded{}, refuse(reasonEmpty)
	}
	var d decoded
	switch {
	case bytes.HasPrefix(raw, []byte(bomUTF16LE)) || bytes.HasPrefix(raw, []byte(bomUTF16BE)):
		order, enc, note := unicode.LittleEndian, encUTF16LE, noteUTF16LE
		if raw[0] == 0xFE {
			order, enc, note = unicode.BigEndian, encUTF16BE, noteUTF16BE
		}
		text, err := unicode.UTF16(order, unicode.ExpectBOM).NewDecoder().Bytes(raw)
		if err != nil {
			return decoded{}, err
		}
		if len(text) == 0 {
			return decoded{}, refuse(reasonEmpty)
		}
		if refLooksBinary(text) {
			return decoded{}, refuse(reasonBinary)
		}
		d = decoded{text: text, encoding: enc, note: note}
	case refLooksBinary(raw):
		return decoded{}, refuse(reasonBinary)
	case bytes.HasPrefix(raw, []byte(bomUTF8)):
		if len(raw) == len(bomUTF8) {
			return decoded{}, refuse(reasonEmpty)
		}
		if utf8.Valid(raw) {
			d = decoded{text: raw, encoding: encUTF8BOM}
		} else {
			d = decoded{text: fromWindows1252(nil, raw[len(bomUTF8):]), encoding: encWindows1252, note: noteBOMBad}
		}
	case utf8.Valid(raw):
		d = decoded{text: raw, encoding: encUTF8}
	default:
		d = decoded{text: fromWindows1252(nil, raw), encoding: encWindows1252, note: noteCP1252}
	}
	if onlySpace(d.text) {
		return decoded{}, refuse(reasonBlank)
	}
	return d, nil
}

// sniffHead is the part of raw that choose gives the sniffers.
func sniffHead(raw []byte) []byte { return raw[:min(len(raw), sniffLen)] }

// sameSniff fails t when the e-mail sniff and its reference disagree.
func sameSniff(t testing.TB, raw []byte) {
	t.Helper()
	head := sniffHead(raw)
	if got, want := (emailText{}).sniff(head), refEmailSniff(head); got != want {
		t.Fatalf("email sniff = %v, reference %v, for %q", got, want, head)
	}
}

// sameDecode fails t when decode and its reference disagree in anything.
func sameDecode(t testing.TB, raw []byte) {
	t.Helper()
	if got, want := looksBinary(raw), refLooksBinary(raw); got != want {
		t.Fatalf("looksBinary = %v, reference %v, for %q", got, want, raw)
	}
	d, err := decode(raw, nil)
	rd, rerr := refDecode(raw)
	if reasonOrNil(err) != reasonOrNil(rerr) {
		t.Fatalf("decode error %v, reference %v, for %q", err, rerr, raw)
	}
	if !bytes.Equal(d.text, rd.text) || d.encoding != rd.encoding || d.note != rd.note {
		t.Fatalf("decode = (%q, %q, %q), reference (%q, %q, %q)", d.text, d.encoding, d.note, rd.text, rd.encoding, rd.note)
	}
}

func reasonOrNil(err error) string {
	if err == nil {
		return ""
	}
	var r *refusal
	if errors.As(err, &r) {
		return "refusal: " + r.reason
	}
	return "error: " + err.Error()
}

// TestEmailSniffCases pins decisions one by one (RFC 5322 3.6 requires
// From and Date; the header block ends at the first empty line, RFC 5322
// 2.1). Each case is also checked against the reference.
func TestEmailSniffCases(t *testing.T) {
	tests := []struct {
		name string
		head string
		want bool
	}{
		{"From and Date, CRLF", "From: a@example.org\r\nDate: Mon, 4 Mar 2024 09:30:00 +0000\r\n\r\nBody\r\n", true},
		{"From and Subject, LF", "From: a@example.org\nSubject: hi\n\nBody\n", true},
		{"starts with Received, From later in the header", "Received: by x\nX-Mailer: y\nsubject: z\nfrom: a\n\nBody", true},
		{"mixed case field names", "fROM: a\ndAtE: b\n\nx", true},
		{"no blank line: the header is the whole head", "From: a\nDate: b", true},
		{"From without Date or Subject", "From: a@example.org\nTo: b@example.org\n\nBody\n", false},
		{"Date and Subject without From", "Date: x\nSubject: y\n\nBody\n", false},
		{"mentions From: after the blank line", "Subject: notes\n\nFrom: the minutes of Monday\n", false},
		{"mentions From: after a CRLF blank line", "Subject: notes\r\n\r\nFrom: the minutes\r\n", false},
		{"From: inside a line does not count", "Subject: see From: a\n\nx", false},
		{"first line is not a header field a message starts with", "Note: From: a\nFrom: a\nDate: b\n\n", false},
		{"plain prose that starts with From", "From the start it was clear.\nDate: later\n", false},
		{"a field name with a space before the colon", "From : a\nDate: b\n", false},
		{"indented field names do not count", "Subject: x\n From: a\n\n", false},
		{"a UTF-8 byte-order mark hides the header", "\uFEFFFrom: a\nDate: b\n\n", false},
		{"a CR alone does not end a line", "From: a\rDate: b\n\n", false},
		{"LF CR LF does not end the header", "Subject: s\n\r\nFrom: a\n", true},
		{"CR LF LF ends the header", "Subject: s\r\n\nFrom: a\n", false},
		{"X- starts a header", "X-Spam: no\nFrom: a\nSubject: b\n", true},
		// unicode.ToLower (Go standard library) maps U+0130 to "i" and
		// U+212A to "k", the only non-ASCII runes it maps to ASCII (found by
		// calling it on every rune); lowering the whole head made
		// "Rece\u0130ved:" a header field, so it still is one.
		{"dotted capital I lowers to i", "Rece\u0130ved: x\nFrom: a\nDate: b\n\n", true},
		{"invalid UTF-8 in a field name", "X-Fr\xc4m: a\nFrom: a\nDate: b\n", true},
		{"invalid UTF-8 in place of a letter", "Fr\xc4m: a\nFrom: a\nDate: b\n", false},
		{"invalid UTF-8 before the field name", "\xc4From: a\nDate: b\n", false},
		{"empty", "", false},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			if got := (emailText{}).sniff([]byte(tc.head)); got != tc.want {
				t.Errorf("sniff(%q) = %v, want %v", tc.head, got, tc.want)
			}
			sameSniff(t, []byte(tc.head))
		})
	}
}

// Pieces of the generated inputs: field names a message starts with and
// ones it does not, in several cases and with the two non-ASCII letters
// that lower to ASCII; values; line ends and blank lines of every kind; a
// byte-order mark, bytes that are not UTF-8 and a rune cut in half.
var (
	fieldPieces = []string{
		"From:", "from:", "FROM:", "Date:", "date:", "Subject:", "SUBJECT:",
		"Received:", "Return-Path:", "Message-ID:", "MIME-Version:", "Delivered-To:", "To:", "X-Mailer:", "x-",
		"Note:", "Content-Type:", "From :", " From:", ">From:", "Fro", "Dat", "From", "",
		"Rece\u0130ved:", "Message-\u0130D:", "MIME-Vers\u0130on:", "\u212A:", "\u0130", "\u0131",
		"\uFEFFFrom:", "\xc4From:", "Fr\xc4m:",
	}
	valuePieces = []string{"", " a@example.org", " Mon, 4 Mar 2024", " hello", " caf\u00e9", " \u201cquoted\u201d", " From: x", "\xff", "\xe2\x80", "\x00", "\t"}
	endPieces   = []string{"\n", "\n", "\r\n", "\r\n", "\r", "\n\n", "\r\n\r\n", "\n\r\n", "\r\n\n", "\n\r", ""}
)

// genHeader builds one header-like input from r: lines of a field name, a
// value and a line end, the first line a field a message starts with
// half of the time, the others From, Date or Subject half of the time, and
// the case of letters sometimes flipped.
func genHeader(r *rand.Rand) []byte {
	var b []byte
	for i := range r.IntN(8) + 1 {
		switch {
		case i == 0 && r.IntN(2) == 0:
			b = append(b, fieldPieces[r.IntN(15)]...) // one of the starts
		case i > 0 && r.IntN(2) == 0:
			b = append(b, fieldPieces[r.IntN(7)]...) // From, Date or Subject
		default:
			b = append(b, fieldPieces[r.IntN(len(fieldPieces))]...)
		}
		b = append(b, valuePieces[r.IntN(len(valuePieces))]...)
		b = append(b, endPieces[r.IntN(len(endPieces))]...)
	}
	if r.IntN(4) == 0 {
		for i, c := range b {
			if ('a' <= c && c <= 'z' || 'A' <= c && c <= 'Z') && r.IntN(3) == 0 {
				b[i] = c ^ 0x20
			}
		}
	}
	return b
}

// TestEmailSniffMatchesReference compares the sniff with its reference on
// generated inputs, including ones around sniffLen, where choose cuts the
// head (a field name or a rune cut at the cut must give the same answer).
func TestEmailSniffMatchesReference(t *testing.T) {
	r := rand.New(rand.NewPCG(20240304, 1))
	n := 100_000
	if testing.Short() {
		n = 20_000
	}
	emails := 0
	for range n {
		raw := genHeader(r)
		sameSniff(t, raw)
		if refEmailSniff(raw) {
			emails++
		}
	}
	t.Logf("%d of %d generated inputs are e-mail", emails, n)
	// The generator must produce both answers often, or the comparison
	// says little.
	if emails < n/50 || emails > n-n/50 {
		t.Fatalf("%d of %d generated inputs are e-mail: the generator is lopsided", emails, n)
	}
	filler := strings.Repeat("X-Pad: "+strings.Repeat("p", 60)+"\r\n", sniffLen/69)
	for cut := sniffLen - 12; cut <= sniffLen+2; cut++ {
		for _, tail := range []string{"From: a\r\nDate: b\r\n", "Date: b\r\nFrom: a\r\n", "Subject: \u0130\u0130\u0130\r\nFrom: a\r\n", "\r\n\r\nFrom: a\r\nDate: b\r\n"} {
			raw := []byte("Subject: s\r\n" + filler)
			raw = append(raw[:min(len(raw), cut)], tail...)
			raw = append(raw, strings.Repeat("q", 40)...)
			sameSniff(t, raw)
		}
	}
}

// TestSniffBrown: no file cut from the Brown corpus gets a different
// sniff, decoding or format, nor does any of its lines taken as the start
// of a file get a different sniff. Several lines of it
// start with words the sniff looks for ("From", "Date", "Subject").
func TestSniffBrown(t *testing.T) {
	for _, raw := range brownTextFiles(t, 5500, 1<<20) {
		sameSniff(t, raw)
		sameDecode(t, raw)
		sameChoice(t, raw)
		for line := range bytes.Lines(raw) {
			sameSniff(t, line)
		}
	}
}

// TestLowBytes compares the word-at-a-time count with a byte-by-byte one
// on every byte value in every position of two words, and on random
// buffers of every length up to 40 bytes (the tail loop).
func TestLowBytes(t *testing.T) {
	check := func(b []byte) {
		t.Helper()
		want := 0
		for _, c := range b {
			if c < 0x20 || c == 0x7F {
				want++
			}
		}
		if got := lowBytes(b); got != want {
			t.Fatalf("lowBytes(%q) = %d, want %d", b, got, want)
		}
	}
	for c := range 256 {
		for pos := range 16 {
			b := []byte("abcdefghABCDEFGH")
			b[pos] = byte(c)
			check(b)
			b[(pos+5)%16] = byte(255 - c)
			check(b)
		}
	}
	r := rand.New(rand.NewPCG(7, 9))
	for n := range 41 {
		for range 200 {
			b := make([]byte, n)
			for i := range b {
				switch r.IntN(4) {
				case 0:
					b[i] = byte(r.IntN(256))
				case 1:
					b[i] = byte(r.IntN(0x22)) // controls and their neighbours
				case 2:
					b[i] = byte(0x7E + r.IntN(3)) // around DEL
				default:
					b[i] = byte(0x80 + r.IntN(0x22)) // the same with the high bit
				}
			}
			check(b)
		}
	}
}

// TestDecodeMatchesReference compares decode with its reference on random
// buffers built to sit near the binary threshold and the encodings' edges.
func TestDecodeMatchesReference(t *testing.T) {
	r := rand.New(rand.NewPCG(11, 13))
	pieces := []string{"text ", "caf\u00e9 ", "\u201cq\u201d", "\n", "\r\n", "\t", "\f", "\x1b[0m", "\x01", "\x7f", "\x00", "\xe9", "\x93", "\xff\xfe", "\xfe\xff", "\xef\xbb\xbf", " ", "\u3000"}
	n := 20_000
	if testing.Short() {
		n = 2_000
	}
	for range n {
		var b []byte
		if r.IntN(5) == 0 {
			b = append(b, pieces[13+r.IntN(3)]...) // a byte-order mark first
		}
		for range r.IntN(40) {
			b = append(b, pieces[r.IntN(len(pieces))]...)
		}
		if r.IntN(10) == 0 { // long enough for the binary test to stop at sniffLen
			b = append(b, bytes.Repeat([]byte("word "), sniffLen/5+r.IntN(10))...)
			b = append(b, pieces[r.IntN(len(pieces))]...)
		}
		sameDecode(t, b)
	}
}

// FuzzEmailSniffMatchesReference: go test -run '^$' -fuzz FuzzEmailSniffMatchesReference ./corpus
func FuzzEmailSniffMatchesReference(f *testing.F) {
	r := rand.New(rand.NewPCG(1, 1))
	for range 20 {
		f.Add(genHeader(r))
	}
	f.Add([]byte("From: a@example.org\r\nDate: Mon, 4 Mar 2024 09:30:00 +0000\r\n\r\nBody\r\n"))
	f.Add([]byte("Rece\u0130ved: x\nFrom: a\nDate: b\n\n"))
	f.Fuzz(func(t *testing.T, raw []byte) {
		sameSniff(t, raw)
	})
}

// FuzzDecodeMatchesReference: go test -run '^$' -fuzz FuzzDecodeMatchesReference ./corpus
func FuzzDecodeMatchesReference(f *testing.F) {
	f.Add([]byte("plain"))
	f.Add([]byte("\xEF\xBB\xBFbom"))
	f.Add([]byte("\xFF\xFEa\x00"))
	f.Add([]byte("caf\xe9 \x93q\x94\x1b\x7f"))
	f.Add([]byte(strings.Repeat("abcdefgh\x01", 10)))
	f.Fuzz(func(t *testing.T, raw []byte) {
		sameDecode(t, raw)
	})
}

// refChoose is choose as it was before it skipped htmlText.sniff for heads
// that do not start with "<", with the reference e-mail sniff.
func refChoose(name string, raw []byte) extractor {
	head := raw[:min(len(raw), sniffLen)]
	if bytes.HasPrefix(head, []byte(zipLocalMagic)) || bytes.HasPrefix(head, []byte(zipEmptyMagic)) {
		if x := zipKind(raw); x != nil {
			return x
		}
	}
	for _, x := range extractors {
		sniff := x.sniff
		if _, ok := x.(emailText); ok {
			sniff = refEmailSniff
		}
		if sniff(head) {
			return x
		}
	}
	for _, r := range refusedFormats {
		if r.magic != "" && bytes.HasPrefix(head, []byte(r.magic)) {
			return nil
		}
	}
	ext := strings.ToLower(path.Ext(name))
	if ext == ".zip" {
		return archive{}
	}
	for _, x := range extractors {
		if x.claims(ext) {
			return x
		}
	}
	for _, r := range refusedFormats {
		for _, e := range r.exts {
			if e == ext {
				return nil
			}
		}
	}
	return plainText{}
}

// formatOf names what choose returned, "" for a refused format.
func formatOf(x extractor) string {
	if x == nil {
		return ""
	}
	return x.format()
}

// chooseNames are file names whose extensions lead choose to each format.
var chooseNames = []string{"a.txt", "a.html", "a.eml", "a.md", "a.svg", "a.ps", "a.zip", "a.docx", "README"}

func sameChoice(t testing.TB, raw []byte) {
	t.Helper()
	for _, name := range chooseNames {
		if got, want := formatOf(choose(name, raw)), formatOf(refChoose(name, raw)); got != want {
			t.Fatalf("choose(%q) = %q, reference %q, for %q", name, got, want, raw[:min(len(raw), 200)])
		}
	}
}

// htmlPieces make heads that are, and nearly are, what htmlText.sniff
// accepts: byte-order marks, white space it skips and white space it
// does not (form feed, vertical tab, no-break space), comments, doctypes,
// XML declarations, other tags and text, and the signatures of the other
// formats.
var htmlPieces = []string{
	"\uFEFF", " ", "\t", "\r\n", "\n", "\f", "\v", "\u00a0",
	"<!-- c -->", "<!--", "-->", "<!DOCTYPE html>", "<!doctype HTML>", "<!DOCTYPE svg>", "<html>", "<HTML lang=en>",
	"<?xml version=\"1.0\"?>", "<?XML?>", "<p>", "<", "\u0130", "text", "From: a\n", "Date: b\n", "Subject: c\n",
	"%PDF-1.4", "{\\rtf1", "%!PS", "PK\x03\x04", "\xc4",
}

// TestChooseMatchesReference: choose picks the same format as refChoose
// for every committed fixture and for generated heads (TestSniffBrown
// checks the Brown corpus files).
func TestChooseMatchesReference(t *testing.T) {
	err := filepath.WalkDir("testdata", func(p string, d fs.DirEntry, err error) error {
		if err != nil || d.IsDir() {
			return err
		}
		raw, err := os.ReadFile(p)
		if err != nil {
			return err
		}
		sameChoice(t, raw)
		return nil
	})
	if err != nil {
		t.Fatal(err)
	}
	r := rand.New(rand.NewPCG(5, 8))
	htmls := 0
	n := 20_000
	if testing.Short() {
		n = 5_000
	}
	for range n {
		var b []byte
		for range r.IntN(6) + 1 {
			b = append(b, htmlPieces[r.IntN(len(htmlPieces))]...)
		}
		if r.IntN(8) == 0 {
			b = append(bytes.Repeat([]byte(" "), 1000+r.IntN(48)), b...) // near html's 1 KiB
		}
		sameChoice(t, b)
		if _, ok := refChoose("a.txt", b).(htmlText); ok {
			htmls++
		}
	}
	t.Logf("%d of %d generated heads are HTML by their content", htmls, n)
	if htmls < n/50 {
		t.Fatalf("only %d of %d generated heads are HTML: the generator misses the case", htmls, n)
	}
}
