package main

import (
	"fmt"
	"maps"
	"os"
	"path/filepath"
	"slices"
	"strings"
	"testing"

	"reprise/report"
)

// TestLicenseTexts checks the whole pipeline on real, independently
// published texts: the SPDX license list (npm package spdx-license-list
// 6.12.0, licenses/*.json, field licenseText) and, where present, Debian's
// /usr/share/common-licenses.
func TestLicenseTexts(t *testing.T) {
	spdx := dataDir(t, "spdx/licenses")
	dir := t.TempDir()
	ids := []string{"GPL-2.0-only", "GPL-2.0-or-later", "GPL-3.0-only", "LGPL-3.0-only",
		"MIT", "Apache-2.0", "BSD-3-Clause", "MPL-2.0"}
	for _, id := range ids {
		writeFile(t, filepath.Join(dir, id+".txt"), spdxText(t, spdx, id))
	}
	debianGPL3 := "/usr/share/common-licenses/GPL-3"
	haveDebian := false
	if raw, err := os.ReadFile(debianGPL3); err == nil {
		writeFile(t, filepath.Join(dir, "debian-GPL-3"), string(raw))
		haveDebian = true
	}

	res := scanJSON(t, exitOK, dir)
	path := func(id string) string { return filepath.ToSlash(filepath.Join(dir, id+".txt")) }

	// GPL-2.0-only and GPL-2.0-or-later carry the same license text in SPDX.
	p := findPair(res, path("GPL-2.0-only"), path("GPL-2.0-or-later"))
	if p == nil || p.CoverageA < 0.95 || p.CoverageB < 0.95 {
		t.Errorf("GPL-2.0-only ~ GPL-2.0-or-later: %s, want coverage >= 0.95 both ways", brief(p))
	}

	// SPDX's LGPL-3.0-only text is the LGPL's own 1,234 words followed by
	// the whole GPL-3.0 text (5,644 words, measured with wc -w on the
	// fetched files), so the GPL lies inside it: nearly all of the GPL is
	// covered, about 5644/6878 = 0.82 of the LGPL.
	p = findPair(res, path("GPL-3.0-only"), path("LGPL-3.0-only"))
	if p == nil {
		t.Fatalf("GPL-3.0-only ~ LGPL-3.0-only not reported")
	}
	gpl, lgpl := coverageOf(p, path("GPL-3.0-only")), coverageOf(p, path("LGPL-3.0-only"))
	if gpl < 0.9 || lgpl > gpl-0.1 {
		t.Errorf("GPL-3.0-only inside LGPL-3.0-only: GPL side %.4f (want >= 0.9), LGPL side %.4f (want clearly lower)", gpl, lgpl)
	}

	// Debian's GPL-3 file is the same text as SPDX GPL-3.0-only with other
	// line breaks and spacing.
	if haveDebian {
		deb := filepath.ToSlash(filepath.Join(dir, "debian-GPL-3"))
		p = findPair(res, deb, path("GPL-3.0-only"))
		if p == nil || p.CoverageA < 0.9 || p.CoverageB < 0.9 {
			t.Errorf("%s ~ GPL-3.0-only: %s, want coverage >= 0.9 both ways", debianGPL3, brief(p))
		}
	} else {
		t.Logf("%s not present: Debian comparison not run", debianGPL3)
	}

	// Unrelated licenses do not pair.
	if p := findPair(res, path("MIT"), path("Apache-2.0")); p != nil {
		t.Errorf("MIT ~ Apache-2.0 reported: %s", brief(p))
	}
}

// brief is a pair's numbers without its passages, for messages.
func brief(p *report.Pair) string {
	if p == nil {
		return "not reported"
	}
	return fmt.Sprintf("%s ~ %s: shared %d, coverage %.4f / %.4f, %d passages",
		p.A, p.B, p.Shared, p.CoverageA, p.CoverageB, len(p.Passages))
}

// TestLicenseCopiesAreClustered checks the mostly-common rule on real
// license texts (SPDX license list, npm package spdx-license-list 6.12.0,
// field licenseText): a folder of package copyright files, each a few
// short lines of its own followed by a whole license text, in which the
// Apache-2.0 files are more than half of the documents. Every file that
// embeds a license is found in that license's cluster and set of
// near-copies, although Apache-2.0's sentences are each in more than half
// of the documents; the licenses that nobody embedded pair with nothing.
func TestLicenseCopiesAreClustered(t *testing.T) {
	spdx := dataDir(t, "spdx/licenses")
	text := func(id string) string { return spdxText(t, spdx, id) }
	dir := t.TempDir()
	embedded := map[string]int{"Apache-2.0": 24, "MIT": 4, "BSD-3-Clause": 3}
	alone := []string{"MPL-2.0", "Zlib", "ISC", "BSL-1.0", "Unlicense", "PostgreSQL", "NCSA"}
	var files []string
	for id, copies := range embedded {
		for k := range copies {
			name := fmt.Sprintf("%s-package-%02d.copyright", id, k)
			header := fmt.Sprintf("Upstream-Name: tool%02d\nFiles: *\nCopyright: 20%02d Maintainer %d\nLicense: %s\n\n", k, k, k, id)
			writeFile(t, filepath.Join(dir, name), header+text(id))
			files = append(files, name)
		}
	}
	for _, id := range slices.Concat(slices.Sorted(maps.Keys(embedded)), alone) {
		writeFile(t, filepath.Join(dir, id+".txt"), text(id))
	}
	res := scanJSON(t, exitOK, dir)
	if n := len(files) + len(embedded) + len(alone); len(res.Documents) != n || res.Settings.MaxDocs >= embedded["Apache-2.0"] {
		t.Fatalf("%d documents and cap %d; want %d and a cap below the %d Apache-2.0 files", len(res.Documents), res.Settings.MaxDocs, n, embedded["Apache-2.0"])
	}
	clusterOf := map[string]int{}
	for k, c := range res.Clusters {
		for _, d := range c.Documents {
			clusterOf[d] = k + 1
		}
	}
	setOf := map[string]int{}
	for k, s := range res.NearCopies {
		for _, m := range s.Documents {
			setOf[m.Path] = k + 1
		}
	}
	for _, name := range files {
		id := strings.SplitN(name, "-package-", 2)[0]
		lic, doc := filepath.Join(dir, id+".txt"), filepath.Join(dir, name)
		if clusterOf[doc] == 0 || clusterOf[doc] != clusterOf[lic] {
			t.Errorf("%s: cluster %d, %s's is %d", name, clusterOf[doc], id, clusterOf[lic])
		}
		if setOf[doc] == 0 || setOf[doc] != setOf[lic] {
			t.Errorf("%s: near-copy set %d, %s's is %d", name, setOf[doc], id, setOf[lic])
		}
	}
	for _, id := range alone {
		if p := filepath.Join(dir, id+".txt"); clusterOf[p] != 0 {
			t.Errorf("%s, embedded nowhere, is in cluster %d", id, clusterOf[p])
		}
	}
	if len(res.Clusters) != len(embedded) {
		t.Errorf("%d clusters, want one per embedded license (%d)", len(res.Clusters), len(embedded))
	}
}
