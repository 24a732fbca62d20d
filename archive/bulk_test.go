package archive

import (
	"context"
	"errors"
	"fmt"
	"os"
	"path/filepath"
	"slices"
	"strings"
	"testing"

	"github.com/cockroachdb/pebble/v2"
)

// bulkDocs is a run of documents with every outcome: new ones, the same
// content under another path, the same path and content again, new content
// at a path added earlier in the run, a document without units, and
// documents sharing sentences (postings of several IDs).
func bulkDocs() []Doc {
	shared := sentences("shared", 3)
	var docs []Doc
	for i := range 12 {
		docs = append(docs, doc(fmt.Sprintf("n%02d.txt", i), shared+sentences(fmt.Sprint("own", i), 2+i%3)))
	}
	docs = append(docs,
		doc("copy-of-n03.txt", docs[3].Text),
		doc("n05.txt", docs[5].Text),
		doc("n07.txt", shared+sentences("seven again", 2)),
		doc("short.txt", "Too short. Also short."),
		doc("pre.txt", sentences("pre", 2)+"changed"),
	)
	for i := range 5 {
		docs = append(docs, doc(fmt.Sprintf("m%02d.txt", i), sentences(fmt.Sprint("m", i), 3)))
	}
	return docs
}

// dump lists every key of the archive with its value; postings are folded
// and their IDs sorted (operand order is not part of the format).
func dump(t *testing.T, a *Archive) []string {
	t.Helper()
	it, err := a.db.NewIter(&pebble.IterOptions{})
	if err != nil {
		t.Fatal(err)
	}
	defer it.Close()
	var out []string
	for it.First(); it.Valid(); it.Next() {
		k, v := it.Key(), it.Value()
		if k[0] == 'p' {
			ids, err := decodeIDs(nil, v)
			if err != nil {
				t.Fatal(err)
			}
			slices.Sort(ids)
			out = append(out, fmt.Sprintf("%x=%v", k, ids))
			continue
		}
		out = append(out, fmt.Sprintf("%x=%x", k, v))
	}
	return out
}

// TestAddAllIsAddInTurn checks that AddAll gives the outcomes, the keys
// and the values of Add called on each document in turn, on an archive
// that already holds documents and on an empty one (where AddAll looks
// nothing up in the store), with chunks of 1, 3 and the default size.
func TestAddAllIsAddInTurn(t *testing.T) {
	docs := bulkDocs()
	seed := []Doc{doc("pre.txt", sentences("pre", 2)), doc("pre-copy.txt", sentences("m", 0)+docs[10].Text)}
	build := func(name string, seeded bool, chunk int, all bool) (*Archive, []AddResult) {
		a := openTest(t, filepath.Join(t.TempDir(), name))
		t.Cleanup(func() { a.Close() })
		a.chunkDocs = chunk
		for _, d := range seed {
			if !seeded {
				break
			}
			if _, err := a.Add(d, testTime); err != nil {
				t.Fatal(err)
			}
		}
		var got []AddResult
		if !all {
			for _, d := range docs {
				r, err := a.Add(d, testTime)
				if err != nil {
					t.Fatal(err)
				}
				got = append(got, r)
			}
			return a, got
		}
		err := a.AddAll(context.Background(), docs, testTime, func(i int, r AddResult) {
			if i != len(got) {
				t.Errorf("told of document %d after %d others: want them in order", i, len(got))
			}
			got = append(got, r)
		})
		if err != nil {
			t.Fatal(err)
		}
		return a, got
	}
	for _, seeded := range []bool{true, false} {
		_, want := build("ref", seeded, 0, false)
		outcomes := map[Outcome]int{}
		for _, r := range want {
			outcomes[r.Outcome]++
		}
		if len(outcomes) != 4 {
			t.Fatalf("seeded %v: the documents give the outcomes %v: want all four", seeded, outcomes)
		}
		for _, chunk := range []int{1, 3, 0} {
			ref, _ := build(fmt.Sprint("ref", chunk), seeded, 0, false)
			wantKeys := dump(t, ref)
			a, got := build(fmt.Sprint("bulk", chunk), seeded, chunk, true)
			if !slices.Equal(got, want) {
				t.Errorf("seeded %v, chunks of %d: outcomes\n%v\nwant (Add in turn)\n%v", seeded, chunk, got, want)
			}
			if keys := dump(t, a); !slices.Equal(keys, wantKeys) {
				t.Errorf("seeded %v, chunks of %d: %d keys differ from Add's %d:\n%s", seeded, chunk, len(keys), len(wantKeys), firstDiff(keys, wantKeys))
			}
			if p, err := a.Verify(true); err != nil || len(p) > 0 {
				t.Errorf("seeded %v, chunks of %d: verify: %v %v", seeded, chunk, p, err)
			}
			// Removing reads postings written by ingestion.
			for _, ar := range []*Archive{a, ref} {
				if err := ar.Remove(want[1].ID); err != nil {
					t.Fatal(err)
				}
			}
			if keys, refKeys := dump(t, a), dump(t, ref); !slices.Equal(keys, refKeys) {
				t.Errorf("seeded %v, chunks of %d, after a removal: keys differ:\n%s", seeded, chunk, firstDiff(keys, refKeys))
			}
		}
	}
}

func firstDiff(a, b []string) string {
	for i := range min(len(a), len(b)) {
		if a[i] != b[i] {
			return fmt.Sprintf("key %d: %.80s…\nwant       %.80s…", i, a[i], b[i])
		}
	}
	return fmt.Sprintf("lengths %d and %d", len(a), len(b))
}

// TestAddAllStopsBetweenChunks checks that a cancelled AddAll leaves whole
// chunks only, and that running it again completes the add.
func TestAddAllStopsBetweenChunks(t *testing.T) {
	dir := filepath.Join(t.TempDir(), "ar")
	a := openTest(t, dir)
	a.chunkDocs = 4
	docs := bulkDocs()
	ctx, cancel := context.WithCancel(context.Background())
	told := 0
	err := a.AddAll(ctx, docs, testTime, func(i int, r AddResult) {
		told++
		if told == 6 {
			cancel()
		}
	})
	if !errors.Is(err, context.Canceled) {
		t.Fatalf("cancelled AddAll: %v, want context.Canceled", err)
	}
	n, _ := a.Count()
	if n != 8 {
		t.Errorf("after a cancel while told of the second chunk: %d documents, want 8 (two whole chunks of 4)", n)
	}
	if p, err := a.Verify(false); err != nil || len(p) > 0 {
		t.Errorf("verify after the cancel: %v %v", p, err)
	}
	if err := a.AddAll(context.Background(), docs, testTime, nil); err != nil {
		t.Fatal(err)
	}
	ref := openTest(t, filepath.Join(t.TempDir(), "ref"))
	defer ref.Close()
	if err := ref.AddAll(context.Background(), docs, testTime, nil); err != nil {
		t.Fatal(err)
	}
	if got, want := dump(t, a), dump(t, ref); !slices.Equal(got, want) {
		t.Errorf("resumed add differs from an add in one go:\n%s", firstDiff(got, want))
	}
	a.Close()
}

// TestOpenDeletesAnUnfinishedChunk checks that the table files of a chunk
// whose ingestion never happened (a killed add) leave the folder at the
// next writable Open, and are never read.
func TestOpenDeletesAnUnfinishedChunk(t *testing.T) {
	dir := filepath.Join(t.TempDir(), "ar")
	a := openTest(t, dir)
	if err := a.AddAll(context.Background(), bulkDocs()[:3], testTime, nil); err != nil {
		t.Fatal(err)
	}
	a.Close()
	left := filepath.Join(dir, ingestDir, "t.sst")
	if err := os.MkdirAll(filepath.Dir(left), 0o700); err != nil {
		t.Fatal(err)
	}
	if err := os.WriteFile(left, []byte("confidential text of a chunk never ingested"), 0o600); err != nil {
		t.Fatal(err)
	}
	a = openTest(t, dir)
	defer a.Close()
	if _, err := os.Stat(filepath.Join(dir, ingestDir)); !errors.Is(err, os.ErrNotExist) {
		t.Errorf("the unfinished chunk's folder is still there after Open: %v", err)
	}
	if n, _ := a.Count(); n != 3 {
		t.Errorf("%d documents, want 3", n)
	}
	entries, _ := os.ReadDir(dir)
	for _, e := range entries {
		if strings.Contains(e.Name(), "tmp") {
			t.Errorf("left in the folder: %s", e.Name())
		}
	}
}
