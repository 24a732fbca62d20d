// Command tune measures how reprise's two main thresholds, --min-shared and
// --min-words, trade recall for precision on real text, to justify their
// defaults. It plants verbatim copies of 1 to 8 sentences between samples of
// the Brown corpus (fetched by scripts/fetch-data.sh), runs the reprise
// binary over the 500 samples at every combination of the two settings, and
// prints a Markdown table: pairs reported, planted pairs found, pairs among
// untouched text (false leads), and recall by the length of the copy.
//
//	go run ./scripts/tune [-data DIR] [-per-size N]
package main

import (
	"encoding/json"
	"flag"
	"fmt"
	"math/rand/v2"
	"os"
	"os/exec"
	"path/filepath"
	"strings"

	"reprise/internal/brown"
	"reprise/internal/plant"
	"reprise/report"
	"reprise/shingle"
)

func main() {
	if err := run(); err != nil {
		fmt.Fprintln(os.Stderr, "tune:", err)
		os.Exit(1)
	}
}

func run() error {
	data := flag.String("data", filepath.Join(".cache", "data"), "folder filled by scripts/fetch-data.sh")
	perSize := flag.Int("per-size", 5, "planted copies of each length (1..8 sentences)")
	flag.Parse()

	samples, err := brown.Load(filepath.Join(*data, "brown"))
	if err != nil {
		return err
	}
	texts := make([]string, len(samples))
	for i, s := range samples {
		texts[i] = s.Text
	}
	var sizes []int
	for k := 1; k <= 8; k++ {
		for range *perSize {
			sizes = append(sizes, k)
		}
	}
	copies := plant.Plant(rand.New(rand.NewPCG(7, 7)), shingle.New(shingle.Options{}), texts, sizes)

	work, err := os.MkdirTemp("", "reprise-tune-")
	if err != nil {
		return err
	}
	defer os.RemoveAll(work)
	corpusDir := filepath.Join(work, "brown")
	for i, s := range samples {
		if err := os.MkdirAll(corpusDir, 0o755); err != nil {
			return err
		}
		if err := os.WriteFile(filepath.Join(corpusDir, s.Name+".txt"), []byte(texts[i]), 0o644); err != nil {
			return err
		}
	}
	bin := filepath.Join(work, "reprise")
	if out, err := exec.Command("go", "build", "-o", bin, "./cmd/reprise").CombinedOutput(); err != nil {
		return fmt.Errorf("go build: %v\n%s", err, out)
	}

	planted := map[string]int{} // "a ~ b" -> copy length
	name := func(i int) string { return filepath.ToSlash(filepath.Join(corpusDir, samples[i].Name+".txt")) }
	perLength := map[int]int{}
	for _, c := range copies {
		a, b := name(c.Src), name(c.Dst)
		if b < a {
			a, b = b, a
		}
		planted[a+" ~ "+b] = c.Units
		perLength[c.Units]++
	}
	fmt.Printf("Brown corpus, %d samples; %d planted verbatim copies, %d of each length 1..8 sentences (of >= 5 words).\n\n",
		len(samples), len(copies), *perSize)
	fmt.Println("| --min-shared | --min-words | pairs | planted found | false leads | recall by copy length 1 2 3 4 5 6 7 8 |")
	fmt.Println("|---|---|---|---|---|---|")
	for _, s := range []int{1, 2, 3, 4, 5} {
		for _, w := range []int{1, 3, 5, 7, 9} {
			out, err := exec.Command(bin, "scan", "-q", "--format", "json",
				"--min-shared", fmt.Sprint(s), "--min-words", fmt.Sprint(w), corpusDir).Output()
			if err != nil {
				return fmt.Errorf("scan --min-shared %d --min-words %d: %w", s, w, err)
			}
			var res report.Result
			if err := json.Unmarshal(out, &res); err != nil {
				return err
			}
			found, falseLeads := 0, 0
			foundBy := map[int]int{}
			for _, p := range res.Pairs {
				if k, ok := planted[p.A+" ~ "+p.B]; ok {
					found++
					foundBy[k]++
				} else {
					falseLeads++
				}
			}
			var recall []string
			for k := 1; k <= 8; k++ {
				recall = append(recall, fmt.Sprintf("%.1f", float64(foundBy[k])/float64(max(1, perLength[k]))))
			}
			fmt.Printf("| %d | %d | %d | %d / %d | %d | %s |\n", s, w, len(res.Pairs), found, len(copies), falseLeads, strings.Join(recall, " "))
		}
	}
	return nil
}
