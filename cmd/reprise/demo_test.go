package main

import (
	"path/filepath"
	"slices"
	"strings"
	"testing"
)

// TestDemoShowsPlantedCasesFirst checks the README's first command: on the
// demo corpus (invented; testdata/demo-planted.md lists what was planted)
// the planted cases are the only pairs, the prompt is set aside as common
// text, and the three students who copied the outside article form a group.
func TestDemoShowsPlantedCasesFirst(t *testing.T) {
	demo := filepath.ToSlash(filepath.Join("..", "..", "testdata", "demo"))
	name := func(f string) string { return demo + "/" + f }
	planted := map[string]bool{
		name("ethan-kowalczyk.txt") + " ~ " + name("tyler-boone.txt"):        true, // verbatim copy
		name("imogen-fairweather.txt") + " ~ " + name("rory-mcallister.txt"): true, // light edits
		name("hana-kobayashi.txt") + " ~ " + name("marisol-quintero.txt"):    true, // outside source
		name("hana-kobayashi.txt") + " ~ " + name("wesley-tran.txt"):         true,
		name("marisol-quintero.txt") + " ~ " + name("wesley-tran.txt"):       true,
	}
	for _, args := range [][]string{{demo}, {"--exclude", filepath.Join(demo, "..", "demo-templates", "prompt.txt"), demo}} {
		res := scanJSON(t, exitOK, args...)
		if len(res.Documents) != 24 {
			t.Errorf("%v: %d documents, want 24", args, len(res.Documents))
		}
		if len(res.Pairs) != len(planted) {
			t.Errorf("%v: %d pairs, want the %d planted", args, len(res.Pairs), len(planted))
		}
		for _, p := range res.Pairs {
			if !planted[p.A+" ~ "+p.B] {
				t.Errorf("%v: unplanted pair %s", args, brief(&p))
			}
		}
		// The verbatim copy ranks first and shares its 12 body sentences.
		if len(res.Pairs) > 0 {
			top := res.Pairs[0]
			if !strings.HasSuffix(top.A, "ethan-kowalczyk.txt") || top.Shared != 12 || len(top.Passages) != 1 {
				t.Errorf("%v: top pair %s, want the verbatim copy with 12 shared sentences in one passage", args, brief(&top))
			}
		}
		want := []string{name("hana-kobayashi.txt"), name("marisol-quintero.txt"), name("wesley-tran.txt")}
		if len(res.Groups) != 1 || !slices.Equal(res.Groups[0].Documents, want) || res.Groups[0].Shared != 5 {
			t.Errorf("%v: groups %+v, want the three who copied the article, sharing 5 sentences", args, res.Groups)
		}
		if args[0] == demo {
			// Without --exclude, the five prompt sentences pasted by 16 of 24
			// essays exceed the default cap of 12 and are listed as common.
			if len(res.Common) != 5 || res.Common[0].Documents != 16 || res.Settings.MaxDocs != 12 {
				t.Errorf("common text %+v (max_docs %d), want the 5 prompt sentences in 16 documents", res.Common, res.Settings.MaxDocs)
			}
		} else if len(res.Common) != 0 || res.Summary.TemplateUnits != 5 {
			t.Errorf("with --exclude: common %+v, template units %d; want none common and the 5 prompt sentences set aside",
				res.Common, res.Summary.TemplateUnits)
		}
	}
}
