//go:build unix

package main

import (
	"errors"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"syscall"
	"testing"
	"time"
)

// TestSIGINTAtEachStage: Ctrl-C (SIGINT) sent to the program while it
// reads the documents and while it writes the report with -o ends it with
// exit status 130, the message, no file left in --temp, and the earlier
// report beside -o untouched. Each stage is recognised by the file it
// makes: the unit spool in the run's folder under --temp, the temporary
// file beside -o. The stages between (counting in memory and on disk,
// reading again, aligning) make no file to watch for; the driver's
// TestCancelAtEveryStage and the engine's TestCountStopsAtEveryCheck
// cancel each of them in process.
func TestSIGINTAtEachStage(t *testing.T) {
	corpus := filepath.Join(t.TempDir(), "corpus")
	crashCorpus(t, corpus, 3000)
	stages := []struct {
		name string
		seen func(temp, outDir string) bool
	}{
		{"reading", func(temp, _ string) bool {
			m, _ := filepath.Glob(filepath.Join(temp, "reprise-*", "units-*"))
			return len(m) > 0
		}},
		{"writing the report", func(_, outDir string) bool {
			m, _ := filepath.Glob(filepath.Join(outDir, ".report.json.tmp-*"))
			return len(m) > 0
		}},
	}
	for _, st := range stages {
		t.Run(st.name, func(t *testing.T) {
			temp, outDir := t.TempDir(), t.TempDir()
			out := filepath.Join(outDir, "report.json")
			writeFile(t, out, "an earlier report")
			cmd := exec.Command(os.Args[0], "-test.run=^TestHelperChildProcess$")
			cmd.Env = append(os.Environ(), "REPRISE_TEST_CHILD="+strings.Join([]string{
				"scan", "--temp", temp, "--memory", "8MiB", "--jobs", "1", "--format", "json", "-o", out, corpus}, "\x1f"))
			var stderr strings.Builder
			cmd.Stderr = &stderr
			if err := cmd.Start(); err != nil {
				t.Fatal(err)
			}
			done := make(chan error, 1)
			go func() { done <- cmd.Wait() }()
			var err error
			sent := false
		wait:
			for {
				select {
				case err = <-done:
					break wait
				case <-time.After(time.Millisecond):
					if !sent && st.seen(temp, outDir) {
						if serr := cmd.Process.Signal(syscall.SIGINT); serr != nil {
							t.Fatal(serr)
						}
						sent = true
					}
				}
			}
			if !sent {
				t.Fatalf("the run ended (%v) before the %s stage was seen; stderr: %s", err, st.name, stderr.String())
			}
			var exit *exec.ExitError
			if !errors.As(err, &exit) || exit.ExitCode() != exitInterrupted {
				t.Fatalf("after SIGINT while %s: %v, want exit status %d; stderr: %s", st.name, err, exitInterrupted, stderr.String())
			}
			if !strings.Contains(stderr.String(), "interrupted; temporary files removed") {
				t.Errorf("stderr %q does not say it was interrupted", stderr.String())
			}
			if left, _ := os.ReadDir(temp); len(left) != 0 {
				t.Errorf("left in --temp: %v", left)
			}
			if b, _ := os.ReadFile(out); string(b) != "an earlier report" {
				t.Errorf("the earlier report is now %.40q", b)
			}
			if left, _ := filepath.Glob(filepath.Join(outDir, ".report.json.tmp-*")); len(left) != 0 {
				t.Errorf("left beside -o: %v", left)
			}
		})
	}
}
