package corpus

import (
	"bufio"
	"bytes"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"os"
	"strconv"
	"strings"
)

// JSON Lines corpora (.jsonl).
//
// Large text collections are usually shipped as one file of JSON Lines
// (https://jsonlines.org): one JSON object per line, each a document, with
// an identifier and the text among its fields. A file whose name ends in
// ".jsonl" (any case) is read that way: every line gives one document named
// "file.jsonl#ID", whose Text is the decoded string of the text field
// (Options.JSONLText, default "text") and whose ID comes from the id field
// (Options.JSONLID, default "id"; a string, or a number as written). Other
// fields are ignored. Offsets and line numbers of such a document are
// offsets into that decoded string, not into the file.
//
// A line that is not a JSON object, lacks either field, has an id that is
// not a string or number, an empty id or text, or an id already used on an
// earlier line of the file gives no document: it is listed in Skipped as
// "file.jsonl:N" (N the line number, from 1) with the reason. Blank lines
// hold nothing and are passed over. A byte order mark before the first line
// and a CR before each LF are dropped. Invalid UTF-8 inside a JSON string
// is replaced by U+FFFD (encoding/json does that).
//
// Options.FileTimeout applies to each line, not to the file (a corpus may
// take hours to read): a line whose reading and decoding ran past it is
// listed as skipped. encoding/json cannot be stopped midway, so the clock
// is read once the line is decoded; what bounds the decoding is the line's
// size limit and encoding/json's linear time.
//
// The file is streamed through a bufio.Reader, one line at a time, and never
// read whole: a JSONL corpus is usually far larger than any one document,
// so MaxFileSize (a per-document limit) does not apply to the file. What
// is bounded instead is one line, the size of one document:
// Options.MaxJSONLLine (0 means MaxFileSize). A longer line is skipped with
// its reason and the reading goes on after it. Only the documents' texts
// stay in memory, as for any other input.
//
// Rejected: a streaming JSON tokenizer that picks the two fields out without
// building the object. It would save one copy of each line's text, but
// encoding/json's decoding of one line into raw fields is simple, exact on
// escapes, and not the cost that matters next to segmentation.

// isJSONL reports whether a file is read as JSON Lines, by its name.
func isJSONL(name string) bool {
	return strings.HasSuffix(strings.ToLower(name), ".jsonl")
}

// readJSONL streams one JSON Lines file into parts: a document per good
// line (sub "#ID"), a reason per bad one (sub ":N").
func readJSONL(osPath string, opt *Options) []part {
	var parts []part
	readJSONLEach(osPath, opt, func(p *part) { parts = append(parts, *p) })
	return parts
}

// readJSONLEach is readJSONL handing each part to emit as soon as its line
// is read, so that a large file's texts need not be held at once.
func readJSONLEach(osPath string, opt *Options, emit func(*part)) {
	f, err := os.Open(osPath)
	if err != nil {
		emit(&part{reason: osReason(err)})
		return
	}
	defer f.Close()
	emitted := 0
	count := func(p *part) { emitted++; emit(p) }
	lines, err := eachJSONL(f, opt, count)
	if err != nil {
		// A read error ends the file; the documents read so far stay, and
		// the file itself is listed with the reason.
		count(&part{reason: fmt.Sprintf("read error after line %d: %s", lines, osReason(err))})
	}
	if emitted == 0 {
		emit(&part{reason: reasonEmpty})
	}
}

// scanJSONL reads JSON Lines from r and returns the parts and the number of
// lines read. The error is for a failed read only; every bad line is a part
// with a reason.
func scanJSONL(r io.Reader, opt *Options) ([]part, int, error) {
	var parts []part
	n, err := eachJSONL(r, opt, func(p *part) { parts = append(parts, *p) })
	return parts, n, err
}

// eachJSONL is scanJSONL handing each part to emit instead of collecting.
func eachJSONL(r io.Reader, opt *Options, emit func(*part)) (int, error) {
	idField, textField := opt.JSONLID, opt.JSONLText
	limit := opt.MaxJSONLLine
	br := bufio.NewReaderSize(r, 64<<10)
	seen := make(map[string]int) // id -> line it was first used on
	var line []byte
	for n := 1; ; n++ {
		var tooLong bool
		var err error
		dl := newDeadline(opt.FileTimeout) // per line: a corpus file may take hours
		line, tooLong, err = readLine(br, line[:0], limit)
		if err != nil && !errors.Is(err, io.EOF) {
			return n - 1, err
		}
		if len(line) > 0 || tooLong {
			if n == 1 {
				line = bytes.TrimPrefix(line, []byte("\uFEFF"))
			}
			if p := jsonlPart(line, tooLong, limit, idField, textField, n, seen); p != nil {
				if p.reason == "" && dl.check() {
					delete(seen, p.sub[1:]) // the id is free again: no document has it
					p = &part{sub: ":" + strconv.Itoa(n), reason: fmt.Sprintf("line %d: ", n) + timedOutReason(opt.FileTimeout)}
				}
				emit(p)
			}
		}
		if err != nil { // io.EOF
			return n, nil
		}
	}
}

// readLine appends the next line of br to buf, without its LF or CRLF. A
// line longer than limit is read to its end and dropped (tooLong). The error
// is io.EOF after the last line.
func readLine(br *bufio.Reader, buf []byte, limit int64) ([]byte, bool, error) {
	tooLong := false
	for {
		chunk, err := br.ReadSlice('\n')
		if !tooLong {
			if int64(len(buf)+len(chunk)) > limit+2 { // room for CRLF
				tooLong, buf = true, buf[:0]
			} else {
				buf = append(buf, chunk...)
			}
		}
		if errors.Is(err, bufio.ErrBufferFull) {
			continue
		}
		buf = bytes.TrimSuffix(buf, []byte("\n"))
		buf = bytes.TrimSuffix(buf, []byte("\r"))
		if !tooLong && int64(len(buf)) > limit {
			tooLong, buf = true, buf[:0]
		}
		return buf, tooLong, err
	}
}

// jsonlPart turns line n into a document part, a skipped part, or nil for a
// blank line.
func jsonlPart(line []byte, tooLong bool, limit int64, idField, textField string, n int, seen map[string]int) *part {
	bad := func(format string, args ...any) *part {
		return &part{sub: ":" + strconv.Itoa(n), reason: fmt.Sprintf("line %d: ", n) + fmt.Sprintf(format, args...)}
	}
	if tooLong {
		return bad("longer than the %s limit for one line (--jsonl-max-line)", formatSize(limit))
	}
	if len(bytes.TrimSpace(line)) == 0 {
		return nil
	}
	var fields map[string]json.RawMessage
	if err := json.Unmarshal(line, &fields); err != nil || fields == nil {
		return bad("not a JSON object")
	}
	rawID, ok := fields[idField]
	if !ok {
		return bad("no %q field (the id, --jsonl-id)", idField)
	}
	id, ok := jsonlID(rawID)
	if !ok {
		return bad("the %q field is not a string or a number", idField)
	}
	if id == "" {
		return bad("the %q field is empty", idField)
	}
	rawText, ok := fields[textField]
	if !ok {
		return bad("no %q field (the text, --jsonl-text)", textField)
	}
	var text string
	if err := json.Unmarshal(rawText, &text); err != nil {
		return bad("the %q field is not a string", textField)
	}
	if strings.TrimSpace(text) == "" {
		return bad("the %q field is empty", textField)
	}
	if first, dup := seen[id]; dup {
		return bad("id %q already used on line %d", clipID(id), first)
	}
	seen[id] = n
	return &part{
		sub:        "#" + id,
		format:     "jsonl",
		size:       int64(len(line)),
		extraction: extraction{Text: text, Encoding: "utf-8"},
	}
}

// jsonlID returns the id as text: a JSON string's value, or a number as
// written ("17", "1e3").
func jsonlID(raw json.RawMessage) (string, bool) {
	raw = bytes.TrimSpace(raw)
	if len(raw) == 0 {
		return "", false
	}
	switch raw[0] {
	case '"':
		var s string
		if json.Unmarshal(raw, &s) != nil {
			return "", false
		}
		return s, true
	case '-', '0', '1', '2', '3', '4', '5', '6', '7', '8', '9':
		return string(raw), true
	}
	return "", false
}

// clipID shortens an id for a message.
func clipID(id string) string {
	if len(id) <= 80 {
		return id
	}
	return id[:runeStart(id, 77)] + "..."
}

// runeStart returns the last UTF-8 sequence start at or before i.
func runeStart(s string, i int) int {
	for i > 0 && s[i]&0xC0 == 0x80 {
		i--
	}
	return i
}
