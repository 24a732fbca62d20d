package report

import "strings"

// writeExplained shows a reworded passage: both sides, the words each
// shares with the other in [brackets], and how many terms they share.
func writeExplained(t *textWriter, g *Passage) {
	e := g.Explained
	t.dimf("   shared content words in [brackets]: %d of A's %d, of B's %d", e.Terms, e.ATerms, e.BTerms)
	t.linef("   A “%s”", trim(clean(MarkShared(g.Text, e.AShared, "[", "]")), 400))
	t.linef("   B “%s”", trim(clean(MarkShared(e.BText, e.BShared, "[", "]")), 400))
}

// MarkShared returns text with each span of marks (byte offsets, sorted,
// disjoint) between open and close.
func MarkShared(text string, marks [][2]int, open, close string) string {
	var b strings.Builder
	at := 0
	for _, m := range marks {
		if m[0] < at || m[1] > len(text) || m[0] > m[1] {
			continue
		}
		b.WriteString(text[at:m[0]])
		b.WriteString(open)
		b.WriteString(text[m[0]:m[1]])
		b.WriteString(close)
		at = m[1]
	}
	b.WriteString(text[at:])
	return b.String()
}
