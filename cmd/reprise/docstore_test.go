package main

import (
	"fmt"
	"reflect"
	"strings"
	"sync"
	"testing"

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
	store, err := newQuotedStore(dir)
	if err != nil {
		t.Fatal(err)
	}
	defer store.close()
	const n = 200
	texts := make([]string, n)
	units := make([][]shingle.Unit, n)
	offs := make([]int64, n)
	for k := range n {
		texts[k], units[k] = someUnits(t, k)
	}
	var wg sync.WaitGroup
	for w := range 4 {
		wg.Go(func() {
			var scratch []byte
			for k := w; k < n; k += 4 {
				offs[k] = spool.add(units[k], &scratch)
			}
		})
	}
	wg.Wait()
	if err := spool.done(); err != nil {
		t.Fatal(err)
	}
	for k := range n {
		got, err := spool.read(offs[k], len(units[k]))
		if err != nil {
			t.Fatal(err)
		}
		if !reflect.DeepEqual(got, units[k]) {
			t.Fatalf("document %d: spool gave %v, want %v", k, got, units[k])
		}
		if k%3 == 0 {
			if err := store.put(k, texts[k], got); err != nil {
				t.Fatal(err)
			}
		}
	}
	if err := store.done(); err != nil {
		t.Fatal(err)
	}
	for k := 0; k < n; k += 3 {
		text, got, err := store.load(k)
		if err != nil {
			t.Fatal(err)
		}
		if text != texts[k] || !reflect.DeepEqual(got, units[k]) {
			t.Fatalf("document %d: store gave %q %v, want %q %v", k, text, got, texts[k], units[k])
		}
	}
	if _, _, err := store.load(1); err == nil {
		t.Error("store.load of a document never put: no error")
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
	spool.f.Close() // every write from here on fails
	_, units := someUnits(t, 1)
	var scratch []byte
	for range 1 + (1<<20)/(unitBytes*len(units)) { // past the write buffer
		spool.add(units, &scratch)
	}
	if err := spool.done(); err == nil || !strings.Contains(err.Error(), "writing the documents' units") {
		t.Errorf("done after failed writes: %v", err)
	}
}
