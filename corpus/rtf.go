package corpus

import (
	"bytes"
	"fmt"
	"strconv"

	"golang.org/x/text/encoding"
	"golang.org/x/text/encoding/charmap"
	"golang.org/x/text/encoding/japanese"
	"golang.org/x/text/encoding/korean"
	"golang.org/x/text/encoding/simplifiedchinese"
	"golang.org/x/text/encoding/traditionalchinese"
	xunicode "golang.org/x/text/encoding/unicode"
)

// rtfText reads the body text of RTF documents (Microsoft Rich Text Format
// Specification 1.9.1). One pass over the bytes with a stack of groups
// ({...}), each remembering whether its text is skipped and its \ucN:
//
//   - destinations that are not body text are skipped with their groups:
//     font, colour, style and list tables, document information, pictures,
//     objects, headers and footers, field instructions (the field result,
//     \fldrslt, is kept), and every group starting with \* (an ignorable
//     destination, "Destinations" in the specification) — which includes
//     footnotes as pandoc writes them, so RTF notes are not read;
//   - \par, \sect, \page, \row and \cell end paragraphs, \line is a line
//     break, \tab white space;
//   - \uN is the Unicode character N (negative N counts from 65536), and
//     the \ucN characters after it (default 1) are its fallback and are
//     dropped;
//   - \'hh is a byte in the document's code page (\ansicpg, default
//     Windows-1252; double-byte code pages 932, 936, 949, 950 decode
//     consecutive escapes together); per-font \fcharset is not followed;
//   - \binN skips N bytes of binary data;
//   - symbols (\emdash, \lquote, \~, ...) become their characters.
//
// Nesting deeper than --max-depth groups is refused.
type rtfText struct{}

func (rtfText) format() string         { return "rtf" }
func (rtfText) claims(ext string) bool { return ext == ".rtf" }
func (rtfText) sniff(head []byte) bool { return bytes.HasPrefix(head, []byte(`{\rtf`)) }

// rtfSkipped are the destinations whose text is not body text.
var rtfSkipped = map[string]bool{
	"fonttbl": true, "colortbl": true, "stylesheet": true, "info": true, "pict": true,
	"header": true, "headerl": true, "headerr": true, "headerf": true,
	"footer": true, "footerl": true, "footerr": true, "footerf": true,
	"object": true, "fldinst": true, "themedata": true, "colorschememapping": true,
	"latentstyles": true, "datastore": true, "xmlnstbl": true, "listtable": true,
	"listoverridetable": true, "rsidtbl": true, "generator": true, "filetbl": true,
	"revtbl": true, "pgdsctbl": true, "listtext": true, "pntext": true, "footnote": true,
	"bkmkstart": true, "bkmkend": true, "mmathPr": true, "docvar": true, "private": true,
}

// rtfSymbols are control words that stand for a character.
var rtfSymbols = map[string]string{
	"emdash": "\u2014", "endash": "\u2013", "lquote": "\u2018", "rquote": "\u2019",
	"ldblquote": "\u201C", "rdblquote": "\u201D", "bullet": "\u2022",
	"emspace": " ", "enspace": " ", "qmspace": " ",
}

// rtfCodePage returns the decoder for an \ansicpg code page.
func rtfCodePage(cp int) (encoding.Encoding, bool) {
	switch cp {
	case 437:
		return charmap.CodePage437, true
	case 850:
		return charmap.CodePage850, true
	case 852:
		return charmap.CodePage852, true
	case 866:
		return charmap.CodePage866, true
	case 874:
		return charmap.Windows874, true
	case 1250:
		return charmap.Windows1250, true
	case 1251:
		return charmap.Windows1251, true
	case 1252:
		return charmap.Windows1252, true
	case 1253:
		return charmap.Windows1253, true
	case 1254:
		return charmap.Windows1254, true
	case 1255:
		return charmap.Windows1255, true
	case 1256:
		return charmap.Windows1256, true
	case 1257:
		return charmap.Windows1257, true
	case 1258:
		return charmap.Windows1258, true
	case 10000:
		return charmap.Macintosh, true
	case 932:
		return japanese.ShiftJIS, true
	case 936:
		return simplifiedchinese.GBK, true
	case 949:
		return korean.EUCKR, true
	case 950:
		return traditionalchinese.Big5, true
	case 65001:
		return xunicode.UTF8, true
	}
	return nil, false
}

type rtfGroup struct {
	skip bool
	uc   int
}

func (rtfText) extract(in *input) (extraction, error) {
	raw := in.raw
	w := &paraWriter{limit: int(in.opt.MaxMemberBytes)}
	var enc encoding.Encoding = charmap.Windows1252
	encName := "windows-1252"
	var notes []string
	stack := []rtfGroup{{uc: 1}}
	var pending []byte // \'hh bytes waiting to be decoded together
	fallback := 0      // characters still to drop after a \uN
	flush := func() {
		if len(pending) == 0 {
			return
		}
		if s, err := enc.NewDecoder().Bytes(pending); err == nil {
			w.text(string(s))
		}
		pending = pending[:0]
	}
	top := func() *rtfGroup { return &stack[len(stack)-1] }
	i := 0
	for i < len(raw) {
		if in.dl.passed() {
			return extraction{}, in.dl.err()
		}
		c := raw[i]
		switch c {
		case '{':
			flush()
			fallback = 0
			if len(stack) > in.opt.MaxDepth {
				return extraction{}, refuse(fmt.Sprintf("RTF nests groups more than %d deep (--max-depth)", in.opt.MaxDepth))
			}
			stack = append(stack, *top())
			i++
		case '}':
			flush()
			fallback = 0
			if len(stack) == 1 {
				i = len(raw) // the document group is closed: the rest is not RTF
				continue
			}
			stack = stack[:len(stack)-1]
			i++
		case '\r', '\n':
			i++
		case '\\':
			if i+1 >= len(raw) {
				i++
				continue
			}
			n := raw[i+1]
			switch {
			case rtfLetter(n):
				j := i + 1
				for j < len(raw) && j-i <= 32 && rtfLetter(raw[j]) {
					j++
				}
				word := string(raw[i+1 : j])
				k := j
				if k < len(raw) && raw[k] == '-' {
					k++
				}
				for k < len(raw) && k-j <= 10 && raw[k] >= '0' && raw[k] <= '9' {
					k++
				}
				param, hasParam := 0, false
				if k > j && !(k == j+1 && raw[j] == '-') {
					param, _ = strconv.Atoi(string(raw[j:k]))
					hasParam = true
				}
				if k < len(raw) && raw[k] == ' ' {
					k++
				}
				i = k
				if word != "u" {
					flush()
				}
				g := top()
				switch {
				case word == "bin":
					if hasParam && param > 0 {
						i = min(len(raw), i+param)
					}
				case rtfSkipped[word]:
					g.skip = true
				case word == "ansicpg" && hasParam:
					if e, ok := rtfCodePage(param); ok {
						enc, encName = e, "cp"+strconv.Itoa(param)
						if param == 1252 {
							encName = "windows-1252"
						}
					} else {
						notes = append(notes, fmt.Sprintf("code page %d is not supported: \\'hh escapes read as Windows-1252", param))
					}
				case word == "uc" && hasParam:
					g.uc = max(0, param)
				case word == "u" && hasParam:
					flush()
					if param < 0 {
						param += 65536
					}
					if !g.skip {
						w.text(string(rune(param)))
					}
					fallback = g.uc
				case g.skip:
				case word == "par" || word == "sect" || word == "page" || word == "row" || word == "cell" || word == "nestcell":
					w.endPara()
				case word == "line":
					w.lineBreak()
				case word == "tab":
					w.spaceOut()
				default:
					if s, ok := rtfSymbols[word]; ok {
						w.text(s)
					}
				}
				if word != "u" {
					fallback = 0
				}
			case n == '\'':
				i += 2
				if i+2 > len(raw) {
					i = len(raw)
					continue
				}
				b, err := strconv.ParseUint(string(raw[i:i+2]), 16, 8)
				i += 2
				if err != nil {
					continue
				}
				if fallback > 0 {
					fallback--
					continue
				}
				if !top().skip {
					pending = append(pending, byte(b))
				}
			default:
				i += 2
				flush()
				if fallback > 0 {
					fallback--
					continue
				}
				g := top()
				switch n {
				case '*':
					g.skip = true
				case '\\', '{', '}':
					if !g.skip {
						w.text(string(n))
					}
				case '~':
					w.spaceOut()
				case '_':
					if !g.skip {
						w.text("-")
					}
				case '\n', '\r':
					if !g.skip {
						w.endPara()
					}
				}
			}
		default:
			j := i
			for j < len(raw) && raw[j] != '\\' && raw[j] != '{' && raw[j] != '}' && raw[j] != '\r' && raw[j] != '\n' {
				j++
			}
			run := raw[i:j]
			i = j
			if fallback > 0 {
				d := min(fallback, len(run))
				run, fallback = run[d:], fallback-d
			}
			flush()
			if len(run) > 0 && !top().skip {
				if isASCII(run) {
					w.text(string(run))
				} else if s, err := enc.NewDecoder().Bytes(run); err == nil {
					w.text(string(s))
				}
			}
		}
	}
	flush()
	return w.extraction(encName, notes)
}

func isASCII(b []byte) bool {
	for _, c := range b {
		if c >= 0x80 {
			return false
		}
	}
	return true
}

func rtfLetter(c byte) bool { return c >= 'a' && c <= 'z' || c >= 'A' && c <= 'Z' }
