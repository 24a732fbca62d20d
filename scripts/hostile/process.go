package main

import (
	"fmt"
	"io"
	"os"
	"os/exec"
	"slices"
	"strconv"

	"reprise/internal/hostile"
)

// processTable measures each shape at n, 2n and 4n, every size in
// processes of its own, as a batch of such files would be read: a child
// (this program with -read-once) reads the shape 1+k times and reports the
// processor time (user and system, all threads, the collector's included)
// and the minor page faults of the k reads after the first (usageSince),
// so that neither making the file, nor starting the process, nor the first
// read's warm-up is in the measure, and no other size's heap, caches or
// garbage is in the process. k is extra at 4n, twice that at 2n and four
// times at n, so that every size's measure covers the same bytes read.
// Each measure is the median of reps children, the three sizes' children
// taking turns. n is scale times each shape's base count (scale 1: the
// sizes of the growth benchmark). With batch, a child's reads are copies
// of the file in one folder read by one corpus.ReadEach that lends the
// texts (readBatch), as reprise scan reads a folder of such files, instead
// of separate corpus.Read calls, and the measure is the k-1 files from the
// second file's first document to the last file's (a refused shape,
// skipped rather than read, is read the separate way). It prints a
// Markdown table and returns false when a time ratio is above maxRatio.
func processTable(w io.Writer, ss []hostile.Shape, batch bool, scale, reps, extra int, maxRatio float64) (bool, error) {
	scale = max(1, scale)
	self, err := os.Executable()
	if err != nil {
		return false, err
	}
	// cost is what the timed reads of one child spent: processor time
	// (user and system, ns) and minor page faults (fresh memory from the
	// kernel, which this machine charges to system time).
	type cost struct{ user, sys, faults, files float64 }
	run := func(s hostile.Shape, mult, reads int) (cost, error) {
		args := []string{"-read-once", s.Name, "-mult", strconv.Itoa(mult), "-reads", strconv.Itoa(reads)}
		if batch && !s.Refused {
			args = append(args, "-batch")
		}
		cmd := exec.Command(self, args...)
		cmd.Stderr = os.Stderr
		out, err := cmd.Output()
		if err != nil {
			return cost{}, fmt.Errorf("%s at %dn: %w", s.Name, mult, err)
		}
		var c cost
		if _, err := fmt.Sscan(string(out), &c.user, &c.sys, &c.faults, &c.files); err != nil || c.files < 1 {
			return cost{}, fmt.Errorf("%s at %dn: the child wrote %q, not four figures with a file count of at least 1 (%v)", s.Name, mult, out, err)
		}
		return c, nil
	}
	median := func(xs []float64) float64 {
		slices.Sort(xs)
		return xs[len(xs)/2]
	}
	how := "1+k separate corpus.Read calls: the time of the k reads after the first, over k"
	if batch {
		how = "1+k copies in one folder, one corpus.ReadEach lending the texts: the time from the second file's first document to the last file's, over k-1"
	}
	fmt.Fprintf(w, "each size in a process of its own (%s); k = %d at 4n, %d at 2n, %d at n; median of %d, the sizes taking turns; n = %d× the base count\n\n", how, extra, 2*extra, 4*extra, reps, scale)
	fmt.Fprintln(w, "| shape | file at n | ms per read at n, 2n, 4n | time 2n/n | time 4n/2n | user time 2n/n, 4n/2n | page faults per read at n, 2n, 4n |")
	fmt.Fprintln(w, "|---|---:|---:|---:|---:|---:|---:|")
	ok, worst, over := true, 0.0, []string{}
	for _, s := range ss {
		raw, err := s.Make(s.Base * scale)
		if err != nil {
			return false, err
		}
		// The sizes take turns, in an order that rotates from one round to
		// the next, so that a spell of load on the machine (seconds long)
		// falls on every size's children alike rather than on all of one
		// size's (common practice: interleave what is compared).
		var ds, us, fs [3][]float64
		mults := [3]int{1, 2, 4}
		for round := range reps {
			for turn := range 3 {
				k := (round + turn) % 3
				c, err := run(s, scale*mults[k], 1+extra*4/mults[k])
				if err != nil {
					return false, err
				}
				ds[k] = append(ds[k], (c.user+c.sys)/c.files)
				us[k] = append(us[k], c.user/c.files)
				fs[k] = append(fs[k], c.faults/c.files)
			}
		}
		var per, user, faults [3]float64
		for k := range 3 {
			per[k], user[k], faults[k] = median(ds[k]), median(us[k]), median(fs[k])
		}
		r1, r2 := per[1]/per[0], per[2]/per[1]
		cell := func(r float64) string {
			if r > maxRatio && !s.Refused {
				return fmt.Sprintf("**%.2f**", r)
			}
			return fmt.Sprintf("%.2f", r)
		}
		if !s.Refused {
			worst = max(worst, r1, r2)
			if r1 > maxRatio || r2 > maxRatio {
				ok = false
				over = append(over, s.Name)
			}
		}
		name := s.Name
		if s.Refused {
			name += " (refused)"
		}
		fmt.Fprintf(w, "| %s | %s | %.2f, %.2f, %.2f | %s | %s | %.2f, %.2f | %.0f, %.0f, %.0f |\n", name, human(float64(len(raw))), per[0]/1e6, per[1]/1e6, per[2]/1e6, cell(r1), cell(r2),
			user[1]/user[0], user[2]/user[1], faults[0], faults[1], faults[2])
	}
	fmt.Fprintf(w, "\nlargest growth per doubling of a shape that is read: %.2f (bound %.2f); above it: %v\n", worst, maxRatio, over)
	return ok, nil
}
