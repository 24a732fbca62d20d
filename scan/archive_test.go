package scan

import (
	"context"
	"errors"
	"path/filepath"
	"strings"
	"testing"

	"reprise/archive"
	"reprise/corpus"
	"reprise/shingle"
)

// TestRemoveAlwaysErases: when a removal fails after another succeeded,
// the store is still compacted (so the removed text leaves the folder's
// files), the removed document is gone, the other kept, and the error
// names the failure.
func TestRemoveAlwaysErases(t *testing.T) {
	dir := t.TempDir()
	writeFile(t, filepath.Join(dir, "docs", "a.txt"), "The first archived note has enough words to count. It ends with a second sentence of words.\n")
	writeFile(t, filepath.Join(dir, "docs", "b.txt"), "The other archived note is not the same at all. Its second sentence differs as well here.\n")
	sopt := shingle.Options{}
	ar, err := archive.Open(filepath.Join(dir, "ar"), archive.Options{Settings: archive.SettingsFor(sopt), Create: true})
	if err != nil {
		t.Fatal(err)
	}
	defer ar.Close()
	ctx := context.Background()
	b, err := ReadBatch(ctx, []string{filepath.Join(dir, "docs")}, corpus.Options{Jobs: 1}, sopt, ar)
	if err != nil {
		t.Fatal(err)
	}
	if _, err := AddBatch(ctx, ar, b, nil); err != nil {
		t.Fatal(err)
	}
	pathA, pathB := b.Docs[0].Path, b.Docs[1].Path
	idB, ok, err := ar.FindPath(pathB)
	if err != nil || !ok {
		t.Fatalf("b not archived: %v", err)
	}
	var removed []string
	compacted := false
	err = removeFrom(ctx, ar, []string{pathA, pathB}, func(ar *archive.Archive, id uint64) error {
		if id == idB {
			return errors.New("injected failure")
		}
		return ar.Remove(id)
	}, func(id uint64, path string) {
		if path == "" {
			compacted = true
			return
		}
		removed = append(removed, path)
	})
	if err == nil || !strings.Contains(err.Error(), "injected failure") {
		t.Errorf("error %v, want the injected failure", err)
	}
	if len(removed) != 1 || removed[0] != pathA || !compacted {
		t.Errorf("removed %v, compacted %v; want %s removed and the store compacted", removed, compacted, pathA)
	}
	if _, ok, _ := ar.FindPath(pathA); ok {
		t.Errorf("%s is still archived", pathA)
	}
	if _, ok, _ := ar.FindPath(pathB); !ok {
		t.Errorf("%s was removed", pathB)
	}
}
