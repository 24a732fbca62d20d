package main

import (
	"bufio"
	"bytes"
	"fmt"
	"io"
	"os"
	"runtime/debug"
	"strings"

	"github.com/spf13/pflag"

	"reprise/scan"
)

// defaultMemory is --memory's default: a laptop with 8 GiB keeps most of
// its memory for everything else, and 10^5 documents of a few pages each
// (about 150 MB of text) fit without spilling the counting.
const defaultMemory = "1GiB"

// scaleFlags are the flags that bound memory and feed large inputs.
type scaleFlags struct {
	memory    string
	temp      string
	filesFrom string
	null      bool
}

func (s *scaleFlags) register(fs *pflag.FlagSet) {
	fs.StringVar(&s.memory, "memory", defaultMemory, "bound what the whole run holds to `SIZE` (512MiB, 2GiB; 0 for no bound): the counting\nspills sorted runs to --temp when it does not fit; the result is the same at every size")
	fs.StringVar(&s.temp, "temp", "", "`DIR` for temporary files (default: the system temporary folder, "+os.TempDir()+");\nthey are removed when the run ends, and on Ctrl-C")
	fs.StringVar(&s.filesFrom, "files-from", "", "read more PATHs from `FILE`, one per line ('-' for standard input)")
	fs.BoolVarP(&s.null, "null", "0", false, "--files-from: paths are separated by NUL bytes, not lines (find -print0)")
}

// apply checks --memory and --temp and records them in cfg.
func (s *scaleFlags) apply(cfg *scan.Config) error {
	n, err := s.memoryBytes()
	if err != nil {
		return err
	}
	if s.temp != "" {
		if fi, err := os.Stat(s.temp); err != nil {
			return fmt.Errorf("--temp: %w", err)
		} else if !fi.IsDir() {
			return fmt.Errorf("--temp %s: not a folder", s.temp)
		}
	}
	cfg.Memory, cfg.TempDir = n, s.temp
	return nil
}

// memoryBytes is --memory in bytes, 0 for no bound.
func (s *scaleFlags) memoryBytes() (int64, error) {
	t := strings.TrimSpace(s.memory)
	if t == "0" || strings.EqualFold(t, "unlimited") || strings.EqualFold(t, "none") {
		return 0, nil
	}
	n, err := parseSize(t)
	if err != nil {
		return 0, fmt.Errorf("--memory: %w", err)
	}
	if n < 8<<20 {
		return 0, fmt.Errorf("--memory %s: at least 8MiB, or 0 for no bound", s.memory)
	}
	return n, nil
}

// paths returns the PATH arguments followed by those of --files-from.
func (s *scaleFlags) paths(args []string, stdin io.Reader) ([]string, error) {
	if s.null && s.filesFrom == "" {
		return nil, fmt.Errorf("-0/--null applies to --files-from only")
	}
	if s.filesFrom == "" {
		return args, nil
	}
	var r io.Reader = stdin
	name := "standard input"
	if s.filesFrom != "-" {
		f, err := os.Open(s.filesFrom)
		if err != nil {
			return nil, fmt.Errorf("--files-from: %w", err)
		}
		defer f.Close()
		r, name = f, s.filesFrom
	}
	listed, err := readPathList(r, s.null)
	if err != nil {
		return nil, fmt.Errorf("--files-from %s: %w", name, err)
	}
	if len(listed) == 0 && len(args) == 0 {
		return nil, fmt.Errorf("--files-from %s: no path in it", name)
	}
	return append(append([]string(nil), args...), listed...), nil
}

// readPathList reads one path per line (a final CR is dropped, so lists
// written on Windows work) or, with null, NUL-separated paths, which is the
// only safe form for names holding line breaks. Empty entries are skipped.
func readPathList(r io.Reader, null bool) ([]string, error) {
	sc := bufio.NewScanner(r)
	sc.Buffer(make([]byte, 64<<10), 1<<20)
	if null {
		sc.Split(func(data []byte, atEOF bool) (int, []byte, error) {
			if i := bytes.IndexByte(data, 0); i >= 0 {
				return i + 1, data[:i], nil
			}
			if atEOF && len(data) > 0 {
				return len(data), data, nil
			}
			return 0, nil, nil
		})
	}
	var out []string
	for sc.Scan() {
		p := sc.Text()
		if !null {
			p = strings.TrimSuffix(p, "\r")
		}
		if p != "" {
			out = append(out, p)
		}
	}
	return out, sc.Err()
}

// setMemoryLimit asks the Go runtime to collect garbage harder as the heap
// nears the bound (a soft limit: without it the heap may grow to twice
// what is live before a collection) and returns a function restoring the
// previous limit. The limit is the bound less a thirty-second: it covers
// the runtime's own memory only, and the program's code and other
// mappings come on top (15 MiB of resident memory measured at 10^6
// documents), as does what the heap overshoots the limit by while the
// collector catches up on a loaded machine (up to 47 MiB measured there).
func setMemoryLimit(memory int64) func() {
	if memory == 0 {
		return func() {}
	}
	old := debug.SetMemoryLimit(memory - memory/32)
	return func() { debug.SetMemoryLimit(old) }
}
