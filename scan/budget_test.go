package scan

import (
	"context"
	"fmt"
	"math/rand/v2"
	"path/filepath"
	"runtime"
	"strings"
	"testing"
	"unsafe"

	"reprise/corpus"
	"reprise/report"
	"reprise/shingle"
)

// TestEngineBudget: the engine gets what the memory bound leaves after the
// runtime's share and the run's own holdings, never less than the floor,
// and no bound stays no bound.
func TestEngineBudget(t *testing.T) {
	tests := []struct {
		name         string
		memory, held int64
		want         int64
	}{
		{"no bound", 0, 1 << 30, 0},
		{"the rest of the budget", 64 << 20, 16 << 20, (64 - 8 - 16) << 20},
		{"the floor when the documents take it all", 8 << 20, 7 << 20, minEngineBudget},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			if got := engineBudget(tc.memory, tc.held); got != tc.want {
				t.Fatalf("got %d, want %d", got, tc.want)
			}
		})
	}
}

// TestHeldPerDocumentCoversTheStructs: the fixed costs charged per
// document are at least what its structs take: while counting its
// corpus.Document, digest and the pointer to it, and its slice header in
// the engine's input; while
// the report is built its report.Doc, report.Document, report.SourceText,
// spans header and reuse share.
func TestHeldPerDocumentCoversTheStructs(t *testing.T) {
	counting := unsafe.Sizeof(corpus.Document{}) + unsafe.Sizeof(docDigest{}) + unsafe.Sizeof(&docDigest{}) + unsafe.Sizeof([]uint64(nil))
	if counting > heldPerDocument {
		t.Errorf("while counting a document's structs take %d bytes, more than heldPerDocument %d", counting, heldPerDocument)
	}
	reporting := unsafe.Sizeof(report.Doc{}) + unsafe.Sizeof(report.Document{}) + unsafe.Sizeof(report.SourceText{}) + unsafe.Sizeof([]int(nil)) + unsafe.Sizeof(float64(0))
	if reporting > reportPerDocument {
		t.Errorf("while reporting a document's structs take %d bytes, more than reportPerDocument %d", reporting, reportPerDocument)
	}
	t.Logf("corpus.Document %d bytes, docDigest %d bytes, charged %d; report %d bytes, charged %d", unsafe.Sizeof(corpus.Document{}), unsafe.Sizeof(docDigest{}), heldPerDocument, reporting, reportPerDocument)
}

// TestAllocSize: the estimate of an allocation is never below what is
// asked, and at most an eighth (or 16 bytes) above it.
func TestAllocSize(t *testing.T) {
	for _, n := range []int{1, 15, 16, 17, 100, 256, 257, 300, 1000, 1025, 5000, 40000, 1 << 20} {
		got := allocSize(n)
		if got < int64(n) || got > int64(n)+max(int64(n)/8, 16) {
			t.Errorf("allocSize(%d) = %d", n, got)
		}
	}
	if allocSize(0) != 0 {
		t.Errorf("allocSize(0) = %d", allocSize(0))
	}
}

// TestHeldBytesCoversTheHeap: what heldBytes charges for documents read
// and digested as Run does is what the Go heap holds for them (the
// documents, digests, their names and fingerprints, and the engine's input
// slice), measured by runtime.ReadMemStats after collections: at least
// that less a fixed 64 KiB (what a read keeps whatever its size: 21 KB
// here at 3,000 and at 9,000 documents), and not a quarter more.
func TestHeldBytesCoversTheHeap(t *testing.T) {
	dir := t.TempDir()
	rng := rand.New(rand.NewPCG(14, 5))
	words := strings.Fields("the report of each team was read again by a reviewer who found several passages shared with older work and asked for the sources")
	const files = 3000
	for f := range files {
		var b strings.Builder
		for s := range 10 + rng.IntN(40) {
			for range 6 + rng.IntN(12) {
				b.WriteString(words[rng.IntN(len(words))])
				b.WriteByte(' ')
			}
			fmt.Fprintf(&b, "%d-%d.\n", f, s) // every sentence distinct
		}
		writeFile(t, filepath.Join(dir, fmt.Sprintf("d%03d", f/1000), fmt.Sprintf("doc-%05d.txt", f)), b.String())
	}
	spool, err := newUnitSpool(t.TempDir())
	if err != nil {
		t.Fatal(err)
	}
	defer spool.close()
	opt := shingle.Options{}
	effective := shingle.New(opt).Options()
	splitters := newSplitterPool(opt)
	heap := func() uint64 {
		runtime.GC()
		runtime.GC() // the splitters' pool is emptied by the second
		var m runtime.MemStats
		runtime.ReadMemStats(&m)
		return m.HeapAlloc
	}
	before := heap()
	docs, digests, _, err := corpus.ReadEachContext(context.Background(), []string{dir}, corpus.Options{Jobs: 2}, func(d *corpus.Document, text *corpus.Loan) *docDigest {
		return splitters.digest(d, text, effective, nil, spool)
	})
	if err != nil {
		t.Fatal(err)
	}
	in := make([][]uint64, len(digests))
	for i := range digests {
		in[i] = digests[i].set
	}
	after := heap()
	runtime.KeepAlive(docs)
	runtime.KeepAlive(in)
	if len(docs) != files {
		t.Fatalf("read %d documents, want %d", len(docs), files)
	}
	measured := int64(after) - int64(before)
	held := heldBytes(docs, digests)
	t.Logf("%d documents: heap grew by %d bytes, heldBytes %d (%.3f)", len(docs), measured, held, float64(held)/float64(measured))
	if held < measured-64<<10 || 4*held > 5*measured {
		t.Errorf("heldBytes charges %d bytes for %d documents; the heap holds %d for them", held, len(docs), measured)
	}
}
