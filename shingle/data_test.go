package shingle

import (
	"testing"

	"reprise/internal/refdata"
)

// dataFile returns the path of a file fetched by scripts/fetch-data.sh
// (see internal/refdata: fails under CI, skips elsewhere when missing).
func dataFile(t testing.TB, rel string) string {
	t.Helper()
	return refdata.Path(t, rel)
}
