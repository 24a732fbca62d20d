package corpus

import "strings"

// blankQuoteMarks returns text with the quote marks of reply lines read as
// spaces: on each line that starts, after optional spaces or tabs, with
// ">" (e-mail quoting, "> > " for a quote inside a quote), every ">" of
// that leading run becomes a space. The text keeps its length and line
// breaks, so offsets and line numbers still point into the original, and
// a hard-wrapped quote splits into the same sentences as the text it
// quotes (a ">" inside a sentence would otherwise be a word of it). It
// returns the number of lines changed; text is returned as it is when
// there are none.
func blankQuoteMarks(text string) (string, int) {
	if !strings.Contains(text, ">") {
		return text, 0
	}
	var b []byte
	lines := 0
	for start := 0; start < len(text); {
		end := strings.IndexByte(text[start:], '\n')
		if end < 0 {
			end = len(text)
		} else {
			end += start + 1
		}
		i := start
		for i < end && (text[i] == ' ' || text[i] == '\t') {
			i++
		}
		if i < end && text[i] == '>' {
			if b == nil {
				b = []byte(text)
			}
			lines++
			for i < end && (text[i] == '>' || text[i] == ' ' || text[i] == '\t') {
				if text[i] == '>' {
					b[i] = ' '
				}
				i++
			}
		}
		start = end
	}
	if b == nil {
		return text, 0
	}
	return string(b), lines
}
