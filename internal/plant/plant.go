// Package plant builds evaluation corpora with known reuse: it copies blocks
// of whole paragraphs from one text into another and records exactly where
// each copy came from and where it landed, so that a test or benchmark can
// compare what reprise reports with the truth, byte for byte.
//
// A block is chosen so that its first unit starts at its first byte and its
// last unit ends at its last byte (by the splitter given), and it is inserted
// as a paragraph of its own; the expected passage is then exactly the block,
// in both texts, whatever the surrounding sentences are. Blocks whose edges
// the splitter would not keep (a short first sentence, a heading) are passed
// over rather than trimmed, so the truth never depends on the code under
// test beyond that choice.
package plant

import (
	"math/rand/v2"
	"strings"

	"reprise/shingle"
)

// A Copy is one planted block: Text[Src][SrcStart:SrcEnd] was inserted into
// Text[Dst] at DstStart (the inserted copy ends at DstEnd).
type Copy struct {
	Src, Dst         int
	SrcStart, SrcEnd int
	DstStart, DstEnd int
	Units            int // units in the block, by the splitter used to choose it
}

// Paragraphs returns the byte spans [start, end) of the blank-line separated
// paragraphs of text (a blank line is "\n\n").
func Paragraphs(text string) [][2]int {
	var out [][2]int
	start := 0
	for start < len(text) {
		for start < len(text) && text[start] == '\n' {
			start++
		}
		if start >= len(text) {
			break
		}
		end := strings.Index(text[start:], "\n\n")
		if end < 0 {
			end = len(strings.TrimRight(text[start:], "\n"))
		}
		out = append(out, [2]int{start, start + end})
		start += end
	}
	return out
}

// Block picks from text a run of consecutive whole paragraphs with between
// minUnits and maxUnits units whose edges are unit edges; ok is false when
// none was found in a bounded number of tries.
func Block(rng *rand.Rand, sp *shingle.Splitter, text string, minUnits, maxUnits int) (start, end, units int, ok bool) {
	paras := Paragraphs(text)
	var scratch []shingle.Unit
	for try := 0; try < 50 && len(paras) > 0; try++ {
		first := rng.IntN(len(paras))
		for last := first; last < len(paras); last++ {
			block := text[paras[first][0]:paras[last][1]]
			scratch, _ = sp.Sentences(block, scratch)
			if len(scratch) > maxUnits {
				break
			}
			if len(scratch) >= minUnits && scratch[0].Start == 0 && int(scratch[len(scratch)-1].End) == len(block) {
				return paras[first][0], paras[last][1], len(scratch), true
			}
		}
	}
	return 0, 0, 0, false
}

// Plant copies blocks between texts (modified in place): for each k in
// sizes, one block of exactly k units from a source text into a destination
// text, every source and destination a different text. Sources are chosen
// among texts not yet touched, so a source's offsets stay those of its
// original text. It returns the copies made; fewer than len(sizes) when the
// texts run out.
func Plant(rng *rand.Rand, sp *shingle.Splitter, texts []string, sizes []int) []Copy {
	order := rng.Perm(len(texts))
	var copies []Copy
	next := 0
	for _, k := range sizes {
		for next+1 < len(order) {
			src, dst := order[next], order[next+1]
			next += 2
			start, end, units, ok := Block(rng, sp, texts[src], k, k)
			if !ok {
				continue
			}
			block := texts[src][start:end]
			paras := Paragraphs(texts[dst])
			if len(paras) == 0 {
				continue
			}
			at := paras[rng.IntN(len(paras))][1]
			texts[dst] = texts[dst][:at] + "\n\n" + block + texts[dst][at:]
			copies = append(copies, Copy{Src: src, Dst: dst, SrcStart: start, SrcEnd: end,
				DstStart: at + 2, DstEnd: at + 2 + len(block), Units: units})
			break
		}
	}
	return copies
}
