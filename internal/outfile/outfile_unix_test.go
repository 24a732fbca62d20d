//go:build unix

package outfile

import (
	"context"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"syscall"
	"testing"
)

// TestOutputModeIsTheReplacedFilesOrTheUmasks: a report written with -o
// never gets wider permissions than the user's: replacing a file keeps
// that file's mode, and a new file gets 0666 less the umask.
func TestOutputModeIsTheReplacedFilesOrTheUmasks(t *testing.T) {
	tests := []struct {
		name     string
		umask    int
		existing os.FileMode // 0: no file there
		want     os.FileMode
	}{
		{"a new file under umask 077 is private", 0o077, 0, 0o600},
		{"a new file under umask 022 is 0644", 0o022, 0, 0o644},
		{"a new file under umask 002 is 0664", 0o002, 0, 0o664},
		{"a private report replaced stays private", 0o022, 0o600, 0o600},
		{"a group-readable report replaced stays so", 0o077, 0o640, 0o640},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			out := filepath.Join(t.TempDir(), "review.html")
			if tc.existing != 0 {
				writeFile(t, out, "old report")
				if err := os.Chmod(out, tc.existing); err != nil {
					t.Fatal(err)
				}
			}
			old := syscall.Umask(tc.umask)
			err := Write(context.Background(), out, nil, func(w io.Writer) error {
				_, err := fmt.Fprint(w, "new report")
				return err
			})
			syscall.Umask(old)
			if err != nil {
				t.Fatal(err)
			}
			fi, err := os.Stat(out)
			if err != nil {
				t.Fatal(err)
			}
			if got := fi.Mode().Perm(); got != tc.want {
				t.Errorf("mode %#o, want %#o", got, tc.want)
			}
		})
	}
}
