package corpus

import (
	"os"
	"path/filepath"
	"runtime"
	"strings"
	"testing"
)

// TestPDFMemberCopyGoesToTempDir: the temporary copy pdftotext reads of a
// PDF that is not a file on disk (a ZIP member) is written to
// Options.TempDir, so a caller's own temporary folder holds it, and to
// the system temporary folder when TempDir is empty; it is removed after.
func TestPDFMemberCopyGoesToTempDir(t *testing.T) {
	if runtime.GOOS == "windows" {
		t.Skip("the stand-in pdftotext is a shell script")
	}
	// A stand-in for pdftotext: it prints the folder of the file it is
	// given ("-enc UTF-8 -eol unix FILE -").
	prog := filepath.Join(t.TempDir(), "pdftotext")
	if err := os.WriteFile(prog, []byte("#!/bin/sh\nprintf 'read in %s\\n' \"$(dirname \"$5\")\"\n"), 0o755); err != nil {
		t.Fatal(err)
	}
	private := t.TempDir()
	tests := []struct {
		name    string
		tempDir string
		want    string
	}{
		{"in TempDir when set", private, private},
		{"in the system temporary folder when empty", "", filepath.Clean(os.TempDir())},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			opt := testOptions(t)
			opt.PDFToText, opt.TempDir = prog, tc.tempDir
			parts := extractBytes(t, "member.pdf", []byte("%PDF-1.4\nnot read by the stand-in\n"), opt)
			if len(parts) != 1 || parts[0].reason != "" {
				t.Fatalf("parts %+v", parts)
			}
			if got := strings.TrimSpace(strings.TrimPrefix(parts[0].Text, "read in ")); got != tc.want {
				t.Errorf("the copy was in %q, want %q", got, tc.want)
			}
		})
	}
	if left, _ := os.ReadDir(private); len(left) != 0 {
		t.Errorf("left in TempDir: %v", left)
	}
}
