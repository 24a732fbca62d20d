package archive

import (
	"bytes"
	"context"
	"encoding/binary"
	"encoding/json"
	"errors"
	"fmt"
	"os"
	"path/filepath"
	"slices"
	"strings"
	"syscall"
	"testing"
	"time"

	"github.com/cockroachdb/pebble/v2"

	"reprise/shingle"
)

var testTime = time.Date(2026, 3, 1, 12, 0, 0, 0, time.UTC)

func testSettings() Settings { return SettingsFor(shingle.Options{}) }

func openTest(t *testing.T, dir string) *Archive {
	t.Helper()
	a, err := Open(dir, Options{Settings: testSettings(), Create: true})
	if err != nil {
		t.Fatal(err)
	}
	return a
}

func doc(path, text string) Doc {
	units, st := shingle.New(shingle.Options{}).Sentences(text, nil)
	return Doc{Path: path, Format: "text", Encoding: "utf-8", Size: int64(len(text)), Words: st.Words, Text: text, UnitList: units}
}

// sentences makes n invented sentences of at least five words, unique to tag.
func sentences(tag string, n int) string {
	var b strings.Builder
	for i := range n {
		fmt.Fprintf(&b, "The %s harbour ledger entry %d records a crate of lamp oil for the night watch. ", tag, i)
	}
	return b.String()
}

func TestAddRules(t *testing.T) {
	a := openTest(t, filepath.Join(t.TempDir(), "ar"))
	defer a.Close()
	shared := sentences("shared", 4)
	steps := []struct {
		name string
		doc  Doc
		want Outcome
	}{
		{"a new document is added", doc("x.txt", shared+sentences("x", 3)), Added},
		{"the same content at the same path is a no-op", doc("x.txt", shared+sentences("x", 3)), Unchanged},
		{"the same content at another path is not added again", doc("copy.txt", shared+sentences("x", 3)), Duplicate},
		{"another document is added", doc("y.txt", shared+sentences("y", 2)), Added},
		{"new content at an archived path replaces the old version", doc("x.txt", shared+sentences("x2", 3)), Replaced},
	}
	for _, s := range steps {
		r, err := a.Add(s.doc, testTime)
		if err != nil {
			t.Fatalf("%s: %v", s.name, err)
		}
		if r.Outcome != s.want {
			t.Errorf("%s: got %v, want %v", s.name, r.Outcome, s.want)
		}
	}
	if n, _ := a.Count(); n != 2 {
		t.Errorf("count %d, want 2 (x.txt replaced, y.txt)", n)
	}
	// Postings by merge: each shared sentence is in both live documents,
	// the replaced version's own sentences in none.
	sp := shingle.New(shingle.Options{})
	su, _ := sp.Sentences(shared, nil)
	xID, _, _ := a.FindPath("x.txt")
	yID, _, _ := a.FindPath("y.txt")
	for _, u := range su {
		ids, err := a.Postings(u.Hash, nil)
		if err != nil {
			t.Fatal(err)
		}
		if want := []uint64{min(xID, yID), max(xID, yID)}; !slices.Equal(ids, want) {
			t.Errorf("posting of a shared sentence: %v, want %v", ids, want)
		}
	}
	old, _ := sp.Sentences(sentences("x", 3), nil)
	for _, u := range old {
		if ids, _ := a.Postings(u.Hash, nil); len(ids) != 0 {
			t.Errorf("a sentence only the replaced version had is still posted to %v", ids)
		}
	}
	d, err := a.Load(xID)
	if err != nil || d.Text != shared+sentences("x2", 3) || !d.Added.Equal(testTime) {
		t.Errorf("loaded x.txt: %q, added %v, %v", d.Text, d.Added, err)
	}
	if want := doc("x.txt", shared+sentences("x2", 3)).UnitList; !slices.Equal(d.UnitList, want) {
		t.Errorf("loaded x.txt's units differ from the ones added (word positions included):\n%v\n%v", d.UnitList, want)
	}
	if p, err := a.Verify(true); err != nil || len(p) > 0 {
		t.Errorf("verify: %v %v", p, err)
	}
}

func TestVerifyFindsAMissingPosting(t *testing.T) {
	a := openTest(t, filepath.Join(t.TempDir(), "ar"))
	defer a.Close()
	d := doc("x.txt", sentences("x", 3))
	if _, err := a.Add(d, testTime); err != nil {
		t.Fatal(err)
	}
	if err := a.db.Delete(postingKey(nil, d.UnitList[1].Hash), nil); err != nil {
		t.Fatal(err)
	}
	p, err := a.Verify(true)
	if err != nil || len(p) != 1 || !strings.Contains(p[0], "missing") {
		t.Errorf("verify after deleting a posting: %q, %v", p, err)
	}
}

func TestSettingsMustMatch(t *testing.T) {
	dir := filepath.Join(t.TempDir(), "ar")
	openTest(t, dir).Close()
	_, err := Open(dir, Options{Settings: SettingsFor(shingle.Options{MinWords: 4})})
	var se *SettingError
	if !errors.As(err, &se) || se.Setting != "--min-words" || !strings.Contains(err.Error(), "--min-words 5") {
		t.Errorf("open with --min-words 4: %v", err)
	}
	s := testSettings()
	s.Probe = "0000000000000000"
	_, err = Open(dir, Options{Settings: s})
	if !errors.As(err, &se) || !strings.Contains(se.Setting, "normalization") {
		t.Errorf("open with another normalization: %v", err)
	}
	if _, err := Open(filepath.Join(t.TempDir(), "none"), Options{Settings: s}); !errors.Is(err, ErrNotArchive) {
		t.Errorf("open of a missing folder without Create: %v", err)
	}
}

// TestOpenComparesSettingsOnlyWhenGiven: Open refuses an archive built with
// other settings only when the caller gives settings (it cuts units); with
// the zero Settings (list, stats, remove) it opens any archive, read-only
// or not, but creates none.
func TestOpenComparesSettingsOnlyWhenGiven(t *testing.T) {
	dir := filepath.Join(t.TempDir(), "ar")
	a, err := Open(dir, Options{Settings: SettingsFor(shingle.Options{MinWords: 4}), Create: true})
	if err != nil {
		t.Fatal(err)
	}
	if _, err := a.Add(doc("x.txt", sentences("x", 3)), testTime); err != nil {
		t.Fatal(err)
	}
	if err := a.Close(); err != nil {
		t.Fatal(err)
	}
	cases := []struct {
		name    string
		dir     string
		opt     Options
		refused string // "" when Open must succeed
	}{
		{"other settings are refused", dir, Options{Settings: testSettings(), ReadOnly: true}, "--min-words 4, but this run uses --min-words 5"},
		{"other settings are refused when writing", dir, Options{Settings: testSettings()}, "--min-words 4, but this run uses --min-words 5"},
		{"the archive's settings are accepted", dir, Options{Settings: SettingsFor(shingle.Options{MinWords: 4}), ReadOnly: true}, ""},
		{"no settings open it read-only", dir, Options{ReadOnly: true}, ""},
		{"no settings open it for writing", dir, Options{}, ""},
		{"no settings create no archive", filepath.Join(t.TempDir(), "new"), Options{Create: true}, "needs the settings"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			a, err := Open(c.dir, c.opt)
			if c.refused != "" {
				if err == nil {
					a.Close()
				}
				if err == nil || !strings.Contains(err.Error(), c.refused) {
					t.Errorf("open: %v, want an error saying %q", err, c.refused)
				}
				return
			}
			if err != nil {
				t.Fatalf("open: %v", err)
			}
			defer a.Close()
			if got := a.Settings().MinWords; got != 4 {
				t.Errorf("the archive's settings say --min-words %d, want 4", got)
			}
			if n, err := a.Count(); err != nil || n != 1 {
				t.Errorf("count %d, %v; want 1", n, err)
			}
		})
	}
	if _, err := os.Stat(filepath.Join(filepath.Dir(cases[len(cases)-1].dir), "new")); !errors.Is(err, os.ErrNotExist) {
		t.Errorf("open without settings created a folder: %v", err)
	}
}

func TestOneWriterAtATime(t *testing.T) {
	dir := filepath.Join(t.TempDir(), "ar")
	a := openTest(t, dir)
	defer a.Close()
	_, err := Open(dir, Options{Settings: testSettings(), ReadOnly: true})
	if err == nil || !strings.Contains(err.Error(), filepath.Join(dir, "LOCK")) {
		t.Errorf("second open: %v, want an error naming %s", err, filepath.Join(dir, "LOCK"))
	}
}

func TestFilesAreOwnerOnly(t *testing.T) {
	old := syscall.Umask(0) // the most permissive umask: permissions must not depend on it
	defer syscall.Umask(old)
	dir := filepath.Join(t.TempDir(), "ar")
	a := openTest(t, dir)
	if _, err := a.Add(doc("x.txt", sentences("x", 20)), testTime); err != nil {
		t.Fatal(err)
	}
	if err := a.Erase(context.Background()); err != nil {
		t.Fatal(err)
	}
	check := func(when string) {
		err := filepath.Walk(dir, func(p string, fi os.FileInfo, err error) error {
			if err != nil {
				return err
			}
			want := os.FileMode(0o600)
			if fi.IsDir() {
				want = 0o700
			}
			if fi.Mode().Perm() != want {
				t.Errorf("%s: %s has mode %v, want %v", when, p, fi.Mode().Perm(), want)
			}
			return nil
		})
		if err != nil {
			t.Fatal(err)
		}
	}
	check("while open")
	if err := a.Close(); err != nil {
		t.Fatal(err)
	}
	check("after close")
}

// grepDir reports which of needles occur in some file under dir.
func grepDir(t *testing.T, dir string, needles map[string][]byte) []string {
	t.Helper()
	var found []string
	entries, err := os.ReadDir(dir)
	if err != nil {
		t.Fatal(err)
	}
	for _, e := range entries {
		b, err := os.ReadFile(filepath.Join(dir, e.Name()))
		if err != nil {
			t.Fatal(err)
		}
		for name, n := range needles {
			if bytes.Contains(b, n) {
				found = append(found, name+" in "+e.Name())
			}
		}
	}
	slices.Sort(found)
	return found
}

func TestRemoveErases(t *testing.T) {
	dir := filepath.Join(t.TempDir(), "ar")
	a := openTest(t, dir)
	keep := doc("keep.txt", sentences("kept", 30))
	secret := doc("private/person-to-forget.txt", sentences("kept", 3)+sentences("Quillfeather", 30))
	for _, d := range []Doc{keep, secret} {
		if _, err := a.Add(d, testTime); err != nil {
			t.Fatal(err)
		}
	}
	id, _, _ := a.FindPath(secret.Path)
	blob, err := a.get(idKey('t', id))
	if err != nil {
		t.Fatal(err)
	}
	// What a search of the raw files looks for: every sentence unique to
	// the removed document, its path, and its stored (compressed) text.
	needles := map[string][]byte{"path": []byte(secret.Path), "stored text": blob[len(blob)/2 : len(blob)/2+24]}
	su, _ := shingle.New(shingle.Options{}).Sentences(sentences("Quillfeather", 30), nil)
	for k, u := range su {
		needles[fmt.Sprintf("sentence %d", k)] = []byte(secret.Text[len(sentences("kept", 3)):][u.Start:u.End])
	}
	// Control: before removal the path and the stored text are in the files
	// (the log, and a table after a flush), so the search can find them.
	if err := a.db.Flush(); err != nil {
		t.Fatal(err)
	}
	before := strings.Join(grepDir(t, dir, needles), "; ")
	if !strings.Contains(before, "path in") || !strings.Contains(before, "stored text in") {
		t.Fatalf("control: before removal the search finds only %q", before)
	}
	if err := a.Remove(id); err != nil {
		t.Fatal(err)
	}
	if err := a.Erase(context.Background()); err != nil {
		t.Fatal(err)
	}
	if err := a.Close(); err != nil {
		t.Fatal(err)
	}
	if found := grepDir(t, dir, needles); len(found) > 0 {
		t.Errorf("after remove and compaction the archive folder still holds: %v", found)
	}
	a = openTest(t, dir)
	defer a.Close()
	if p, err := a.Verify(true); err != nil || len(p) > 0 {
		t.Errorf("verify after remove: %v %v", p, err)
	}
	if n, _ := a.Count(); n != 1 {
		t.Errorf("count %d after removing one of two", n)
	}
	// The kept document still has the three sentences the two shared, alone.
	ku, _ := shingle.New(shingle.Options{}).Sentences(sentences("kept", 3), nil)
	kid, _, _ := a.FindPath("keep.txt")
	for _, u := range ku {
		if ids, _ := a.Postings(u.Hash, nil); !slices.Equal(ids, []uint64{kid}) {
			t.Errorf("posting of a sentence of both: %v, want [%d]", ids, kid)
		}
	}
}

// FuzzDecodeRecords: the decoders of stored records never panic on damaged
// bytes (an archive folder may be truncated or tampered with), and what
// they accept re-encodes to the same bytes.
func FuzzDecodeRecords(f *testing.F) {
	d := doc("x.txt", sentences("fuzz", 3))
	f.Add(encodeUnits(d.UnitList))
	f.Add(encodeIDs([]uint64{0, 1, 300, 1 << 40}))
	f.Add([]byte(`{"id":1,"path":"x","sha256":"` + strings.Repeat("ab", 32) + `"}`))
	f.Fuzz(func(t *testing.T, b []byte) {
		if units, err := decodeUnits(b); err == nil && !bytes.Equal(encodeUnits(units), b) {
			t.Errorf("units %x decode and re-encode differently", b)
		}
		if ids, err := decodeIDs(nil, b); err == nil && len(b) > 0 && len(ids) == 0 {
			t.Errorf("posting %x decodes to no ID", b)
		}
		decodeMeta(b)
		decompress(b)
	})
}

// writeFormat1 turns the archive in dir into one as format 1 wrote it: the
// settings record says format 1 and each document's units are 20 bytes
// each, fixed width (fingerprint, start, end, words, little-endian; no word
// position). The bytes are written here by hand, as format 1 laid them out;
// every other key was the same in both formats.
func writeFormat1(t *testing.T, dir string) {
	t.Helper()
	a, err := Open(dir, Options{})
	if err != nil {
		t.Fatal(err)
	}
	docs, err := a.List()
	if err != nil {
		t.Fatal(err)
	}
	for _, m := range docs {
		d, err := a.Load(m.ID)
		if err != nil {
			t.Fatal(err)
		}
		var old []byte
		for _, u := range d.UnitList {
			old = binary.LittleEndian.AppendUint64(old, u.Hash)
			old = binary.LittleEndian.AppendUint32(old, u.Start)
			old = binary.LittleEndian.AppendUint32(old, u.End)
			old = binary.LittleEndian.AppendUint32(old, u.Words)
		}
		if err := a.db.Set(idKey('u', m.ID), old, pebble.Sync); err != nil {
			t.Fatal(err)
		}
	}
	setFormat(t, a, 1)
	if err := a.Close(); err != nil {
		t.Fatal(err)
	}
}

// setFormat rewrites the format of a's settings record.
func setFormat(t *testing.T, a *Archive, format int) {
	t.Helper()
	s := a.Settings()
	s.Format = format
	raw, err := json.Marshal(s)
	if err != nil {
		t.Fatal(err)
	}
	if err := a.db.Set(keySettings, raw, pebble.Sync); err != nil {
		t.Fatal(err)
	}
}

// rawFormat reads the format of the settings record in dir with pebble
// alone, bypassing Open's checks.
func rawFormat(t *testing.T, dir string) int {
	t.Helper()
	db, err := pebble.Open(dir, &pebble.Options{ReadOnly: true, Merger: postingsMerger, Logger: quietLogger{}})
	if err != nil {
		t.Fatal(err)
	}
	defer db.Close()
	v, closer, err := db.Get(keySettings)
	if err != nil {
		t.Fatal(err)
	}
	defer closer.Close()
	var s Settings
	if err := json.Unmarshal(v, &s); err != nil {
		t.Fatal(err)
	}
	return s.Format
}

// TestOldFormatIsRefused: an archive written in format 1 (20-byte units) is
// refused by every way of opening it, with an error that says to build a
// new archive with 'archive add', and the refusal writes nothing to it.
func TestOldFormatIsRefused(t *testing.T) {
	dir := filepath.Join(t.TempDir(), "ar")
	a := openTest(t, dir)
	added, err := a.Add(doc("x.txt", sentences("x", 3)), testTime)
	if err != nil {
		t.Fatal(err)
	}
	if err := a.Close(); err != nil {
		t.Fatal(err)
	}
	writeFormat1(t, dir)
	opens := []struct {
		name string
		opt  Options
	}{
		{"check (settings, read-only)", Options{Settings: testSettings(), ReadOnly: true}},
		{"add (settings, create)", Options{Settings: testSettings(), Create: true}},
		{"list (no settings, read-only)", Options{ReadOnly: true}},
		{"remove (no settings, writing)", Options{}},
	}
	for _, o := range opens {
		t.Run(o.name, func(t *testing.T) {
			a, err := Open(dir, o.opt)
			if err == nil {
				a.Close()
				t.Fatal("a format 1 archive opened")
			}
			var fe *FormatError
			if !errors.As(err, &fe) || fe.Found != 1 || fe.Want != FormatVersion {
				t.Fatalf("open: %v, want a *FormatError from format 1", err)
			}
			for _, say := range []string{dir, "format 1", "older reprise", "reads format 2 only", "archive --archive NEW-FOLDER add"} {
				if !strings.Contains(err.Error(), say) {
					t.Errorf("the error does not say %q: %v", say, err)
				}
			}
		})
	}
	if f := rawFormat(t, dir); f != 1 {
		t.Errorf("after the refusals the settings record says format %d, want 1 (untouched)", f)
	}
	// A control: the fixture's units really are the old layout, which the
	// new decoder refuses, so that the test above cannot pass by an
	// archive that was never changed.
	db, err := pebble.Open(dir, &pebble.Options{ReadOnly: true, Merger: postingsMerger, Logger: quietLogger{}})
	if err != nil {
		t.Fatal(err)
	}
	v, closer, err := db.Get(idKey('u', added.ID))
	if err != nil {
		t.Fatal(err)
	}
	if len(v) != 3*20 {
		t.Errorf("the fixture's units take %d bytes, want 3 units of 20", len(v))
	}
	if _, err := decodeUnits(v); err == nil {
		t.Errorf("the new decoder accepts the old 20-byte units % x", v)
	}
	closer.Close()
	db.Close()
}

// TestNewerFormatIsRefused: an archive of a format after this program's
// says to use the newer program.
func TestNewerFormatIsRefused(t *testing.T) {
	dir := filepath.Join(t.TempDir(), "ar")
	a := openTest(t, dir)
	setFormat(t, a, FormatVersion+1)
	if err := a.Close(); err != nil {
		t.Fatal(err)
	}
	_, err := Open(dir, Options{Settings: testSettings(), ReadOnly: true})
	var fe *FormatError
	if !errors.As(err, &fe) || !strings.Contains(err.Error(), "newer reprise") {
		t.Errorf("open of a format %d archive: %v", FormatVersion+1, err)
	}
}
