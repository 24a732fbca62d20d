//go:build unix

package corpus

import (
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
