package corpus

import (
	"os"
	"path/filepath"
	"strings"
	"testing"
	"time"

	"reprise/internal/hostile"
)

// TestFileTimeoutSkips: under Options.FileTimeout every file that runs
// past it is skipped with the reason naming the flag, and the batch goes
// on: with a deadline of 1 ns, which every extraction outlasts (the clock
// is read once the extraction is done, if not before), every file of
// every format is listed so and nothing is an error; with the default,
// the same folder is read. A ZIP archive's members share its deadline and
// a JSON Lines file has one per line, so their parts are listed one by one.
func TestFileTimeoutSkips(t *testing.T) {
	dir := t.TempDir()
	var names []string
	for _, s := range hostile.Shapes() {
		if s.Refused {
			continue
		}
		raw, err := s.Make(max(1, s.Base/64))
		if err != nil {
			t.Fatal(err)
		}
		name := s.Name + s.Ext
		names = append(names, name)
		if err := os.WriteFile(filepath.Join(dir, name), raw, 0o644); err != nil {
			t.Fatal(err)
		}
	}
	if err := os.WriteFile(filepath.Join(dir, "plain.txt"), []byte("An ordinary sentence of an ordinary file.\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	names = append(names, "plain.txt")

	docs, skipped, err := Read([]string{dir}, Options{FileTimeout: time.Nanosecond})
	if err != nil {
		t.Fatal(err)
	}
	if len(docs) != 0 {
		t.Errorf("%d documents read past a 1ns deadline, the first %s", len(docs), docs[0].Path)
	}
	want := timedOutReason(time.Nanosecond)
	listed := map[string]bool{}
	for _, s := range skipped {
		if !strings.Contains(s.Reason, want) {
			t.Errorf("%s: reason %q, want %q", s.Path, s.Reason, want)
		}
		f := strings.SplitN(filepath.Base(strings.SplitN(s.Path, "!/", 2)[0]), ":", 2)[0]
		listed[f] = true
	}
	for _, n := range names {
		if !listed[n] {
			t.Errorf("%s not listed as skipped", n)
		}
	}

	docs, skipped, err = Read([]string{dir}, Options{})
	if err != nil {
		t.Fatal(err)
	}
	if len(skipped) != 0 || len(docs) < len(names) {
		t.Errorf("with the default deadline: %d documents, skipped %v", len(docs), skipped)
	}
}

// TestFileTimeoutOption: the deadline is an option like the other limits:
// 0 means the default, a negative one is refused.
func TestFileTimeoutOption(t *testing.T) {
	e, err := Options{}.Effective()
	if err != nil || e.FileTimeout != DefaultFileTimeout {
		t.Errorf("default file timeout %v (%v), want %v", e.FileTimeout, err, DefaultFileTimeout)
	}
	if e, _ := (Options{FileTimeout: time.Second}).Effective(); e.FileTimeout != time.Second {
		t.Errorf("file timeout %v, want 1s", e.FileTimeout)
	}
	if _, _, err := Read(nil, Options{FileTimeout: -time.Second}); err == nil || !strings.Contains(err.Error(), "file timeout") {
		t.Errorf("a negative file timeout gave %v, want an error naming it", err)
	}
}

// TestDeadlineReadsTheClockSparingly: passed reads the clock on its
// first call and then once every deadlineEvery calls, so a deadline that
// passes between two readings is seen at the next one, and check always
// reads it.
func TestDeadlineReadsTheClockSparingly(t *testing.T) {
	d := newDeadline(time.Hour)
	if d.passed() {
		t.Fatal("an hour's deadline passed at once")
	}
	d.at = time.Now().Add(-time.Second) // it passes now
	for k := 2; k <= deadlineEvery; k++ {
		if d.passed() {
			t.Fatalf("call %d read the clock; want only every %d calls", k, deadlineEvery)
		}
	}
	if !d.passed() {
		t.Fatalf("call %d did not see the passed deadline", deadlineEvery+1)
	}
	if !d.passed() {
		t.Fatal("a passed deadline came back")
	}
	fresh := newDeadline(time.Hour)
	fresh.at = time.Now().Add(-time.Second)
	if !fresh.check() {
		t.Fatal("check did not read the clock")
	}
	var none *deadline
	if none.passed() || none.check() {
		t.Fatal("a nil deadline passed")
	}
}
