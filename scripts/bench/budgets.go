package main

import (
	"crypto/sha256"
	"encoding/hex"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"slices"
	"strings"
)

// slackMiB is what a run may hold over its --memory bound: the target is
// peak RSS at most the bound plus 64 MiB.
const slackMiB = 64

// measureBudgets runs, for every size, the scan at each of o.budgets (and
// each with o.other too, when given), alternately and o.runs times each,
// writing the JSON report to a file of the work folder: it prints each
// one's median wall time, user and system time, peak RSS (largest of the
// runs) against the bound plus slackMiB, and whether every report is
// byte-identical to the first (SHA-256 of the file, which is then removed).
func measureBudgets(g *generator, bin string, o options) error {
	bins := []string{bin}
	if o.other != "" {
		bins = append(bins, o.other)
	}
	for _, n := range o.sizes {
		dir := corpusDir(o, n)
		bytes, err := g.ensure(dir, n)
		if err != nil {
			return err
		}
		fmt.Printf("%d documents, %.1f MB in %s\n", n, float64(bytes)/1e6, dir)
		type key struct{ bin, budget string }
		walls := map[key][]float64{}
		rss := map[key][]float64{}
		sums := map[string]bool{}
		var first string
		out := filepath.Join(o.work, "budget-report.json")
		for i := range o.runs {
			for _, b := range bins {
				for _, m := range o.budgets {
					args := append([]string{"scan", "--format", "json", "-o", out, "-q", "--memory", m}, o.extra...)
					args = append(args, dir)
					if i == 0 {
						fmt.Printf("  %s %s\n", b, strings.Join(args, " "))
					}
					t, r, _, err := timed(b, args...)
					if err != nil {
						return fmt.Errorf("%s (run %d): %w", b, i+1, err)
					}
					sum, err := fileSum(out)
					if err != nil {
						return err
					}
					os.Remove(out)
					if first == "" {
						first = sum
					}
					sums[sum] = true
					k := key{b, m}
					walls[k], rss[k] = append(walls[k], t), append(rss[k], r)
					fmt.Printf("    run %d: %s --memory %s: %.1f s, peak RSS %.0f MiB (%.0f KiB), report %s\n", i+1, filepath.Base(b), m, t, r/1024, r, sum[:12])
				}
			}
		}
		fmt.Printf("  load average after the runs: %s\n", loadAverage())
		for _, b := range bins {
			for _, m := range o.budgets {
				k := key{b, m}
				peak := slices.Max(rss[k]) / 1024
				held := "no bound"
				if mem, err := parseSize(m); err == nil && mem > 0 {
					bound := float64(mem>>20) + slackMiB
					held = fmt.Sprintf("bound %.0f MiB: held %v", bound, peak <= bound)
				}
				fmt.Printf("  %s --memory %s: median %.1f s (runs %s), peak RSS %.0f MiB (median %.0f); %s\n", b, m, median(walls[k]), list(walls[k]), peak, median(rss[k])/1024, held)
			}
		}
		fmt.Printf("  reports byte-identical at every budget and binary: %v\n\n", len(sums) == 1)
	}
	return nil
}

// fileSum is the hex SHA-256 of a file.
func fileSum(path string) (string, error) {
	f, err := os.Open(path)
	if err != nil {
		return "", err
	}
	defer f.Close()
	h := sha256.New()
	if _, err := io.Copy(h, f); err != nil {
		return "", err
	}
	return hex.EncodeToString(h.Sum(nil)), nil
}
