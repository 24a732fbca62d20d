package pipeline

import (
	"slices"
	"testing"
)

func iterOf[T any](xs []T) func(*T) bool {
	return func(p *T) bool {
		if len(xs) == 0 {
			return false
		}
		*p, xs = xs[0], xs[1:]
		return true
	}
}

// The basket rules of the engine's step 1 (pairs/doc.go), on one basket.
func TestBasketRules(t *testing.T) {
	tests := []struct {
		name       string
		paths      []string
		maxDocs    int
		documents  int
		wantCommon string // first path of a common unit, "" for none
		wantMember int
	}{
		{"unit in one document pairs nothing", []string{"a"}, 0, 10, "", 0},
		{"unit in two documents goes on to pruning", []string{"b", "a"}, 0, 10, "", 2},
		{"unit in more documents than the cap is common, quoted from the first path", []string{"c", "b", "a"}, 2, 10, "a", 0},
		{"default cap is the engine's: 5 for 10 documents", []string{"f", "e", "d", "c", "b", "a"}, 0, 10, "a", 0},
		{"unit at the cap still counts", []string{"e", "d", "c", "b", "a"}, 0, 10, "", 5},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			var common []string
			members := 0
			err := (&basketFn{MaxDocs: tc.maxDocs}).ProcessElement(7, iterOf(tc.paths), tc.documents,
				func(p, _ string) { common = append(common, p) }, func(string, int64) { members++ })
			if err != nil {
				t.Fatal(err)
			}
			if tc.wantCommon == "" && len(common) > 0 || tc.wantCommon != "" && !slices.Equal(common, []string{tc.wantCommon}) {
				t.Errorf("common = %v, want %q", common, tc.wantCommon)
			}
			if members != tc.wantMember {
				t.Errorf("members = %d, want %d", members, tc.wantMember)
			}
		})
	}
}

// A-Priori: a document in fewer than s baskets leaves every basket.
func TestPruneRule(t *testing.T) {
	tests := []struct {
		name       string
		baskets    []int64
		minShared  int
		wantKept   int
		wantPruned bool
	}{
		{"document in fewer than s baskets is pruned", []int64{1}, 2, 0, true},
		{"document in s baskets stays in all of them", []int64{1, 2}, 2, 2, false},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			kept, pruned := 0, false
			(&pruneFn{MinShared: tc.minShared}).ProcessElement("a", iterOf(tc.baskets),
				func(int64, string) { kept++ }, func(string) { pruned = true })
			if kept != tc.wantKept || pruned != tc.wantPruned {
				t.Errorf("kept %d pruned %v, want %d %v", kept, pruned, tc.wantKept, tc.wantPruned)
			}
		})
	}
}

// Every pair of a basket is emitted once, smaller path first.
func TestPairsPerBasket(t *testing.T) {
	var got []string
	pairFn{}.ProcessElement(1, iterOf([]string{"c", "a", "b"}), func(k string, n int) {
		if n != 1 {
			t.Errorf("count %d", n)
		}
		got = append(got, k)
	})
	want := []string{"a\x00b", "a\x00c", "b\x00c"}
	if !slices.Equal(got, want) {
		t.Errorf("got %q, want %q", got, want)
	}
}

func BenchmarkPairsPerBasket(b *testing.B) {
	paths := make([]string, 100)
	for i := range paths {
		paths[i] = string(rune('A'+i%26)) + string(rune('a'+i/26))
	}
	for b.Loop() {
		pairFn{}.ProcessElement(1, iterOf(paths), func(string, int) {})
	}
}
