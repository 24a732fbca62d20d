// Package hostile generates the adversarial inputs reprise's extractors
// must read in linear time: deep nesting, long runs of openers that never
// close (or close once, far away), many tiny elements, long lines, many
// header fields, many ZIP members. Each Shape makes a file of its format
// from a repetition count n, and its size grows linearly in n, so reading
// the files of n, 2n and 4n shows at once whether an extractor's time or
// memory grows faster than its input: the growth benchmark of package
// corpus (BenchmarkHostileGrowth, TestHostileGrowthShapes), the end-to-end
// test of cmd/reprise and scripts/hostile, which writes the files to a
// folder, all take their inputs from here, so nothing is copied by hand.
//
// The shapes are the cases that were superlinear (a Markdown line of
// 50,000 ">" then 50,000 "- ", nested link openers, backtick runs of
// every length, nested emphasis, image openers before links, EPUB spines
// naming one chapter many times) and, for every other extractor, the
// kinds of input that make parsers quadratic in general: nesting,
// unclosed constructs, many small elements, one long token. A shape
// whose file must be refused (nesting past the depth limit) is marked
// Refused, so a test can check the reason.
package hostile

import (
	"archive/zip"
	"bytes"
	"fmt"
	"strconv"
	"strings"
	"unicode/utf16"
)

// A Shape is one family of hostile files.
type Shape struct {
	Name   string // "markdown-quote-list": the format, then what it does
	Format string // the extractor it aims at, as corpus names formats ("markdown", "zip", ...)
	Ext    string // the file name extension that makes reprise read it as Format
	About  string // what the file holds, in a few words
	// Base is the n of the smallest file of the growth check's "big"
	// scale (n, 2n, 4n): about 0.5 to 2.5 MiB of input, so that even the
	// smallest read is past the processor's second-level cache, small
	// enough that the largest stays under the default limits (members,
	// MIME parts, file size) unless the shape is about a limit. Past the
	// caches a doubling can still cost more than twice the time where a
	// read builds a map or a slice of one entry per element (BENCHMARKS.md
	// gives the figures); the check's "cache" scale takes Base/2^k, small
	// enough for the whole 4n read to stay in the cache. Tests read the
	// shapes at Base/64.
	Base int
	// Refused: the file is refused (skipped with a reason) at the default
	// limits, for every n from Base on; the growth check then measures
	// how fast the refusal comes.
	Refused bool
	// Make returns the file for repetition count n (n >= 1). The error
	// is from archive/zip, for the shapes that are ZIP packages.
	Make func(n int) ([]byte, error)
}

// Shapes returns every shape, in a fixed order.
func Shapes() []Shape {
	return []Shape{
		// Markdown.
		{Name: "markdown-quote-list", Format: "markdown", Ext: ".md", Base: 262144,
			About: `n ">" then n "- " and one sentence, on one line`,
			Make:  plain(func(n int) []byte { return cat(rep(">", n), rep("- ", n), "One sentence ends the line.\n") })},
		{Name: "markdown-link-openers", Format: "markdown", Ext: ".md", Base: 131072,
			About: `n "[a](" then n ")"`,
			Make:  plain(func(n int) []byte { return cat("Text ", rep("[a](", n), rep(")", n), " ends.\n") })},
		{Name: "markdown-link-titles", Format: "markdown", Ext: ".md", Base: 131072,
			About: `n "[a](b (" (a title never closed) and one ")" at the end`,
			Make:  plain(func(n int) []byte { return cat("Text ", rep("[a](b (", n), ")\n") })},
		{Name: "markdown-link-quotes", Format: "markdown", Ext: ".md", Base: 131072,
			About: `n "[a](b '" and one "'" at the end`,
			Make:  plain(func(n int) []byte { return cat("Text ", rep("[a](b '", n), "'\n") })},
		{Name: "markdown-image-openers", Format: "markdown", Ext: ".md", Base: 131072,
			About: `n "![" then n "[a](b)" links`,
			Make:  plain(func(n int) []byte { return cat(rep("![", n), rep("[a](b)", n), "\n") })},
		{Name: "markdown-backtick-runs", Format: "markdown", Ext: ".md", Base: 262144,
			About: "backtick runs of length 1, 2, 3, ... (none closes), about 4n bytes",
			Make:  plain(backtickRuns)},
		{Name: "markdown-emphasis-nest", Format: "markdown", Ext: ".md", Base: 131072,
			About: `n "*a " then n "a* " (nested emphasis)`,
			Make:  plain(func(n int) []byte { return cat(rep("*a ", n), rep("a* ", n), "\n") })},
		{Name: "markdown-emphasis-open", Format: "markdown", Ext: ".md", Base: 131072,
			About: `n "*a _b " that never close, then one "c*"`,
			Make:  plain(func(n int) []byte { return cat(rep("*a _b ", n), "c*\n") })},
		{Name: "markdown-html-open", Format: "markdown", Ext: ".md", Base: 65536,
			About: `n "<a x=\"" and n "<!--" never closed`,
			Make:  plain(func(n int) []byte { return cat(rep(`<a x="`, n), rep("<!--", n), "\n") })},
		{Name: "markdown-headers", Format: "markdown", Ext: ".md", Base: 32768,
			About: `n lines "## Heading k ##"`,
			Make: plain(func(n int) []byte {
				return lines(n, func(k int) string { return "## Heading " + strconv.Itoa(k) + " ##" })
			})},
		{Name: "markdown-long-line", Format: "markdown", Ext: ".md", Base: 65536,
			About: "one line of n words with markup characters",
			Make:  plain(func(n int) []byte { return cat(rep("word *x_ `y [z] ", n), "\n") })},
		{Name: "markdown-table", Format: "markdown", Ext: ".md", Base: 32768,
			About: "a table of n rows",
			Make:  plain(func(n int) []byte { return cat("| a | b |\n|---|---|\n", rep("| x \\| y | *z* |\n", n)) })},
		{Name: "markdown-nested-lists", Format: "markdown", Ext: ".md", Base: 16384,
			About: `n lines, line k holding k mod 32 nested "> 1. " markers`,
			Make: plain(func(n int) []byte {
				return lines(n, func(k int) string { return strings.Repeat("> 1. ", k%32) + "item" })
			})},

		// HTML.
		{Name: "html-deep", Format: "html", Ext: ".html", Base: 16384, Refused: true,
			About: `n nested "<div>"`,
			Make:  plain(func(n int) []byte { return cat("<!doctype html><body>", rep("<div>", n), "deep") })},
		{Name: "html-unclosed-inline", Format: "html", Ext: ".html", Base: 16384, Refused: true,
			About: `n "<b>x" never closed`,
			Make:  plain(func(n int) []byte { return cat("<!doctype html><body>", rep("<b>x", n)) })},
		{Name: "html-stray-end-tags", Format: "html", Ext: ".html", Base: 131072,
			About: `200 open "<div>" then n "</span>" that close nothing`,
			Make:  plain(func(n int) []byte { return cat("<!doctype html><body>", rep("<div>", 200), "text ", rep("</span>", n)) })},
		{Name: "html-tiny-elements", Format: "html", Ext: ".html", Base: 65536,
			About: `n "<span>a</span> "`,
			Make:  plain(func(n int) []byte { return cat("<!doctype html><body><p>", rep("<span>a</span> ", n), "</p>") })},
		{Name: "html-implied-ends", Format: "html", Ext: ".html", Base: 65536,
			About: `n "<p>x" then n "<li>y", end tags omitted`,
			Make:  plain(func(n int) []byte { return cat("<!doctype html><body>", rep("<p>x", n), "<ul>", rep("<li>y", n)) })},
		{Name: "html-attributes", Format: "html", Ext: ".html", Base: 131072,
			About: "one tag with n attributes",
			Make:  plain(func(n int) []byte { return cat("<!doctype html><body><p ", rep(`a="b" `, n), ">text</p>") })},
		{Name: "html-body-tags", Format: "html", Ext: ".html", Base: 65536,
			About: `200 open "<div>" then n "<body>x</body>" (each start looks for an open <head>)`,
			Make: plain(func(n int) []byte {
				return cat("<!doctype html><head><title>t</title>", rep("<div>", 200), rep("<body>x</body>", n))
			})},
		{Name: "html-long-text", Format: "html", Ext: ".html", Base: 32768,
			About: "one paragraph of n words and character references",
			Make:  plain(func(n int) []byte { return cat("<!doctype html><body><p>", rep("word &amp; caf&eacute; ", n), "</p>") })},

		// RTF.
		{Name: "rtf-deep", Format: "rtf", Ext: ".rtf", Base: 16384, Refused: true,
			About: `n nested "{"`,
			Make:  plain(func(n int) []byte { return cat(`{\rtf1 `, rep("{", n), "x") })},
		{Name: "rtf-groups", Format: "rtf", Ext: ".rtf", Base: 131072,
			About: `n groups "{\b x}"`,
			Make:  plain(func(n int) []byte { return cat(`{\rtf1\ansi `, rep(`{\b x} `, n), "}") })},
		{Name: "rtf-escapes", Format: "rtf", Ext: ".rtf", Base: 65536,
			About: `n "\'e9" and "\u233?" escapes`,
			Make:  plain(func(n int) []byte { return cat(`{\rtf1\ansi `, rep(`caf\'e9 \u233?`, n), "}") })},
		{Name: "rtf-control-words", Format: "rtf", Ext: ".rtf", Base: 16384,
			About: "n unknown control words of 40 letters with parameters",
			Make: plain(func(n int) []byte {
				return cat(`{\rtf1\ansi `, rep(`\abcdefghijklmnopqrstuvwxyzabcdefghijklmn-12345678901 x`, n), "}")
			})},
		{Name: "rtf-paragraphs", Format: "rtf", Ext: ".rtf", Base: 65536,
			About: `n "\par" paragraphs`,
			Make:  plain(func(n int) []byte { return cat(`{\rtf1\ansi `, rep(`word\par `, n), "}") })},
		{Name: "rtf-skipped-groups", Format: "rtf", Ext: ".rtf", Base: 65536,
			About: `n ignorable destinations "{\*\x y}"`,
			Make:  plain(func(n int) []byte { return cat(`{\rtf1\ansi `, rep(`{\*\x y}z `, n), "}") })},

		// E-mail.
		{Name: "email-headers", Format: "email", Ext: ".eml", Base: 32768,
			About: "n header fields",
			Make: plain(func(n int) []byte {
				return cat(emailHead, string(lines(n, func(k int) string { return "X-Field-" + strconv.Itoa(k) + ": value" })), "\nThe body of the message.\n")
			})},
		{Name: "email-folded-subject", Format: "email", Ext: ".eml", Base: 131072,
			About: "a subject folded over n lines",
			Make:  plain(func(n int) []byte { return cat(emailHead, "Subject: start", rep("\r\n word", n), "\r\n\r\nBody.\r\n") })},
		{Name: "email-content-params", Format: "email", Ext: ".eml", Base: 65536,
			About: "a Content-Type with n parameters",
			Make: plain(func(n int) []byte {
				var b strings.Builder
				b.WriteString(emailHead + "Content-Type: text/plain; charset=utf-8")
				for k := range n {
					fmt.Fprintf(&b, ";\r\n p%d=v", k)
				}
				b.WriteString("\r\n\r\nBody.\r\n")
				return []byte(b.String())
			})},
		{Name: "email-parts", Format: "email", Ext: ".eml", Base: 2048,
			About: "a multipart message of n parts",
			Make: plain(func(n int) []byte {
				return cat(emailHead, "Content-Type: multipart/mixed; boundary=b\r\n\r\n",
					rep("--b\r\nContent-Type: text/plain\r\n\r\nA part of the message.\r\n", n), "--b--\r\n")
			})},
		{Name: "email-nested", Format: "email", Ext: ".eml", Base: 4096, Refused: true,
			About: "multipart parts nested n deep",
			Make: plain(func(n int) []byte {
				var b strings.Builder
				b.WriteString(emailHead)
				for k := range n {
					fmt.Fprintf(&b, "Content-Type: multipart/mixed; boundary=b%d\r\n\r\n--b%d\r\n", k, k)
				}
				b.WriteString("Content-Type: text/plain\r\n\r\ndeep\r\n")
				return []byte(b.String())
			})},
		{Name: "email-quoted", Format: "email", Ext: ".eml", Base: 32768,
			About: `n quoted lines "> text"`,
			Make:  plain(func(n int) []byte { return cat(emailHead, "\r\n", rep("> quoted text of the reply\r\n", n)) })},

		// Office XML and EPUB.
		{Name: "docx-deep", Format: "docx", Ext: ".docx", Base: 16384, Refused: true,
			About: `n nested "<w:r>"`,
			Make: func(n int) ([]byte, error) {
				return docx(join(`<w:p>`, rep("<w:r>", n), "<w:t>deep</w:t>", rep("</w:r>", n), "</w:p>"))
			}},
		{Name: "docx-tiny-runs", Format: "docx", Ext: ".docx", Base: 16384,
			About: "one paragraph of n runs of one letter",
			Make: func(n int) ([]byte, error) {
				return docx(join("<w:p>", rep("<w:r><w:t>a</w:t></w:r><w:r><w:tab/></w:r>", n), "</w:p>"))
			}},
		{Name: "docx-paragraphs", Format: "docx", Ext: ".docx", Base: 16384,
			About: "n paragraphs",
			Make:  func(n int) ([]byte, error) { return docx(rep("<w:p><w:r><w:t>A word.</w:t></w:r></w:p>", n)) }},
		{Name: "docx-attributes", Format: "docx", Ext: ".docx", Base: 65536,
			About: "one element with n attributes",
			Make: func(n int) ([]byte, error) {
				var b strings.Builder
				b.WriteString("<w:p><w:r ")
				for k := range n {
					fmt.Fprintf(&b, `w:a%d="v" `, k)
				}
				b.WriteString("><w:t>text</w:t></w:r></w:p>")
				return docx(b.String())
			}},
		{Name: "docx-namespaces", Format: "docx", Ext: ".docx", Base: 32768,
			About: "one element declaring n namespaces",
			Make: func(n int) ([]byte, error) {
				var b strings.Builder
				b.WriteString("<w:p><w:r ")
				for k := range n {
					fmt.Fprintf(&b, `xmlns:n%d="urn:x:%d" `, k, k)
				}
				b.WriteString("><w:t>text</w:t></w:r></w:p>")
				return docx(b.String())
			}},
		{Name: "odt-spans", Format: "odt", Ext: ".odt", Base: 16384,
			About: "one paragraph of n spans and spaces",
			Make: func(n int) ([]byte, error) {
				return odt(join("<text:p>", rep(`<text:span>a</text:span><text:s text:c="3"/>`, n), "</text:p>"))
			}},
		{Name: "epub-chapters", Format: "epub", Ext: ".epub", Base: 2048,
			About: "n chapters, each a member and a spine item",
			Make:  epubChapters},
		{Name: "epub-spine-repeats", Format: "epub", Ext: ".epub", Base: 32768,
			About: "one chapter named n times in the spine",
			Make:  epubRepeats},

		// ZIP archives.
		{Name: "zip-members", Format: "zip", Ext: ".zip", Base: 2048,
			About: "n small text members",
			Make: func(n int) ([]byte, error) {
				ms := make([]member, n)
				for k := range ms {
					ms[k] = member{fmt.Sprintf("d%d/note%d.txt", k%10, k), []byte("A short note, number " + strconv.Itoa(k) + ".\n")}
				}
				return zipOf(ms...)
			}},
		{Name: "zip-nested", Format: "zip", Ext: ".zip", Base: 2048,
			About: "n members that are ZIPs of one text",
			Make: func(n int) ([]byte, error) {
				ms := make([]member, n)
				for k := range ms {
					inner, err := zipOf(member{"a.txt", []byte("Inner text " + strconv.Itoa(k) + ".\n")})
					if err != nil {
						return nil, err
					}
					ms[k] = member{fmt.Sprintf("in%d.zip", k), inner}
				}
				return zipOf(ms...)
			}},

		// JSON Lines.
		{Name: "jsonl-lines", Format: "jsonl", Ext: ".jsonl", Base: 16384,
			About: "n one-sentence lines",
			Make: plain(func(n int) []byte {
				return lines(n, func(k int) string { return `{"id":` + strconv.Itoa(k) + `,"text":"Line text \u00e9 here."}` })
			})},
		{Name: "jsonl-long-line", Format: "jsonl", Ext: ".jsonl", Base: 32768,
			About: "one line of n words with escapes",
			Make:  plain(func(n int) []byte { return cat(`{"id":"x","text":"`, rep(`word \"q\" \u00e9 `, n), `"}`, "\n") })},
		{Name: "jsonl-nested", Format: "jsonl", Ext: ".jsonl", Base: 262144,
			About: "lines with arrays nested 100 deep, n/100 lines",
			Make: plain(func(n int) []byte {
				return lines(max(1, n/100), func(k int) string {
					return `{"id":` + strconv.Itoa(k) + `,"x":` + strings.Repeat("[", 100) + strings.Repeat("]", 100) + `,"text":"t"}`
				})
			})},

		// Plain text: sniffing and decoding.
		{Name: "text-long-line", Format: "text", Ext: ".txt", Base: 524288,
			About: "one line of n words",
			Make:  plain(func(n int) []byte { return cat(rep("word ", n), "\n") })},
		{Name: "text-short-lines", Format: "text", Ext: ".txt", Base: 1048576,
			About: "n lines of one character (control-heavy for the binary test)",
			Make:  plain(func(n int) []byte { return []byte(rep("a\n", n)) })},
		{Name: "text-windows-1252", Format: "text", Ext: ".txt", Base: 262144,
			About: "n words in Windows-1252 (not UTF-8)",
			Make:  plain(func(n int) []byte { return []byte(rep("caf\xe9 na\xefve ", n)) })},
		{Name: "text-utf16", Format: "text", Ext: ".txt", Base: 131072,
			About: "n words in UTF-16LE with its byte-order mark",
			Make:  plain(utf16Words)},
		{Name: "text-email-like", Format: "text", Ext: ".txt", Base: 131072,
			About: "a header-like first line then n lines that are not headers (the e-mail sniffer)",
			Make:  plain(func(n int) []byte { return cat("From: someone\n", rep("x-not-a-header\n", n)) })},
	}
}

// Lookup returns the shape of that name.
func Lookup(name string) (Shape, bool) {
	for _, s := range Shapes() {
		if s.Name == name {
			return s, true
		}
	}
	return Shape{}, false
}

const emailHead = "From: a@example.org\r\nTo: b@example.org\r\nDate: Mon, 4 Mar 2024 09:30:00 +0000\r\n"

// plain is a Make for a shape that is not a ZIP package.
func plain(f func(n int) []byte) func(n int) ([]byte, error) {
	return func(n int) ([]byte, error) { return f(n), nil }
}

func rep(s string, n int) string { return strings.Repeat(s, n) }

func join(parts ...string) string { return strings.Join(parts, "") }

func cat(parts ...string) []byte { return []byte(join(parts...)) }

// lines joins line(0) ... line(n-1), each ended by "\n".
func lines(n int, line func(k int) string) []byte {
	var b bytes.Buffer
	for k := range n {
		b.WriteString(line(k))
		b.WriteByte('\n')
	}
	return b.Bytes()
}

// backtickRuns writes runs of 1, 2, 3, ... backticks separated by " a ",
// about 4n bytes: no run has a partner of its length, so every one is an
// opener searching for its closer.
func backtickRuns(n int) []byte {
	var b bytes.Buffer
	b.WriteString("Text ")
	for k := 1; b.Len() < 4*n; k++ {
		b.WriteString(strings.Repeat("`", k))
		b.WriteString(" a ")
	}
	b.WriteString("\n")
	return b.Bytes()
}

func utf16Words(n int) []byte {
	u := utf16.Encode([]rune(rep("mot déjà ", n)))
	b := make([]byte, 2, 2+2*len(u))
	b[0], b[1] = 0xFF, 0xFE
	for _, c := range u {
		b = append(b, byte(c), byte(c>>8))
	}
	return b
}

type member struct {
	name string
	data []byte
}

// zipOf builds a ZIP archive of the members, in order, stored: the file's
// size is then the members' (deflating the repetitive members would make
// the file grow far slower than the work of reading it).
func zipOf(ms ...member) ([]byte, error) {
	var buf bytes.Buffer
	zw := zip.NewWriter(&buf)
	for _, m := range ms {
		w, err := zw.CreateHeader(&zip.FileHeader{Name: m.name, Method: zip.Store})
		if err != nil {
			return nil, fmt.Errorf("hostile: zip member %s: %w", m.name, err)
		}
		if _, err := w.Write(m.data); err != nil {
			return nil, fmt.Errorf("hostile: zip member %s: %w", m.name, err)
		}
	}
	if err := zw.Close(); err != nil {
		return nil, fmt.Errorf("hostile: zip: %w", err)
	}
	return buf.Bytes(), nil
}

const nsW = "http://schemas.openxmlformats.org/wordprocessingml/2006/main"

func docx(body string) ([]byte, error) {
	doc := `<?xml version="1.0" encoding="UTF-8"?><w:document xmlns:w="` + nsW + `"><w:body>` + body + `</w:body></w:document>`
	return zipOf(member{"[Content_Types].xml", []byte("<Types/>")}, member{"word/document.xml", []byte(doc)})
}

func odt(body string) ([]byte, error) {
	doc := `<?xml version="1.0" encoding="UTF-8"?><office:document-content xmlns:office="urn:oasis:names:tc:opendocument:xmlns:office:1.0" xmlns:text="urn:oasis:names:tc:opendocument:xmlns:text:1.0"><office:body><office:text>` +
		body + `</office:text></office:body></office:document-content>`
	return zipOf(member{"mimetype", []byte("application/vnd.oasis.opendocument.text")}, member{"content.xml", []byte(doc)})
}

const epubContainer = `<?xml version="1.0"?><container version="1.0" xmlns="urn:oasis:names:tc:opendocument:xmlns:container"><rootfiles><rootfile full-path="OEBPS/content.opf" media-type="application/oebps-package+xml"/></rootfiles></container>`

func epub(manifest, spine string, chapters []member) ([]byte, error) {
	opf := `<?xml version="1.0"?><package xmlns="http://www.idpf.org/2007/opf" version="3.0"><manifest>` + manifest + `</manifest><spine>` + spine + `</spine></package>`
	ms := []member{{"mimetype", []byte("application/epub+zip")}, {"META-INF/container.xml", []byte(epubContainer)}, {"OEBPS/content.opf", []byte(opf)}}
	return zipOf(append(ms, chapters...)...)
}

func chapter(k int) []byte {
	return []byte(`<html xmlns="http://www.w3.org/1999/xhtml"><body><p>Chapter ` + strconv.Itoa(k) + ` has one sentence.</p></body></html>`)
}

func epubChapters(n int) ([]byte, error) {
	var man, spine strings.Builder
	chs := make([]member, n)
	for k := range n {
		fmt.Fprintf(&man, `<item id="c%d" href="c%d.xhtml" media-type="application/xhtml+xml"/>`, k, k)
		fmt.Fprintf(&spine, `<itemref idref="c%d"/>`, k)
		chs[k] = member{fmt.Sprintf("OEBPS/c%d.xhtml", k), chapter(k)}
	}
	return epub(man.String(), spine.String(), chs)
}

func epubRepeats(n int) ([]byte, error) {
	man := `<item id="c" href="c.xhtml" media-type="application/xhtml+xml"/>`
	return epub(man, rep(`<itemref idref="c"/>`, n), []member{{"OEBPS/c.xhtml", chapter(0)}})
}
