//go:build !linux

package corpus

import "time"

// processTime: no processor clock here; the wall clock is used (see the
// Linux version).
func processTime() (time.Duration, bool) { return 0, false }

// processFaults: no fault count here.
func processFaults() int64 { return 0 }
