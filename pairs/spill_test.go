package pairs

import (
	"errors"
	"fmt"
	"os"
	"path/filepath"
	"reflect"
	"slices"
	"testing"

	"pgregory.net/rapid"
)

// sameResult reports how two Results differ, ignoring Spill (which says
// how the work was split and so depends on the budget by design).
func sameResult(got, want *Result) error {
	g, w := *got, *want
	g.Spill, w.Spill = SpillStats{}, SpillStats{}
	if !reflect.DeepEqual(g, w) {
		return fmt.Errorf("\n got %+v\nwant %+v", g, w)
	}
	return nil
}

// checkBudgets is the budget variant of the property test: the same input
// counted with a tiny memory budget (which forces the spilling path:
// sorted runs on disk, merges of at most a few runs, several passes) and
// with several workers must give exactly the unbounded Result.
func checkBudgets(t *rapid.T, in Input, opt Options, want *Result) {
	dir, err := os.MkdirTemp("", "reprise-pairs-test-")
	if err != nil {
		t.Fatal(err)
	}
	defer os.RemoveAll(dir)
	opt.TempDir = dir
	opt.MemoryBudget = rapid.Int64Range(1, 4096).Draw(t, "MemoryBudget")
	opt.Jobs = rapid.IntRange(1, 4).Draw(t, "Jobs")
	got, err := Count(in, opt)
	if err != nil {
		t.Fatalf("budget %d, jobs %d: %v", opt.MemoryBudget, opt.Jobs, err)
	}
	if err := sameResult(got, want); err != nil {
		t.Fatalf("%v, budget %d, jobs %d: result differs from the unbounded one:%v", opt.Counter, opt.MemoryBudget, opt.Jobs, err)
	}
	var entries int64
	for _, d := range in.Docs {
		entries += int64(len(d))
	}
	if spills := inMemoryBytes(entries, len(in.Docs)) > opt.MemoryBudget; spills != (got.Spill.Runs > 0) && entries > 0 {
		t.Fatalf("budget %d for %d entries: %d runs written", opt.MemoryBudget, entries, got.Spill.Runs)
	}
	if left, _ := os.ReadDir(dir); len(left) != 0 {
		t.Fatalf("temporary files left behind: %v", left)
	}
	// Several workers without a budget: the in-memory ranges.
	opt.MemoryBudget = 0
	got, err = Count(in, opt)
	if err != nil {
		t.Fatal(err)
	}
	if err := sameResult(got, want); err != nil {
		t.Fatalf("%v, jobs %d: result differs from one worker's:%v", opt.Counter, opt.Jobs, err)
	}
}

// TestCountBudgets checks the generated benchmark corpus (20,000 documents,
// 1.2 million entries; see benchCorpus) at budgets from far too small to
// ample and with 1 and 3 workers: the Result must be the unbounded one,
// and the budgets below the in-memory estimate must have spilled.
func TestCountBudgets(t *testing.T) {
	in := benchCorpus(20000, 60)
	want, err := Count(in, Options{})
	if err != nil {
		t.Fatal(err)
	}
	if len(want.Pairs) == 0 || len(want.Groups) == 0 || len(want.Common) == 0 {
		t.Fatalf("the corpus should give pairs, groups and common units: %d %d %d", len(want.Pairs), len(want.Groups), len(want.Common))
	}
	tests := []struct {
		name   string
		budget int64
		jobs   int
		spills bool
	}{
		{"1 MiB spills, merges runs and counts in ranges", 1 << 20, 1, true},
		{"8 MiB spills", 8 << 20, 3, true},
		{"64 MiB fits in memory", 64 << 20, 3, false},
		{"no budget, three workers", 0, 3, false},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			dir := t.TempDir()
			got, err := Count(in, Options{MemoryBudget: tc.budget, Jobs: tc.jobs, TempDir: dir})
			if err != nil {
				t.Fatal(err)
			}
			if err := sameResult(got, want); err != nil {
				t.Fatal(err)
			}
			if (got.Spill.Runs > 0) != tc.spills {
				t.Fatalf("runs written: %d, want spilling %v", got.Spill.Runs, tc.spills)
			}
			if left, _ := os.ReadDir(dir); len(left) != 0 {
				t.Fatalf("temporary files left behind: %v", left)
			}
			t.Logf("runs %d, %d bytes written, %d ranges", got.Spill.Runs, got.Spill.BytesWritten, got.Spill.Ranges)
		})
	}
}

// TestCountBudgetErrors: a bad budget or an unusable temporary folder is
// an error with context, not a crash or a silent in-memory run.
func TestCountBudgetErrors(t *testing.T) {
	in := Input{Docs: [][]uint64{{1, 2, 3}, {1, 2, 3}}}
	if _, err := Count(in, Options{MemoryBudget: -1}); !errors.Is(err, ErrOption) {
		t.Fatalf("negative budget: %v, want ErrOption", err)
	}
	missing := filepath.Join(t.TempDir(), "missing")
	_, err := Count(in, Options{MemoryBudget: 1, TempDir: missing})
	if !errors.Is(err, errTemp) {
		t.Fatalf("missing temporary folder: %v, want a temporary-file error", err)
	}
}

// TestSplitRanges: ranges cover 0..m in order, each within the limit
// unless a single document exceeds it.
func TestSplitRanges(t *testing.T) {
	cost := []int64{5, 1, 1, 9, 0, 2, 2}
	tests := []struct {
		name  string
		limit int64
		parts int
		want  [][2]int
	}{
		{"no limit, one part: one range", 0, 1, [][2]int{{0, 7}}},
		{"a limit cuts before it is passed", 6, 1, [][2]int{{0, 2}, {2, 3}, {3, 4}, {4, 7}}},
		{"parts share the cost", 0, 2, [][2]int{{0, 3}, {3, 5}, {5, 7}}},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			got := splitRanges(len(cost), func(a int) int64 { return cost[a] }, tc.limit, tc.parts)
			if !slices.Equal(got, tc.want) {
				t.Fatalf("got %v, want %v", got, tc.want)
			}
		})
	}
}
