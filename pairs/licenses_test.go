package pairs

import (
	"fmt"
	"slices"
	"testing"

	"reprise/internal/refdata"
	"reprise/shingle"
)

// TestLicenseCopiesAreOneGroupEach runs the group search on real license
// texts: the SPDX license list (npm package spdx-license-list 6.12.0,
// fetched by scripts/fetch-data.sh, licenses/ID.json, field licenseText),
// split into sentences as a scan splits them. Several copies of each of a
// few licenses, each copy under a header of its own, give one maximal
// group per license: its copies, sharing every sentence of the license
// text. SPDX's LGPL-3.0-only text holds the whole GPL-3.0 text, so the
// GPL-3.0-only and LGPL-3.0-only copies are one group together, sharing
// the sentences the two texts have in common, and neither license's
// copies are a group of their own (they lie inside it).
func TestLicenseCopiesAreOneGroupEach(t *testing.T) {
	spdx := refdata.Path(t, "spdx/licenses")
	split := shingle.New(shingle.Options{})
	units := func(text string) []uint64 {
		us, _ := split.Units(text, nil)
		var fps []uint64
		for _, u := range us {
			fps = append(fps, u.Hash)
		}
		slices.Sort(fps)
		return slices.Compact(fps)
	}
	text := func(id string) string { return refdata.LicenseText(t, spdx, id) }
	copies := []struct {
		id string
		n  int
	}{{"Apache-2.0", 6}, {"BSD-3-Clause", 4}, {"MIT", 3}, {"MPL-2.0", 3}, {"GPL-3.0-only", 2}, {"LGPL-3.0-only", 2}}
	var docs [][]uint64
	var want []Group
	var gnu []uint32
	for _, c := range copies {
		lic := units(text(c.id))
		var ids []uint32
		for k := range c.n {
			header := fmt.Sprintf("Package tool-%s-%d is maintained by volunteer number %d of the %s team.\n\n", c.id, k, k, c.id)
			ids = append(ids, uint32(len(docs)))
			docs = append(docs, units(header+text(c.id)))
		}
		if c.id == "GPL-3.0-only" || c.id == "LGPL-3.0-only" {
			gnu = append(gnu, ids...)
			continue
		}
		want = append(want, Group{Docs: ids, Shared: uint32(len(lic))})
	}
	gpl, lgpl := units(text("GPL-3.0-only")), units(text("LGPL-3.0-only"))
	both := 0
	for _, fp := range gpl {
		if _, ok := slices.BinarySearch(lgpl, fp); ok {
			both++
		}
	}
	if both < len(gpl)*9/10 {
		t.Fatalf("SPDX LGPL-3.0-only holds %d of GPL-3.0-only's %d sentences; this test expects nearly all", both, len(gpl))
	}
	want = append(want, Group{Docs: gnu, Shared: uint32(both)})
	slices.SortFunc(want, func(x, y Group) int {
		if len(x.Docs) != len(y.Docs) {
			return len(y.Docs) - len(x.Docs)
		}
		if x.Shared != y.Shared {
			return int(y.Shared) - int(x.Shared)
		}
		return slices.Compare(x.Docs, y.Docs)
	})
	// MaxDocs above the number of copies: no sentence is common text.
	for _, budget := range []int64{0, 8 << 10} {
		res, err := Count(Input{Docs: docs}, Options{MinShared: 2, MaxDocs: len(docs), MemoryBudget: budget, TempDir: t.TempDir()})
		if err != nil {
			t.Fatal(err)
		}
		if budget > 0 && res.Spill.Runs == 0 {
			t.Errorf("budget %d: nothing spilled", budget)
		}
		if res.GroupsTruncated || !groupsEqual(res.Groups, want) {
			t.Errorf("budget %d: truncated %v, groups\n got %v\nwant %v", budget, res.GroupsTruncated, res.Groups, want)
		}
	}
}
