//go:build unix

package corpus

import (
	"os"
	"reflect"
	"syscall"
	"testing"
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
