package main

import (
	"bufio"
	"bytes"
	"fmt"
	"io"
	"os"
	"os/signal"
	"runtime/debug"
	"strings"
	"sync"
	"syscall"

	"github.com/spf13/pflag"

	"reprise/corpus"
)

// defaultMemory is --memory's default: a laptop with 8 GiB keeps most of
// its memory for everything else, and 10^5 documents of a few pages each
// (about 150 MB of text) fit without spilling the counting.
const defaultMemory = "1GiB"

// minEngineBudget is the least the pair engine is given when the
// documents alone take the whole --memory: it then spills at once.
const minEngineBudget = 1 << 20

// Bytes the pipeline holds per document and per distinct unit while the
// engine counts (see BENCHMARKS.md, "What the budget covers"): a distinct
// unit is one 8-byte fingerprint in the engine's input; a document's fixed
// cost is its corpus.Document (144 bytes), its digest (80 bytes), slice
// headers and allocation rounding; its path and notes are counted by
// their length.
const (
	heldPerUnit     = 8
	heldPerDocument = 256
)

// scaleFlags are the flags that bound memory and feed large inputs.
type scaleFlags struct {
	memory    string
	temp      string
	filesFrom string
	null      bool
}

func (s *scaleFlags) register(fs *pflag.FlagSet) {
	fs.StringVar(&s.memory, "memory", defaultMemory, "bound what the whole run holds to `SIZE` (512MiB, 2GiB; 0 for no bound): the counting\nspills sorted runs to --temp when it does not fit; the result is the same at every size")
	fs.StringVar(&s.temp, "temp", "", "`DIR` for temporary files (default: the system temporary folder, "+os.TempDir()+");\nthey are removed on exit and on Ctrl-C")
	fs.StringVar(&s.filesFrom, "files-from", "", "read more PATHs from `FILE`, one per line ('-' for standard input)")
	fs.BoolVarP(&s.null, "null", "0", false, "--files-from: paths are separated by NUL bytes, not lines (find -print0)")
}

// apply checks --memory and records it and --temp in cfg.
func (s *scaleFlags) apply(cfg *scanConfig) error {
	n, err := s.memoryBytes()
	if err != nil {
		return err
	}
	cfg.Memory, cfg.Temp = n, s.temp
	return nil
}

// useTempDir points every stage that writes temporary files at the
// guard's private folder: the engine's spilled runs and the corpus's copies
// of PDFs inside ZIPs, so that both are removed on exit and on Ctrl-C.
func useTempDir(cfg *scanConfig, g *tempGuard) {
	cfg.Pairs.TempDir = g.dir
	cfg.Corpus.TempDir = g.dir
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

// heldBytes estimates what the pipeline holds for the documents while the
// engine counts: each one's corpus.Document and digest, its path and
// notes, and its fingerprints (the texts are not held).
func heldBytes(docs []corpus.Document, digests []docDigest) int64 {
	var n int64
	for i := range docs {
		n += heldPerDocument + int64(len(docs[i].Path))
		for _, note := range digests[i].notes {
			n += int64(len(note)) + 16
		}
		n += heldPerUnit * int64(cap(digests[i].set))
	}
	return n
}

// engineBudget is what the pair engine may hold: the --memory bound less
// what the pipeline already holds, at least minEngineBudget; 0 stays 0 (no
// bound).
func engineBudget(memory, held int64) int64 {
	if memory == 0 {
		return 0
	}
	return max(memory-held, minEngineBudget)
}

// setMemoryLimit asks the Go runtime to collect garbage harder as the heap
// nears the bound (a soft limit: without it the heap may grow to twice
// what is live before a collection) and returns a function restoring the
// previous limit.
func setMemoryLimit(memory int64) func() {
	if memory == 0 {
		return func() {}
	}
	old := debug.SetMemoryLimit(memory)
	return func() { debug.SetMemoryLimit(old) }
}

// tempGuard owns the run's temporary folder: it removes it when the run
// ends and, on Ctrl-C or SIGTERM, removes it and the files registered with
// removeOnInterrupt, and exits with status 130 (deferred clean-ups do not
// run then).
type tempGuard struct {
	dir  string
	once sync.Once
	sigs chan os.Signal
	done chan struct{}
	exit func(code int) // os.Exit, replaced in tests
	msg  io.Writer
}

// newTempGuard makes a private folder under parent ("" for the system
// temporary folder) and starts watching for interrupts.
func newTempGuard(parent string, stderr io.Writer, exit func(int)) (*tempGuard, error) {
	if parent != "" {
		if fi, err := os.Stat(parent); err != nil {
			return nil, fmt.Errorf("--temp: %w", err)
		} else if !fi.IsDir() {
			return nil, fmt.Errorf("--temp %s: not a folder", parent)
		}
	}
	dir, err := os.MkdirTemp(parent, "reprise-")
	if err != nil {
		return nil, fmt.Errorf("--temp: %w", err)
	}
	g := &tempGuard{dir: dir, sigs: make(chan os.Signal, 1), done: make(chan struct{}), exit: exit, msg: stderr}
	signal.Notify(g.sigs, os.Interrupt, syscall.SIGTERM)
	go g.watch()
	return g, nil
}

func (g *tempGuard) watch() {
	select {
	case <-g.sigs:
		g.remove()
		removeRegistered()
		fmt.Fprintln(g.msg, "reprise: interrupted; temporary files removed")
		g.exit(130)
	case <-g.done:
	}
}

func (g *tempGuard) remove() { g.once.Do(func() { os.RemoveAll(g.dir) }) }

// Close stops watching and removes the folder.
func (g *tempGuard) Close() {
	signal.Stop(g.sigs)
	close(g.done)
	g.remove()
}

// interruptFiles are files outside the run's folder (the temporary file
// beside -o) that an interrupt removes too. It is package state on
// purpose: signals are delivered to the whole process, and only main
// handles them.
var interruptFiles struct {
	sync.Mutex
	names map[string]bool
}

// removeOnInterrupt registers name for removal on Ctrl-C or SIGTERM while
// a tempGuard watches; the returned function unregisters it.
func removeOnInterrupt(name string) (unregister func()) {
	interruptFiles.Lock()
	defer interruptFiles.Unlock()
	if interruptFiles.names == nil {
		interruptFiles.names = map[string]bool{}
	}
	interruptFiles.names[name] = true
	return func() {
		interruptFiles.Lock()
		defer interruptFiles.Unlock()
		delete(interruptFiles.names, name)
	}
}

// removeRegistered removes the files registered with removeOnInterrupt.
func removeRegistered() {
	interruptFiles.Lock()
	defer interruptFiles.Unlock()
	for name := range interruptFiles.names {
		os.Remove(name)
		delete(interruptFiles.names, name)
	}
}
