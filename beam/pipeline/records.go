package pipeline

import (
	"encoding/json"
	"fmt"

	"reprise/corpus"
	"reprise/shingle"
)

// The records that travel between stages and into the output files are
// JSON strings: every runner has a coder for strings, the files the
// pipeline writes can be read by anyone, and a record type can gain a field
// without a coder change. The price is the encoding work, small beside
// sentence splitting (see the package documentation for the measurement).
// A document's units are the exception inside the JSON: they are bytes of
// shingle's unit encoding (shingle.AppendUnits, versioned by its first
// byte), which JSON carries as base64 — about 16.5 characters a unit against
// about 40 for rows of five numbers, and decoded without a JSON parse of
// each number (shingle's BenchmarkUnitEncoding measures both).

// docRecord is one document with everything report.Build needs of it.
// Only the documents that end up in a pair are written out with it.
type docRecord struct {
	Path     string        `json:"path"`
	Format   string        `json:"format"`
	Encoding string        `json:"encoding"`
	Notes    []string      `json:"notes"`
	Words    int           `json:"words"`
	Text     string        `json:"text"`
	Units    []byte        `json:"units"` // shingle.AppendUnits; base64 in the JSON
	Marks    []corpus.Mark `json:"marks,omitempty"`
}

// summaryRecord is one document as the report lists it, without its text.
type summaryRecord struct {
	Path     string   `json:"path"`
	Format   string   `json:"format"`
	Encoding string   `json:"encoding"`
	Notes    []string `json:"notes"`
	Words    int      `json:"words"`
	Units    int      `json:"units"`
}

// skippedRecord is an input that gave no document.
type skippedRecord struct {
	Path   string `json:"path"`
	Reason string `json:"reason"`
}

// commonRef names a common unit and its document count; it travels keyed
// by the first document (by path) that contains it, whose text quotes it.
type commonRef struct {
	Hash uint64 `json:"hash"`
	Docs int    `json:"docs"`
}

// commonRecord is a common unit with its text.
type commonRecord struct {
	Hash uint64 `json:"hash"`
	Text string `json:"text"`
	Docs int    `json:"docs"`
}

// pairRecord is a pair with support at least MinShared.
type pairRecord struct {
	A      string `json:"a"`
	B      string `json:"b"`
	Shared int    `json:"shared"`
}

// unpackUnits decodes a document record's units; path names it in errors.
func unpackUnits(path string, b []byte) ([]shingle.Unit, error) {
	units, err := shingle.DecodeUnits(b, nil)
	if err != nil {
		return nil, fmt.Errorf("reprise-beam: %s: units: %w", path, err)
	}
	return units, nil
}

func encode(v any) (string, error) {
	b, err := json.Marshal(v)
	if err != nil {
		return "", fmt.Errorf("reprise-beam: encode %T: %w", v, err)
	}
	return string(b), nil
}

func decode(s string, v any) error {
	if err := json.Unmarshal([]byte(s), v); err != nil {
		return fmt.Errorf("reprise-beam: decode %T: %w", v, err)
	}
	return nil
}
