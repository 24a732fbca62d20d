package report

import (
	"encoding/json"
	"fmt"
	"os"
)

// ReadJSONFile decodes a result saved with the json format and checks
// that it is one, of this FormatVersion. Texts are not part of the JSON:
// the result has none until the caller reads the documents again.
func ReadJSONFile(name string) (*Result, error) {
	raw, err := os.ReadFile(name)
	if err != nil {
		return nil, err
	}
	var res Result
	if err := json.Unmarshal(raw, &res); err != nil {
		return nil, fmt.Errorf("%s: not a reprise JSON result: %w", name, err)
	}
	if res.Format != FormatVersion {
		return nil, fmt.Errorf("%s: result format %d, this reprise reads format %d (is it a 'reprise scan --format json' file?)",
			name, res.Format, FormatVersion)
	}
	if res.Caution == "" {
		res.Caution = Caution
	}
	return &res, nil
}
