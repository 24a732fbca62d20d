package main

import (
	"bytes"
	"fmt"
	"io"
	"os"
	"os/exec"
	"path/filepath"
	"regexp"
	"strconv"
	"strings"
	"syscall"

	"reprise/corpus"
	"reprise/internal/hostile"
)

// The instruction table: the machine's clock says how long a read took,
// which mixes the work the code does with how the memory system served it
// (caches shared with other work, fresh pages, the collector). The number
// of instructions executed does not depend on either: valgrind's
// cachegrind counts them exactly, the same on every run. So a shape whose
// time grows more than 2.5x per doubling but whose instructions grow 2x is
// linear code on a memory system that slows down as the data grows, and a
// shape whose instructions grow faster is a superlinear path in the code.
//
// One read is the difference between a run of the script that reads the
// file twice and one that reads it once (both under cachegrind, GOGC=off
// and GOMAXPROCS=1 so that no collection or scheduling differs): making
// the file, starting the program and the first read's warm-up cost the
// same in both and cancel out. What does not cancel (the runtime's own
// background work, some ten thousand instructions from run to run) is
// nothing beside a read of most shapes, but it is beside the refusal of a
// refused shape, which stops at the depth limit whatever the size: those
// are read refusedReads more times in the second run, and the difference
// divided by refusedReads.
//
// With -cache-sim, cachegrind also simulates a first-level data cache and a
// last-level cache (-ll, by default 1 MiB, the size of one core's L2 on the
// development machine) and counts their misses per read, the same way:
// data misses that grow faster than the input are the memory system's part.

// readBatch writes reads copies of the shape at mult times its base count
// into a temporary folder and reads the folder once with corpus.ReadEach
// (one job), lending each text to a digest that keeps none of it, as
// `reprise scan` reads a folder: the worker's buffers serve file after
// file. The clock is read at the first digest of each file (the worker
// digests a file's documents as it extracts them, one after the other):
// from the second file's to the last file's is reads-2 files' worth of
// reading, whatever the format's documents per file (one; a ZIP archive's
// members, digested after the whole archive is read; a JSON Lines file's
// lines, digested as they are read). It writes that to out (usageSince).
func readBatch(out io.Writer, s hostile.Shape, mult, reads int) error {
	if reads < 3 {
		return fmt.Errorf("-batch needs -reads of at least 3, not %d", reads)
	}
	raw, err := s.Make(s.Base * max(1, mult))
	if err != nil {
		return err
	}
	dir, err := os.MkdirTemp("", "reprise-hostile-")
	if err != nil {
		return err
	}
	defer os.RemoveAll(dir)
	for k := range reads {
		if err := os.WriteFile(filepath.Join(dir, fmt.Sprintf("%04d%s", k, s.Ext)), raw, 0o644); err != nil {
			return err
		}
	}
	var second, last syscall.Rusage
	files, file := 0, ""
	_, _, _, err = corpus.ReadEach([]string{dir}, corpus.Options{Jobs: 1}, func(d *corpus.Document, text *corpus.Loan) int {
		if d.File != file {
			file, files = d.File, files+1
			switch {
			case files == 2:
				_ = syscall.Getrusage(syscall.RUSAGE_SELF, &second)
			case files == reads:
				_ = syscall.Getrusage(syscall.RUSAGE_SELF, &last)
			}
		}
		return len(text.Text())
	})
	if err != nil {
		return err
	}
	if files != reads {
		return fmt.Errorf("%s: %d of %d copies read (a refused shape is skipped, not digested: read it without -batch)", s.Name, files, reads)
	}
	return usageBetween(out, &second, &last, reads-2)
}

// readShape writes the shape at mult times its base count to a temporary
// file and reads it reads times with corpus.Read (one job). It writes to
// out what the reads after the first cost (see usageSince).
func readShape(out io.Writer, s hostile.Shape, mult, reads int) error {
	raw, err := s.Make(s.Base * max(1, mult))
	if err != nil {
		return err
	}
	dir, err := os.MkdirTemp("", "reprise-hostile-")
	if err != nil {
		return err
	}
	defer os.RemoveAll(dir)
	name := filepath.Join(dir, s.Name+s.Ext)
	if err := os.WriteFile(name, raw, 0o644); err != nil {
		return err
	}
	var first syscall.Rusage
	for k := range reads {
		if _, _, err := corpus.Read([]string{name}, corpus.Options{Jobs: 1}); err != nil {
			return err
		}
		if k == 0 {
			_ = syscall.Getrusage(syscall.RUSAGE_SELF, &first)
		}
	}
	return usageSince(out, &first, reads-1)
}

// usageSince writes to out what the process has spent since first, over
// files files' reads (usageBetween).
func usageSince(out io.Writer, first *syscall.Rusage, files int) error {
	var now syscall.Rusage
	if err := syscall.Getrusage(syscall.RUSAGE_SELF, &now); err != nil {
		return err
	}
	return usageBetween(out, first, &now, files)
}

// usageBetween writes one line to out: the user and system time (in
// nanoseconds, every thread of the process) and the minor page faults
// from a to b, and the number of files read in between, as processTable
// reads them.
func usageBetween(out io.Writer, a, b *syscall.Rusage, files int) error {
	ns := func(t syscall.Timeval) int64 { return t.Nano() }
	_, err := fmt.Fprintf(out, "%d %d %d %d\n", ns(b.Utime)-ns(a.Utime), ns(b.Stime)-ns(a.Stime), b.Minflt-a.Minflt, files)
	return err
}

// refusedReads is how many more reads of a refused shape the second run
// makes.
const refusedReads = 16

// A cgCount is what cachegrind counted over a whole run.
type cgCount struct {
	ir, dr, dw, d1, lld float64 // instructions, data reads, writes, D1 misses, last-level data misses
}

var cgLine = regexp.MustCompile(`==\d+== (I\s+refs|D\s+refs|D1\s+misses|LLd misses):\s+([\d,]+)(?:\s+\(\s*([\d,]+) rd\s+\+\s+([\d,]+) wr\))?`)

// cachegrind runs this program under valgrind's cachegrind with
// -read-once shape -reads reads and returns its counts.
func cachegrind(self string, s hostile.Shape, mult, reads int, cacheSim bool, ll string) (cgCount, error) {
	args := []string{"--tool=cachegrind", "--cachegrind-out-file=/dev/null"}
	if cacheSim {
		args = append(args, "--cache-sim=yes", "--D1=32768,8,64", "--LL="+ll)
	} else {
		args = append(args, "--cache-sim=no")
	}
	args = append(args, self, "-read-once", s.Name, "-mult", strconv.Itoa(mult), "-reads", strconv.Itoa(reads))
	cmd := exec.Command("valgrind", args...)
	cmd.Env = append(os.Environ(), "GOGC=off", "GOMAXPROCS=1")
	var out bytes.Buffer
	cmd.Stderr, cmd.Stdout = &out, io.Discard
	if err := cmd.Run(); err != nil {
		return cgCount{}, fmt.Errorf("valgrind %s: %w\n%s", s.Name, err, out.String())
	}
	num := func(v string) float64 {
		f, _ := strconv.ParseFloat(strings.ReplaceAll(v, ",", ""), 64)
		return f
	}
	var c cgCount
	for _, m := range cgLine.FindAllStringSubmatch(out.String(), -1) {
		switch strings.Fields(m[1])[0] {
		case "I":
			c.ir = num(m[2])
		case "D":
			c.dr, c.dw = num(m[3]), num(m[4])
		case "D1":
			c.d1 = num(m[2])
		case "LLd":
			c.lld = num(m[2])
		}
	}
	if c.ir == 0 {
		return cgCount{}, fmt.Errorf("valgrind %s: no instruction count in its output\n%s", s.Name, out.String())
	}
	return c, nil
}

// instructionTable prints, per shape, the instructions of one read at n
// and their growth per doubling (and with cacheSim the data misses'); ok
// is false when an instruction ratio is above maxRatio.
func instructionTable(w io.Writer, ss []hostile.Shape, cacheSim bool, ll string, maxRatio float64) (bool, error) {
	if _, err := exec.LookPath("valgrind"); err != nil {
		return false, fmt.Errorf("-instructions needs valgrind (apt-get install valgrind): %w", err)
	}
	self, err := os.Executable()
	if err != nil {
		return false, err
	}
	fmt.Fprintf(w, "valgrind --tool=cachegrind, GOGC=off GOMAXPROCS=1; one read = run reading twice - run reading once (a refused shape: %d reads - 1, over %d)", 1+refusedReads, refusedReads)
	if cacheSim {
		fmt.Fprintf(w, "; D1 32 KiB 8-way, LL %s", ll)
	}
	fmt.Fprintf(w, "\n\n| shape | file at n | instructions per byte at n, 2n, 4n | instr. 2n/n | instr. 4n/2n |")
	if cacheSim {
		fmt.Fprintf(w, " D1 misses per KiB at n, 2n, 4n | LL misses per KiB at n, 2n, 4n | LL 4n/2n |")
	}
	fmt.Fprintf(w, "\n|---|---:|---:|---:|---:|")
	if cacheSim {
		fmt.Fprintf(w, "---:|---:|---:|")
	}
	fmt.Fprintln(w)
	ok := true
	worst := 0.0
	for _, s := range ss {
		var one [3]cgCount
		var size [3]float64
		for k := range 3 {
			mult := 1 << k
			c1, err := cachegrind(self, s, mult, 1, cacheSim, ll)
			if err != nil {
				return false, err
			}
			extra := 1
			if s.Refused {
				extra = refusedReads
			}
			c2, err := cachegrind(self, s, mult, 1+extra, cacheSim, ll)
			if err != nil {
				return false, err
			}
			d := float64(extra)
			one[k] = cgCount{ir: (c2.ir - c1.ir) / d, dr: (c2.dr - c1.dr) / d, dw: (c2.dw - c1.dw) / d, d1: (c2.d1 - c1.d1) / d, lld: (c2.lld - c1.lld) / d}
			raw, err := s.Make(s.Base * mult)
			if err != nil {
				return false, err
			}
			size[k] = float64(len(raw))
		}
		r1, r2 := one[1].ir/one[0].ir, one[2].ir/one[1].ir
		worst = max(worst, r1, r2)
		mark := func(r float64) string {
			if r > maxRatio {
				ok = false
				return fmt.Sprintf("**%.2f**", r)
			}
			return fmt.Sprintf("%.2f", r)
		}
		fmt.Fprintf(w, "| %s | %s | %.1f, %.1f, %.1f | %s | %s |", s.Name, human(size[0]),
			one[0].ir/size[0], one[1].ir/size[1], one[2].ir/size[2], mark(r1), mark(r2))
		if cacheSim {
			perKiB := func(v, sz float64) float64 { return v / (sz / 1024) }
			fmt.Fprintf(w, " %.0f, %.0f, %.0f | %.1f, %.1f, %.1f | %.2f |",
				perKiB(one[0].d1, size[0]), perKiB(one[1].d1, size[1]), perKiB(one[2].d1, size[2]),
				perKiB(one[0].lld, size[0]), perKiB(one[1].lld, size[1]), perKiB(one[2].lld, size[2]),
				one[2].lld/max(1, one[1].lld))
		}
		fmt.Fprintln(w)
	}
	fmt.Fprintf(w, "\nlargest instruction growth per doubling: %.2f (bound %.2f)\n", worst, maxRatio)
	return ok, nil
}
