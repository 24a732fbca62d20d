package shingle

import (
	"math/rand/v2"
	"slices"
	"testing"
)

// TestWinnowGuarantee checks the guarantee of Schleimer, Wilkerson & Aiken
// (SIGMOD 2003, section 3): two texts sharing a run of at least W+K-1 words
// share a winnowed fingerprint, for random texts with the shared run planted
// at random places.
func TestWinnowGuarantee(t *testing.T) {
	rng := rand.New(rand.NewPCG(3, 9))
	for _, kw := range [][2]int{{3, 4}, {5, 4}, {5, 8}, {2, 16}} {
		k, w := kw[0], kw[1]
		sp := New(Options{Unit: UnitWords, ShingleWords: k, Winnow: w})
		for trial := range 200 {
			shared := randomText(rng, w+k-1)
			a := randomText(rng, rng.IntN(60)) + " " + shared + " " + randomText(rng, rng.IntN(60))
			b := randomText(rng, rng.IntN(60)) + " " + shared + " " + randomText(rng, rng.IntN(60))
			ua, _ := sp.Words(a, nil)
			ha := hashSet(ua)
			ub, _ := sp.Words(b, nil)
			found := false
			for _, u := range ub {
				if _, ok := slices.BinarySearch(ha, u.Hash); ok {
					found = true
					break
				}
			}
			if !found {
				t.Fatalf("K=%d W=%d trial %d: a shared run of %d words left no common fingerprint\nA: %s\nB: %s", k, w, trial, w+k-1, a, b)
			}
		}
	}
}

func hashSet(us []Unit) []uint64 {
	out := make([]uint64, len(us))
	for i, u := range us {
		out[i] = u.Hash
	}
	slices.Sort(out)
	return out
}

// TestWinnowDensity checks the density figure of the same paper (section
// 3.1): on text whose shingle fingerprints behave like random numbers,
// winnowing keeps about 2/(W+1) of them. Random words from a large
// vocabulary give such fingerprints; the tolerance is 5% of the figure.
func TestWinnowDensity(t *testing.T) {
	rng := rand.New(rand.NewPCG(1, 2))
	var units []Unit
	for range 50000 {
		units = append(units, Unit{Hash: rng.Uint64()})
	}
	for _, w := range []int{2, 4, 8, 16, 32} {
		kept := len(Winnow(nil, units, w))
		got, want := float64(kept)/float64(len(units)), 2/float64(w+1)
		if got < want*0.95 || got > want*1.05 {
			t.Errorf("W=%d: kept %.4f of the units, want about 2/(W+1) = %.4f", w, got, want)
		}
	}
	// The same through Words, on random text.
	text := randomText(rng, 40000)
	sp := New(Options{Unit: UnitWords, ShingleWords: 5})
	all, _ := sp.Words(text, nil)
	spw := New(Options{Unit: UnitWords, ShingleWords: 5, Winnow: 8})
	thin, _ := spw.Words(text, nil)
	if got, want := float64(len(thin))/float64(len(all)), 2.0/9; got < want*0.9 || got > want*1.1 {
		t.Errorf("Words with W=8 kept %.4f of the shingles, want about %.4f", got, want)
	}
}

func TestWinnowRules(t *testing.T) {
	u := func(hs ...uint64) []Unit {
		var out []Unit
		for i, h := range hs {
			out = append(out, Unit{Hash: h, Pos: uint32(i)})
		}
		return out
	}
	pos := func(us []Unit) []uint32 {
		var out []uint32
		for _, x := range us {
			out = append(out, x.Pos)
		}
		return out
	}
	tests := []struct {
		name string
		in   []Unit
		w    int
		want []uint32
	}{
		// The worked example of the paper (section 3, figure 2), hashes
		// 77 74 42 17 98 50 17 98 8 88 67 39 77 74 42 17 98 with W=4,
		// whose winnowed fingerprints are 17 17 8 39 17 (positions 3 6 8 11 15),
		// from memory.
		{"the paper's example", u(77, 74, 42, 17, 98, 50, 17, 98, 8, 88, 67, 39, 77, 74, 42, 17, 98), 4, []uint32{3, 6, 8, 11, 15}},
		{"ties keep the rightmost", u(5, 5, 5, 5), 2, []uint32{1, 2, 3}},
		{"a window of one keeps all", u(3, 1, 2), 1, []uint32{0, 1, 2}},
		{"fewer units than a window keep the minimum", u(9, 2, 7), 5, []uint32{1}},
		{"no units, none kept", nil, 4, nil},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			if got := pos(Winnow(nil, tc.in, tc.w)); !slices.Equal(got, tc.want) {
				t.Errorf("kept positions %v, want %v", got, tc.want)
			}
		})
	}
}
