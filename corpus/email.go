package corpus

import (
	"bytes"
	"encoding/base64"
	"fmt"
	"io"
	"mime"
	"mime/multipart"
	"mime/quotedprintable"
	"net/mail"
	"strings"
	"unicode"
	"unicode/utf8"

	"golang.org/x/text/encoding/htmlindex"
)

// emailText reads e-mail messages saved as .eml (RFC 5322, with MIME:
// RFC 2045 to 2047). The header is read by net/mail; the subject's
// encoded words (RFC 2047, 2) are decoded by mime.WordDecoder with the
// character sets of x/text. The body is walked as a tree of MIME parts
// (multipart/*, RFC 2046 5.1, read with mime/multipart, which undoes
// quoted-printable; base64 and quoted-printable of a single-part body,
// RFC 2045 6.7 and 6.8, are undone here). The first text/plain part that
// is not an attachment is the body; without one, the first text/html part,
// read by the HTML extractor. Attachments and other parts are not read and
// are counted in a Note.
//
// Text is the subject, a blank line, then the body, with line ends
// normalised to "\n"; locations are line numbers in that text. Quoted
// replies (lines starting with ">", after optional spaces) are kept, their
// ">" marks read as spaces (blankQuoteMarks), and counted in a Note; with Options.SkipQuotedReplies they are left out and
// the Note says how many lines were. Quoting inside an HTML body
// (<blockquote>) is not recognised.
type emailText struct{}

func (emailText) format() string         { return "email" }
func (emailText) claims(ext string) bool { return ext == ".eml" }

// emailStarts are header fields a saved message commonly starts with,
// lower case.
var emailStarts = [...]string{"received:", "return-path:", "from:", "date:", "message-id:", "mime-version:", "delivered-to:", "subject:", "to:", "x-"}

// sniff: the first line is a header field a message starts with, and the
// header block (up to the first blank line, "\n\n" or "\r\n\r\n") has
// both From: and Date: or Subject: (RFC 5322, 3.6: From and Date are
// required). Field names are matched at line starts, in any case.
//
// sniff runs on every file whose format is not known yet, so it must cost
// little on the files that are not e-mail, which are most: it compares the
// first bytes with each field name in place, without lowering or copying
// head, and a file whose first line is not a header field costs a few byte
// comparisons. For one that is, it walks the header lines (bytes.IndexByte
// finds each line end) and stops at the blank line or as soon as both
// fields are seen, so at most head (sniffLen bytes) is read. The case
// folding is that of bytes.ToLower, which an earlier version applied to
// the whole head: see hasFoldPrefix.
func (emailText) sniff(head []byte) bool {
	start := false
	for _, s := range emailStarts {
		if hasFoldPrefix(head, s) {
			start = true
			break
		}
	}
	if !start {
		return false
	}
	from, dateOrSubject := false, false
	for p := 0; p < len(head); {
		line := head[p:]
		if p > 0 && (line[0] == '\n' || // "\n\n" ends the header block
			p >= 2 && head[p-2] == '\r' && len(line) >= 2 && line[0] == '\r' && line[1] == '\n') { // "\r\n\r\n"
			break
		}
		switch {
		case hasFoldPrefix(line, "from:"):
			from = true
		case hasFoldPrefix(line, "date:"), hasFoldPrefix(line, "subject:"):
			dateOrSubject = true
		}
		if from && dateOrSubject {
			return true
		}
		n := bytes.IndexByte(line, '\n')
		if n < 0 {
			break
		}
		p += n + 1
	}
	return false
}

// hasFoldPrefix reports whether b starts with lower, a lower-case ASCII
// string, when b is lowered as bytes.ToLower lowers it: rune by rune with
// unicode.ToLower (Go standard library bytes and unicode packages), an
// invalid byte counting as U+FFFD. ASCII bytes are folded directly; any
// other rune is decoded and lowered, because two non-ASCII letters lower to
// ASCII (U+0130 to "i", U+212A KELVIN SIGN to "k"; listed by scanning
// unicode.ToLower over every rune), so "RECE\u0130VED:" starts a header
// exactly as it did when head was lowered whole.
func hasFoldPrefix(b []byte, lower string) bool {
	i := 0
	for j := 0; j < len(lower); j++ {
		if i >= len(b) {
			return false
		}
		c := b[i]
		if c >= utf8.RuneSelf {
			r, n := utf8.DecodeRune(b[i:])
			if unicode.ToLower(r) != rune(lower[j]) {
				return false
			}
			i += n
			continue
		}
		if 'A' <= c && c <= 'Z' {
			c += 'a' - 'A'
		}
		if c != lower[j] {
			return false
		}
		i++
	}
	return true
}

// emailBody is what the walk over the parts found.
type emailBody struct {
	plain, html     []byte // decoded to UTF-8 (plain) / raw with its charset (html)
	plainCS, htmlCT string
	hasPlain        bool
	hasHTML         bool
	others          int // attachments and parts of other types, not read
	narrowed        int // parts whose Content-Type was read for charset and boundary only
	parts           int
	room            int // the message's body in bytes: no part is longer
}

func charsetReader(cs string, r io.Reader) (io.Reader, error) {
	e, err := htmlindex.Get(cs)
	if err != nil {
		return nil, fmt.Errorf("unknown character set %q", cs)
	}
	return e.NewDecoder().Reader(r), nil
}

func (emailText) extract(in *input) (extraction, error) {
	h := narrowHeader(in.raw)
	msg, err := mail.ReadMessage(io.MultiReader(bytes.NewReader(h.head), bytes.NewReader(h.body)))
	if err != nil {
		return extraction{}, refuse("malformed e-mail: " + err.Error())
	}
	dec := mime.WordDecoder{CharsetReader: charsetReader}
	subject := msg.Header.Get("Subject")
	if s, err := dec.DecodeHeader(subject); err == nil {
		subject = s
	}
	b := emailBody{room: h.bodyLen}
	if err := b.walk(in, msg.Header.Get("Content-Type"), msg.Header.Get("Content-Transfer-Encoding"), "", msg.Body, 0); err != nil {
		return extraction{}, err
	}
	var notes []string
	if h.fields > 0 {
		notes = append(notes, fmt.Sprintf("header of %d fields: only the subject and the MIME fields were read (more than %d)", h.fields, maxHeaderFields))
	}
	if h.subject > 0 {
		notes = append(notes, fmt.Sprintf("subject field of %d bytes: only its first %d bytes were read (more than %d)", h.subject, h.kept, maxFieldBytes))
	}
	var body, encName string
	switch {
	case b.hasPlain:
		body, encName = strings.ReplaceAll(string(b.plain), "\r\n", "\n"), b.plainCS
	case b.hasHTML:
		w := &paraWriter{limit: int(in.opt.MaxMemberBytes)}
		cs, err := htmlInto(w, b.html, b.htmlCT, in.opt.MaxDepth, in.dl)
		if err != nil {
			return extraction{}, err
		}
		body, encName = w.b.String(), cs
		notes = append(notes, "body read from the HTML part (no plain-text part)")
	}
	if b.narrowed > 0 {
		parts := "MIME parts"
		if b.narrowed == 1 {
			parts = "MIME part"
		}
		notes = append(notes, fmt.Sprintf("%d %s with a Content-Type of more than %d parameters: only charset and boundary were read", b.narrowed, parts, maxMediaParams))
	}
	if b.others > 0 {
		notes = append(notes, fmt.Sprintf("%d attachments or other parts not read", b.others))
	}
	body, quoted := quotedLines(body, in.opt.SkipQuotedReplies)
	switch {
	case quoted > 0 && in.opt.SkipQuotedReplies:
		notes = append(notes, fmt.Sprintf("%d quoted reply lines (starting with >) left out (--skip-quoted-replies)", quoted))
	case quoted > 0:
		body, _ = blankQuoteMarks(body)
		notes = append(notes, fmt.Sprintf("%d quoted reply lines (starting with >) kept, their > marks read as spaces so that they match the text they quote; --skip-quoted-replies leaves them out", quoted))
	}
	text := strings.TrimSpace(subject)
	if strings.TrimSpace(body) != "" {
		text += "\n\n" + strings.TrimLeft(body, "\n")
	}
	text = strings.ToValidUTF8(text, "\uFFFD")
	if strings.TrimSpace(text) == "" {
		return extraction{}, refuse("e-mail with no subject and no text body")
	}
	if encName == "" {
		encName = "us-ascii"
	}
	return extraction{Text: text, Encoding: encName, Notes: notes}, nil
}

// maxHeaderFields is the most header fields a message's header is read
// with whole. Saved messages have tens (a long chain of Received fields
// some hundreds); net/mail keeps every field in a map, which for a
// header of 10^5 fields is read from memory rather than cache.
const maxHeaderFields = 1000

// maxFieldBytes is the longest header field, folded lines included, that
// a header is read with whole, and the most of a subject that is read. A
// subject has tens of bytes; net/textproto joins a folded field's lines
// into a buffer grown as it goes and then copies it, so a field of
// megabytes cost several times its size in fresh memory.
const maxFieldBytes = 64 << 10

// emailHeader is a message's header as it is handed to net/mail, and what
// narrowing it left out.
type emailHeader struct {
	head, body []byte // read as one stream: head, then body
	fields     int    // the header's fields when there were too many, else 0
	subject    int    // the subject's length in bytes when it was cut, else 0
	kept       int    // the bytes of the subject field kept when it was cut, line end not counted
	bodyLen    int    // the bytes of raw from the header's end on
}

// narrowHeader returns raw as it is (as head) when its header has at most
// maxHeaderFields fields and none longer than maxFieldBytes. Otherwise
// head is a new header with only the fields the extractor reads
// (Subject, MIME-Version, Content-Type, Content-Transfer-Encoding, each
// with its folded lines; a subject cut to at most maxFieldBytes, at the
// last white space before that when there is one), and body the rest of
// raw from the blank line on, not copied. Lines of the header that are
// not fields (no colon) go with the fields dropped, so such a message is
// read where net/mail would have refused it. The Content-Type is kept
// whole: its parameters are narrowed when it is parsed (narrowMediaType).
func narrowHeader(raw []byte) emailHeader {
	end := len(raw) // the header's end: the blank line, or the whole file
	fields, longest, start := 0, 0, 0
	for p := 0; p < len(raw); {
		line := raw[p:]
		if line[0] == '\n' || (line[0] == '\r' && len(line) > 1 && line[1] == '\n') {
			end = p
			break
		}
		if line[0] != ' ' && line[0] != '\t' {
			fields++
			longest = max(longest, p-start)
			start = p
		}
		n := bytes.IndexByte(line, '\n')
		if n < 0 {
			break
		}
		p += n + 1
	}
	longest = max(longest, end-start)
	if fields <= maxHeaderFields && longest <= maxFieldBytes {
		return emailHeader{head: raw, bodyLen: len(raw) - end}
	}
	h := emailHeader{body: raw[end:], bodyLen: len(raw) - end}
	if fields > maxHeaderFields {
		h.fields = fields
	}
	var out []byte
	for p := 0; p < end; {
		q := p + 1 // the field's end: the next line that is not a fold
		for q < end {
			n := bytes.IndexByte(raw[q:end], '\n')
			if n < 0 {
				q = end
				break
			}
			q += n + 1
			if q < end && raw[q] != ' ' && raw[q] != '\t' {
				break
			}
		}
		field := raw[p:q]
		p = q
		switch {
		case hasFoldPrefix(field, "subject:"):
			if len(field) > maxFieldBytes {
				h.subject = len(field)
				field = cutField(field)
				h.kept = len(field) - len("\r\n") // cutField ends it with one line end
			}
		case hasFoldPrefix(field, "mime-version:"), hasFoldPrefix(field, "content-type:"), hasFoldPrefix(field, "content-transfer-encoding:"):
		default:
			continue
		}
		out = append(out, field...)
		if field[len(field)-1] != '\n' {
			out = append(out, "\r\n"...)
		}
	}
	h.head = out
	return h
}

// cutField returns field cut to at most maxFieldBytes, at its last space,
// tab or line end that leaves some of its value, else at a character's
// start, without the white space and line ends it would end with, plus
// one line end.
func cutField(field []byte) []byte {
	cut := field[:maxFieldBytes]
	if k := bytes.LastIndexAny(cut, " \t\n"); k > bytes.IndexByte(cut, ':')+1 {
		cut = cut[:k]
	} else {
		for len(cut) > 0 && !utf8.RuneStart(field[len(cut)]) {
			cut = cut[:len(cut)-1]
		}
	}
	cut = bytes.TrimRight(cut, " \t\r\n")
	return append(cut[:len(cut):len(cut)], "\r\n"...)
}

// maxMediaParams is the most parameters a Content-Type is parsed with
// whole. A part's type has one to three (charset, boundary, format);
// mime.ParseMediaType keeps every one in a map.
const maxMediaParams = 100

// narrowMediaType returns ct as it is when it has at most maxMediaParams
// parameters, and otherwise the media type with only the parameters the
// extractor reads (charset and boundary, RFC 2046; with their RFC 2231
// continuations "charset*0", "boundary*"), in their order. Parameters are
// split at the semicolons outside quoted strings (RFC 2045 5.1).
func narrowMediaType(ct string) string {
	if strings.Count(ct, ";") <= maxMediaParams {
		return ct
	}
	var pieces []string
	quoted, start := false, 0
	for i := 0; i < len(ct); i++ {
		switch c := ct[i]; {
		case c == '\\' && quoted:
			i++
		case c == '"':
			quoted = !quoted
		case c == ';' && !quoted:
			pieces = append(pieces, ct[start:i])
			start = i + 1
		}
	}
	pieces = append(pieces, ct[start:])
	kept := pieces[:1]
	for _, p := range pieces[1:] {
		name := strings.ToLower(strings.TrimSpace(p))
		if i := strings.IndexAny(name, "=*"); i >= 0 {
			name = strings.TrimSpace(name[:i])
		}
		if name == "charset" || name == "boundary" {
			kept = append(kept, p)
		}
	}
	return strings.Join(kept, ";")
}

// walk visits one MIME entity and, for a multipart, its parts.
func (b *emailBody) walk(in *input, ct, cte, disp string, r io.Reader, depth int) error {
	b.parts++
	if in.dl.passed() {
		return in.dl.err()
	}
	if depth > in.opt.MaxDepth {
		return refuse(fmt.Sprintf("e-mail nests MIME parts more than %d deep (--max-depth)", in.opt.MaxDepth))
	}
	if b.parts > in.opt.MaxMembers {
		return refuse(fmt.Sprintf("e-mail has more than %d MIME parts (--max-members)", in.opt.MaxMembers))
	}
	if n := narrowMediaType(ct); len(n) != len(ct) {
		ct = n
		b.narrowed++
	}
	media, params := "text/plain", map[string]string{}
	if ct != "" {
		m, p, err := mime.ParseMediaType(ct)
		if err != nil {
			b.others++ // RFC 2045 5.2 makes such a part text/plain; we do not guess
			return nil
		}
		media, params = m, p
	}
	if strings.HasPrefix(media, "multipart/") {
		mr := multipart.NewReader(r, params["boundary"])
		for {
			p, err := mr.NextPart()
			if err == io.EOF {
				return nil
			}
			if err != nil {
				return refuse("malformed MIME multipart body: " + err.Error())
			}
			err = b.walk(in, p.Header.Get("Content-Type"), p.Header.Get("Content-Transfer-Encoding"), p.Header.Get("Content-Disposition"), p, depth+1)
			if err != nil {
				return err
			}
		}
	}
	attachment := strings.HasPrefix(strings.ToLower(strings.TrimSpace(disp)), "attachment")
	want := !attachment && ((media == "text/plain" && !b.hasPlain) || (media == "text/html" && !b.hasHTML))
	if !want {
		if media != "text/plain" && media != "text/html" || attachment {
			b.others++
		}
		return nil
	}
	switch strings.ToLower(strings.TrimSpace(cte)) {
	case "base64":
		r = base64.NewDecoder(base64.StdEncoding, r) // it skips the CR LF of wrapped lines
	case "quoted-printable":
		r = quotedprintable.NewReader(r)
	}
	// Read into room for the whole body at once (a part is never larger
	// than the body it is in; a base64 one is smaller): io.ReadAll grows
	// its buffer a quarter at a time, copying a large body about five
	// times over.
	var buf bytes.Buffer
	buf.Grow(int(min(int64(b.room), in.opt.MaxMemberBytes+1)) + bytes.MinRead)
	_, err := buf.ReadFrom(io.LimitReader(r, in.opt.MaxMemberBytes+1))
	data := buf.Bytes()
	if err != nil {
		return refuse("damaged e-mail body: " + err.Error())
	}
	if int64(len(data)) > in.opt.MaxMemberBytes {
		return refuse(fmt.Sprintf("e-mail part larger than the %s limit (--max-member-size)", formatSize(in.opt.MaxMemberBytes)))
	}
	cs := strings.ToLower(params["charset"])
	if media == "text/html" {
		b.html, b.htmlCT, b.hasHTML = data, ct, true
		return nil
	}
	if cs == "" {
		cs = "us-ascii"
	}
	if cs != "us-ascii" && cs != "utf-8" {
		e, err := htmlindex.Get(cs)
		if err != nil {
			return refuse(fmt.Sprintf("e-mail body in an unknown character set %q", cs))
		}
		if data, err = e.NewDecoder().Bytes(data); err != nil {
			return refuse(fmt.Sprintf("e-mail body is not valid %s", cs))
		}
	}
	b.plain, b.plainCS, b.hasPlain = data, cs, true
	return nil
}

// quotedLines counts the lines of body that start, after spaces, with ">"
// and, when drop is set, removes them.
func quotedLines(body string, drop bool) (string, int) {
	n := 0
	var out strings.Builder
	for line := range strings.SplitAfterSeq(body, "\n") {
		if strings.HasPrefix(strings.TrimLeft(line, " \t"), ">") {
			n++
			if drop {
				continue
			}
		}
		if drop {
			out.WriteString(line)
		}
	}
	if !drop {
		return body, n
	}
	return out.String(), n
}
