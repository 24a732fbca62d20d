// Command gentables writes shingle/scripttables.go: one 32-bit entry per
// code point of the Basic Multilingual Plane, giving what the table-driven
// fast path of package shingle (scripts.go) needs to know of a rune:
//
//   - its Sentence_Break and Word_Break properties, read from the tables of
//     the segmenter the package uses as its reference (github.com/rivo/uniseg,
//     sentenceproperties.go and wordproperties.go, Unicode 15.0.0), so that
//     the fast path and the reference cannot disagree on a property;
//   - its fate in the normalized form (kept, a separator, dropped, or one
//     other rune), computed by running the reference normalization
//     (golang.org/x/text NFKC, full case folding, NFKC again) on the rune
//     alone, and whether that per-rune answer is exact in any context: a rune
//     that can compose with the rune before it, whose form is more than one
//     rune, or a combining mark that normalization changes, is marked for
//     the reference path;
//   - whether it is a letter and whether it makes a word segment a word
//     (unicode.IsLetter, and isWordRune of words.go);
//   - for a combining mark kept as it is, its canonical combining class, and
//     for every rune whether a composing rune may be joined to it, so that
//     the walks need no x/text call or list search for either.
//
// Beside the table it writes scriptSBStops, one bit per code point: the
// Sentence_Break properties that end the sentence segmenter's skip loop.
//
// The command in cmd/ writes the file: from the module root,
// go run ./shingle/internal/gentables/cmd -o shingle/scripttables.go
// (go generate ./shingle does that). The test TestScriptTablesUpToDate
// regenerates the file in memory and fails when it differs.
package gentables

import (
	"bytes"
	"fmt"
	"os"
	"os/exec"
	"path/filepath"
	"regexp"
	"slices"
	"strconv"
	"strings"
	"unicode"
	"unicode/utf8"

	"golang.org/x/text/cases"
	"golang.org/x/text/unicode/norm"
)

// UnisegDir returns the folder of the uniseg module the build uses.
func UnisegDir() (string, error) {
	b, err := exec.Command("go", "list", "-m", "-f", "{{.Dir}}", "github.com/rivo/uniseg").Output()
	if err != nil {
		return "", fmt.Errorf("go list uniseg: %w", err)
	}
	return strings.TrimSpace(string(b)), nil
}

// The values below must equal the constants of shingle/fast.go (sbp*) and
// shingle/scripts.go (wp*, ent*); TestScriptTablesUpToDate checks the
// generated file, and the differential tests check the meaning.
var sbValues = map[string]uint32{
	"Any": 0, "CR": 1, "LF": 2, "Sep": 3, "Sp": 4, "Lower": 5, "Upper": 6, "Numeric": 7,
	"ATerm": 8, "STerm": 9, "Close": 10, "SContinue": 11, "Format": 12, "Extend": 13, "OLetter": 14,
}

const sbSlow = 15

var wbValues = map[string]uint32{
	"Any": 0, "CR": 1, "LF": 2, "Newline": 3, "WSegSpace": 4, "HebrewLetter": 5, "ALetter": 6,
	"Numeric": 7, "Katakana": 8, "ExtendNumLet": 9, "MidLetter": 10, "MidNumLet": 11, "MidNum": 12,
	"SingleQuote": 13, "DoubleQuote": 14, "Extend": 15, "Format": 16, "ZWJ": 17,
	// Extended_Pictographic matters to the word rules only after a ZWJ
	// (WB3c), which the fast path leaves to uniseg; elsewhere uniseg treats
	// it as Any.
	"ExtendedPictographic": 0,
}

const wbSlow = 31

// Entry layout (shingle/scripts.go reads it).
const (
	shiftWB    = 4
	shiftNorm  = 9
	normKeep   = 0
	normSep    = 1
	normDrop   = 2
	normDelta  = 3
	bitLetter  = 1 << 11
	bitWordy   = 1 << 12
	bitNSlow   = 1 << 13
	bitMark    = 1 << 14
	bitCompose = 1 << 15
	bitFirst   = 1 << 16
	shiftDelta = 17
	shiftCCC   = 24
)

var rangeRE = regexp.MustCompile(`\{0x([0-9A-F]+), 0x([0-9A-F]+), pr(\w+)\}`)

// readRanges fills prop[r] from the uniseg table in file, as uniseg's
// propertySearch finds it: by the same binary search over the same list, so
// that where two ranges overlap (U+24C2 is ALetter and
// Extended_Pictographic) the answer is the one uniseg gives.
func readRanges(file string, values map[string]uint32, prop []uint32) error {
	b, err := os.ReadFile(file)
	if err != nil {
		return err
	}
	type entry struct {
		lo, hi int
		v      uint32
	}
	var list []entry
	for _, m := range rangeRE.FindAllSubmatch(b, -1) {
		lo, _ := strconv.ParseUint(string(m[1]), 16, 32)
		hi, _ := strconv.ParseUint(string(m[2]), 16, 32)
		v, ok := values[string(m[3])]
		if !ok {
			v = ^uint32(0) // unknown here: slow
		}
		list = append(list, entry{int(lo), int(hi), v})
	}
	if len(list) < 1000 {
		return fmt.Errorf("%s: only %d ranges", file, len(list))
	}
	for r := range prop {
		prop[r] = 0 // prAny when no range holds r
		from, to := 0, len(list)
		for to > from {
			m := (from + to) / 2
			switch {
			case r < list[m].lo:
				to = m
			case r > list[m].hi:
				from = m + 1
			default:
				prop[r] = list[m].v
				from = to
			}
		}
	}
	return nil
}

// Generate returns the source of scripttables.go from the uniseg module in dir.
func Generate(dir string) ([]byte, error) {
	const n = 0x10000
	sb := make([]uint32, n)
	wb := make([]uint32, n)
	if err := readRanges(filepath.Join(dir, "sentenceproperties.go"), sbValues, sb); err != nil {
		return nil, err
	}
	if err := readRanges(filepath.Join(dir, "wordproperties.go"), wbValues, wb); err != nil {
		return nil, err
	}
	composes, firsts := composingRunes()
	fold := cases.Fold()
	entries := make([]uint32, n)
	forms := map[rune]string{}
	for r := rune(0); r < n; r++ {
		if 0xD800 <= r && r <= 0xDFFF || r == utf8.RuneError {
			entries[r] = sbSlow | wbSlow<<shiftWB | bitNSlow
			continue
		}
		e := sb[r]
		if e > sbSlow {
			e = sbSlow
		}
		w := wb[r]
		if w > wbSlow {
			w = wbSlow
		}
		e |= w << shiftWB
		if unicode.IsLetter(r) {
			e |= bitLetter
		}
		if unicode.IsLetter(r) || unicode.IsDigit(r) || unicode.Is(unicode.Ideographic, r) {
			e |= bitWordy
		}
		ne, form := normEntry(r, composes, fold)
		e |= ne
		if form != "" {
			forms[r] = form
		}
		entries[r] = e
	}
	// The runes after which a composing rune may compose: those that begin a
	// composition, and those whose compatibility or folded form holds one.
	var first []rune
	for r := rune(0); r < n; r++ {
		if 0xD800 <= r && r <= 0xDFFF {
			continue
		}
		s := string(r)
		for _, f := range s + norm.NFKD.String(s) + norm.NFKC.String(s) + fold.String(norm.NFKC.String(s)) {
			if firsts[f] {
				first = append(first, r)
				break
			}
		}
	}
	for _, r := range first {
		entries[r] |= bitFirst
	}
	return render(entries, forms, first), nil
}

// normEntry returns the normalization bits of r, and its form when that is
// not one rune within a 16-bit delta of r (the form list holds it then).
func normEntry(r rune, composes map[rune]bool, fold cases.Caser) (uint32, string) {
	s := string(r)
	if unicode.Is(unicode.Cf, r) {
		return normDrop << shiftNorm, "" // prepare drops it before anything else
	}
	ccc := norm.NFC.PropertiesString(s).CCC()
	var e uint32
	if ccc != 0 {
		e |= bitMark
	}
	if composes[r] {
		e |= bitCompose
	}
	form := norm.NFKC.String(s)
	form = fold.String(form)
	if !norm.NFKC.IsNormalString(form) {
		form = norm.NFKC.String(form)
	}
	if ccc != 0 && form != s || form == "" {
		return e | bitNSlow, ""
	}
	if ccc != 0 {
		// A mark kept as it is (the only kind of mark not sent to the
		// reference): its combining class in the bits a delta would use.
		e |= uint32(ccc) << shiftCCC
	}
	seps, kept := 0, 0
	for i, f := range form {
		// The form must not interact with the rune before it: its first
		// rune is a starter that composes with nothing before it. The
		// runes after it (such as the nukta of U+0958, which NFKC
		// decomposes) are in NFKC order already; shingle's scriptNormal
		// checks the marks after them.
		if i == 0 && f != r && (norm.NFC.PropertiesString(string(f)).CCC() != 0 || composes[f]) {
			return e | bitNSlow, ""
		}
		switch {
		case f < utf8.RuneSelf && isASCIISeparator(byte(f)):
			seps++
		case f < utf8.RuneSelf:
			kept++
		case unicode.Is(unicode.Cf, f):
			return e | bitNSlow, ""
		case unicode.IsPunct(f) || unicode.IsSpace(f) || unicode.IsControl(f):
			seps++
		default:
			kept++
		}
	}
	switch {
	case kept == 0:
		return e | normSep<<shiftNorm, ""
	case seps > 0:
		return e | bitNSlow, ""
	case form == s:
		return e | normKeep<<shiftNorm, ""
	}
	form = strings.Map(func(f rune) rune { // separate lowers ASCII
		if 'A' <= f && f <= 'Z' {
			f += 'a' - 'A'
		}
		return f
	}, form)
	f, size := utf8.DecodeRuneInString(form)
	d := f - r
	if size != len(form) || d < -(1<<14) || d >= 1<<14 || d == 0 {
		// Delta 0 sends the reader to the form list.
		return e | normDelta<<shiftNorm, form
	}
	return e | normDelta<<shiftNorm | uint32(d)<<shiftDelta, ""
}

// isASCIISeparator is shingle's (normalize.go).
func isASCIISeparator(c byte) bool {
	switch c {
	case '$', '+', '<', '=', '>', '^', '|', '~':
		return false
	}
	return c <= ' ' || c == 0x7f || c >= '!' && c <= '/' || c >= ':' && c <= '@' ||
		c >= '[' && c <= '`' || c >= '{' && c <= '~'
}

// composingRunes returns every rune that canonical composition can join to
// a rune before it (Unicode's NFC_Quick_Check=Maybe): the runes after the
// first of the canonical decomposition of each primary composite; and the
// runes it can join them to: the first rune of each such decomposition and
// the composites of its prefixes.
func composingRunes() (composes, firsts map[rune]bool) {
	composes, firsts = map[rune]bool{}, map[rune]bool{}
	for r := rune(0); r <= unicode.MaxRune; r++ {
		if 0xD800 <= r && r <= 0xDFFF {
			continue
		}
		s := string(r)
		d := norm.NFD.String(s)
		if d == s || utf8.RuneCountInString(d) < 2 || norm.NFC.String(d) != s {
			continue
		}
		rs := []rune(d)
		for i, c := range rs {
			if i > 0 {
				composes[c] = true
			}
			if i < len(rs)-1 {
				for _, f := range norm.NFC.String(string(rs[:i+1])) {
					firsts[f] = true
				}
			}
		}
	}
	return composes, firsts
}

// render writes the entries as two constant strings: scriptIndex, two bytes
// per block of 64 code points giving the block's number, and scriptBlocks,
// the distinct blocks, four bytes (little-endian) per entry.
func render(entries []uint32, forms map[rune]string, first []rune) []byte {
	var blocks [][]uint32
	seen := map[string]int{}
	index := make([]int, len(entries)/64)
	for b := range index {
		blk := entries[b*64 : b*64+64]
		key := fmt.Sprint(blk)
		id, ok := seen[key]
		if !ok {
			id = len(blocks)
			seen[key] = id
			blocks = append(blocks, blk)
		}
		index[b] = id
	}
	var buf bytes.Buffer
	buf.WriteString("// Code generated by go run ./shingle/internal/gentables/cmd; DO NOT EDIT.\n\n")
	buf.WriteString("package shingle\n\n")
	fmt.Fprintf(&buf, "// scriptIndex gives, two bytes (little-endian) per block of 64 code points\n")
	fmt.Fprintf(&buf, "// of the Basic Multilingual Plane, the block's number in scriptBlocks.\n")
	buf.WriteString("const scriptIndex = \"\" +\n")
	var line []byte
	for i, id := range index {
		line = fmt.Appendf(line, "\\x%02x\\x%02x", id&0xff, id>>8)
		if i%16 == 15 || i == len(index)-1 {
			end := " +\n"
			if i == len(index)-1 {
				end = "\n"
			}
			fmt.Fprintf(&buf, "\t\"%s\"%s", line, end)
			line = line[:0]
		}
	}
	fmt.Fprintf(&buf, "\n// scriptBlocks holds %d distinct blocks of 64 entries, four bytes\n", len(blocks))
	buf.WriteString("// (little-endian) per entry; scripts.go describes an entry.\n")
	buf.WriteString("const scriptBlocks = \"\" +\n")
	for bi, blk := range blocks {
		for j := 0; j < 64; j += 4 {
			line = line[:0]
			for _, e := range blk[j : j+4] {
				line = fmt.Appendf(line, "\\x%02x\\x%02x\\x%02x\\x%02x", e&0xff, e>>8&0xff, e>>16&0xff, e>>24)
			}
			end := " +\n"
			if bi == len(blocks)-1 && j == 60 {
				end = "\n"
			}
			fmt.Fprintf(&buf, "\t\"%s\"%s", line, end)
		}
	}
	// The sentence stops (fast.go's fastFirstSentence), one bit a code
	// point: CR, LF, Sep, ATerm, STerm or slow.
	stops := make([]byte, len(entries)/8)
	for r, e := range entries {
		switch e & 0xF {
		case sbValues["CR"], sbValues["LF"], sbValues["Sep"], sbValues["ATerm"], sbValues["STerm"], sbSlow:
			stops[r>>3] |= 1 << (r & 7)
		}
	}
	buf.WriteString("\n// scriptSBStops has bit r&7 of byte r>>3 set when the Sentence_Break\n")
	buf.WriteString("// property of r is CR, LF, Sep, ATerm, STerm or slow: the runes that end\n")
	buf.WriteString("// fastFirstSentence's skip loop.\n")
	buf.WriteString("const scriptSBStops = \"\" +\n")
	for i := 0; i < len(stops); i += 32 {
		line = line[:0]
		for _, v := range stops[i : i+32] {
			line = fmt.Appendf(line, "\\x%02x", v)
		}
		end := " +\n"
		if i+32 == len(stops) {
			end = "\n"
		}
		fmt.Fprintf(&buf, "\t\"%s\"%s", line, end)
	}
	var keys []rune
	for r := range forms {
		keys = append(keys, r)
	}
	slices.Sort(keys)
	buf.WriteString("\n// scriptFormRunes lists, two bytes (big-endian) each and sorted, the runes\n")
	buf.WriteString("// whose form is in scriptForms: the text from offset scriptFormEnds[i-1]\n")
	buf.WriteString("// (0 for the first) to scriptFormEnds[i], two bytes (big-endian) each.\n")
	writeRunes(&buf, "scriptFormRunes", keys)
	var ends []rune
	var text strings.Builder
	for _, r := range keys {
		text.WriteString(forms[r])
		ends = append(ends, rune(text.Len()))
	}
	writeRunes(&buf, "scriptFormEnds", ends)
	fmt.Fprintf(&buf, "const scriptForms = %q\n", text.String())
	buf.WriteString("\n// scriptComposeFirst lists, two bytes (big-endian) each and sorted, the runes\n")
	buf.WriteString("// after which a rune with the compose bit may be joined to them by NFKC.\n")
	writeRunes(&buf, "scriptComposeFirst", first)
	return buf.Bytes()
}

// writeRunes writes a constant string of name holding rs, two bytes each.
func writeRunes(buf *bytes.Buffer, name string, rs []rune) {
	fmt.Fprintf(buf, "const %s = \"\" +\n", name)
	var line []byte
	for i, r := range rs {
		line = fmt.Appendf(line, "\\x%02x\\x%02x", r>>8, r&0xff)
		if i%16 == 15 || i == len(rs)-1 {
			end := " +\n"
			if i == len(rs)-1 {
				end = "\n"
			}
			fmt.Fprintf(buf, "\t\"%s\"%s", line, end)
			line = line[:0]
		}
	}
}
