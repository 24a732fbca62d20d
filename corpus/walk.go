package corpus

import (
	"errors"
	"io/fs"
	"os"
	"path"
	"path/filepath"
	"slices"
	"strings"
	"syscall"
)

// Reasons found while walking.
const (
	reasonMissing    = "no such file or folder"
	reasonPermission = "permission denied"
	reasonBroken     = "broken symbolic link"
	reasonLoop       = "symbolic link loop"
	reasonLinkDir    = "symbolic link to a folder: not followed"
	reasonHidden     = "hidden: name starts with a dot"
	reasonIrregular  = "not a regular file (device, pipe or socket)"
)

// An entry is one file found by the walk: either a candidate to read
// (reason == "") or an input already known to give no document.
type entry struct {
	display string // Document.Path / Skipped.Path
	osPath  string // the name to open
	abs     string // cleaned absolute path, to recognise the same file reached twice
	size    int64  // from the walk's stat
	dev     uint64
	ino     uint64
	reason  string
	seq     int    // for a candidate: how many candidates the walk found before it
	hasID   bool   // dev and ino are known
	dup     bool   // the same file under a display path that sorts earlier
	aliasOf string // for a dup reached under another absolute path (a link): the display path kept
}

// A walker collects entries from the arguments, in walk order. When found
// is set, it is called with every candidate (reason == "") the moment the
// walk appends it, so that reading can start while the walk goes on; the
// entry it is given is the walker's and is moved by later appends, so
// found must copy what it keeps.
type walker struct {
	opt        Options
	entries    []entry
	candidates int // entries with reason == "" so far: the next one's seq
	found      func(e *entry)
	stopped    func() bool // nil: never; true: the walk lists nothing more
}

// stop reports whether the walk was asked to end early.
func (w *walker) stop() bool { return w.stopped != nil && w.stopped() }

// arg adds one command-line argument: a file, a folder, or a symbolic link
// to either. A link given as an argument is followed, even to a folder:
// the user named it (links met inside a folder are not followed to
// folders).
func (w *walker) arg(p string) {
	abs, err := filepath.Abs(p)
	if err != nil { // only when the working folder is gone
		abs = filepath.Clean(p)
	}
	name := filepath.Base(abs)
	display := p
	if c := path.Clean(filepath.ToSlash(p)); c == "." || c == ".." {
		display = "" // "." and ".." are not names a glob should see
	}
	if w.skipped(name, display) {
		return
	}
	fi, err := os.Lstat(p)
	if err != nil {
		w.skip(p, abs, osReason(err))
		return
	}
	if fi.Mode()&fs.ModeSymlink != 0 {
		if fi, err = os.Stat(p); err != nil {
			w.skip(p, abs, linkReason(err))
			return
		}
	}
	switch {
	case fi.IsDir():
		w.dir(p, p, abs)
	case !w.included(name):
	case fi.Mode().IsRegular():
		w.file(p, p, abs, fi)
	default:
		w.skip(p, abs, reasonIrregular)
	}
}

// dir walks one folder, entries in lexical order (os.ReadDir sorts them).
func (w *walker) dir(osPath, display, abs string) {
	ents, err := os.ReadDir(osPath)
	if err != nil {
		w.skip(display, abs, osReason(err))
	}
	for _, e := range ents {
		if w.stop() {
			return
		}
		name := e.Name()
		op, d, ap := childNames(osPath, display, abs, name)
		if w.skipped(name, d) {
			continue
		}
		t := e.Type()
		if strings.HasPrefix(name, ".") {
			if t.IsDir() || w.included(name) {
				w.skip(d, ap, reasonHidden)
			}
			continue
		}
		if t.IsDir() {
			w.dir(op, d, ap)
			continue
		}
		if !w.included(name) {
			continue
		}
		var fi fs.FileInfo
		if t&fs.ModeSymlink != 0 {
			fi, err = os.Stat(op)
			if err != nil {
				w.skip(d, ap, linkReason(err))
				continue
			}
			if fi.IsDir() {
				w.skip(d, ap, reasonLinkDir)
				continue
			}
		} else if fi, err = e.Info(); err != nil {
			w.skip(d, ap, osReason(err)) // removed since the folder was listed
			continue
		}
		if !fi.Mode().IsRegular() {
			w.skip(d, ap, reasonIrregular)
			continue
		}
		w.file(op, d, ap, fi)
	}
}

func (w *walker) file(osPath, display, abs string, fi fs.FileInfo) {
	e := entry{display: display, osPath: osPath, abs: abs, size: fi.Size(), seq: w.candidates}
	e.dev, e.ino, e.hasID = fileIdentity(fi)
	w.candidates++
	w.entries = append(w.entries, e)
	if w.found != nil {
		w.found(&w.entries[len(w.entries)-1])
	}
}

func (w *walker) skip(display, abs, reason string) {
	w.entries = append(w.entries, entry{display: display, abs: abs, reason: reason})
}

// skipped reports whether Options.Skip matches the base name or the
// displayed path (also in its cleaned form, so "./docs/x" is "docs/x").
func (w *walker) skipped(name, display string) bool {
	if matchAny(w.opt.Skip, name) {
		return true
	}
	if display == "" {
		return false
	}
	return matchAny(w.opt.Skip, display) || matchAny(w.opt.Skip, path.Clean(display))
}

// included reports whether a file's base name passes Options.Include.
func (w *walker) included(name string) bool {
	return len(w.opt.Include) == 0 || matchAny(w.opt.Include, name)
}

func matchAny(globs []string, s string) bool {
	for _, g := range globs {
		if ok, _ := path.Match(g, s); ok { // globs were checked by withDefaults
			return true
		}
	}
	return false
}

// childNames returns the three names of the entry name of a folder: the
// name to open, the displayed name and the cleaned absolute one (see
// entry). Every file's names are kept until the reading ends (at 10^6
// files, three strings each of some 60 bytes), so they share one
// allocation where their text allows: the displayed name is often the end
// of the absolute one (a relative folder argument such as "essays/") or
// equal to it (an absolute one), and the name to open is the displayed one
// where the separator is "/" and the folder's two names are the same.
func childNames(osPath, display, abs, name string) (op, d, ap string) {
	ap = filepath.Join(abs, name)
	d = joinDisplay(display, name)
	if strings.HasSuffix(ap, d) {
		d = ap[len(ap)-len(d):]
	}
	if filepath.Separator == '/' && osPath == display {
		op = d // joinOS and joinDisplay join alike here
	} else {
		op = joinOS(osPath, name)
	}
	return op, d, ap
}

// joinOS joins a folder path as given and a name without cleaning the
// path as text (filepath.Join would): "link/../docs" must stay as it is,
// for the system resolves ".." after the symbolic link, as it did when the
// folder was listed, and as it does when the displayed name is read again.
func joinOS(dir, name string) string {
	if strings.HasSuffix(dir, string(filepath.Separator)) || strings.HasSuffix(dir, "/") {
		return dir + name
	}
	return dir + string(filepath.Separator) + name
}

// joinDisplay joins a displayed folder path and a name with "/", without
// doubling a trailing separator ("docs/" + "a.txt" is "docs/a.txt").
func joinDisplay(dir, name string) string {
	if strings.HasSuffix(dir, "/") || strings.HasSuffix(dir, string(filepath.Separator)) {
		return dir + name
	}
	return dir + "/" + name
}

// sortAndDedupe orders the entries by display path and marks as dup every
// entry that names a file already named by an earlier one: same cleaned
// absolute path, or (for files to read) same device and inode. Sorting
// first makes the kept name the first in sort order, whatever the order of
// the arguments.
func (w *walker) sortAndDedupe() {
	es := w.entries
	slices.SortStableFunc(es, func(a, b entry) int { return strings.Compare(a.display, b.display) })
	idx := make([]int, len(es))
	for i := range idx {
		idx[i] = i
	}
	// Same absolute path; candidates and skipped entries are kept apart
	// (a name is either one or the other).
	slices.SortStableFunc(idx, func(a, b int) int {
		if c := compareBool(es[a].reason == "", es[b].reason == ""); c != 0 {
			return c
		}
		return strings.Compare(es[a].abs, es[b].abs)
	})
	for k := 1; k < len(idx); k++ {
		p, c := &es[idx[k-1]], &es[idx[k]]
		if (p.reason == "") == (c.reason == "") && p.abs == c.abs {
			c.dup = true
		}
	}
	// Same device and inode, among the candidates still kept.
	idx = idx[:0]
	for i := range es {
		if es[i].reason == "" && es[i].hasID && !es[i].dup {
			idx = append(idx, i)
		}
	}
	slices.SortStableFunc(idx, func(a, b int) int {
		if es[a].dev != es[b].dev {
			return compareUint(es[a].dev, es[b].dev)
		}
		return compareUint(es[a].ino, es[b].ino)
	})
	for k, first := 1, 0; k < len(idx); k++ {
		p, c := &es[idx[first]], &es[idx[k]]
		if p.dev == c.dev && p.ino == c.ino {
			c.dup, c.aliasOf = true, p.display
			continue
		}
		first = k
	}
}

func compareBool(a, b bool) int {
	switch {
	case a == b:
		return 0
	case a:
		return 1
	}
	return -1
}

func compareUint(a, b uint64) int {
	switch {
	case a < b:
		return -1
	case a > b:
		return 1
	}
	return 0
}

// osReason turns a file system error into a Skipped reason.
func osReason(err error) string {
	switch {
	case errors.Is(err, fs.ErrNotExist):
		return reasonMissing
	case errors.Is(err, fs.ErrPermission):
		return reasonPermission
	case errors.Is(err, syscall.ELOOP):
		return reasonLoop
	}
	var pe *fs.PathError
	if errors.As(err, &pe) {
		err = pe.Err
	}
	return "cannot read: " + err.Error()
}

// linkReason is osReason for a symbolic link whose target could not be
// reached.
func linkReason(err error) string {
	if errors.Is(err, fs.ErrNotExist) {
		return reasonBroken
	}
	return osReason(err)
}
