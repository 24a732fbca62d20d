package main

import (
	"bufio"
	"encoding/json"
	"os"
	"path/filepath"
	"slices"
	"strings"
	"testing"

	"reprise/report"
)

const (
	demoSource = "../../testdata/demo-sources/hillward-monthly-tanner-avenue.txt"
	demoDir    = "../../testdata/demo"
)

// copiersOfTheSource are the three essays that copy sentences 6–10 of the
// invented article (testdata/demo-planted.md, "Outside source").
var copiersOfTheSource = []string{"hana-kobayashi.txt", "marisol-quintero.txt", "wesley-tran.txt"}

func jsonResult(t *testing.T, args ...string) *report.Result {
	t.Helper()
	code, out, e := runCLI(t, args...)
	if code != 0 {
		t.Fatalf("%v: exit %d: %s", args, code, e)
	}
	var res report.Result
	if err := json.Unmarshal([]byte(out), &res); err != nil {
		t.Fatalf("%v: %v", args, err)
	}
	return &res
}

func TestCompareRules(t *testing.T) {
	src := filepath.Dir(demoSource)
	cases := []struct {
		name  string
		args  []string
		pairs []string // "a ~ b" by base name
	}{
		{"only pairs with one side in the reference set",
			[]string{"compare", "--format", "json", "--against", src, demoDir},
			[]string{"hillward-monthly-tanner-avenue.txt ~ hana-kobayashi.txt",
				"hillward-monthly-tanner-avenue.txt ~ marisol-quintero.txt",
				"hillward-monthly-tanner-avenue.txt ~ wesley-tran.txt"}},
	}
	for _, c := range cases {
		res := jsonResult(t, c.args...)
		var got []string
		for _, p := range res.Pairs {
			got = append(got, filepath.Base(p.A)+" ~ "+filepath.Base(p.B))
		}
		slices.Sort(got)
		if !slices.Equal(got, c.pairs) {
			t.Errorf("%s: pairs %q, want %q", c.name, got, c.pairs)
		}
		for _, d := range res.Documents {
			want := 0.0
			if slices.Contains(copiersOfTheSource, filepath.Base(d.Path)) || strings.Contains(d.Path, "demo-sources") {
				want = -1 // some reuse
			}
			if (want == 0) != (d.Reused == 0) {
				t.Errorf("%s: %s reused %.4f", c.name, d.Path, d.Reused)
			}
		}
		if len(res.Groups) != 1 || len(res.Groups[0].Documents) != 4 {
			t.Errorf("%s: groups %v, want the article and its three copiers", c.name, res.Groups)
		}
	}
	// --within adds the pairs among the new documents: the verbatim copy
	// (testdata/demo-planted.md, case 1) appears, the reference pairs stay.
	res := jsonResult(t, "compare", "--format", "json", "--within", "--against", src, demoDir)
	var verbatim, withSource int
	for _, p := range res.Pairs {
		if strings.HasSuffix(p.A, "ethan-kowalczyk.txt") && strings.HasSuffix(p.B, "tyler-boone.txt") {
			verbatim++
		}
		if strings.Contains(p.A, "demo-sources") || strings.Contains(p.B, "demo-sources") {
			withSource++
		}
	}
	if verbatim != 1 || withSource != 3 {
		t.Errorf("--within: verbatim pair found %d times, pairs with the source %d", verbatim, withSource)
	}
}

func TestCompareMasterCoverage(t *testing.T) {
	code, out, e := runCLI(t, "compare", "--format", "ndjson", "--master", demoSource, demoDir)
	if code != 0 {
		t.Fatalf("exit %d: %s", code, e)
	}
	var masterUnits int
	pairs := map[string]report.Pair{}
	var cover []masterCoverage
	nSources := 0
	sc := bufio.NewScanner(strings.NewReader(out))
	sc.Buffer(nil, 1<<24)
	for sc.Scan() {
		var line struct {
			Type string `json:"type"`
		}
		json.Unmarshal(sc.Bytes(), &line)
		switch line.Type {
		case "document":
			var d report.Document
			json.Unmarshal(sc.Bytes(), &d)
			if strings.Contains(d.Path, "demo-sources") {
				masterUnits = d.Units
			}
		case "pair":
			var p report.Pair
			json.Unmarshal(sc.Bytes(), &p)
			pairs[filepath.Base(p.B)] = p
		case "sources":
			var src sources
			json.Unmarshal(sc.Bytes(), &src)
			nSources++
			if len(src.Sources) != 1 || !strings.Contains(src.Sources[0].Path, "demo-sources") || src.Reused == 0 {
				t.Errorf("sources of %s: %+v", src.Document, src)
			}
		case "master":
			var c masterCoverage
			if err := json.Unmarshal(sc.Bytes(), &c); err != nil {
				t.Fatal(err)
			}
			cover = append(cover, c)
		}
	}
	if nSources != len(copiersOfTheSource) {
		t.Errorf("%d documents with sources, want the %d copiers", nSources, len(copiersOfTheSource))
	}
	if masterUnits == 0 || len(cover) != 24 {
		t.Fatalf("master has %d units; %d copies covered, want the 24 essays", masterUnits, len(cover))
	}
	for _, c := range cover {
		p, paired := pairs[filepath.Base(c.Copy)]
		missing, kept := 0, 0
		for k, g := range c.Missing {
			missing += g.Units
			if k > 0 && g.Start < c.Missing[k-1].End {
				t.Errorf("%s: missing passages out of order", c.Copy)
			}
		}
		for _, g := range p.Passages {
			kept += g.Units
		}
		// Every master sentence is either in a shared passage or missing.
		if kept+missing != masterUnits {
			t.Errorf("%s: %d kept + %d missing sentences, the master has %d", c.Copy, kept, missing, masterUnits)
		}
		if paired != (c.Coverage > 0) || (paired && c.Coverage != p.CoverageA) {
			t.Errorf("%s: coverage %.4f, pair %v with master-side coverage %.4f", c.Copy, c.Coverage, paired, p.CoverageA)
		}
		if slices.Contains(copiersOfTheSource, filepath.Base(c.Copy)) {
			// The copiers take sentences 6–10 (five) and lack the rest.
			if kept != 5 || len(c.Missing) != 2 {
				t.Errorf("%s: kept %d sentences in %d gaps, want 5 kept and 2 gaps", c.Copy, kept, len(c.Missing))
			}
		}
	}
	if code, _, e := runCLI(t, "compare", "--format", "csv", "--master", demoSource, demoDir); code != exitUsage || !strings.Contains(e, "--master") {
		t.Errorf("--master with csv: exit %d, %q", code, e)
	}
}

// TestArchiveCheckMatchesCompare: checking the demo against an archive of
// the article gives the pairs and passages of compare against the article
// file, every number equal, the archived article as side A (two routes to one answer: postings in the
// store, and the engine over both sets).
func TestArchiveCheckMatchesCompare(t *testing.T) {
	dir := filepath.Join(t.TempDir(), "ar")
	if code, _, e := runCLI(t, "archive", "--archive", dir, "add", "-q", demoSource); code != 0 {
		t.Fatalf("add: %d %s", code, e)
	}
	viaArchive := jsonResult(t, "archive", "--archive", dir, "check", "--format", "json", demoDir)
	viaCompare := jsonResult(t, "compare", "--format", "json", "--against", demoSource, demoDir)
	for i := range viaArchive.Pairs {
		p := &viaArchive.Pairs[i]
		p.A = strings.TrimPrefix(p.A, "archive:")
	}
	a, _ := json.Marshal(viaArchive.Pairs)
	c, _ := json.Marshal(viaCompare.Pairs)
	if len(viaCompare.Pairs) != 3 || string(a) != string(c) {
		t.Errorf("archive check pairs\n%s\ncompare pairs\n%s", a, c)
	}
	// Every format renders the check, each with the caution.
	for _, format := range report.Formats {
		code, out, e := runCLI(t, "archive", "--archive", dir, "check", "--format", format, demoDir)
		if code != 0 || !strings.Contains(out, "not proof of misconduct") || !strings.Contains(out, "hillward-monthly") {
			t.Errorf("check --format %s: exit %d, %d bytes, %s", format, code, len(out), e)
		}
	}
	// The archived side is shown after the original file is gone.
	moved := filepath.Join(t.TempDir(), "article.txt")
	b, _ := os.ReadFile(demoSource)
	os.WriteFile(moved, b, 0o600)
	dir2 := filepath.Join(t.TempDir(), "ar2")
	runCLI(t, "archive", "--archive", dir2, "add", "-q", moved)
	os.Remove(moved)
	res := jsonResult(t, "archive", "--archive", dir2, "check", "--format", "json", demoDir)
	if len(res.Pairs) != 3 || !strings.Contains(res.Pairs[0].Passages[0].Text, "Tanner Avenue") || res.Pairs[0].Passages[0].AWhere != "line 14" || res.Pairs[0].A != "archive:"+moved {
		t.Errorf("check after the archived file was deleted: %+v", res.Pairs)
	}
}

func TestArchiveCommandErrors(t *testing.T) {
	dir := filepath.Join(t.TempDir(), "ar")
	runCLI(t, "archive", "--archive", dir, "add", "-q", demoSource)
	cases := []struct {
		name string
		args []string
		want string
	}{
		{"a check with other unit settings is refused, naming the setting",
			[]string{"archive", "--archive", dir, "check", "--min-words", "4", demoDir}, "--min-words 5"},
		{"no archive folder", []string{"archive", "check", demoDir}, "REPRISE_ARCHIVE"},
		{"a folder that holds no archive", []string{"archive", "--archive", t.TempDir(), "list"}, "holds no archive"},
		{"an unknown subcommand", []string{"archive", "--archive", dir, "frobnicate"}, "unknown command"},
		{"remove of a path not archived", []string{"archive", "--archive", dir, "remove", "nothing.txt"}, "no archived document"},
	}
	t.Setenv("REPRISE_ARCHIVE", "")
	for _, c := range cases {
		code, _, e := runCLI(t, c.args...)
		if code != exitUsage || !strings.Contains(e, c.want) {
			t.Errorf("%s: exit %d, %q; want %q", c.name, code, e, c.want)
		}
	}
	// remove by path, then the archive is empty and whole.
	code, out, e := runCLI(t, "archive", "--archive", dir, "remove", demoSource)
	if code != 0 || !strings.Contains(out, "removed") {
		t.Fatalf("remove: %d %s %s", code, out, e)
	}
	if code, out, _ := runCLI(t, "archive", "--archive", dir, "verify", "--resplit"); code != 0 || !strings.Contains(out, "0 documents") {
		t.Errorf("verify after remove: %d %s", code, out)
	}
}

func TestArchiveCheckSkipsTheDocumentItself(t *testing.T) {
	dir := filepath.Join(t.TempDir(), "ar")
	tyler := filepath.Join(demoDir, "tyler-boone.txt")
	if code, _, e := runCLI(t, "archive", "--archive", dir, "add", "-q", tyler); code != 0 {
		t.Fatal(e)
	}
	res := jsonResult(t, "archive", "--archive", dir, "check", "--format", "json", demoDir)
	// Ethan's essay is the verbatim copy of Tyler's (testdata/demo-planted.md, case 1):
	// it pairs with the archived Tyler; Tyler's own file does not.
	var got []string
	for _, p := range res.Pairs {
		got = append(got, filepath.Base(p.A)+" ~ "+filepath.Base(p.B))
	}
	if !slices.Equal(got, []string{"tyler-boone.txt ~ ethan-kowalczyk.txt"}) {
		t.Errorf("pairs %q, want only the archived Tyler with Ethan", got)
	}
}
