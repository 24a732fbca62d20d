package pairs

import (
	"math/rand/v2"
	"slices"
	"testing"
)

func TestProbeDrop(t *testing.T) {
	r := rand.New(rand.NewPCG(1, 2))
	var docs [][]uint64
	for d := 0; d < 50; d++ {
		drop := r.Perm(15)[:2]
		var fps []uint64
		for u := 0; u < 15; u++ {
			if !slices.Contains(drop, u) {
				fps = append(fps, uint64(u+1))
			}
		}
		fps = append(fps, uint64(1000+d))
		docs = append(docs, fps)
	}
	for d := 0; d < 200; d++ {
		docs = append(docs, []uint64{uint64(5000 + d)})
	}
	for _, lim := range []int{1e5, 1e6, 2e7} {
		res, err := Count(Input{Docs: docs}, Options{MinShared: 2, MaxGroupSteps: lim})
		if err != nil {
			t.Fatal(err)
		}
		t.Logf("limit %d: groups %d truncated %v steps %d items %d pairs %d", lim, len(res.Groups), res.GroupsTruncated, res.Stats.GroupSteps, res.Stats.GroupItems, len(res.Pairs))
	}
}
