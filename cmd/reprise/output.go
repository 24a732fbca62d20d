package main

import (
	"errors"
	"fmt"
	"io"
	"io/fs"
	"os"
	"strings"
	"sync"
	"sync/atomic"
	"time"

	"reprise/scan"
)

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

// noDocumentError says why no document was read from paths: the first
// path that does not exist, or a filter that matched no file, or else that
// nothing readable was found (the skipped inputs say why in the report).
func noDocumentError(what string, paths, include []string) error {
	for _, p := range paths {
		fi, err := os.Stat(p)
		if pe := (*fs.PathError)(nil); errors.As(err, &pe) {
			return fmt.Errorf("%s: %w", p, pe.Err) // the path is named once
		} else if err != nil {
			return fmt.Errorf("%s: %w", p, err)
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
