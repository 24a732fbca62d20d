package main

import (
	"fmt"
	"io"
	"os"
	"os/exec"
	"slices"
	"strconv"
	"syscall"

	"reprise/internal/hostile"
)

// processTable measures each shape at n, 2n and 4n, every size in
// processes of its own, as a batch of such files would be read: a child
// (this program with -read-once) reads the shape once, another reads it
// 1+k times, and the difference of their processor time (user and system,
// all threads, the collector's included), over k, is the cost of one read
// in a process that has already read that file: no other size's heap,
// caches or garbage is in it. k is extra at 4n, twice that at 2n and four
// times at n, so that every size's measure covers the same bytes read and
// the small reads are not drowned by the noise of starting a process. Each
// measure is the median of reps pairs of children. n is scale times each
// shape's base count (scale 1: the sizes of the growth benchmark). It
// prints a Markdown table and returns false when a time ratio is above
// maxRatio.
func processTable(w io.Writer, ss []hostile.Shape, scale, reps, extra int, maxRatio float64) (bool, error) {
	scale = max(1, scale)
	self, err := os.Executable()
	if err != nil {
		return false, err
	}
	// cost is what one child spent: processor time (user and system) and
	// minor page faults (fresh memory from the kernel, which this machine
	// charges to system time).
	type cost struct{ user, sys, faults float64 }
	run := func(s hostile.Shape, mult, reads int) (cost, error) {
		cmd := exec.Command(self, "-read-once", s.Name, "-mult", strconv.Itoa(mult), "-reads", strconv.Itoa(reads))
		cmd.Stderr = os.Stderr
		if err := cmd.Run(); err != nil {
			return cost{}, fmt.Errorf("%s at %dn: %w", s.Name, mult, err)
		}
		c := cost{user: float64(cmd.ProcessState.UserTime()), sys: float64(cmd.ProcessState.SystemTime())}
		if ru, ok := cmd.ProcessState.SysUsage().(*syscall.Rusage); ok {
			c.faults = float64(ru.Minflt)
		}
		return c, nil
	}
	median := func(xs []float64) float64 {
		slices.Sort(xs)
		return xs[len(xs)/2]
	}
	fmt.Fprintf(w, "each size in its own processes: (time of 1+k reads - time of 1 read) / k, k = %d at 4n, %d at 2n, %d at n; median of %d; n = %d× the base count\n\n", extra, 2*extra, 4*extra, reps, scale)
	fmt.Fprintln(w, "| shape | file at n | ms per read at n, 2n, 4n | time 2n/n | time 4n/2n | user time 2n/n, 4n/2n | page faults per read at n, 2n, 4n |")
	fmt.Fprintln(w, "|---|---:|---:|---:|---:|---:|---:|")
	ok, worst, over := true, 0.0, []string{}
	for _, s := range ss {
		raw, err := s.Make(s.Base * scale)
		if err != nil {
			return false, err
		}
		var per, user, faults [3]float64
		for k, mult := range []int{1, 2, 4} {
			var ds, us, fs []float64
			reads := extra * 4 / mult
			for range reps {
				one, err := run(s, scale*mult, 1)
				if err != nil {
					return false, err
				}
				many, err := run(s, scale*mult, 1+reads)
				if err != nil {
					return false, err
				}
				k := float64(reads)
				ds = append(ds, (many.user+many.sys-one.user-one.sys)/k)
				us = append(us, (many.user-one.user)/k)
				fs = append(fs, (many.faults-one.faults)/k)
			}
			per[k], user[k], faults[k] = median(ds), median(us), median(fs)
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
