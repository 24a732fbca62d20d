package pairs

import (
	"context"
	"errors"
	"os"
	"sync/atomic"
	"testing"
)

// countdown is a context whose Err turns to context.Canceled on its n-th
// call: a cancel that lands at each of the engine's checks in turn.
type countdown struct {
	context.Context
	left atomic.Int64
}

func (c *countdown) Err() error {
	if c.left.Add(-1) < 0 {
		return context.Canceled
	}
	return nil
}

// TestCountStopsAtEveryCheck: cancelled at its first, second, … check, in
// memory and spilling (sorted runs, merges, pruning passes, ranges), with
// one and three workers, CountContext returns context.Canceled and leaves
// no temporary file; once enough checks pass it gives the uncancelled
// result.
func TestCountStopsAtEveryCheck(t *testing.T) {
	in := benchCorpus(600, 60)
	want, err := Count(in, Options{})
	if err != nil {
		t.Fatal(err)
	}
	var entries int64
	for _, d := range in.Docs {
		entries += int64(len(d))
	}
	spill := inMemoryBytes(entries, len(in.Docs)) / 2 // spills, in a few runs
	for _, opt := range []Options{{}, {Jobs: 3}, {MemoryBudget: spill, Jobs: 3}} {
		cancelled := 0
		for n := int64(0); ; n++ {
			dir := t.TempDir()
			opt.TempDir = dir
			ctx := &countdown{Context: context.Background()}
			ctx.left.Store(n)
			got, err := CountContext(ctx, in, opt)
			if left, _ := os.ReadDir(dir); len(left) != 0 {
				t.Fatalf("budget %d, jobs %d, cancelled at check %d: left behind %v", opt.MemoryBudget, opt.Jobs, n, left)
			}
			if errors.Is(err, context.Canceled) {
				cancelled++
				continue
			}
			if err != nil {
				t.Fatal(err)
			}
			if err := sameResult(got, want); err != nil {
				t.Fatalf("budget %d, jobs %d, after %d checks: %v", opt.MemoryBudget, opt.Jobs, n, err)
			}
			if opt.MemoryBudget > 0 && got.Spill.Runs == 0 {
				t.Fatalf("budget %d did not spill", opt.MemoryBudget)
			}
			break
		}
		if cancelled < 2 {
			t.Errorf("budget %d, jobs %d: only %d checks", opt.MemoryBudget, opt.Jobs, cancelled)
		}
		t.Logf("budget %d, jobs %d: %d checks", opt.MemoryBudget, opt.Jobs, cancelled)
	}
}
