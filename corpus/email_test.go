package corpus

import (
	"fmt"
	"slices"
	"strings"
	"testing"
	"unicode/utf8"
)

// TestLongHeaderIsNarrowed: a message whose header has more than
// maxHeaderFields fields is read as the same message with only the fields
// the extractor reads (its text is the same, byte for byte), and its
// document says so; at maxHeaderFields fields it is read whole, with no
// note. The fields are RFC 5322 header fields (section 2.2), a folded
// Subject (2.2.3) among them.
func TestLongHeaderIsNarrowed(t *testing.T) {
	opt := testOptions(t)
	message := func(extra int, crlf bool) string {
		var b strings.Builder
		b.WriteString("From: ana@example.org\nDate: Tue, 1 Dec 2026 10:00:00 +0000\n")
		for k := range extra {
			fmt.Fprintf(&b, "X-Trace-%d: hop %d\n", k, k)
			if k == extra/2 {
				b.WriteString("Subject: Minutes of the\n  board meeting\nMIME-Version: 1.0\n")
				b.WriteString("Content-Type: text/plain;\n charset=iso-8859-1\nContent-Transfer-Encoding: quoted-printable\n")
			}
		}
		b.WriteString("\nThe board approved the caf=E9 budget.\nIt meets again in March.\n")
		s := b.String()
		if crlf {
			s = strings.ReplaceAll(s, "\n", "\r\n")
		}
		return s
	}
	for _, crlf := range []bool{false, true} {
		want := extractBytes(t, "m.eml", []byte(message(2, crlf)), opt)
		if len(want) != 1 || want[0].reason != "" {
			t.Fatalf("short header: %+v", want)
		}
		// 2 + 1000 + 4 fields: narrowed; 2 + 994 + 4 = maxHeaderFields: whole.
		for extra, narrowed := range map[int]bool{maxHeaderFields: true, maxHeaderFields - 6: false} {
			got := extractBytes(t, "m.eml", []byte(message(extra, crlf)), opt)
			if len(got) != 1 || got[0].reason != "" {
				t.Fatalf("%d fields: %+v", extra+6, got)
			}
			if got[0].Text != want[0].Text || got[0].Encoding != want[0].Encoding {
				t.Errorf("%d fields, crlf %v: text %q (%s), want %q (%s)", extra+6, crlf, got[0].Text, got[0].Encoding, want[0].Text, want[0].Encoding)
			}
			note := fmt.Sprintf("header of %d fields: only the subject and the MIME fields were read (more than %d)", extra+6, maxHeaderFields)
			if has := slices.Contains(got[0].Notes, note); has != narrowed {
				t.Errorf("%d fields: note %q present %v, want %v (notes %q)", extra+6, note, has, narrowed, got[0].Notes)
			}
		}
	}
}

// TestLongMediaTypeIsNarrowed: a Content-Type of more than maxMediaParams
// parameters is read for its charset and boundary only (RFC 2046 5.1.1,
// 4.1.2), and the document says so; a quoted ";" does not split a
// parameter (RFC 2045 5.1).
func TestLongMediaTypeIsNarrowed(t *testing.T) {
	opt := testOptions(t)
	var ct strings.Builder
	ct.WriteString(`multipart/mixed; note="a;b"`)
	for k := range maxMediaParams {
		fmt.Fprintf(&ct, ";\n p%d=v", k)
		if k == 40 {
			ct.WriteString(";\n boundary=\"=sep=\"")
		}
	}
	msg := "From: ana@example.org\nSubject: Budget\nMIME-Version: 1.0\nContent-Type: " + ct.String() + "\n\n" +
		"--=sep=\nContent-Type: text/plain; charset=utf-8\n\nThe café budget was approved.\n--=sep=--\n"
	got := extractBytes(t, "m.eml", []byte(msg), opt)
	if len(got) != 1 || got[0].reason != "" {
		t.Fatalf("%+v", got)
	}
	if want := "Budget\n\nThe café budget was approved."; got[0].Text != want {
		t.Errorf("text %q, want %q", got[0].Text, want)
	}
	note := fmt.Sprintf("1 MIME part with a Content-Type of more than %d parameters: only charset and boundary were read", maxMediaParams)
	if !slices.Contains(got[0].Notes, note) {
		t.Errorf("notes %q, want %q among them", got[0].Notes, note)
	}
	if n := narrowMediaType(`text/plain; a="x;y"; charset=utf-8`); n != `text/plain; a="x;y"; charset=utf-8` {
		t.Errorf("a short type was changed: %q", n)
	}
}

// TestLongFieldsAreNarrowed: a subject longer than maxFieldBytes, folded
// (RFC 5322 2.2.3) or on one line, is read for its first maxFieldBytes at
// most, cut at white space or at a character's start, and the document
// says so; a long field that is not read (an X- field, RFC 5322 3.6.8)
// changes nothing in the text and adds no note. The body is read as
// without the long field.
func TestLongFieldsAreNarrowed(t *testing.T) {
	opt := testOptions(t)
	const head = "From: ana@example.org\r\nDate: Tue, 1 Dec 2026 10:00:00 +0000\r\n"
	const body = "\r\nThe committee met on Tuesday.\r\n"
	short := extractBytes(t, "m.eml", []byte(head+"Subject: Budget\r\n"+body), opt)
	if len(short) != 1 || short[0].reason != "" {
		t.Fatalf("short: %+v", short)
	}
	long := extractBytes(t, "m.eml", []byte(head+"X-Trace: hop"+strings.Repeat("\r\n hop", 40000)+"\r\nSubject: Budget\r\n"+body), opt)
	if len(long) != 1 || long[0].Text != short[0].Text || len(long[0].Notes) != len(short[0].Notes) {
		t.Errorf("a long field not read: %+v, want %+v", long, short)
	}
	for name, subject := range map[string]string{
		"folded":   "Subject: start" + strings.Repeat("\r\n word", 30000),
		"one line": "Subject: " + strings.Repeat("é", 60000),
	} {
		got := extractBytes(t, "m.eml", []byte(head+subject+"\r\n"+body), opt)
		if len(got) != 1 || got[0].reason != "" {
			t.Fatalf("%s: %+v", name, got)
		}
		text := got[0].Text
		if !strings.HasSuffix(text, "\n\nThe committee met on Tuesday.\n") || !utf8.ValidString(text) {
			t.Errorf("%s: text ends %q", name, text[max(0, len(text)-60):])
		}
		// Unfolding (RFC 5322 2.2.3) drops each fold's CRLF.
		whole := strings.ReplaceAll(strings.TrimPrefix(subject, "Subject: "), "\r\n", "")
		subj, _, _ := strings.Cut(text, "\n\n")
		if !strings.HasPrefix(whole, subj) || len(subj) > maxFieldBytes || len(subj) < maxFieldBytes/2 || strings.ContainsRune(subj, utf8.RuneError) {
			t.Errorf("%s: subject of %d bytes read, want a part of the subject under %d", name, len(subj), maxFieldBytes)
		}
		note := fmt.Sprintf("subject field of %d bytes: only its first ", len(subject)+2)
		if !slices.ContainsFunc(got[0].Notes, func(n string) bool { return strings.HasPrefix(n, note) }) {
			t.Errorf("%s: no note %q… in %q", name, note, got[0].Notes)
		}
	}
}
