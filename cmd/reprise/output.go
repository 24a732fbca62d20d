package main

import (
	"bufio"
	"context"
	"crypto/rand"
	"encoding/hex"
	"errors"
	"fmt"
	"io"
	"io/fs"
	"os"
	"path/filepath"
	"strings"
	"sync"
	"sync/atomic"
	"time"

	"reprise/scan"
)

// writeOutput runs render into standard output, or into a temporary file
// beside path that is renamed over path only when rendering succeeded, so a
// reader never sees a half-written report and a failed run leaves the old
// one in place. The temporary file is removed on failure, and when ctx is
// cancelled (Ctrl-C) while the report is written.
//
// Reports quote the documents, so the file gets no wider permissions than
// the user asked for: a report replacing a file keeps that file's mode,
// and a new one gets 0666 less the umask, as a shell redirection would.
func writeOutput(ctx context.Context, path string, stdout io.Writer, render func(io.Writer) error) error {
	// Once ctx is done every write fails, so the rendering stops at its
	// next write and the temporary file is removed.
	inner := render
	render = func(w io.Writer) error { return inner(ctxWriter{ctx, w}) }
	if path == "" || path == "-" {
		bw := bufio.NewWriter(stdout)
		if err := render(bw); err != nil {
			return err
		}
		return bw.Flush()
	}
	fi, err := os.Stat(path)
	if err == nil && !fi.Mode().IsRegular() {
		// Devices such as /dev/null cannot be replaced by a rename.
		f, err := os.OpenFile(path, os.O_WRONLY, 0)
		if err != nil {
			return fmt.Errorf("output: %w", err)
		}
		bw := bufio.NewWriter(f)
		err = render(bw)
		if err == nil {
			err = bw.Flush()
		}
		if cerr := f.Close(); err == nil {
			err = cerr
		}
		return err
	}
	keepMode := err == nil
	tmp, err := createBeside(path)
	if err != nil {
		return fmt.Errorf("output: %w", err)
	}
	ok := false
	defer func() {
		if !ok {
			tmp.Close()
			os.Remove(tmp.Name())
		}
	}()
	bw := bufio.NewWriter(tmp)
	if err := render(bw); err != nil {
		return err
	}
	if err := bw.Flush(); err != nil {
		return fmt.Errorf("output: %w", err)
	}
	if keepMode {
		if err := tmp.Chmod(fi.Mode().Perm()); err != nil {
			return fmt.Errorf("output: %w", err)
		}
	}
	if err := tmp.Close(); err != nil {
		return fmt.Errorf("output: %w", err)
	}
	if err := os.Rename(tmp.Name(), path); err != nil {
		return fmt.Errorf("output: %w", err)
	}
	ok = true
	return nil
}

// ctxWriter fails every write once its context is done.
type ctxWriter struct {
	ctx context.Context
	w   io.Writer
}

func (c ctxWriter) Write(p []byte) (int, error) {
	if err := c.ctx.Err(); err != nil {
		return 0, err
	}
	return c.w.Write(p)
}

// createBeside creates a new file named ".BASE.tmp-N" in path's folder,
// with mode 0666 less the umask (os.CreateTemp's 0600 would make every
// report private, and reading the umask is not portable).
func createBeside(path string) (*os.File, error) {
	dir, base := filepath.Dir(path), filepath.Base(path)
	for try := 0; ; try++ {
		var b [6]byte
		if _, err := rand.Read(b[:]); err != nil {
			return nil, err
		}
		name := filepath.Join(dir, "."+base+".tmp-"+hex.EncodeToString(b[:]))
		f, err := os.OpenFile(name, os.O_RDWR|os.O_CREATE|os.O_EXCL, 0o666)
		if err == nil || !errors.Is(err, fs.ErrExist) || try == 100 {
			return f, err
		}
	}
}

// isTerminal reports whether w is a character device such as a terminal.
func isTerminal(w io.Writer) bool {
	f, ok := w.(*os.File)
	if !ok {
		return false
	}
	fi, err := f.Stat()
	return err == nil && fi.Mode()&os.ModeCharDevice != 0
}

// progress shows one rewritable status line on a terminal. show may be
// called from several goroutines.
type progress struct {
	mu    sync.Mutex
	w     io.Writer
	width int
}

func (p *progress) show(format string, args ...any) {
	line := fmt.Sprintf(format, args...) + "…"
	p.mu.Lock()
	defer p.mu.Unlock()
	pad := max(0, p.width-len(line))
	fmt.Fprintf(p.w, "\r%s%s", line, strings.Repeat(" ", pad))
	p.width = len(line)
}

// done clears the status line; it is safe on a nil progress.
func (p *progress) done() {
	if p == nil {
		return
	}
	p.mu.Lock()
	defer p.mu.Unlock()
	if p.width == 0 {
		return
	}
	fmt.Fprintf(p.w, "\r%s\r", strings.Repeat(" ", p.width))
	p.width = 0
}

// newProgress shows the run's progress on stderr when it is a terminal
// and quiet is not set, by setting cfg.Progress; done on the result clears
// the line.
func newProgress(cfg *scan.Config, quiet bool, stderr io.Writer) *progress {
	if quiet || !isTerminal(stderr) {
		return nil
	}
	p := &progress{w: stderr}
	cfg.Progress = stageCounter(p.show)
	return p
}

// stageLabels name each stage in the progress line.
var stageLabels = map[scan.Stage]string{
	scan.StageRead:   "reading and splitting: documents read",
	scan.StageCount:  "counting pairs among the documents",
	scan.StageReread: "reading again the documents the report quotes",
	scan.StageAlign:  "aligning pairs",
}

// stageCounter turns the run's progress reports into lines for show: one
// counter per stage, with its estimate of the time left. It is safe from
// several goroutines.
func stageCounter(show func(format string, args ...any)) func(scan.Progress) {
	var mu sync.Mutex
	var stage scan.Stage
	var c *counter
	return func(p scan.Progress) {
		mu.Lock()
		if p.Stage != stage || c == nil {
			stage = p.Stage
			c = newCounter(show, stageLabels[p.Stage], p.Total)
		}
		cur := c
		mu.Unlock()
		if p.Detail != "" {
			show("%s", p.Detail)
			return
		}
		cur.at(p.Done, p.Total)
	}
}

// counter reports the progress of one stage through show: done of total
// (total 0: not known) with, once a second has passed, an estimate of the
// time left. It shows at most ten lines a second, whatever the rate of
// calls, and is safe from several goroutines: it calls show from one
// goroutine at a time, so show itself need not be.
type counter struct {
	mu    sync.Mutex // held while show runs
	show  func(format string, args ...any)
	label string
	total atomic.Int64 // 0: not known
	start time.Time
	done  atomic.Int64
	last  atomic.Int64 // unix nanoseconds of the last line shown
}

func newCounter(show func(string, ...any), label string, total int) *counter {
	c := &counter{show: show, label: label, start: time.Now()}
	c.total.Store(int64(total))
	show("%s", c.line(0, 0))
	return c
}

// at says that done of total are done.
func (c *counter) at(done, total int) {
	c.total.Store(int64(total))
	c.report(int64(done))
}

func (c *counter) report(done int64) {
	now := time.Now()
	last := c.last.Load()
	if now.UnixNano()-last < int64(100*time.Millisecond) && done != c.total.Load() {
		return
	}
	if !c.last.CompareAndSwap(last, now.UnixNano()) {
		return
	}
	c.mu.Lock()
	defer c.mu.Unlock()
	c.show("%s", c.line(done, now.Sub(c.start)))
}

func (c *counter) line(done int64, elapsed time.Duration) string {
	total := c.total.Load()
	if total <= 0 {
		return fmt.Sprintf("%s: %d", c.label, done)
	}
	line := fmt.Sprintf("%s: %d of %d (%d%%)", c.label, done, total, 100*done/total)
	if elapsed >= time.Second && done > 0 && done < total {
		left := time.Duration(float64(elapsed) * float64(total-done) / float64(done))
		line += ", about " + left.Round(time.Second).String() + " left"
	}
	return line
}

// checkOutputDir fails when the folder of the -o FILE does not exist (or is
// not a folder), before any work is done, naming the folder the user gave.
func checkOutputDir(path string) error {
	if path == "" || path == "-" {
		return nil
	}
	dir := filepath.Dir(path)
	fi, err := os.Stat(dir)
	switch {
	case err != nil:
		return fmt.Errorf("-o %s: folder %s: %w", path, dir, unwrapPath(err))
	case !fi.IsDir():
		return fmt.Errorf("-o %s: %s is not a folder", path, dir)
	}
	return nil
}

// unwrapPath drops the *fs.PathError around err, whose path the message
// already names.
func unwrapPath(err error) error {
	var pe *fs.PathError
	if errors.As(err, &pe) {
		return pe.Err
	}
	return err
}

// noDocumentError says why no document was read from paths: the first
// path that does not exist, or a filter that matched no file, or else that
// nothing readable was found (the skipped inputs say why in the report).
func noDocumentError(what string, paths, include []string) error {
	for _, p := range paths {
		fi, err := os.Stat(p)
		if err != nil {
			return fmt.Errorf("%s: %w", p, unwrapPath(err))
		}
		if fi.IsDir() {
			if entries, err := os.ReadDir(p); err == nil && len(entries) == 0 {
				return fmt.Errorf("%s: empty folder", p)
			}
		}
	}
	if len(include) > 0 {
		return fmt.Errorf("no file in %s matches --include %s", strings.Join(paths, " "), strings.Join(include, " "))
	}
	return fmt.Errorf("no readable %s in %s", what, strings.Join(paths, " "))
}
