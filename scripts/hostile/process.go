package main

import (
	"fmt"
	"io"
	"os"
	"os/exec"
	"slices"
	"strconv"
	"time"

	"reprise/internal/hostile"
)

// processTable measures each shape at n, 2n and 4n, every size in
// processes of its own, as a batch of such files would be read: a child
// (this program with -read-once) reads the shape once, another reads it
// 1+extra times, and the difference of their processor time (user and
// system, all threads, the collector's included), over extra, is the cost
// of one read in a process that has already read that file: no other
// size's heap, caches or garbage is in it. Each measure is the median of
// reps pairs of children. It prints a Markdown table and returns false
// when a time ratio is above maxRatio.
func processTable(w io.Writer, ss []hostile.Shape, reps, extra int, maxRatio float64) (bool, error) {
	self, err := os.Executable()
	if err != nil {
		return false, err
	}
	cpu := func(s hostile.Shape, mult, reads int) (time.Duration, error) {
		cmd := exec.Command(self, "-read-once", s.Name, "-mult", strconv.Itoa(mult), "-reads", strconv.Itoa(reads))
		cmd.Stderr = os.Stderr
		if err := cmd.Run(); err != nil {
			return 0, fmt.Errorf("%s at %dn: %w", s.Name, mult, err)
		}
		return cmd.ProcessState.UserTime() + cmd.ProcessState.SystemTime(), nil
	}
	fmt.Fprintf(w, "each size in its own processes: (time of 1+%d reads - time of 1 read) / %d, median of %d\n\n", extra, extra, reps)
	fmt.Fprintln(w, "| shape | file at n | ms per read at n, 2n, 4n | time 2n/n | time 4n/2n |")
	fmt.Fprintln(w, "|---|---:|---:|---:|---:|")
	ok, worst, over := true, 0.0, []string{}
	for _, s := range ss {
		raw, err := s.Make(s.Base)
		if err != nil {
			return false, err
		}
		var per [3]float64
		for k, mult := range []int{1, 2, 4} {
			var ds []float64
			for range reps {
				one, err := cpu(s, mult, 1)
				if err != nil {
					return false, err
				}
				many, err := cpu(s, mult, 1+extra)
				if err != nil {
					return false, err
				}
				ds = append(ds, float64(many-one)/float64(extra))
			}
			slices.Sort(ds)
			per[k] = ds[len(ds)/2]
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
		fmt.Fprintf(w, "| %s | %s | %.2f, %.2f, %.2f | %s | %s |\n", name, human(float64(len(raw))), per[0]/1e6, per[1]/1e6, per[2]/1e6, cell(r1), cell(r2))
	}
	fmt.Fprintf(w, "\nlargest growth per doubling of a shape that is read: %.2f (bound %.2f); above it: %v\n", worst, maxRatio, over)
	return ok, nil
}
