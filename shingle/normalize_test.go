package shingle

import (
	"bufio"
	"strings"
	"testing"

	"reprise/internal/brown"
)

func TestNormalize(t *testing.T) {
	tests := []struct {
		name     string
		sentence string
		want     string
	}{
		{"curly quotes and punctuation are separators", "The “cat”, sat.", "the cat sat"},
		{"straight quotes equal curly ones", `The "cat", sat.`, "the cat sat"},
		{"CRLF and runs of spaces collapse to one space", "Line\r\nbreaks   and spacing", "line breaks and spacing"},
		{"no space at either end", "  \t leading and trailing \n ", "leading and trailing"},
		// Unicode UnicodeData.txt: FB01 has the compatibility decomposition 0066 0069 (from memory).
		{"NFKC expands the fi ligature", "a ﬁne ﬁle", "a fine file"},
		// Unicode UnicodeData.txt: FF21..FF5A are <wide> forms of ASCII letters (from memory).
		{"NFKC maps full-width letters and digits to ASCII", "ＦＵＬＬ ｗｉｄｔｈ １２３", "full width 123"},
		// Unicode UnicodeData.txt: 3392 SQUARE MHZ decomposes to "MHz" (from memory).
		{"case folding runs after NFKC", "㎒", "mhz"},
		// Unicode CaseFolding.txt: 0130; F; 0069 0307 (full folding, not the Turkic T entry; from memory).
		{"dotted capital I folds to i with a combining dot", "İstanbul", "i\u0307stanbul"},
		{"plain capital I folds to i, not dotless ı", "ISTANBUL", "istanbul"},
		// Unicode CaseFolding.txt: no entry for 0131, so dotless ı stays (from memory).
		{"dotless ı is left alone", "ıstanbul", "ıstanbul"},
		// Unicode CaseFolding.txt: 00DF; F; 0073 0073 (from memory).
		{"full case folding expands sharp s", "STRASSE Straße", "strasse strasse"},
		{"decomposed and composed accents are the same (NFKC)", "Cafe\u0301 Café", "café café"},
		{"straight and curly apostrophes both separate", "don't don’t", "don t don t"},
		{"em dash and hyphen both separate", "well—known well-known", "well known well known"},
		{"grave accent and double apostrophe quotes separate", "``quoted'' text", "quoted text"},
		{"guillemets and low quotes separate", "«un» „zwei“ ‹drei›", "un zwei drei"},
		{"inverted marks are punctuation", "¡Hola! ¿Qué tal?", "hola qué tal"},
		{"soft hyphen is removed", "co\u00ADoper\u00ADate", "cooperate"},
		{"byte order mark at the start is removed", "\uFEFFHello world", "hello world"},
		{"zero-width space is removed, not a separator", "zero\u200Bwidth", "zerowidth"},
		{"line-break hyphenation is joined", "an exam-\n  ple here", "an example here"},
		{"line-break hyphenation is joined across CRLF and tabs", "exam-\r\n\tple", "example"},
		{"blanks before the line break still join", "exam- \nple", "example"},
		{"no join before a capital letter", "Jean-\nPaul", "jean paul"},
		{"no join without a line break", "term-end", "term end"},
		{"no join across a blank line", "exam-\n\nple", "exam ple"},
		{"symbols are kept", "5 € + $3 = ©", "5 € + $3 = ©"},
		{"ASCII symbols are kept, ASCII punctuation is not", "a<b|c~d^e_f#g", "a<b|c~d^e f g"},
		{"empty stays empty", "", ""},
		{"punctuation only gives empty", " .,;!? ", ""},
		{"invalid UTF-8 becomes U+FFFD", "bad \xff byte", "bad \uFFFD byte"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			if got := string(Normalize(nil, tc.sentence)); got != tc.want {
				t.Errorf("Normalize(%q) = %q, want %q", tc.sentence, got, tc.want)
			}
		})
	}
}

func TestNormalizeAppends(t *testing.T) {
	got := string(Normalize([]byte("kept|"), "The Cat."))
	if got != "kept|the cat" {
		t.Errorf("Normalize onto a prefix = %q, want %q", got, "kept|the cat")
	}
}

// Fingerprint is xxhash64 with seed 0; the digest of empty input is
// 0xEF46DB3751D8E999 (xxHash specification test vector; from memory).
func TestFingerprintIsXXHash64(t *testing.T) {
	if got := Fingerprint(nil); got != 0xEF46DB3751D8E999 {
		t.Errorf("Fingerprint(empty) = %#x, want 0xef46db3751d8e999", got)
	}
	if Fingerprint([]byte("the cat sat")) == Fingerprint([]byte("the cat sat ")) {
		t.Error("a trailing space does not change the fingerprint")
	}
}

// TestASCIIShortcutAgrees checks that skipping NFKC and case folding for
// ASCII text changes nothing, on every line of the Brown corpus and on all
// ASCII bytes.
func TestASCIIShortcutAgrees(t *testing.T) {
	var lines []string
	var all strings.Builder
	for c := 0; c < 0x80; c++ {
		all.WriteByte(byte(c))
		all.WriteString(" x")
	}
	lines = append(lines, all.String())
	if dir, err := brown.Dir(); err == nil {
		samples, err := brown.Load(dir)
		if err != nil {
			t.Fatal(err)
		}
		for _, s := range samples {
			sc := bufio.NewScanner(strings.NewReader(strings.ReplaceAll(s.Text, "“", "``")))
			for sc.Scan() {
				lines = append(lines, strings.ReplaceAll(sc.Text(), "”", "''"))
			}
		}
	}
	n := newNormalizer()
	var fast, full []byte
	for _, line := range lines {
		fast = n.appendPath(fast[:0], line, false)
		full = n.appendPath(full[:0], line, true)
		if string(fast) != string(full) {
			t.Fatalf("%q: shortcut %q, full path %q", line, fast, full)
		}
	}
	t.Logf("%d lines agree", len(lines))
}
