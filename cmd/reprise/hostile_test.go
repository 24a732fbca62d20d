package main

import (
	"bytes"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"reprise/internal/hostile"
)

// TestHostileFolderFinishes: a folder holding every hostile shape of
// internal/hostile beside two ordinary documents that share a paragraph is
// scanned to the end; the shapes that must be refused are listed with the
// limit that refused them, the others give documents, and the ordinary
// pair is reported as it is without them.
func TestHostileFolderFinishes(t *testing.T) {
	dir := t.TempDir()
	para := "Our policy requires every visitor to sign in at the front desk before entering. " +
		"Visitors must wear the badge they receive where staff can see it at all times. " +
		"Badges are returned at the front desk when the visitor leaves the building.\n"
	writeFile(t, filepath.Join(dir, "ordinary", "policy-a.txt"), para)
	writeFile(t, filepath.Join(dir, "ordinary", "policy-b.md"), "# Visitors\n\n"+para)
	alone := scanJSON(t, exitOK, filepath.Join(dir, "ordinary"))
	if len(alone.Pairs) != 1 {
		t.Fatalf("the ordinary documents alone give %d pairs, want 1", len(alone.Pairs))
	}

	shapes := hostile.Shapes()
	for _, s := range shapes {
		n := s.Base // a shape that must be refused nests past the depth limit
		if !s.Refused {
			n = max(1, s.Base/64) // smaller, for the race detector; the growth check has the large ones
		}
		raw, err := s.Make(n)
		if err != nil {
			t.Fatal(err)
		}
		if err := os.WriteFile(filepath.Join(dir, s.Name+s.Ext), raw, 0o644); err != nil {
			t.Fatal(err)
		}
	}
	res := scanJSON(t, exitOK, dir)

	a, b := filepath.Join(dir, "ordinary", "policy-a.txt"), filepath.Join(dir, "ordinary", "policy-b.md")
	p := findPair(res, a, b)
	if p == nil {
		t.Fatalf("the ordinary pair is missing among %d pairs", len(res.Pairs))
	}
	if q := alone.Pairs[0]; p.Shared != q.Shared || len(p.Passages) != len(q.Passages) {
		t.Errorf("the ordinary pair shares %d units in %d passages, %d in %d without the hostile files", p.Shared, len(p.Passages), q.Shared, len(q.Passages))
	}
	// The file a document or skipped part came from: "x.zip!/a.txt",
	// "x.jsonl#7" and "x.jsonl:7" name x.zip and x.jsonl.
	file := func(path string) string {
		path = strings.SplitN(path, "!/", 2)[0]
		if i := strings.Index(path, ".jsonl"); i >= 0 {
			path = path[:i+len(".jsonl")]
		}
		return filepath.Base(path)
	}
	skipped := map[string]string{}
	for _, s := range res.Skipped {
		skipped[file(s.Path)] = s.Reason
	}
	read := map[string]bool{}
	for _, d := range res.Documents {
		read[file(d.Path)] = true
	}
	for _, s := range shapes {
		name := s.Name + s.Ext
		switch {
		case s.Refused && !strings.Contains(skipped[name], "(--max-depth)"):
			t.Errorf("%s: skipped for %q, want the depth limit", name, skipped[name])
		case !s.Refused && skipped[name] != "":
			t.Errorf("%s: skipped for %q, want it read", name, skipped[name])
		case !s.Refused && !read[name]:
			t.Errorf("%s: no document", name)
		}
	}
}

// TestFileTimeoutFlag: --file-timeout takes a positive duration.
func TestFileTimeoutFlag(t *testing.T) {
	demo := filepath.Join("..", "..", "testdata", "demo")
	for _, v := range []string{"0", "-1s"} {
		var out, errs bytes.Buffer
		if code := run([]string{"scan", "-q", "--file-timeout", v, demo}, &out, &errs); code != exitUsage {
			t.Errorf("--file-timeout %s: exit %d, want %d", v, code, exitUsage)
		} else if !strings.Contains(errs.String(), "--file-timeout must be positive") {
			t.Errorf("--file-timeout %s: message %q", v, errs.String())
		}
	}
}
