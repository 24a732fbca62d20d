package corpus

import "testing"

func TestBlankQuoteMarks(t *testing.T) {
	tests := []struct {
		name, in, want string
		lines          int
	}{
		{"no quote is left as it is", "a > b\nc\n", "a > b\nc\n", 0},
		{"leading marks become spaces, length kept", "> one\n>> two\n > > three\nfour >\n", "  one\n   two\n     three\nfour >\n", 3},
		{"a mark on the last line without a line end", "x\n>y", "x\n y", 1},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			got, n := blankQuoteMarks(tc.in)
			if got != tc.want || n != tc.lines || len(got) != len(tc.in) {
				t.Fatalf("got %q, %d lines; want %q, %d", got, n, tc.want, tc.lines)
			}
		})
	}
}
