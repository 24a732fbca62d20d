package corpus

import (
	"bytes"
	"encoding/base64"
	"mime"
	"mime/multipart"
	"mime/quotedprintable"
	"net/textproto"
	"strings"
	"testing"

	"golang.org/x/text/encoding/charmap"
)

// TestHTMLText: visible text only, per the rules of WHATWG HTML cited
// beside each case.
func TestHTMLText(t *testing.T) {
	win1252, _ := charmap.Windows1252.NewEncoder().String("<meta charset=windows-1252><p>caf\u00e9 cr\u00e8me</p>")
	tests := []struct {
		name, in, want string
	}{
		{"script, style, template and head are not shown (4.2, 4.11, 4.12)",
			"<!doctype html><html><head><title>T</title><style>p{}</style></head><body><script>var x</script><template><p>no</p></template><p>Shown.</p></body></html>",
			"Shown."},
		{"block elements end paragraphs, inline ones do not",
			"<p>One <b>bold</b> word.</p><div>Two</div><ul><li>Three</li><li>Four</li></ul>",
			"One bold word.\n\nTwo\n\nThree\n\nFour"},
		{"character references are decoded (13.2.5.72)",
			"<p>Fish &amp; chips &mdash; &#233;t&#xE9; &lt;ok&gt;</p>",
			"Fish & chips \u2014 \u00e9t\u00e9 <ok>"},
		{"br is a line break inside the paragraph",
			"<p>first line<br>second line</p>",
			"first line\nsecond line"},
		{"an unclosed head ends at body (13.2.6.4.6)",
			"<html><head><title>T</title><body><p>Body text.</p>",
			"Body text."},
		{"p start tags close the open p (optional end tags, 13.1.2.4)",
			"<p>a" + strings.Repeat("<p>b", 1000),
			"a" + strings.Repeat("\n\nb", 1000)},
		{"meta charset declares the encoding (13.2.3.2)", win1252, "caf\u00e9 cr\u00e8me"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			ps := extractBytes(t, "x.html", []byte(tc.in), testOptions(t))
			if ps[0].reason != "" {
				t.Fatal(ps[0].reason)
			}
			if ps[0].Text != tc.want {
				t.Fatalf("got %q\nwant %q", ps[0].Text, tc.want)
			}
		})
	}
}

// TestRTFText: control words and escapes as the RTF 1.9.1 specification
// defines them.
func TestRTFText(t *testing.T) {
	tests := []struct {
		name, in, want string
	}{
		{`\uN is a Unicode character, its \ucN fallback dropped ("Unicode RTF")`,
			`{\rtf1\ansi\uc1 caf\u233?\par}`, "caf\u00e9"},
		{`negative \uN counts from 65536`,
			`{\rtf1\ansi \u-3913?\par}`, "\uf0b7"},
		{`\'hh is a byte of the \ansicpg code page (1251: Cyrillic)`,
			`{\rtf1\ansi\ansicpg1251 \'cf\'f0\'e8\'e2\'e5\'f2\par}`, "\u041f\u0440\u0438\u0432\u0435\u0442"},
		{`double-byte code page 932 decodes escape pairs together`,
			`{\rtf1\ansi\ansicpg932 \'82\'a0\par}`, "\u3042"},
		{"font and colour tables and pictures are skipped (destinations)",
			`{\rtf1{\fonttbl{\f0 Helvetica;}}{\colortbl;\red255;}{\pict\pngblip 89504e47}Body\par}`, "Body"},
		{`\* ignorable destinations are skipped`,
			`{\rtf1 Kept{\*\generator Some Writer;} text\par}`, "Kept text"},
		{`\par ends a paragraph, \line breaks a line, \tab is white space`,
			`{\rtf1 One\par Two\line half\tab more\par}`, "One\n\nTwo\nhalf more"},
		{`escaped braces and backslash are text`,
			`{\rtf1 a \{b\} \\c\par}`, `a {b} \c`},
		{`symbols become their characters; the space after a control word is its delimiter, not text`,
			`{\rtf1 \ldblquote hi\rdblquote \emdash ok\par}`, "\u201chi\u201d\u2014ok"},
		{`\binN skips N bytes of binary data`,
			`{\rtf1 x{\bin4 {{{{}y\par}`, "xy"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			ps := extractBytes(t, "x.rtf", []byte(tc.in), testOptions(t))
			if ps[0].reason != "" {
				t.Fatal(ps[0].reason)
			}
			if ps[0].Text != tc.want {
				t.Fatalf("got %q\nwant %q", ps[0].Text, tc.want)
			}
		})
	}
}

// message builds an e-mail with Go's MIME writers (mime/multipart,
// mime/quotedprintable, mime.QEncoding: the standard library's RFC 2045,
// 2046 and 2047 encoders).
func message(t *testing.T, plain, html string) []byte {
	t.Helper()
	var body bytes.Buffer
	mw := multipart.NewWriter(&body)
	if plain != "" {
		w, err := mw.CreatePart(textproto.MIMEHeader{
			"Content-Type":              {"text/plain; charset=iso-8859-1"},
			"Content-Transfer-Encoding": {"quoted-printable"},
		})
		if err != nil {
			t.Fatal(err)
		}
		latin, err := charmap.ISO8859_1.NewEncoder().String(plain)
		if err != nil {
			t.Fatal(err)
		}
		qw := quotedprintable.NewWriter(w)
		qw.Write([]byte(latin))
		qw.Close()
	}
	if html != "" {
		w, err := mw.CreatePart(textproto.MIMEHeader{
			"Content-Type":              {"text/html; charset=utf-8"},
			"Content-Transfer-Encoding": {"base64"},
		})
		if err != nil {
			t.Fatal(err)
		}
		enc := base64.StdEncoding.EncodeToString([]byte(html))
		for len(enc) > 76 { // RFC 2045 6.8: lines of at most 76 characters
			w.Write([]byte(enc[:76] + "\r\n"))
			enc = enc[76:]
		}
		w.Write([]byte(enc + "\r\n"))
	}
	mw.Close()
	var m bytes.Buffer
	m.WriteString("From: Rowing Secretary <secretary@example.org>\r\n")
	m.WriteString("To: crew@example.org\r\n")
	m.WriteString("Date: Mon, 4 Mar 2024 09:30:00 +0000\r\n")
	m.WriteString("Subject: " + mime.QEncoding.Encode("utf-8", "Loan book \u2013 new rules") + "\r\n")
	m.WriteString("MIME-Version: 1.0\r\n")
	m.WriteString("Content-Type: multipart/alternative; boundary=" + mw.Boundary() + "\r\n\r\n")
	m.Write(body.Bytes())
	return m.Bytes()
}

// TestEmail: subject and the text part, decoded; the HTML part when there
// is no text part; quoted replies kept or left out.
func TestEmail(t *testing.T) {
	plain := "The caf\u00e9 on the pontoon opens at nine.\r\n\r\n> Will the store open early on Saturday?\r\n> It did last year.\r\nYes, from eight.\r\n"
	tests := []struct {
		name      string
		raw       []byte
		skip      bool
		want      string
		wantNotes string
	}{
		{"text part preferred; quoted-printable and ISO-8859-1 decoded (RFC 2045 6.7)",
			message(t, plain, "<p>HTML version</p>"), false,
			"Loan book \u2013 new rules\n\nThe caf\u00e9 on the pontoon opens at nine.\n\n  Will the store open early on Saturday?\n  It did last year.\nYes, from eight.\n",
			"2 quoted reply lines (starting with >) kept, their > marks read as spaces so that they match the text they quote; --skip-quoted-replies leaves them out"},
		{"quoted replies left out on request",
			message(t, plain, ""), true,
			"Loan book \u2013 new rules\n\nThe caf\u00e9 on the pontoon opens at nine.\n\nYes, from eight.\n",
			"2 quoted reply lines (starting with >) left out (--skip-quoted-replies)"},
		{"HTML part when there is no text part; base64 decoded (RFC 2045 6.8)",
			message(t, "", "<p>Boats go out at <b>ten</b>.</p><p>"+strings.Repeat("Bring a radio. ", 10)+"</p>"), false,
			"Loan book \u2013 new rules\n\nBoats go out at ten.\n\n" + strings.TrimSpace(strings.Repeat("Bring a radio. ", 10)),
			"body read from the HTML part (no plain-text part)"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			opt := testOptions(t)
			opt.SkipQuotedReplies = tc.skip
			ps := extractBytes(t, "m.eml", tc.raw, opt)
			if ps[0].reason != "" {
				t.Fatal(ps[0].reason)
			}
			if ps[0].format != "email" {
				t.Fatalf("format %q, want email", ps[0].format)
			}
			if ps[0].Text != tc.want {
				t.Fatalf("got %q\nwant %q", ps[0].Text, tc.want)
			}
			if !strings.Contains(strings.Join(ps[0].Notes, "; "), tc.wantNotes) {
				t.Fatalf("notes %q, want %q", ps[0].Notes, tc.wantNotes)
			}
		})
	}
}

// TestDOCXStructure: tables cell by cell, footnotes after the body,
// headers left out, fields' shown text, tabs and breaks (ECMA-376 Part 1
// sections cited in docx.go). The package is written by hand here because
// pandoc writes neither fields nor headers; the rest is checked on the
// pandoc fixtures.
func TestDOCXStructure(t *testing.T) {
	doc := `<w:document xmlns:w="` + nsW + `"><w:body>` +
		`<w:p><w:r><w:t>Intro</w:t><w:tab/><w:t>text</w:t><w:br/><w:t>after break</w:t></w:r><w:r><w:footnoteReference w:id="1"/></w:r></w:p>` +
		`<w:tbl><w:tr><w:tc><w:p><w:r><w:t>cell one</w:t></w:r></w:p></w:tc><w:tc><w:p><w:r><w:t>cell two</w:t></w:r></w:p></w:tc></w:tr></w:tbl>` +
		`<w:p><w:r><w:fldChar w:fldCharType="begin"/></w:r><w:r><w:instrText>PAGE</w:instrText></w:r><w:r><w:fldChar w:fldCharType="separate"/></w:r><w:r><w:t>7</w:t></w:r><w:r><w:fldChar w:fldCharType="end"/></w:r><w:del><w:r><w:delText>gone</w:delText></w:r></w:del></w:p>` +
		`</w:body></w:document>`
	notes := `<w:footnotes xmlns:w="` + nsW + `"><w:footnote w:type="separator" w:id="-1"><w:p><w:r><w:t>SEP</w:t></w:r></w:p></w:footnote>` +
		`<w:footnote w:id="1"><w:p><w:r><w:t>The note.</w:t></w:r></w:p></w:footnote></w:footnotes>`
	header := `<w:hdr xmlns:w="` + nsW + `"><w:p><w:r><w:t>Running head</w:t></w:r></w:p></w:hdr>`
	raw := zipOf(t, zipMember{name: "[Content_Types].xml", data: []byte("<Types/>")},
		zipMember{name: "word/document.xml", data: []byte(doc)},
		zipMember{name: "word/footnotes.xml", data: []byte(notes)},
		zipMember{name: "word/header1.xml", data: []byte(header)})
	ps := extractBytes(t, "x.docx", raw, testOptions(t))
	if ps[0].reason != "" {
		t.Fatal(ps[0].reason)
	}
	want := "Intro text\nafter break\n\ncell one\n\ncell two\n\n7\n\nThe note."
	if ps[0].Text != want {
		t.Fatalf("got %q\nwant %q", ps[0].Text, want)
	}
	if m := markAt(ps[0].Marks, strings.Index(want, "The note.")); m.Paragraph != 5 {
		t.Fatalf("the footnote is paragraph %d, want 5 (numbered on after the body)", m.Paragraph)
	}
}
