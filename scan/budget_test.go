package scan

import (
	"testing"
	"unsafe"

	"reprise/corpus"
)

// TestEngineBudget: the engine gets what the memory bound leaves after the
// run's own holdings, never less than the floor, and no bound stays no
// bound.
func TestEngineBudget(t *testing.T) {
	tests := []struct {
		name         string
		memory, held int64
		want         int64
	}{
		{"no bound", 0, 1 << 30, 0},
		{"the rest of the budget", 64 << 20, 16 << 20, 48 << 20},
		{"the floor when the documents take it all", 8 << 20, 9 << 20, minEngineBudget},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			if got := engineBudget(tc.memory, tc.held); got != tc.want {
				t.Fatalf("got %d, want %d", got, tc.want)
			}
		})
	}
}

// TestHeldPerDocumentCoversTheStructs: the fixed cost charged per document
// is at least what its corpus.Document and digest take, with their two
// slices of results (ReadEach's docs and digests) holding one each.
func TestHeldPerDocumentCoversTheStructs(t *testing.T) {
	structs := unsafe.Sizeof(corpus.Document{}) + unsafe.Sizeof(docDigest{})
	if structs > heldPerDocument {
		t.Errorf("a document's structs take %d bytes, more than heldPerDocument %d", structs, heldPerDocument)
	}
	t.Logf("corpus.Document %d bytes, docDigest %d bytes, charged %d", unsafe.Sizeof(corpus.Document{}), unsafe.Sizeof(docDigest{}), heldPerDocument)
}
