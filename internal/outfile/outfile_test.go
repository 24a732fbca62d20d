package outfile

import (
	"context"
	"errors"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"testing"
)

func writeFile(t *testing.T, path, text string) {
	t.Helper()
	if err := os.WriteFile(path, []byte(text), 0o644); err != nil {
		t.Fatal(err)
	}
}

// TestInterruptRemovesTheOutputTempFile: Ctrl-C (a cancelled context)
// while the report is being written fails the next write, removes the
// temporary file beside -o and leaves an earlier report as it was.
func TestInterruptRemovesTheOutputTempFile(t *testing.T) {
	tests := []struct {
		name     string
		existing bool
	}{
		{"a new report", false},
		{"a report replacing a file", true},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			dir := t.TempDir()
			out := filepath.Join(dir, "review.html")
			if tc.existing {
				writeFile(t, out, "old report")
			}
			ctx, cancel := context.WithCancel(context.Background())
			defer cancel()
			pending := func() []string {
				m, _ := filepath.Glob(filepath.Join(dir, ".review.html.tmp-*"))
				return m
			}
			err := Write(ctx, out, nil, func(w io.Writer) error {
				fmt.Fprint(w, "half a report")
				if len(pending()) != 1 {
					t.Fatalf("no temporary file beside -o while writing: %v", pending())
				}
				cancel()
				// More than the output's buffer, so that it reaches the file.
				_, err := w.Write(make([]byte, 1<<20))
				return err
			})
			if !errors.Is(err, context.Canceled) {
				t.Fatalf("Write after the interrupt: %v, want context.Canceled", err)
			}
			if left := pending(); len(left) != 0 {
				t.Errorf("left after the interrupt: %v", left)
			}
			if tc.existing {
				if b, _ := os.ReadFile(out); string(b) != "old report" {
					t.Errorf("the old report is now %q", b)
				}
			}
		})
	}
}
