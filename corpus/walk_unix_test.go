//go:build unix

package corpus

import (
	"os"
	"path/filepath"
	"reflect"
	"syscall"
	"testing"
	"unsafe"
)

func TestPipesAreListedNotOpened(t *testing.T) {
	dir := t.TempDir()
	t.Chdir(dir)
	writeTree(t, dir, map[string]string{"d/a.txt": text})
	if err := syscall.Mkfifo("d/pipe", 0o644); err != nil {
		t.Skipf("cannot make a named pipe here: %v", err)
	}
	// Opening a pipe with no writer would block: finishing at all shows it
	// was not opened.
	docs, skipped := mustRead(t, []string{"d", "d/pipe"}, Options{})
	want := []Skipped{{"d/pipe", reasonIrregular}}
	if !reflect.DeepEqual(skipped, want) || len(docs) != 1 {
		t.Errorf("skipped = %v, documents = %q; want %v and d/a.txt", skipped, docPaths(docs), want)
	}
}

// TestDotDotAfterALinkIsResolvedByTheSystem: in "link/../docs" the system
// resolves ".." after following the link, so the folder listed is the
// link target's sibling; its files must be read from there too, and not
// from "./docs", which a lexical clean of the path would name (the same
// file the name gives when it is read again).
func TestDotDotAfterALinkIsResolvedByTheSystem(t *testing.T) {
	dir := t.TempDir()
	t.Chdir(dir)
	writeTree(t, dir, map[string]string{
		"real/sub/keep.txt": "Beside the link target.\n",
		"real/docs/a.txt":   "The file the system finds.\n",
		"docs/a.txt":        "The file a lexical clean would name.\n",
	})
	if err := os.Symlink("real/sub", "link"); err != nil {
		t.Skipf("cannot make a symbolic link here: %v", err)
	}
	docs, _ := mustRead(t, []string{"link/../docs"}, Options{})
	if len(docs) != 1 || docs[0].Path != "link/../docs/a.txt" || docs[0].Text != "The file the system finds.\n" {
		t.Fatalf("documents %+v", docs)
	}
	again, _ := mustRead(t, []string{docs[0].File}, Options{})
	if len(again) != 1 || again[0].Text != docs[0].Text {
		t.Errorf("read again by its name: %+v", again)
	}
}

// makeFifo makes a named pipe (an irregular file) at p.
func makeFifo(p string) error { return syscall.Mkfifo(p, 0o644) }

// TestChildNamesShareOneAllocation: the three names of a folder's entry
// are the plain joins (joinOS, joinDisplay, filepath.Join), and where
// their text allows they are one string's bytes, not three copies (the
// walk keeps every file's names until the reading ends).
func TestChildNamesShareOneAllocation(t *testing.T) {
	for _, c := range []struct {
		osPath, display, abs string
		shared               bool // the displayed name is the end of the absolute one
	}{
		{"/srv/essays", "/srv/essays", "/srv/essays", true},
		{"essays/", "essays/", "/home/ana/essays", true},
		{"essays", "essays", "/home/ana/essays", true},
		{".", ".", "/home/ana", false}, // "./a.txt" is not the end of "/home/ana/a.txt"
		{"link/../essays", "link/../essays", "/home/ana/essays", false},
	} {
		op, d, ap := childNames(c.osPath, c.display, c.abs, "a.txt")
		if op != joinOS(c.osPath, "a.txt") || d != joinDisplay(c.display, "a.txt") || ap != filepath.Join(c.abs, "a.txt") {
			t.Errorf("%+v: got %q %q %q", c, op, d, ap)
		}
		end := unsafe.StringData(ap[len(ap)-len(d):])
		if got := unsafe.StringData(d) == end; got != c.shared {
			t.Errorf("%+v: displayed name shares the absolute one's bytes: %v, want %v", c, got, c.shared)
		}
		if unsafe.StringData(op) != unsafe.StringData(d) {
			t.Errorf("%+v: the name to open is a second copy of the displayed one", c)
		}
	}
}
