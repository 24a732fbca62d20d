package corpus

import (
	"regexp"
	"slices"
	"strings"
	"testing"
	"unicode/utf8"
)

// rawBlock is a pandoc raw block (```{=ms} ... ```): pandoc passes it to
// that one output format only (pandoc manual, "Extension: raw_attribute").
var rawBlock = regexp.MustCompile("(?s)```\\{=[a-z]+\\}\n.*?```\n")

// sourceWords returns the words a converted fixture should hold: the
// Markdown source's title (YAML front matter; pandoc's standalone writers
// print it) when withTitle, then its visible text as the Markdown
// extractor reads it.
func sourceWords(t *testing.T, doc string, withTitle bool) []string {
	t.Helper()
	raw := string(readFixture(t, "source/"+doc+".md"))
	raw = rawBlock.ReplaceAllString(raw, "\n")
	var title string
	if m := regexp.MustCompile(`(?m)^title: (.*)$`).FindStringSubmatch(raw); m != nil {
		title = m[1]
	}
	x, err := markdown{}.extract(&input{raw: []byte(raw)})
	if err != nil {
		t.Fatal(err)
	}
	if withTitle {
		return words(title + "\n\n" + x.Text)
	}
	return words(x.Text)
}

// TestFixturesMatchTheirSource: each fixture, converted by pandoc from an
// invented Markdown document, gives back that document's words in order.
func TestFixturesMatchTheirSource(t *testing.T) {
	for _, doc := range []string{"essay", "policy", "memo"} {
		for _, ext := range []string{"docx", "odt", "epub", "html", "rtf", "pdf", "txt"} {
			name := doc + "/" + doc + "." + ext
			t.Run(name, func(t *testing.T) {
				if ext == "pdf" {
					needPDFToText(t)
				}
				p := extractOne(t, fixture(t, name), testOptions(t))
				want := sourceWords(t, doc, ext != "txt") // pandoc -t plain without -s prints no title
				got := words(p.Text)
				if ext == "pdf" && doc == "policy" {
					// pdftotext without -layout reads a table column by
					// column (its reading order), so only the words, not
					// their order, can match for the one fixture with a table.
					slices.Sort(got)
					slices.Sort(want)
				}
				if !slices.Equal(got, want) {
					i := 0
					for i < min(len(got), len(want)) && got[i] == want[i] {
						i++
					}
					t.Fatalf("words differ from the source at word %d:\n got %q\nwant %q", i, got[i:min(len(got), i+8)], want[i:min(len(want), i+8)])
				}
				if !utf8.ValidString(p.Text) {
					t.Error("text is not valid UTF-8")
				}
				if ext != "txt" && !strings.Contains(p.Text, "\n\n") {
					t.Error("paragraphs are not separated by blank lines")
				}
				checkMarks(t, p.Text, p.Marks)
			})
		}
	}
}

// checkMarks: marks are sorted by offset, inside the text, and each starts
// a paragraph (at the start of the text or after a blank line).
func checkMarks(t *testing.T, text string, marks []Mark) {
	t.Helper()
	for i, m := range marks {
		if m.Offset < 0 || m.Offset >= len(text) || (i > 0 && m.Offset <= marks[i-1].Offset) {
			t.Fatalf("mark %d %+v out of order or outside the text (%d bytes)", i, m, len(text))
		}
		if m.Offset > 0 && !strings.HasSuffix(text[:m.Offset], "\n\n") {
			t.Fatalf("mark %d %+v does not start a paragraph", i, m)
		}
	}
}

// markAt returns the mark in force at offset.
func markAt(marks []Mark, offset int) Mark {
	var m Mark
	for _, k := range marks {
		if k.Offset > offset {
			break
		}
		m = k
	}
	return m
}

// TestLocations: the paragraph, chapter and page a reader would count in
// the source. The expected numbers come from the Markdown sources and from
// how pandoc lays them out: a standalone document starts with its title
// as a paragraph of its own; in EPUB the title page is the first spine
// item (chapter 1) and the text the second; essay.md forces a page break
// (groff ms .bp) before "What we learned", and make-fixtures.sh checks
// with pdftotext that it lands on page 2.
func TestLocations(t *testing.T) {
	const planted = "A roof is a harsh place"
	tests := []struct {
		file string
		want Mark // Offset ignored
	}{
		{"memo/memo.docx", Mark{Paragraph: 5}}, // title, heading, 2 paragraphs, then the planted one
		{"memo/memo.odt", Mark{Paragraph: 5}},
		{"memo/memo.rtf", Mark{Paragraph: 5}},
		{"memo/memo.html", Mark{Paragraph: 5}},
		{"memo/memo.epub", Mark{Chapter: 2, Paragraph: 4}}, // the title is in chapter 1
		{"essay/essay.epub", Mark{Chapter: 2, Paragraph: 8}},
		{"essay/essay.docx", Mark{Paragraph: 9}},
		{"essay/essay.pdf", Mark{Page: 2}},
	}
	for _, tc := range tests {
		t.Run(tc.file, func(t *testing.T) {
			if strings.HasSuffix(tc.file, ".pdf") {
				needPDFToText(t)
			}
			p := extractOne(t, fixture(t, tc.file), testOptions(t))
			at := strings.Index(p.Text, planted)
			if at < 0 {
				t.Fatalf("planted paragraph not in the text")
			}
			got := markAt(p.Marks, at)
			got.Offset = 0
			if got != tc.want {
				t.Fatalf("planted paragraph at %+v, want %+v", got, tc.want)
			}
		})
	}
}

// TestDetection: the format comes from the content first (ZIP member
// names, signatures), the extension second.
func TestDetection(t *testing.T) {
	docx := readFixture(t, "essay/essay.docx")
	tests := []struct {
		name, file string
		raw        []byte
		want       string // format, or "" for refused
	}{
		{"DOCX by its members, whatever its name", "notes.pdf", docx, "docx"},
		{"ODT by its mimetype member", "a.zip", readFixture(t, "essay/essay.odt"), "odt"},
		{"EPUB by its mimetype member", "a.bin", readFixture(t, "essay/essay.epub"), "epub"},
		{"PDF by %PDF- (ISO 32000-1 7.5.2)", "a.txt", readFixture(t, "essay/essay.pdf"), "pdf"},
		{`RTF by {\rtf`, "a.txt", readFixture(t, "essay/essay.rtf"), "rtf"},
		{"HTML by its doctype", "a.txt", readFixture(t, "essay/essay.html"), "html"},
		{"e-mail by its header (RFC 5322 3.6)", "a.txt", []byte("From: a@example.org\r\nDate: Mon, 1 Jan 2024 10:00:00 +0000\r\nSubject: hi\r\n\r\nBody.\r\n"), "email"},
		{"a text that starts like a header is still text", "a.txt", []byte("Note: bring the oars.\n"), "text"},
		{"other ZIP is an archive", "a.dat", zipOf(t, zipMember{name: "a.txt", data: []byte("x")}), "zip"},
		{"HTML by extension", "a.htm", []byte("<p>Hello</p>"), "html"},
		{"Markdown by extension", "a.md", []byte("# Hello"), "markdown"},
		{"PostScript is refused", "a.txt", []byte("%!PS-Adobe-3.0\n"), ""},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			x := choose(tc.file, tc.raw)
			got := ""
			if x != nil {
				got = x.format()
			}
			if got != tc.want {
				t.Fatalf("choose(%q) = %q, want %q", tc.file, got, tc.want)
			}
		})
	}
}
