package corpus

import (
	"bytes"
	"context"
	"errors"
	"fmt"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"time"
	"unicode"
	"unicode/utf8"
)

// pdfText reads PDF through pdftotext from poppler-utils: parsing PDF
// (ISO 32000) with its fonts, encodings and content streams is a project
// of its own, and pdftotext is the reference reader on Debian. It is run
// with no shell: the program and its arguments are passed directly
// ("-enc UTF-8 -eol unix FILE -", no -layout, so text comes in reading
// order), the input is the file on disk (or, for a ZIP member, a private
// temporary file, mode 0600, in Options.TempDir, removed afterwards), the output is read
// from standard output, bounded by --max-member-size, and the run is
// killed after --pdf-timeout.
//
// pdftotext ends every page with a form feed; page n of the PDF gives the
// paragraphs marked page n. Within a page, pdftotext separates blocks
// with blank lines when it sees them, but often not a heading from its
// section, so a line that is much shorter than the page's longest line
// and ends without a comma or hyphen, followed by a line starting with a
// capital letter or digit, also ends a paragraph (common practice for
// text from PDF; otherwise a heading runs into the first sentence under
// it). Lines inside a paragraph are joined with a line break, which the
// sentence splitter reads as a space; a word hyphenated across lines
// stays split ("pol- icy"), which the shingle normalisation joins.
type pdfText struct{}

func (pdfText) format() string         { return "pdf" }
func (pdfText) claims(ext string) bool { return ext == ".pdf" }

// sniff: the header "%PDF-" (ISO 32000-1, 7.5.2), which readers accept
// anywhere in the first 1024 bytes.
func (pdfText) sniff(head []byte) bool {
	return bytes.Contains(head[:min(len(head), 1024)], []byte("%PDF-"))
}

// reasonNoPDFToText is the Skipped reason when pdftotext is not installed.
const reasonNoPDFToText = "PDF not read: pdftotext is not installed (Debian/Ubuntu: apt-get install poppler-utils)"

func (pdfText) extract(in *input) (extraction, error) {
	prog, err := exec.LookPath(in.opt.PDFToText)
	if err != nil {
		return extraction{}, refuse(reasonNoPDFToText)
	}
	name := in.osPath
	if name == "" {
		f, err := os.CreateTemp(in.opt.TempDir, "reprise-*.pdf") // mode 0600; "" is os.TempDir()
		if err != nil {
			return extraction{}, fmt.Errorf("temporary file for a PDF member: %w", err)
		}
		name = f.Name()
		defer os.Remove(name)
		_, werr := f.Write(in.raw)
		if cerr := f.Close(); werr == nil {
			werr = cerr
		}
		if werr != nil {
			return extraction{}, fmt.Errorf("temporary file for a PDF member: %w", werr)
		}
	}
	if strings.HasPrefix(name, "-") { // never read as an option
		name = "." + string(filepath.Separator) + name
	}
	// The run is bounded by --pdf-timeout and by what is left of the
	// file's deadline (a PDF member of a ZIP shares the archive's).
	limit, byFile := in.opt.PDFTimeout, false
	if in.dl != nil {
		if left := time.Until(in.dl.at); left < limit {
			limit, byFile = max(left, 0), true
		}
	}
	ctx, cancel := context.WithTimeout(context.Background(), limit)
	defer cancel()
	cmd := exec.CommandContext(ctx, prog, "-enc", "UTF-8", "-eol", "unix", name, "-")
	out := &cappedBuffer{limit: int(in.opt.MaxMemberBytes), onOver: cancel}
	stderr := &cappedBuffer{limit: 4 << 10, drop: true}
	cmd.Stdout, cmd.Stderr = out, stderr
	cmd.Env = []string{"LC_ALL=C.UTF-8"}
	err = cmd.Run()
	switch {
	case out.over:
		return extraction{}, refuse(fmt.Sprintf("pdftotext wrote more than the %s limit (--max-member-size)", formatSize(in.opt.MaxMemberBytes)))
	case ctx.Err() != nil && byFile:
		return extraction{}, in.dl.err()
	case ctx.Err() != nil:
		return extraction{}, refuse(fmt.Sprintf("pdftotext did not finish within %v (--pdf-timeout)", in.opt.PDFTimeout))
	case err != nil:
		var ee *exec.ExitError
		if errors.As(err, &ee) {
			msg := strings.TrimSpace(firstLine(stderr.b.String()))
			if msg == "" {
				msg = "no message"
			}
			return extraction{}, refuse(fmt.Sprintf("pdftotext could not read this PDF (exit status %d: %s)", ee.ExitCode(), msg))
		}
		return extraction{}, fmt.Errorf("running pdftotext: %w", err)
	}
	w := &paraWriter{limit: int(in.opt.MaxMemberBytes)}
	pdfPages(w, out.b.Bytes())
	x, err := w.extraction("utf-8", nil)
	if err != nil {
		return extraction{}, refuse("no text in this PDF (scanned pages without a text layer give none)")
	}
	x.Marks = pageMarks(x.Marks)
	return x, nil
}

// pageMarks keeps one mark per page, without paragraph numbers: the
// paragraphs of a PDF are guessed (see pdfText), its pages are not, and a
// location a reader cannot check is worse than none.
func pageMarks(ms []Mark) []Mark {
	out := ms[:0]
	for _, m := range ms {
		m.Paragraph = 0
		if len(out) == 0 || out[len(out)-1].Page != m.Page {
			out = append(out, m)
		}
	}
	return out
}

// pdfPages adds pdftotext's output, pages separated by form feeds, to w.
func pdfPages(w *paraWriter, out []byte) {
	page := 0
	for len(out) > 0 || page == 0 {
		page++
		pg := out
		if i := bytes.IndexByte(out, '\f'); i >= 0 {
			pg, out = out[:i], out[i+1:]
		} else {
			out = nil
		}
		w.newPage(page)
		lines := strings.Split(string(pg), "\n")
		longest := 0
		for _, l := range lines {
			longest = max(longest, utf8.RuneCountInString(strings.TrimSpace(l)))
		}
		for i, l := range lines {
			l = strings.TrimSpace(l)
			if l == "" {
				w.endPara()
				continue
			}
			w.text(l)
			w.lineBreak()
			if i+1 < len(lines) && endsBlock(l, strings.TrimSpace(lines[i+1]), longest) {
				w.endPara()
			}
		}
		if len(out) == 0 {
			break
		}
	}
}

// endsBlock: see pdfText, a short line before a capitalised one ends its
// paragraph.
func endsBlock(line, next string, longest int) bool {
	if next == "" || utf8.RuneCountInString(line)*4 > longest*3 {
		return false
	}
	last, _ := utf8.DecodeLastRuneInString(line)
	if last == ',' || last == '-' || last == ';' {
		return false
	}
	first, _ := utf8.DecodeRuneInString(next)
	return unicode.IsUpper(first) || unicode.IsDigit(first)
}

func firstLine(s string) string {
	if i := strings.IndexByte(s, '\n'); i >= 0 {
		return s[:i]
	}
	return s
}

// A cappedBuffer keeps at most limit bytes. Past the limit it either drops
// the rest (drop, for messages) or fails the write and calls onOver, which
// kills the child process, so endless output is stopped instead of
// filling memory.
type cappedBuffer struct {
	b      bytes.Buffer
	limit  int
	drop   bool
	onOver func()
	over   bool
}

func (c *cappedBuffer) Write(p []byte) (int, error) {
	if c.b.Len()+len(p) > c.limit {
		if c.drop {
			c.b.Write(p[:max(0, c.limit-c.b.Len())])
			return len(p), nil
		}
		c.over = true
		if c.onOver != nil {
			c.onOver()
		}
		return 0, errors.New("output limit reached")
	}
	return c.b.Write(p)
}
