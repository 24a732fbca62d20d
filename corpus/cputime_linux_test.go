package corpus

import (
	"syscall"
	"time"
	"unsafe"
)

// clockThreadCPUTime is CLOCK_THREAD_CPUTIME_ID (Linux, <time.h>).
const clockThreadCPUTime = 3

// threadTime returns the processor time the calling thread has used
// (clock_gettime(CLOCK_THREAD_CPUTIME_ID)), to the nanosecond: unlike the
// wall clock, it does not advance while other work on the machine has the
// processor. The caller locks its goroutine to its thread. The second
// result is false when the clock cannot be read.
func threadTime() (time.Duration, bool) {
	var ts syscall.Timespec
	if _, _, e := syscall.Syscall(syscall.SYS_CLOCK_GETTIME, clockThreadCPUTime, uintptr(unsafe.Pointer(&ts)), 0); e != 0 {
		return 0, false
	}
	return time.Duration(ts.Nano()), true
}

// rusageThread is RUSAGE_THREAD (Linux, <sys/resource.h>).
const rusageThread = 1

// threadFaults returns the page faults (minor and major) the calling
// thread has taken so far, 0 when they cannot be read. The caller locks
// its goroutine to its thread.
func threadFaults() int64 {
	var ru syscall.Rusage
	if err := syscall.Getrusage(rusageThread, &ru); err != nil {
		return 0
	}
	return ru.Minflt + ru.Majflt
}
