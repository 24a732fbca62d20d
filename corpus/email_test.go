package corpus

import (
	"fmt"
	"slices"
	"strings"
	"testing"
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
