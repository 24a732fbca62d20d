package corpus

import (
	"syscall"
	"time"
	"unsafe"
)

// clockProcessCPUTime is CLOCK_PROCESS_CPUTIME_ID (Linux, <time.h>).
const clockProcessCPUTime = 2

// processTime returns the processor time all threads of the process have
// used (clock_gettime(CLOCK_PROCESS_CPUTIME_ID)), to the nanosecond: the
// reading goroutine's and the collector's workers' alike, so that a read
// is charged for the collection its garbage costs. Unlike the wall clock,
// it does not advance while other work on the machine has the processor.
// The second result is false when the clock cannot be read.
func processTime() (time.Duration, bool) {
	var ts syscall.Timespec
	if _, _, e := syscall.Syscall(syscall.SYS_CLOCK_GETTIME, clockProcessCPUTime, uintptr(unsafe.Pointer(&ts)), 0); e != 0 {
		return 0, false
	}
	return time.Duration(ts.Nano()), true
}

// processFaults returns the page faults (minor and major) the process has
// taken so far (getrusage(RUSAGE_SELF)), 0 when they cannot be read.
func processFaults() int64 {
	var ru syscall.Rusage
	if err := syscall.Getrusage(syscall.RUSAGE_SELF, &ru); err != nil {
		return 0
	}
	return ru.Minflt + ru.Majflt
}
