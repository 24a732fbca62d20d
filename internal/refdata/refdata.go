// Package refdata finds the outside reference data that scripts/fetch-data.sh
// fetches from package registries (the Brown corpus, the SPDX license texts,
// Unicode's SentenceBreakTest.txt), so that every test and script looks in
// the same place: $REPRISE_DATA when set, otherwise .cache/data in the
// module's root (the nearest folder at or above the working directory that
// holds go.mod).
//
// Tests that lack their data must fail in CI and skip elsewhere with a
// message saying how to fetch it; Path does exactly that, in one place.
package refdata

import (
	"encoding/json"
	"errors"
	"fmt"
	"os"
	"path/filepath"
	"testing"
)

// ErrNoData is wrapped by the errors of Root and Find when the data is missing.
var ErrNoData = errors.New("reference data not found; run scripts/fetch-data.sh")

// Root returns the folder the reference data is fetched into.
func Root() (string, error) {
	if data := os.Getenv("REPRISE_DATA"); data != "" {
		return data, nil
	}
	wd, err := os.Getwd()
	if err != nil {
		return "", fmt.Errorf("refdata: %w", err)
	}
	for dir := wd; ; dir = filepath.Dir(dir) {
		if _, err := os.Stat(filepath.Join(dir, "go.mod")); err == nil {
			return filepath.Join(dir, ".cache", "data"), nil
		}
		if filepath.Dir(dir) == dir {
			return "", fmt.Errorf("refdata: no go.mod above %s: %w", wd, ErrNoData)
		}
	}
}

// Find returns the path of rel inside the reference data, or an error
// wrapping ErrNoData when it is not there.
func Find(rel string) (string, error) {
	root, err := Root()
	if err != nil {
		return "", err
	}
	p := filepath.Join(root, filepath.FromSlash(rel))
	if _, err := os.Stat(p); err != nil {
		return "", fmt.Errorf("refdata: %s: %w (%v)", p, ErrNoData, err)
	}
	return p, nil
}

// Path is Find for tests: when rel is missing it fails tb if the
// environment variable CI is set, and skips it otherwise.
func Path(tb testing.TB, rel string) string {
	tb.Helper()
	p, err := Find(rel)
	if err != nil {
		if os.Getenv("CI") != "" {
			tb.Fatal(err)
		}
		tb.Skip(err)
	}
	return p
}

// LicenseText reads the licenseText of license id (an SPDX identifier) from
// the SPDX license list's licenses/ID.json in the folder spdx (npm package
// spdx-license-list 6.12.0, fetched by scripts/fetch-data.sh), failing tb
// when it cannot.
func LicenseText(tb testing.TB, spdx, id string) string {
	tb.Helper()
	raw, err := os.ReadFile(filepath.Join(spdx, id+".json"))
	if err != nil {
		tb.Fatal(err)
	}
	var lic struct {
		LicenseText string `json:"licenseText"`
	}
	if err := json.Unmarshal(raw, &lic); err != nil {
		tb.Fatalf("%s: %v", id, err)
	}
	return lic.LicenseText
}
