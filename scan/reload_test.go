package scan

import (
	"path/filepath"
	"testing"

	"reprise/report"
)

// TestReportReadOptionsAreTheRecordedOnes: the options used to read again
// are the result's recorded ones; a result without them (older format
// writers) reads with the defaults and its file size limit.
func TestReportReadOptionsAreTheRecordedOnes(t *testing.T) {
	tests := []struct {
		name     string
		settings report.Settings
		check    func(t *testing.T, s report.Settings)
	}{
		{"recorded settings are used", report.Settings{MaxFileSize: 1 << 20, Read: &report.ReadSettings{
			MaxContainerSize: 5 << 20, MaxMemberSize: 3 << 20, MaxMembers: 7, MaxRatio: 9, MaxDepth: 11,
			PDFTimeoutSeconds: 2.5, FileTimeoutSeconds: 7, SkipQuotedReplies: true, JSONLID: "key", JSONLText: "body", MaxJSONLLine: 4096,
		}}, func(t *testing.T, s report.Settings) {
			got := ReadSettings(recordedReadOptions(s))
			if *got != *s.Read {
				t.Errorf("read with %+v, recorded %+v", *got, *s.Read)
			}
		}},
		{"no recorded settings: defaults", report.Settings{MaxFileSize: 1 << 20}, func(t *testing.T, s report.Settings) {
			o := recordedReadOptions(s)
			if o.MaxFileSize != 1<<20 || o.SkipQuotedReplies || o.JSONLText != "" || o.MaxMembers != 0 {
				t.Errorf("options %+v, want the defaults and MaxFileSize", o)
			}
		}},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) { tc.check(t, tc.settings) })
	}
}

// TestReportOuterFile: a recorded path is read again from the file on
// disk that holds it.
func TestReportOuterFile(t *testing.T) {
	dir := t.TempDir()
	odd := filepath.Join(dir, "x#y.jsonl#z.txt")
	writeFile(t, odd, "a file whose name looks like a JSON Lines line")
	tests := []struct{ name, path, want string }{
		{"a plain file is itself", "docs/a.txt", "docs/a.txt"},
		{"a ZIP member is its archive", "docs/b.zip!/x.txt", "docs/b.zip"},
		{"a member of a nested ZIP is the outer archive", "b.zip!/inner.zip!/x.txt", "b.zip"},
		{"a JSON Lines line is its file", "docs/f.jsonl#id-1", "docs/f.jsonl"},
		{"an id holding # is cut at the first .jsonl#", "d/F.JSONL#a#b", "d/F.JSONL"},
		{"a # in a plain file name stays", "docs/a#1.txt", "docs/a#1.txt"},
		{"a file on disk stays whole", odd, odd},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			if got := outerFile(tc.path); got != tc.want {
				t.Errorf("outerFile(%q) = %q, want %q", tc.path, got, tc.want)
			}
		})
	}
}
