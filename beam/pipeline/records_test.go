package pipeline

import (
	"slices"
	"strings"
	"testing"

	"reprise/shingle"
)

// A document record carries its units through the JSON string exactly
// (shingle's encoding inside, base64 in the JSON), and damaged units are
// an error that names the document.
func TestDocRecordUnits(t *testing.T) {
	text := "The harbour ledger records a crate of lamp oil for the watch. " +
		"A second entry lists the rope bought for the night boats today."
	units, _ := shingle.New(shingle.Options{}).Sentences(text, nil)
	if len(units) != 2 {
		t.Fatalf("%d units, want 2", len(units))
	}
	rec, err := encode(docRecord{Path: "a.txt", Text: text, Units: shingle.AppendUnits(nil, units)})
	if err != nil {
		t.Fatal(err)
	}
	var d docRecord
	if err := decode(rec, &d); err != nil {
		t.Fatal(err)
	}
	got, err := unpackUnits(d.Path, d.Units)
	if err != nil || !slices.Equal(got, units) {
		t.Errorf("units after the JSON record: %v, %v; want %v", got, err, units)
	}
	d.Units[0] = shingle.UnitLayout + 1
	if _, err := unpackUnits(d.Path, d.Units); err == nil || !strings.Contains(err.Error(), "a.txt") ||
		!strings.Contains(err.Error(), "newer program") {
		t.Errorf("units of a newer layout: %v", err)
	}
}
