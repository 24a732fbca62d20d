package archive

import (
	"bytes"
	"encoding/binary"
	"encoding/json"
	"errors"
	"fmt"
	"io"
	"os"
	"path/filepath"
	"strings"

	"github.com/cockroachdb/pebble/v2"
	"github.com/cockroachdb/pebble/v2/vfs"

	"reprise/shingle"
)

// FormatVersion is the version of the archive's key layout and encodings.
// Format 1 stored units 20 bytes each, fixed width; format 2 stores them in
// shingle's unit encoding (shingle.AppendUnits), with their word positions.
// Open refuses any other format (a *FormatError).
const FormatVersion = 2

// A FormatError means the archive was written in another format than this
// program reads. Nothing is converted: the message says what to do.
type FormatError struct {
	Location string // the archive's folder
	Found    int    // the archive's format
	Want     int    // FormatVersion
}

func (e *FormatError) Error() string {
	if e.Found > e.Want {
		return fmt.Sprintf("archive %s is in format %d, written by a newer reprise; this reprise reads format %d only. "+
			"Use the newer reprise with this archive.", e.Location, e.Found, e.Want)
	}
	return fmt.Sprintf("archive %s is in format %d, written by an older reprise; this reprise reads format %d only. "+
		"Build a new archive from the original files with 'reprise archive --archive NEW-FOLDER add PATH...', "+
		"then delete %s (the older reprise can still read it, and remove documents from it).", e.Location, e.Found, e.Want, e.Location)
}

// ErrNotArchive means the folder holds no archive (and Options.Create was not set).
var ErrNotArchive = errors.New("not an archive")

// Settings are the rules units were cut by; an archive only compares units
// cut by the same ones.
type Settings struct {
	Format       int    `json:"format"`
	Unit         string `json:"unit"`
	MinWords     int    `json:"min_words"`
	MaxUnitBytes int    `json:"max_unit_bytes"`
	// Probe is the fingerprint of probeText's units under these settings,
	// in hexadecimal: it changes when the normalization changes.
	Probe string `json:"probe"`
}

// probeText exercises the normalization: case, quote styles, punctuation,
// hyphenation across a line break, white space, NFKC compatibility forms.
const probeText = "The “Harbour” committee met on Tuesday, and it voted to re-\nopen the ﬁsh market at dawn. " +
	"SEVEN   members said: 'yes, we agree with the plan today'! Why would anyone object to it now?"

// SettingsFor returns the settings that opt gives (defaults applied), with
// the probe fingerprint computed by this program's shingle package.
func SettingsFor(opt shingle.Options) Settings {
	sp := shingle.New(opt)
	eff := sp.Options()
	units, _ := sp.Sentences(probeText, nil)
	var h uint64 = 1469598103934665603
	for _, u := range units {
		h = (h ^ u.Hash) * 1099511628211
		h = (h ^ uint64(u.Start)<<32 ^ uint64(u.End)) * 1099511628211
	}
	return Settings{
		Format: FormatVersion, Unit: "sentence", MinWords: eff.MinWords, MaxUnitBytes: eff.MaxUnitBytes,
		Probe: fmt.Sprintf("%016x", h),
	}
}

// A SettingError says which setting differs between the archive and a request.
type SettingError struct {
	Setting  string // "unit", "--min-words", "maximum sentence bytes" or "sentence normalization (probe fingerprint)"
	Archive  string // the archive's value
	Asked    string // the requested value
	Explain  string // what to do
	Location string
}

func (e *SettingError) Error() string {
	return fmt.Sprintf("archive %s was built with %s %s, but this run uses %s %s: units would differ. %s",
		e.Location, e.Setting, e.Archive, e.Setting, e.Asked, e.Explain)
}

// compare returns a *SettingError for the first setting of want that
// differs from s. The format is not a setting: Open checks it first, for
// every caller (see FormatError).
func (s Settings) compare(want Settings, dir string) error {
	switch {
	case s.Unit != want.Unit:
		return &SettingError{"unit", s.Unit, want.Unit, "Use the archive's unit, or build a new archive.", dir}
	case s.MinWords != want.MinWords:
		return &SettingError{"--min-words", fmt.Sprint(s.MinWords), fmt.Sprint(want.MinWords),
			fmt.Sprintf("Use --min-words %d, or build a new archive.", s.MinWords), dir}
	case s.MaxUnitBytes != want.MaxUnitBytes:
		return &SettingError{"maximum sentence bytes", fmt.Sprint(s.MaxUnitBytes), fmt.Sprint(want.MaxUnitBytes),
			"Build a new archive with this version of reprise.", dir}
	case s.Probe != want.Probe:
		return &SettingError{"sentence normalization (probe fingerprint)", s.Probe, want.Probe,
			"This reprise normalizes sentences differently from the one that built the archive; build a new archive.", dir}
	}
	return nil
}

// Options control Open.
type Options struct {
	// Settings the caller cuts units by; Open refuses an archive built with
	// other ones (a *SettingError) and records them in a new archive. The
	// zero Settings means the caller cuts no units (it lists, counts or
	// removes documents): Open then compares nothing, and cannot create an
	// archive.
	Settings Settings
	// Create makes a new archive when dir holds none (the folder is created 0700).
	Create bool
	// ReadOnly opens without writing; the folder is still locked.
	ReadOnly bool
}

// Archive is an open archive. It is not safe for concurrent use; pebble's
// lock keeps other processes out while it is open.
type Archive struct {
	db       *pebble.DB
	dir      string
	settings Settings
	readOnly bool
	scratch  []byte
	flate    textCompressor
	opts     *pebble.Options // as opened, defaults filled in: AddAll writes tables with them
	fs       vfs.FS
	// chunkDocs, when set, replaces AddAll's documents per chunk (tests).
	chunkDocs int
}

// Open opens (or with opt.Create, creates) the archive in dir.
func Open(dir string, opt Options) (*Archive, error) {
	if dir == "" {
		return nil, errors.New("archive: no folder given")
	}
	if opt.Create && opt.Settings == (Settings{}) {
		return nil, errors.New("archive: a new archive needs the settings its units are cut by")
	}
	fi, err := os.Stat(dir)
	switch {
	case err == nil && !fi.IsDir():
		return nil, fmt.Errorf("archive: %s is not a folder", dir)
	case errors.Is(err, os.ErrNotExist):
		if !opt.Create {
			return nil, fmt.Errorf("archive: %s does not exist: %w", dir, ErrNotArchive)
		}
		if err := os.MkdirAll(dir, 0o700); err != nil {
			return nil, fmt.Errorf("archive: %w", err)
		}
		if err := os.Chmod(dir, 0o700); err != nil {
			return nil, fmt.Errorf("archive: %w", err)
		}
	case err != nil:
		return nil, fmt.Errorf("archive: %w", err)
	}
	exists, err := isStore(dir)
	if err != nil {
		return nil, fmt.Errorf("archive: %w", err)
	}
	if !exists {
		if !opt.Create || opt.ReadOnly {
			return nil, fmt.Errorf("archive: %s holds no archive (run 'reprise archive add' first): %w", dir, ErrNotArchive)
		}
		entries, err := os.ReadDir(dir)
		if err != nil {
			return nil, fmt.Errorf("archive: %w", err)
		}
		if len(entries) > 0 {
			return nil, fmt.Errorf("archive: %s is not empty and holds no archive; give an empty or new folder", dir)
		}
	}
	po := &pebble.Options{
		FS:       privateFS{vfs.Default},
		Merger:   postingsMerger,
		ReadOnly: opt.ReadOnly,
		Logger:   quietLogger{},
	}
	// L0 is compacted at pebble's default depth (4 tables). Each chunk of
	// AddAll ingests tables of h/, n/ and p/ keys over the whole key range,
	// which land in L0; at a depth of 24 an add of 10^5 documents did 5
	// compactions instead of 33 (about 3 s of CPU less), but a check then
	// read through up to 24 more tables and took half again as much CPU
	// (BENCHMARKS.md), so the default stays.
	po.EnsureDefaults()
	if !opt.ReadOnly {
		// What a killed AddAll left before its ingestion: never part of the archive.
		if err := os.RemoveAll(filepath.Join(dir, ingestDir)); err != nil {
			return nil, fmt.Errorf("archive: %w", err)
		}
	}
	db, err := pebble.Open(dir, po)
	if err != nil {
		var le *lockError
		if errors.As(err, &le) {
			return nil, le
		}
		return nil, fmt.Errorf("archive: open %s: %w", dir, err)
	}
	a := &Archive{db: db, dir: dir, readOnly: opt.ReadOnly, opts: po, fs: vfs.Default}
	raw, err := a.get(keySettings)
	switch {
	case err == nil:
		if err := json.Unmarshal(raw, &a.settings); err != nil {
			db.Close()
			return nil, fmt.Errorf("archive: %s: settings record: %w", dir, err)
		}
		if a.settings.Format != FormatVersion {
			db.Close()
			return nil, &FormatError{Location: dir, Found: a.settings.Format, Want: FormatVersion}
		}
		if opt.Settings != (Settings{}) {
			if err := a.settings.compare(opt.Settings, dir); err != nil {
				db.Close()
				return nil, err
			}
		}
	case errors.Is(err, pebble.ErrNotFound) && !opt.ReadOnly && opt.Settings != (Settings{}):
		a.settings = opt.Settings
		val, _ := json.Marshal(a.settings)
		if err := db.Set(keySettings, val, pebble.Sync); err != nil {
			db.Close()
			return nil, fmt.Errorf("archive: %s: %w", dir, err)
		}
	default:
		db.Close()
		return nil, fmt.Errorf("archive: %s: no settings record: %w", dir, ErrNotArchive)
	}
	if err := a.privatize(); err != nil {
		db.Close()
		return nil, err
	}
	return a, nil
}

// Settings returns the settings the archive was built with.
func (a *Archive) Settings() Settings { return a.settings }

// Dir returns the archive's folder.
func (a *Archive) Dir() string { return a.dir }

// Close syncs and closes the store, releasing the lock. A writer first
// flushes the memtable into a table file: a read-only open (every check)
// would otherwise replay the write-ahead log's tail into a new memtable,
// and that tail is as long as the last add left it (up to the memtable's
// size: 5 ms of a 30 ms check measured on 20,000 documents, BENCHMARKS.md).
func (a *Archive) Close() error {
	var err error
	if !a.readOnly {
		if err = a.db.Flush(); err != nil {
			err = fmt.Errorf("archive: flush: %w", err)
		} else {
			err = a.Sync()
		}
	}
	if cerr := a.db.Close(); err == nil && cerr != nil {
		err = fmt.Errorf("archive: close: %w", cerr)
	}
	if perr := a.privatize(); err == nil {
		err = perr
	}
	return err
}

// Sync makes every document added so far durable.
func (a *Archive) Sync() error {
	if err := a.db.LogData(nil, pebble.Sync); err != nil {
		return fmt.Errorf("archive: sync: %w", err)
	}
	return nil
}

// privatize sets 0600 on every file and 0700 on the folder: a second line
// of defence behind privateFS, for files pebble might create another way.
func (a *Archive) privatize() error {
	if a.readOnly {
		return nil
	}
	if err := os.Chmod(a.dir, 0o700); err != nil {
		return fmt.Errorf("archive: %w", err)
	}
	entries, err := os.ReadDir(a.dir)
	if err != nil {
		return fmt.Errorf("archive: %w", err)
	}
	for _, e := range entries {
		mode := os.FileMode(0o600)
		if e.IsDir() {
			mode = 0o700
		}
		if err := os.Chmod(filepath.Join(a.dir, e.Name()), mode); err != nil && !errors.Is(err, os.ErrNotExist) {
			return fmt.Errorf("archive: %w", err)
		}
	}
	return nil
}

func (a *Archive) get(key []byte) ([]byte, error) {
	v, closer, err := a.db.Get(key)
	if err != nil {
		return nil, err
	}
	out := bytes.Clone(v)
	closer.Close()
	return out, nil
}

// Keys.
var (
	keySettings = []byte("m/settings")
	keyNext     = []byte("m/next")
	keyCount    = []byte("m/count")
)

func idKey(prefix byte, id uint64) []byte {
	k := make([]byte, 2, 10)
	k[0], k[1] = prefix, '/'
	return binary.BigEndian.AppendUint64(k, id)
}

func hashKey(prefix byte, h [32]byte) []byte {
	k := make([]byte, 2, 34)
	k[0], k[1] = prefix, '/'
	return append(k, h[:]...)
}

func postingKey(dst []byte, fp uint64) []byte {
	dst = append(dst[:0], 'p', '/')
	return binary.BigEndian.AppendUint64(dst, fp)
}

// prefixEnd is the first key after every key starting with prefix.
func prefixEnd(prefix []byte) []byte {
	end := bytes.Clone(prefix)
	end[len(end)-1]++
	return end
}

// postingsMerger concatenates uvarint-encoded IDs: an add appends without
// reading. Operand order does not matter to readers, which sort.
var postingsMerger = &pebble.Merger{
	Name: "reprise.postings.v1",
	Merge: func(key, value []byte) (pebble.ValueMerger, error) {
		return &concatMerger{buf: bytes.Clone(value)}, nil
	},
}

type concatMerger struct{ buf []byte }

func (m *concatMerger) MergeNewer(v []byte) error { m.buf = append(m.buf, v...); return nil }
func (m *concatMerger) MergeOlder(v []byte) error {
	m.buf = append(bytes.Clone(v), m.buf...)
	return nil
}
func (m *concatMerger) Finish(bool) ([]byte, io.Closer, error) { return m.buf, nil, nil }

// quietLogger drops pebble's informational messages (they would interleave
// with the command's output) and keeps its errors.
type quietLogger struct{}

func (quietLogger) Infof(string, ...any) {}
func (quietLogger) Errorf(format string, args ...any) {
	pebble.DefaultLogger.Errorf(format, args...)
}
func (quietLogger) Fatalf(format string, args ...any) {
	pebble.DefaultLogger.Fatalf(format, args...)
}

// lockError names the lock file another process holds.
type lockError struct {
	path string
	err  error
}

func (e *lockError) Error() string {
	return fmt.Sprintf("archive: %s is locked by another process (lock file %s); one process at a time may open an archive: %v",
		filepath.Dir(e.path), e.path, e.err)
}

func (e *lockError) Unwrap() error { return e.err }

// privateFS is the default file system, but files are made 0600 and
// folders 0700 whatever the umask, lock failures name the lock file, and
// old write-ahead logs are never reused (a reused log would keep the bytes
// of removed documents until overwritten).
type privateFS struct{ vfs.FS }

func (p privateFS) Create(name string, c vfs.DiskWriteCategory) (vfs.File, error) {
	f, err := p.FS.Create(name, c)
	if err == nil {
		err = os.Chmod(name, 0o600)
		if err != nil {
			f.Close()
			return nil, err
		}
	}
	return f, err
}

func (p privateFS) OpenReadWrite(name string, c vfs.DiskWriteCategory, opts ...vfs.OpenOption) (vfs.File, error) {
	f, err := p.FS.OpenReadWrite(name, c, opts...)
	if err == nil {
		if err = os.Chmod(name, 0o600); err != nil {
			f.Close()
			return nil, err
		}
	}
	return f, err
}

func (p privateFS) ReuseForWrite(oldname, newname string, c vfs.DiskWriteCategory) (vfs.File, error) {
	if err := p.FS.Remove(oldname); err != nil && !errors.Is(err, os.ErrNotExist) {
		return nil, err
	}
	return p.Create(newname, c)
}

func (p privateFS) MkdirAll(dir string, _ os.FileMode) error {
	if err := p.FS.MkdirAll(dir, 0o700); err != nil {
		return err
	}
	return os.Chmod(dir, 0o700)
}

func (p privateFS) Lock(name string) (io.Closer, error) {
	c, err := p.FS.Lock(name)
	if err != nil {
		return nil, &lockError{path: name, err: err}
	}
	if err := os.Chmod(name, 0o600); err != nil {
		c.Close()
		return nil, err
	}
	return c, nil
}

// isStore reports whether dir holds a pebble store (its manifest marker,
// or the CURRENT file of older formats).
func isStore(dir string) (bool, error) {
	entries, err := os.ReadDir(dir)
	if err != nil {
		return false, err
	}
	for _, e := range entries {
		if e.Name() == "CURRENT" || strings.HasPrefix(e.Name(), "marker.manifest.") {
			return true, nil
		}
	}
	return false, nil
}
