package corpus

import (
	"fmt"
	"hash/fnv"
	"os"
	"path/filepath"
	"reflect"
	"slices"
	"strings"
	"sync/atomic"
	"testing"
	"time"
)

// The walk and the reads overlap in ReadEach (files are read as the walk
// finds them, put in order afterwards). These tests build a tree where the
// walk's order is not the result's and the same files are reached under
// several names, and compare ReadEach with an expectation computed here,
// independently of the walker: the displayed paths as the rules of the
// package comment give them, sorted bytewise.

type wantDoc struct{ path, file, text string }

// overlapTree builds, under the working folder, a tree named "tree" and
// returns the arguments to read it with and the documents and skipped
// inputs expected. Besides many plain files it has:
//
//   - "a", "a-b" and "a.txt" side by side: os.ReadDir walks them in that
//     order, but by full path "tree/a-b/..." < "tree/a.txt" < "tree/a/..."
//     ('-' < '.' < '/'), so the walk order is not the result's order;
//   - "tree/a/b/k.txt" named twice more as arguments (read three times,
//     kept once);
//   - "./tree/a-b" as an argument after "tree": every file of a-b is
//     reached twice, and the name kept is the one walked second, which
//     sorts first ("./" < "t"), with the ZIP archive, the JSON Lines file,
//     the hidden file and the binary file in it;
//   - a hard link "tree/a/hard.txt" to "tree/a-b/orig.txt", walked first,
//     kept under the other name and listed as skipped, "same file as …"
//     (where hard links can be made);
//   - skipped inputs met by the walk (a hidden folder, hidden files, a
//     broken symbolic link, a named pipe) and by the reads (an empty file,
//     a binary file, a hidden ZIP member, a bad JSON line).
func overlapTree(t *testing.T) (args []string, docs []wantDoc, skipped []Skipped) {
	t.Helper()
	files := map[string]string{
		"tree/a/b/k.txt":     "Text of k, named three times.\n",
		"tree/a/.hidden.txt": "Hidden in a.\n",
		"tree/a/empty.txt":   "",
		"tree/a-b/orig.txt":  "The original of a hard link.\n",
		"tree/a-b/.h":        "Hidden in a-b, reached twice.\n",
		"tree/a-b/bin.dat":   "\x00\x01binary",
		"tree/a-b/lines.jsonl": `{"id":"one","text":"First line text."}` + "\n" + "not json\n" +
			`{"id":"two","text":"Second line text."}` + "\n",
		"tree/a.txt":          "Beside the folders a and a-b.\n",
		"tree/.git/config":    "[core]\n",
		"tree/z/deep/er/f.md": "# Deep\n\nDown three folders.\n",
	}
	for i := range 30 {
		files[fmt.Sprintf("tree/a/n%02d.txt", i)] = fmt.Sprintf("Plain text a %d.\n", i)
		files[fmt.Sprintf("tree/a-b/n%02d.txt", i)] = fmt.Sprintf("Plain text a-b %d.\n", i)
		files[fmt.Sprintf("tree/z/m%02d.txt", i)] = fmt.Sprintf("Plain text z %d.\n", i)
	}
	writeTree(t, ".", files)
	zipped := zipOf(t,
		zipMember{name: "in/m1.txt", data: []byte("Zipped member one.\n")},
		zipMember{name: "in/.dot.txt", data: []byte("A hidden member.\n")},
		zipMember{name: "in/m2.txt", data: []byte("Zipped member two.\n")})
	if err := os.WriteFile(filepath.FromSlash("tree/a-b/arch.zip"), zipped, 0o644); err != nil {
		t.Fatal(err)
	}

	// What each file gives, by its path under "tree"; "./tree/a-b" names
	// a-b's files first in sort order.
	under := func(rel string) string {
		if strings.HasPrefix(rel, "a-b/") {
			return "./tree/" + rel
		}
		return "tree/" + rel
	}
	for name, content := range files {
		rel := strings.TrimPrefix(name, "tree/")
		switch rel {
		case "a/.hidden.txt", "a-b/.h":
			skipped = append(skipped, Skipped{under(rel), reasonHidden})
		case ".git/config":
			skipped = append(skipped, Skipped{"tree/.git", reasonHidden})
		case "a/empty.txt":
			skipped = append(skipped, Skipped{under(rel), reasonEmpty})
		case "a-b/bin.dat":
			skipped = append(skipped, Skipped{under(rel), reasonBinary})
		case "a-b/lines.jsonl":
			p := under(rel)
			docs = append(docs, wantDoc{p + "#one", p, "First line text."}, wantDoc{p + "#two", p, "Second line text."})
			skipped = append(skipped, Skipped{p + ":2", "line 2: not a JSON object"})
		case "z/deep/er/f.md":
			p := under(rel)
			docs = append(docs, wantDoc{p, p, "  Deep\n\nDown three folders.\n"}) // heading mark blanked (markdown.go)
		default:
			p := under(rel)
			docs = append(docs, wantDoc{p, p, content})
		}
	}
	zp := under("a-b/arch.zip")
	docs = append(docs, wantDoc{zp + "!/in/m1.txt", zp, "Zipped member one.\n"}, wantDoc{zp + "!/in/m2.txt", zp, "Zipped member two.\n"})
	skipped = append(skipped, Skipped{zp + "!/in/.dot.txt", reasonZipHidden})

	if err := os.Link(filepath.FromSlash("tree/a-b/orig.txt"), filepath.FromSlash("tree/a/hard.txt")); err != nil {
		t.Logf("no hard link here (%v): that case is left out", err)
	} else {
		// Kept as ./tree/a-b/orig.txt, already expected; the other name
		// is listed.
		skipped = append(skipped, Skipped{"tree/a/hard.txt", "same file as ./tree/a-b/orig.txt (read under that name)"})
	}
	if err := os.Symlink("nowhere.txt", filepath.FromSlash("tree/broken.txt")); err != nil {
		t.Logf("no symbolic link here (%v): that case is left out", err)
	} else {
		skipped = append(skipped, Skipped{"tree/broken.txt", reasonBroken})
	}
	if err := makeFifo(filepath.FromSlash("tree/z/pipe")); err != nil {
		t.Logf("no named pipe here (%v): that case is left out", err)
	} else {
		skipped = append(skipped, Skipped{"tree/z/pipe", reasonIrregular})
	}

	slices.SortFunc(docs, func(a, b wantDoc) int { return strings.Compare(a.path, b.path) })
	slices.SortFunc(skipped, func(a, b Skipped) int { return strings.Compare(a.Path, b.Path) })
	args = []string{"tree", "tree/a/b/k.txt", "./tree/a-b", "tree/a/b/k.txt"}
	return args, docs, skipped
}

// slowDigest is a digest whose time depends on the document (a hash of its
// path picks some to wait), so that workers finish out of walk order.
func slowDigest(calls *atomic.Int64) func(d *Document, text *Loan) string {
	return func(d *Document, text *Loan) string {
		calls.Add(1)
		h := fnv.New32a()
		h.Write([]byte(d.Path))
		if h.Sum32()%4 == 0 {
			time.Sleep(time.Duration(h.Sum32()%500) * time.Microsecond)
		}
		text.Keep()
		return d.Path + "|" + text.Text()
	}
}

// TestReadEachOverlapSameResult: with 1, 2 and 8 workers, several times
// each, ReadEach gives exactly the documents (order, IDs, fields), digests
// and skipped inputs expected, however the reads and the walk interleave.
func TestReadEachOverlapSameResult(t *testing.T) {
	t.Chdir(t.TempDir())
	args, want, wantSkipped := overlapTree(t)
	type result struct {
		Docs    []Document
		Digests []string
		Skipped []Skipped
	}
	var first *result
	for _, jobs := range []int{1, 2, 8} {
		for round := range 3 {
			var calls atomic.Int64
			docs, digests, skipped, err := ReadEach(args, Options{Jobs: jobs}, slowDigest(&calls))
			if err != nil {
				t.Fatal(err)
			}
			var got []wantDoc
			for i, d := range docs {
				got = append(got, wantDoc{d.Path, d.File, d.Text})
				if d.ID != i {
					t.Errorf("Jobs=%d: %s has ID %d at index %d", jobs, d.Path, d.ID, i)
				}
				if len(digests) > i && digests[i] != d.Path+"|"+d.Text {
					t.Errorf("Jobs=%d: digest %d is %q, not its document's", jobs, i, digests[i])
				}
			}
			if !slices.Equal(got, want) {
				t.Errorf("Jobs=%d round %d: documents\n%q\nwant\n%q", jobs, round, got, want)
			}
			if !reflect.DeepEqual(skipped, wantSkipped) {
				t.Errorf("Jobs=%d round %d: skipped\n%q\nwant\n%q", jobs, round, skipped, wantSkipped)
			}
			if len(digests) != len(docs) || calls.Load() < int64(len(docs)) {
				t.Errorf("Jobs=%d: %d digests from %d calls for %d documents", jobs, len(digests), calls.Load(), len(docs))
			}
			r := &result{docs, digests, skipped}
			if first == nil {
				first = r
			} else if !reflect.DeepEqual(r, first) {
				t.Errorf("Jobs=%d round %d: the result differs from Jobs=1's", jobs, round)
			}
		}
	}
}

// TestReadEachEmptyWalk: arguments that give no file to read start no
// worker and return nothing, or only the skipped inputs.
func TestReadEachEmptyWalk(t *testing.T) {
	dir := t.TempDir()
	writeTree(t, dir, map[string]string{".only-hidden": text})
	docs, digests, skipped, err := ReadEach([]string{dir, filepath.Join(dir, "missing")}, Options{Jobs: 4}, func(*Document, *Loan) int {
		t.Error("digest called with nothing to read")
		return 0
	})
	if err != nil {
		t.Fatal(err)
	}
	wantSkipped := []Skipped{
		{filepath.ToSlash(filepath.Join(dir, ".only-hidden")), reasonHidden},
		{filepath.Join(dir, "missing"), reasonMissing},
	}
	if len(docs) != 0 || len(digests) != 0 || !reflect.DeepEqual(skipped, wantSkipped) {
		t.Errorf("docs %q, %d digests, skipped %v; want none, none, %v", docPaths(docs), len(digests), skipped, wantSkipped)
	}
}

// TestChunkedKeepsPointers: a pointer from at stays the value of its index
// while the store grows past many chunks.
func TestChunkedKeepsPointers(t *testing.T) {
	var c chunked[int]
	n := 3*chunkLen + 5
	ptrs := make([]*int, n)
	for i := range n {
		ptrs[i] = c.at(i)
		*ptrs[i] = i + 1
	}
	for i := range n {
		if ptrs[i] != c.at(i) || *c.at(i) != i+1 {
			t.Fatalf("index %d: pointer moved or value %d", i, *c.at(i))
		}
	}
	if len(c.chunks) != 4 {
		t.Errorf("%d chunks for %d values of %d per chunk", len(c.chunks), n, chunkLen)
	}
}
