//go:build !unix

package corpus

import "io/fs"

// fileIdentity is not available here: duplicates are then recognised by
// their cleaned absolute path only.
func fileIdentity(fs.FileInfo) (dev, ino uint64, ok bool) { return 0, 0, false }
