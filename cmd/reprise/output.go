package main

import (
	"bufio"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"strings"
)

// writeOutput runs render into standard output, or into a temporary file
// beside path that is renamed over path only when rendering succeeded, so a
// reader never sees a half-written report and a failed run leaves the old
// one in place.
func writeOutput(path string, stdout io.Writer, render func(io.Writer) error) error {
	if path == "" || path == "-" {
		bw := bufio.NewWriter(stdout)
		if err := render(bw); err != nil {
			return err
		}
		return bw.Flush()
	}
	if fi, err := os.Stat(path); err == nil && !fi.Mode().IsRegular() {
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
	dir := filepath.Dir(path)
	tmp, err := os.CreateTemp(dir, "."+filepath.Base(path)+".tmp-*")
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
	if err := tmp.Chmod(0o644); err != nil {
		return fmt.Errorf("output: %w", err)
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

// isTerminal reports whether w is a character device such as a terminal.
func isTerminal(w io.Writer) bool {
	f, ok := w.(*os.File)
	if !ok {
		return false
	}
	fi, err := f.Stat()
	return err == nil && fi.Mode()&os.ModeCharDevice != 0
}

// progress shows one rewritable status line on a terminal.
type progress struct {
	w     io.Writer
	width int
}

func (p *progress) show(format string, args ...any) {
	line := fmt.Sprintf(format, args...) + "…"
	pad := max(0, p.width-len(line))
	fmt.Fprintf(p.w, "\r%s%s", line, strings.Repeat(" ", pad))
	p.width = len(line)
}

// done clears the status line; it is safe on a nil progress.
func (p *progress) done() {
	if p == nil || p.width == 0 {
		return
	}
	fmt.Fprintf(p.w, "\r%s\r", strings.Repeat(" ", p.width))
	p.width = 0
}
