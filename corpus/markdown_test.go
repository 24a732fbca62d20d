package corpus

import (
	"bytes"
	"strings"
	"testing"
	"unicode/utf8"
)

func blankMarkdown(in string) string {
	b := []byte(in)
	var m mdBlanker
	m.blank(b)
	return string(b)
}

// checkBlanked checks the promises of the Markdown extractor that hold for
// any input: same length, line ends where they were, and every byte that
// is not a space is the file's own byte at the same offset (so every kept
// word sits at its original offset).
func checkBlanked(t *testing.T, in, out string) {
	t.Helper()
	if len(out) != len(in) {
		t.Fatalf("length %d, want the file's %d", len(out), len(in))
	}
	for i := range len(in) {
		o, c := out[i], in[i]
		switch {
		case c == '\n' || c == '\r':
			if o != c {
				t.Fatalf("line end at offset %d changed to %q", i, o)
			}
		case o != ' ' && o != c:
			t.Fatalf("offset %d holds %q, the file has %q", i, o, c)
		case o == '\n' || o == '\r':
			t.Fatalf("line end added at offset %d", i)
		}
	}
}

// The Markdown cases follow the CommonMark specification 0.31.2 and the
// GitHub Flavored Markdown specification 0.29-gfm (tables,
// strikethrough), from memory; "visible" is the text a renderer shows,
// words separated by single spaces.
func TestMarkdown(t *testing.T) {
	tests := []struct {
		name    string
		in      string
		visible string
	}{
		{"ATX heading marks go, the title stays", "# Title\n\nBody text.\n", "Title Body text."},
		{"closing hashes of a heading go", "## Title ##\n", "Title"},
		{"a hash without a space is not a heading", "#hashtag and #1\n", "#hashtag and #1"},
		{"seven hashes are not a heading", "####### seven\n", "####### seven"},
		{"a setext underline goes", "Title\n=====\n\nBody\n", "Title Body"},
		{"a setext dash underline goes", "Title\n---\nBody\n", "Title Body"},
		{"emphasis marks go", "*a* **b** _c_ __d__ ***e*** ~~f~~ ~g~\n", "a b c d e f g"},
		{"emphasis across a line break goes", "some *long\nemphasis* here\n", "some long emphasis here"},
		{"underscores inside words stay", "snake_case_name and __init__\n", "snake_case_name and init"},
		{"a lone asterisk stays", "5 * 3 = 15 and a*\n", "5 * 3 = 15 and a*"},
		{"an unmatched opener stays", "*footnote text\n", "*footnote text"},
		{"three tildes are not strikethrough", "a ~~~x~~~ y\n", "a ~~~x~~~ y"},
		{"three tildes starting a line open a fence", "~~~x~~~ y\ncode\n", "code"},
		{"inline code keeps its text", "use `go vet` now\n", "use go vet now"},
		{"double backticks may hold one", "see ``a ` b`` here\n", "see a ` b here"},
		{"emphasis marks inside code stay", "`*not*` but *yes*\n", "*not* but yes"},
		{"an unclosed backtick stays", "it`s odd\n", "it`s odd"},
		{"fences go, the code stays", "```go\nfmt.Println(1)\n```\n", "fmt.Println(1)"},
		{"tilde fences go", "~~~\ncode line\n~~~\n", "code line"},
		{"markup inside a fence is code, not markup", "```\n*not emphasis* [x](y)\n```\n", "*not emphasis* [x](y)"},
		{"an unclosed fence runs to the end", "```\n# not a heading\n", "# not a heading"},
		{"bullet markers go", "- one\n+ two\n* three\n", "one two three"},
		{"numbered markers go", "1. one\n2) two\n10. ten\n", "one two ten"},
		{"a number starting a wrapped line stays", "It was in\n1984. The year\n", "It was in 1984. The year"},
		{"nested list markers go", "- a\n  - b\n    1. c\n", "a b c"},
		{"block quote marks go", "> quoted\n> > nested\n>\n> - item\n", "quoted nested item"},
		{"thematic breaks go", "a\n\n***\n\n- - -\n\n___\n\nb\n", "a b"},
		{"link syntax goes, the text stays", `see [the text](http://x.com/a_b "a title") here` + "\n", "see the text here"},
		{"a link destination in angle brackets goes", "[t](<a b>)\n", "t"},
		{"a destination with parentheses goes", "[t](http://x/(y)) z\n", "t z"},
		{"image syntax goes, the alt text stays", "![alt text](img.png) after\n", "alt text after"},
		{"an image inside a link", "[![logo](l.png) home](/)\n", "logo home"},
		{"a link spanning a line break", "a [long\nlink](u) b\n", "a long link b"},
		{"reference links and definitions go", "[text][ref] and [more][]\n\n[ref]: http://x.com \"T\"\n[more]: <http://y>\n", "text and more"},
		{"a bracket without a destination stays", "he said [sic] it\n", "he said [sic] it"},
		{"a footnote definition keeps its text", "[^1]: The note.\n", "[^1]: The note."},
		{"prose with a colon after brackets stays", "[note]: this is important\n", "[note]: this is important"},
		{"autolink brackets go, the address stays", "<http://example.com/x> and <a@b.org>\n", "http://example.com/x and a@b.org"},
		{"HTML tags go, their text stays", "<b>bold</b> and <a href=\"x>y\">link</a><br/>\n", "bold and link"},
		{"an HTML comment goes", "a <!-- hidden --> b\n", "a b"},
		{"an HTML comment block over lines goes", "a\n\n<!--\nhidden\n\nstill hidden\n-->\n\nb\n", "a b"},
		{"a less-than sign in prose stays", "x < y and 1<2\n", "x < y and 1<2"},
		{"table pipes and the delimiter row go", "| a | b |\n|---|:-:|\n| 1 | 2 |\n", "a b 1 2"},
		{"a table without outer pipes", "a | b\n--- | ---\n1 | 2\n\nafter\n", "a b 1 2 after"},
		{"an escaped pipe in a table stays", "| a \\| b | c |\n| --- | --- |\n", "a | b c"},
		{"pipes outside a table stay", "either | or\n", "either | or"},
		// Each removed backslash leaves a space where it stood.
		{"backslash escapes go, the character stays", `\*not em\* and \[x\] \\` + "\n", `*not em * and [x ] \`},
		{"a backslash hard break goes", "line\\\nnext\n", "line next"},
		{"YAML front matter goes", "---\ntitle: x\ntags: [a]\n---\nBody\n", "Body"},
		{"front matter after a UTF-8 mark goes", "\uFEFF---\nk: v\n---\n# T\n", "\uFEFF T"},
		{"an unclosed front matter is a rule", "---\ntext\n", "text"},
		{"non-ASCII link destinations go whole", "[é](http://x/é)\n", "é"},
		{"CRLF line ends stay", "# T\r\n\r\n*a* b\r\n", "T a b"},
		{"a lone CR ends a line", "# T\r- x\r", "T x"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			out := blankMarkdown(tc.in)
			checkBlanked(t, tc.in, out)
			if got := strings.Join(strings.Fields(out), " "); got != tc.visible {
				t.Errorf("visible text %q, want %q\n in: %q\nout: %q", got, tc.visible, tc.in, out)
			}
		})
	}
}

// TestMarkdownLines checks paragraph structure: blank lines stay blank and
// lines made only of markup become blank, so the sentence splitter sees
// the same paragraphs a reader does.
func TestMarkdownLines(t *testing.T) {
	tests := []struct {
		name  string
		in    string
		blank []bool // per line: is it blank (only spaces) after blanking
	}{
		{"a blank line stays blank", "a\n\nb\n", []bool{false, true, false}},
		{"a setext underline becomes a blank line", "Title\n===\nbody\n", []bool{false, true, false}},
		{"fence lines become blank", "text\n```sh\nls\n```\nmore\n", []bool{false, true, false, true, false}},
		{"a rule becomes blank", "a\n\n---\nb\n", []bool{false, true, true, false}},
		{"a heading line is not blank", "# Head\nbody\n", []bool{false, false}},
		{"front matter lines become blank", "---\na: 1\n---\nx\n", []bool{true, true, true, false}},
		{"a reference definition becomes blank", "[r]: http://x\n", []bool{true}},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			out := blankMarkdown(tc.in)
			checkBlanked(t, tc.in, out)
			lines := strings.Split(strings.TrimSuffix(out, "\n"), "\n")
			if len(lines) != len(tc.blank) {
				t.Fatalf("%d lines, want %d", len(lines), len(tc.blank))
			}
			for i, l := range lines {
				if got := strings.TrimSpace(l) == ""; got != tc.blank[i] {
					t.Errorf("line %d %q: blank %v, want %v", i+1, l, got, tc.blank[i])
				}
			}
		})
	}
}

// TestMarkdownWordsKeepOffsets checks that each visible word of a larger
// document is found in the output at the offset it has in the file.
func TestMarkdownWordsKeepOffsets(t *testing.T) {
	in := "---\ntitle: Essay\n---\n# Bicycle *lanes*\n\n" +
		"Our town should build [protected lanes](https://example.org/lanes \"plan\").\n" +
		"> Cyclists **feel** safer.\n\n" +
		"1. Fewer `crashes`\n2. Cleaner air<br>\n\n" +
		"| Year | Trips |\n|------|------:|\n| 2023 | 4100 |\n"
	out := blankMarkdown(in)
	checkBlanked(t, in, out)
	for _, w := range []string{"Bicycle", "lanes", "Our", "protected", "Cyclists", "feel", "safer.", "Fewer", "crashes", "Cleaner", "air", "Year", "Trips", "2023", "4100"} {
		at := strings.Index(in[strings.Index(in, "# B"):], w) + strings.Index(in, "# B")
		if out[at:at+len(w)] != w {
			t.Errorf("word %q not at its offset %d: %q", w, at, out[at:at+len(w)])
		}
	}
	for _, gone := range []string{"title", "https", "plan", "*", "`", "|", "---", "<br>", ">"} {
		if strings.Contains(out, gone) {
			t.Errorf("markup %q left in %q", gone, out)
		}
	}
}

func TestMarkdownExtractorDecodesFirst(t *testing.T) {
	raw := []byte("# Caf\xe9\n\n*na\xefve*\n")
	x, err := markdown{}.extract(&input{raw: raw})
	if err != nil {
		t.Fatal(err)
	}
	// Windows-1252 0xE9 = é, 0xEF = ï (code page 1252 table, from memory).
	if got := strings.Join(strings.Fields(x.Text), " "); got != "Café naïve" || x.Encoding != encWindows1252 {
		t.Errorf("text %q, encoding %q", x.Text, x.Encoding)
	}
}

func FuzzMarkdown(f *testing.F) {
	for _, s := range []string{
		"# T\n\n*a* **b** _c_ `d` [e](f \"g\") ![h](i)\n",
		"---\nk: v\n---\n> - 1. x\n",
		"```\ncode\n```\n~~~\n",
		"| a | b |\n|---|---|\n| 1 | 2 |\n",
		"<!-- c\n-->\n<a href='x'>y</a> <http://z> \\*\n",
		"[r]: <u> 'title'\n[x][r] [y][]\nT\n==\n",
		"***a**b*__c_d__~~e~f~",
		"[[[[((((]]]])))) <<<>>> ``` ` \\",
	} {
		f.Add([]byte(s))
	}
	seedHostile(f, "markdown")
	f.Fuzz(func(t *testing.T, in []byte) {
		b := bytes.Clone(in)
		var m mdBlanker
		m.blank(b)
		checkBlanked(t, string(in), string(b))
		if utf8.Valid(in) && !utf8.Valid(b) {
			t.Fatalf("valid UTF-8 in, invalid out: %q -> %q", in, b)
		}
	})
}

func BenchmarkMarkdown(b *testing.B) {
	doc := "# A heading for the section\n\n" +
		"Some *emphasised* text with a [link](https://example.org/page \"title\") and `code`,\n" +
		"wrapped over lines as editors do, with **strong** words and snake_case names.\n\n" +
		"- a list item with ~~struck~~ text\n- another <em>item</em>\n\n" +
		"> a quoted paragraph\n\n| a | b |\n|---|---|\n| 1 | 2 |\n\n```\ncode block\n```\n\n"
	in := []byte(strings.Repeat(doc, 1000))
	buf := make([]byte, len(in))
	var m mdBlanker
	b.SetBytes(int64(len(in)))
	for b.Loop() {
		copy(buf, in)
		m.blank(buf)
	}
}
