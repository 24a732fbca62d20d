package refdata

import (
	"errors"
	"os"
	"path/filepath"
	"testing"
)

func TestFindUsesTheEnvironmentFirst(t *testing.T) {
	dir := t.TempDir()
	if err := os.MkdirAll(filepath.Join(dir, "brown"), 0o755); err != nil {
		t.Fatal(err)
	}
	t.Setenv("REPRISE_DATA", dir)
	got, err := Find("brown")
	if err != nil || got != filepath.Join(dir, "brown") {
		t.Errorf("Find(brown) = %q, %v; want %q", got, err, filepath.Join(dir, "brown"))
	}
	if _, err := Find("absent"); !errors.Is(err, ErrNoData) {
		t.Errorf("Find(absent) error %v, want ErrNoData", err)
	}
}

func TestRootDefaultsToTheModuleCache(t *testing.T) {
	t.Setenv("REPRISE_DATA", "")
	root, err := Root()
	if err != nil {
		t.Fatal(err)
	}
	// This package lives two folders below the module root.
	want, _ := filepath.Abs(filepath.Join("..", "..", ".cache", "data"))
	if root != want {
		t.Errorf("Root() = %q, want %q", root, want)
	}
}
