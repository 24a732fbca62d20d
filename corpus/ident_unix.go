//go:build unix

package corpus

import (
	"io/fs"
	"syscall"
)

// fileIdentity returns the device and inode numbers of a file, which name
// it however it was reached (hard links, symbolic links, bind mounts).
func fileIdentity(fi fs.FileInfo) (dev, ino uint64, ok bool) {
	st, ok := fi.Sys().(*syscall.Stat_t)
	if !ok {
		return 0, 0, false
	}
	return uint64(st.Dev), uint64(st.Ino), true //nolint:unconvert // types differ between systems
}
