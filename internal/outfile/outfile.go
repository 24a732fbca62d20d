// Package outfile writes a report where the user asked for it: to
// standard output, or to a file replaced atomically (a temporary file
// beside it, renamed over it once the report is whole), keeping the mode
// of the file it replaces, writing through devices such as /dev/null, and
// stopping, with the temporary file removed, when its context is done.
// The command line and the Beam driver write their reports through it.
package outfile

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
)

// Write runs render into standard output, or into a temporary file
// beside path that is renamed over path only when rendering succeeded, so a
// reader never sees a half-written report and a failed run leaves the old
// one in place. The temporary file is removed on failure, and when ctx is
// cancelled (Ctrl-C) while the report is written.
//
// Reports quote the documents, so the file gets no wider permissions than
// the user asked for: a report replacing a file keeps that file's mode,
// and a new one gets 0666 less the umask, as a shell redirection would.
func Write(ctx context.Context, path string, stdout io.Writer, render func(io.Writer) error) error {
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

// CheckDir fails when the folder of the -o FILE does not exist (or is
// not a folder), before any work is done, naming the folder the user gave.
func CheckDir(path string) error {
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
