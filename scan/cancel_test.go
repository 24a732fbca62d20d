package scan

import (
	"context"
	"errors"
	"fmt"
	"os"
	"path/filepath"
	"strings"
	"sync"
	"testing"
)

// TestCancelAtEveryStage: a run cancelled while it reads, counts (in
// memory and spilling to disk), reads again or aligns returns
// context.Canceled, no result, and leaves nothing in its temporary folder's
// parent: every temporary file is removed by the code that made it.
func TestCancelAtEveryStage(t *testing.T) {
	dir := demoCopy(t)
	// More documents, so that counting under a tiny bound spills.
	for k := range 40 {
		var b strings.Builder
		for s := range 12 {
			fmt.Fprintf(&b, "Filler note %d of the batch says sentence %d with several plain words. ", k, s)
		}
		writeFile(t, filepath.Join(dir, fmt.Sprintf("filler-%02d.txt", k)), b.String())
	}
	for _, stage := range []Stage{StageRead, StageCount, StageReread, StageAlign} {
		for _, memory := range []int64{0, 256 << 10} {
			t.Run(fmt.Sprintf("%s, memory %d", stage, memory), func(t *testing.T) {
				ctx, cancel := context.WithCancel(context.Background())
				defer cancel()
				cfg := demoConfig(t, dir)
				cfg.Memory = memory
				var once sync.Once
				var inTemp []string
				cfg.Progress = func(p Progress) {
					if p.Stage != stage {
						return
					}
					once.Do(func() {
						// The run's own folder exists while it runs.
						entries, _ := os.ReadDir(cfg.TempDir)
						for _, e := range entries {
							inTemp = append(inTemp, e.Name())
						}
						cancel()
					})
				}
				res, err := Run(ctx, cfg)
				if !errors.Is(err, context.Canceled) || res != nil {
					t.Fatalf("cancelled at %s: result %v, error %v; want no result and context.Canceled", stage, res != nil, err)
				}
				if len(inTemp) != 1 || !strings.HasPrefix(inTemp[0], "reprise-") {
					t.Errorf("while running, the temporary folder held %v, want the run's own folder", inTemp)
				}
				if left, _ := os.ReadDir(cfg.TempDir); len(left) != 0 {
					t.Errorf("cancelled at %s: left behind %v", stage, left)
				}
			})
		}
	}
}
