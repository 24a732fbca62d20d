package report

import (
	"bytes"
	"fmt"
	"strings"
	"testing"
)

// TestGroupsLimitedByTop: the text and the page list at most --top groups
// and say how many more the JSON holds; the JSON lists them all.
func TestGroupsLimitedByTop(t *testing.T) {
	r := &Result{Format: FormatVersion, Caution: Caution, Settings: Settings{Unit: "sentence"}}
	for k := range 5 {
		r.Groups = append(r.Groups, Group{Documents: []string{fmt.Sprintf("g%d-a", k), fmt.Sprintf("g%d-b", k), fmt.Sprintf("g%d-c", k)}, Shared: 3})
	}
	r.Summary.Groups = len(r.Groups)
	for _, format := range []string{"text", "html", "json"} {
		var buf bytes.Buffer
		if err := Write(&buf, r, format, TextOptions{Top: 2}); err != nil {
			t.Fatal(err)
		}
		out := buf.String()
		listed := 0
		for k := range 5 {
			if strings.Contains(out, fmt.Sprintf("g%d-a", k)) {
				listed++
			}
		}
		want, more := 2, "and 3 more groups"
		if format == "json" {
			want, more = 5, ""
		}
		if listed != want || !strings.Contains(out, more) {
			t.Errorf("%s: %d groups listed, want %d, and %q", format, listed, want, more)
		}
	}
}
