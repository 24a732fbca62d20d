//go:build !linux

package corpus

import "time"

// threadTime: no per-thread processor clock here; the wall clock is used
// (see the Linux version).
func threadTime() (time.Duration, bool) { return 0, false }

// threadFaults: no per-thread fault count here.
func threadFaults() int64 { return 0 }
