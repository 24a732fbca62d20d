package scan

import (
	"fmt"
	"reflect"
	"slices"
	"strings"
	"sync"
	"testing"
	"unsafe"

	"reprise/shingle"
)

// someUnits splits a text of its own for document k, so that units of
// different documents differ in every field.
func someUnits(t *testing.T, k int) (string, []shingle.Unit) {
	t.Helper()
	var b strings.Builder
	for s := range 3 + k%5 {
		fmt.Fprintf(&b, "Document %d has sentence number %d in it, %s. ", k, s, strings.Repeat("more ", s))
	}
	text := b.String()
	units, _ := shingle.New(shingle.Options{}).Units(text, nil)
	if len(units) == 0 {
		t.Fatalf("no units in %q", text)
	}
	return text, units
}

// TestUnitSpoolGivesBackWhatWasAdded: units added from many goroutines
// at once come back from read, each document's as it was added, and so do
// texts and units through the quoted store.
func TestUnitSpoolGivesBackWhatWasAdded(t *testing.T) {
	dir := t.TempDir()
	spool, err := newUnitSpool(dir)
	if err != nil {
		t.Fatal(err)
	}
	defer spool.close()
	const n = 200
	texts := make([]string, n)
	units := make([][]shingle.Unit, n)
	offs := make([]int64, n)
	sizes := make([]uint32, n)
	for k := range n {
		texts[k], units[k] = someUnits(t, k)
	}
	var wg sync.WaitGroup
	for w := range 4 {
		wg.Go(func() {
			var scratch []byte
			for k := w; k < n; k += 4 {
				offs[k], sizes[k] = spool.add(units[k], &scratch)
			}
		})
	}
	wg.Wait()
	if err := spool.done(); err != nil {
		t.Fatal(err)
	}
	for k := range n {
		got, err := spool.read(offs[k], sizes[k])
		if err != nil {
			t.Fatal(err)
		}
		if !reflect.DeepEqual(got, units[k]) {
			t.Fatalf("document %d: spool gave %v, want %v", k, got, units[k])
		}
	}
	for _, inMemory := range []bool{false, true} {
		store, err := newQuotedStore(dir, inMemory)
		if err != nil {
			t.Fatal(err)
		}
		defer store.close()
		for k := 0; k < n; k += 3 {
			// What put is given may be overwritten after it returns (a
			// read buffer used again): the store keeps copies.
			text, us := []byte(texts[k]), slices.Clone(units[k])
			if err := store.put(k, unsafe.String(&text[0], len(text)), us); err != nil {
				t.Fatal(err)
			}
			for b := range text {
				text[b] = 'x'
			}
			clear(us)
		}
		if err := store.done(); err != nil {
			t.Fatal(err)
		}
		for k := range n {
			text, got, err := store.load(k)
			if k%3 != 0 {
				if err == nil || store.has(k) {
					t.Errorf("in memory %v: document %d never put, but loaded (%v)", inMemory, k, err)
				}
				continue
			}
			if err != nil {
				t.Fatal(err)
			}
			if !store.has(k) || text != texts[k] || !reflect.DeepEqual(got, units[k]) {
				t.Fatalf("in memory %v: document %d: store gave %q %v, want %q %v", inMemory, k, text, got, texts[k], units[k])
			}
		}
	}
}

// TestQuotedFit: the quoted documents are held in memory with no bound,
// or when they take at most half of what the bound leaves after the
// runtime's share (an eighth) and what the report holds.
func TestQuotedFit(t *testing.T) {
	digests := []*docDigest{{size: 1000, units: 10}, {size: 5000, units: 40}, {size: 3000, units: 20}}
	need := quotedBytes(1000, 10) + quotedBytes(3000, 20) // documents 0 and 2: 4720 bytes
	for _, tc := range []struct {
		memory, held int64
		want         bool
	}{
		{0, 1 << 40, true},
		{8 * (2*need + 100) / 7, 100, true}, // 8 * 9540 / 7 = 10902: 9540 after its eighth
		{8*(2*need+100)/7 - 2, 100, false},
		{100, 200, false},
	} {
		if got := quotedFit(tc.memory, tc.held, digests, []int{0, 2}); got != tc.want {
			t.Errorf("memory %d, held %d, need %d: fit %v, want %v", tc.memory, tc.held, need, got, tc.want)
		}
	}
}

// TestUnitSpoolReportsAWriteError: a spool whose file can no longer be
// written says so when the writing ends, not later with wrong units.
func TestUnitSpoolReportsAWriteError(t *testing.T) {
	spool, err := newUnitSpool(t.TempDir())
	if err != nil {
		t.Fatal(err)
	}
	defer spool.close()
	spool.f.f.Close() // every write from here on fails
	_, units := someUnits(t, 1)
	var scratch []byte
	for range 1 + (1<<20)/len(shingle.AppendUnits(nil, units)) { // past the write buffer
		spool.add(units, &scratch)
	}
	if err := spool.done(); err == nil || !strings.Contains(err.Error(), "writing the documents' units") {
		t.Errorf("done after failed writes: %v", err)
	}
}
