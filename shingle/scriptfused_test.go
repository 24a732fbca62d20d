package shingle

import "testing"

// deriveWordTab computes wordTab from wordStep: for each state below 16
// and property below 32, the step without look-ahead, or wtCall where
// wordStep may look ahead or give up (slow, ZWJ, the regional indicator
// states, the mids after a letter or digit, property values not in use).
func deriveWordTab() string {
	b := make([]byte, 16*32)
	for st := range 16 {
		for p := range 32 {
			b[st<<5|p] = wtCall
			if st > wsExtendNumLet || p > wpZWJ || p == wpZWJ {
				continue
			}
			if st == wsALetter || st == wsHebrewLetter || st == wsNumeric {
				switch p {
				case wpMidLetter, wpMidNumLet, wpSingleQuote, wpDoubleQuote, wpMidNum:
					continue
				}
			}
			ns, brk, ok := wordStep(st, p, "")
			if !ok || ns < 0 || ns > 15 {
				continue
			}
			e := byte(ns)
			if brk {
				e |= wtBreak
			}
			b[st<<5|p] = e
		}
	}
	return string(b)
}

// TestWordTabMatches checks wordTab against wordStep, from which it is
// derived (wordStep is checked against uniseg by
// TestScriptTableMatchesReference).
func TestWordTabMatches(t *testing.T) {
	if want := deriveWordTab(); wordTab != want {
		for i := range want {
			if wordTab[i] != want[i] {
				t.Fatalf("wordTab[state %d, property %d] = %#x, wordStep gives %#x", i>>5, i&31, wordTab[i], want[i])
			}
		}
		t.Fatalf("wordTab has %d bytes, want %d", len(wordTab), len(want))
	}
}
