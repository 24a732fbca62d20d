package shingle

import (
	"os"
	"path/filepath"
	"testing"
)

// dataFile returns the path of a file fetched by scripts/fetch-data.sh, from
// $REPRISE_DATA or <repo>/.cache/data. A missing file fails the test under CI
// and skips it elsewhere.
func dataFile(t testing.TB, rel string) string {
	t.Helper()
	data := os.Getenv("REPRISE_DATA")
	if data == "" {
		data = filepath.Join("..", ".cache", "data")
	}
	path := filepath.Join(data, rel)
	if _, err := os.Stat(path); err != nil {
		if os.Getenv("CI") != "" {
			t.Fatalf("%s: %v", path, err)
		}
		t.Skipf("%s missing: run scripts/fetch-data.sh", path)
	}
	return path
}
