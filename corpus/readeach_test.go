package corpus

import (
	"fmt"
	"os"
	"path/filepath"
	"reflect"
	"slices"
	"strings"
	"sync/atomic"
	"testing"
)

// eachTree is a folder with plain files, a ZIP archive and a JSON Lines
// file, so that File differs from Path for members and lines.
func eachTree(t *testing.T) string {
	t.Helper()
	dir := t.TempDir()
	files := map[string]string{}
	for i := range 40 {
		files[fmt.Sprintf("d%d/n%02d.txt", i%3, i)] = fmt.Sprintf("Plain text number %d.\n", i)
	}
	files["z/bad.bin"] = "\x00\x01binary"
	files["z/lines.jsonl"] = `{"id":"one","text":"First line text."}` + "\n" + `not json` + "\n" + `{"id":"two","text":"Second line text."}` + "\n"
	writeTree(t, dir, files)
	zipped := zipOf(t, zipMember{name: "in/a.txt", data: []byte("Zipped member a.\n")}, zipMember{name: "in/b.txt", data: []byte("Zipped member b.\n")})
	if err := os.WriteFile(filepath.Join(dir, "z", "arch.zip"), zipped, 0o644); err != nil {
		t.Fatal(err)
	}
	return dir
}

// TestReadEachIsReadWithDigests: the documents and skipped inputs are
// Read's, in the same order, and each digest is the one computed from its
// own document, whatever the number of workers.
func TestReadEachIsReadWithDigests(t *testing.T) {
	dir := eachTree(t)
	want, wantSkipped := mustRead(t, []string{dir}, Options{Jobs: 1})
	if len(want) != 44 || len(wantSkipped) != 2 {
		t.Fatalf("tree gave %d documents and %d skipped", len(want), len(wantSkipped))
	}
	for _, jobs := range []int{1, 4} {
		var calls atomic.Int64
		docs, digests, skipped, err := ReadEach([]string{dir}, Options{Jobs: jobs}, func(d *Document, text *Loan) string {
			calls.Add(1)
			text.Keep()
			return d.Path + "|" + text.Text()
		})
		if err != nil {
			t.Fatal(err)
		}
		if !reflect.DeepEqual(docs, want) || !reflect.DeepEqual(skipped, wantSkipped) {
			t.Errorf("Jobs=%d: ReadEach's documents or skipped differ from Read's", jobs)
		}
		if len(digests) != len(docs) || int(calls.Load()) != len(docs) {
			t.Fatalf("Jobs=%d: %d digests from %d calls for %d documents", jobs, len(digests), calls.Load(), len(docs))
		}
		for i, d := range docs {
			if digests[i] != d.Path+"|"+d.Text {
				t.Errorf("Jobs=%d: digest %d is %q, not its document's", jobs, i, digests[i])
			}
		}
	}
}

// TestReadEachKeepsWhatDigestLeaves: a text the digest does not Keep is
// not in the result.
func TestReadEachKeepsWhatDigestLeaves(t *testing.T) {
	dir := eachTree(t)
	docs, lengths, _, err := ReadEach([]string{dir}, Options{}, func(d *Document, text *Loan) int {
		if d.Text != "" {
			t.Errorf("%s: the Document holds its text while the digest runs", d.Path)
		}
		if strings.HasSuffix(d.Path, "n07.txt") {
			text.Keep()
		}
		return len(text.Text())
	})
	if err != nil {
		t.Fatal(err)
	}
	for i, d := range docs {
		if lengths[i] == 0 {
			t.Errorf("%s: the digest saw no text", d.Path)
		}
		if keep := strings.HasSuffix(d.Path, "n07.txt"); keep != (d.Text != "") {
			t.Errorf("%s: text %q after a digest that kept it: %v", d.Path, d.Text, keep)
		}
	}
}

// TestFileReadsAgain: File names the file on disk a document came from;
// reading just those files again, named so, gives the same documents
// under the same names (a whole archive or JSON Lines file comes back
// whole, its bad line listed as before).
func TestFileReadsAgain(t *testing.T) {
	dir := eachTree(t)
	docs, _ := mustRead(t, []string{dir}, Options{Include: []string{"*.txt", "*.zip", "*.jsonl"}})
	byPath := map[string]Document{}
	for _, d := range docs {
		byPath[d.Path] = d
		if !strings.HasPrefix(d.Path, d.File) {
			t.Errorf("%s: File %q is not a prefix of Path", d.Path, d.File)
		}
		inner := strings.Contains(d.Path, "!/") || strings.Contains(d.Path, ".jsonl#")
		if inner == (d.File == d.Path) {
			t.Errorf("%s: File %q", d.Path, d.File)
		}
	}
	member := filepath.ToSlash(filepath.Join(dir, "z", "arch.zip")) + "!/in/b.txt"
	line := filepath.ToSlash(filepath.Join(dir, "z", "lines.jsonl")) + "#two"
	plain := filepath.ToSlash(filepath.Join(dir, "d1", "n04.txt"))
	for _, p := range []string{member, line, plain} {
		if _, ok := byPath[p]; !ok {
			t.Fatalf("no document %s among %q", p, docPaths(docs))
		}
	}
	files := []string{byPath[member].File, byPath[line].File, byPath[plain].File}
	again, skipped := mustRead(t, files, Options{})
	var got []string
	for _, d := range again {
		got = append(got, d.Path)
		if orig := byPath[d.Path]; orig.Text != d.Text || orig.File != d.File {
			t.Errorf("%s read again differs from the first read", d.Path)
		}
	}
	wantPaths := []string{
		plain,
		filepath.ToSlash(filepath.Join(dir, "z", "arch.zip")) + "!/in/a.txt",
		member,
		filepath.ToSlash(filepath.Join(dir, "z", "lines.jsonl")) + "#one",
		line,
	}
	slices.Sort(wantPaths)
	if !reflect.DeepEqual(got, wantPaths) {
		t.Errorf("read again: %q, want %q", got, wantPaths)
	}
	if len(skipped) != 1 || !strings.HasSuffix(skipped[0].Path, "lines.jsonl:2") {
		t.Errorf("skipped when reading again: %v, want only line 2 of the JSON Lines file", skipped)
	}
}

// TestReadEachSortsMembersAmongFiles: a ZIP member sorts by its whole path
// ("a.zip!/x" after "a.zip b.txt", '!' being after ' '), not where the walk
// met its archive; each digest moves with its document.
func TestReadEachSortsMembersAmongFiles(t *testing.T) {
	dir := t.TempDir()
	writeTree(t, dir, map[string]string{"a.zip b.txt": "Beside the archive.\n", "c.txt": "After it.\n"})
	zipped := zipOf(t, zipMember{name: "x.txt", data: []byte("Inside the archive.\n")})
	if err := os.WriteFile(filepath.Join(dir, "a.zip"), zipped, 0o644); err != nil {
		t.Fatal(err)
	}
	docs, digests, _, err := ReadEach([]string{dir}, Options{Jobs: 2}, func(_ *Document, text *Loan) string {
		text.Keep()
		return text.Text()
	})
	if err != nil {
		t.Fatal(err)
	}
	var got []string
	for i, d := range docs {
		got = append(got, strings.TrimPrefix(d.Path, filepath.ToSlash(dir)+"/"))
		if digests[i] != d.Text || d.ID != i {
			t.Errorf("%s: digest %q, ID %d at index %d", d.Path, digests[i], d.ID, i)
		}
	}
	if want := []string{"a.zip b.txt", "a.zip!/x.txt", "c.txt"}; !reflect.DeepEqual(got, want) {
		t.Errorf("order %q, want %q", got, want)
	}
}

// TestReadEachReusesOnlyGivenBackBuffers: a worker reads its next file
// into the buffer of the last one only when the digest gave the text back.
// Files of falling and rising sizes (a short text read into a longer
// one's buffer) must each reach the digest as they are on disk, and every
// text a digest keeps must still be its file's once all files are read.
func TestReadEachReusesOnlyGivenBackBuffers(t *testing.T) {
	dir := t.TempDir()
	files := map[string]string{}
	for i := range 60 {
		n := []int{900, 30, 4000, 5, 1200, 70}[i%6] + i
		files[fmt.Sprintf("f%02d.txt", i)] = strings.Repeat(fmt.Sprintf("Word%c ", 'a'+i%26), n/6+1)[:n] + "\n"
	}
	writeTree(t, dir, files)
	for _, jobs := range []int{1, 3} {
		docs, seen, _, err := ReadEach([]string{dir}, Options{Jobs: jobs}, func(d *Document, loan *Loan) string {
			text := strings.Clone(loan.Text()) // what the digest saw, as it saw it
			if strings.HasSuffix(d.Path, "3.txt") || strings.HasSuffix(d.Path, "7.txt") {
				loan.Keep() // the others are given back
			}
			return text
		})
		if err != nil {
			t.Fatal(err)
		}
		if len(docs) != len(files) {
			t.Fatalf("jobs %d: %d documents of %d files", jobs, len(docs), len(files))
		}
		kept := 0
		for i, d := range docs {
			want := files[filepath.Base(d.Path)]
			if seen[i] != want {
				t.Errorf("jobs %d: %s reached the digest as %.40q..., want %.40q...", jobs, d.Path, seen[i], want)
			}
			if d.Text != "" {
				kept++
				if d.Text != want {
					t.Errorf("jobs %d: kept text of %s is %.40q..., want %.40q... (its buffer was read into again)", jobs, d.Path, d.Text, want)
				}
			}
		}
		if kept != 12 {
			t.Errorf("jobs %d: %d texts kept, want 12", jobs, kept)
		}
	}
}
