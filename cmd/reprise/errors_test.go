package main

import (
	"bytes"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// TestErrorsNotSilence: inputs that give nothing to compare are errors with
// exit status 2 and one line that names the cause, never an empty report
// that reads as an all-clear.
func TestErrorsNotSilence(t *testing.T) {
	demo := "../../testdata/demo"
	empty := t.TempDir()
	missing := filepath.Join(t.TempDir(), "nope")
	cases := []struct {
		name string
		args []string
		want string
	}{
		{"a missing path says no such file", []string{"scan", missing}, missing + ": no such file or directory"},
		{"an empty folder says so", []string{"scan", empty}, empty + ": empty folder"},
		{"an --include that matches nothing says so", []string{"scan", "--include", "*.zzz", demo}, "matches --include *.zzz"},
		{"-o into a missing folder names the folder", []string{"scan", "-o", filepath.Join(missing, "r.json"), demo}, "folder " + missing + ": no such file or directory"},
		{"an unknown help topic", []string{"help", "bogus"}, `no help on "bogus"`},
		{"compare: a missing reference set", []string{"compare", "--against", missing, demo}, "reference set: " + missing + ": no such file or directory"},
		{"compare: an empty reference folder", []string{"compare", "--against", empty, demo}, "reference set: " + empty + ": empty folder"},
		{"compare: a reference set with --fail-on too", []string{"compare", "--fail-on", "50%", "--against", empty, demo}, "reference set: " + empty},
		{"compare: no new document read", []string{"compare", "--against", demo, empty}, "new documents: " + empty + ": empty folder"},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			var out, errs bytes.Buffer
			code := run(append(tc.args[:1:1], append([]string{"-q"}, tc.args[1:]...)...), &out, &errs)
			if tc.args[0] == "help" {
				code = run(tc.args, &out, &errs)
			}
			if code != exitUsage || !strings.Contains(errs.String(), tc.want) || out.Len() != 0 {
				t.Fatalf("exit %d, stderr %q, stdout %d bytes; want exit 2, %q, nothing", code, errs.String(), out.Len(), tc.want)
			}
		})
	}
	if _, err := os.Stat(missing); err == nil {
		t.Fatalf("%s was created", missing)
	}
}
