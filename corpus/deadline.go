package corpus

import (
	"fmt"
	"time"
)

// A deadline bounds the time one file's extraction may take
// (Options.FileTimeout). The extractors' loops ask it, cooperatively, at
// every step of their work (a line, a token, a group, a member, a part),
// and stop with errTimedOut when it has passed; the file is then skipped
// with that reason, and whatever the extraction had built is dropped with
// it, so a hostile file costs at most the memory it could build in that
// time, and no goroutine is left running.
//
// The alternative, running each extraction in a goroutine and abandoning
// it at the deadline, was rejected: the abandoned goroutine would go on
// using a core and its memory until it ended by itself, which for a
// superlinear path could be never in practice; and nothing of the kind
// is needed once every step asks the clock.
//
// Reading the clock costs about 20 ns, more than some steps (an RTF
// control word, a Markdown line), so passed reads it only on its first
// call and then once every deadlineEvery calls; check reads it every time,
// for the places that ask once per file or member. A nil deadline never
// passes (tests and fuzz targets that build an input by hand).
type deadline struct {
	at      time.Time
	timeout time.Duration // for the reason
	calls   uint32
	over    bool
}

// deadlineEvery is how many calls of passed share one reading of the
// clock: a power of two, so that the test is a mask.
const deadlineEvery = 256

// newDeadline starts the clock of one file.
func newDeadline(timeout time.Duration) *deadline {
	return &deadline{at: time.Now().Add(timeout), timeout: timeout}
}

// passed reports whether the deadline has passed, reading the clock on
// the first call and every deadlineEvery calls after it.
func (d *deadline) passed() bool {
	if d == nil {
		return false
	}
	if d.over {
		return true
	}
	d.calls++
	if d.calls%deadlineEvery != 1 {
		return false
	}
	return d.check()
}

// check reports whether the deadline has passed, reading the clock.
func (d *deadline) check() bool {
	if d == nil {
		return false
	}
	if !d.over && !time.Now().Before(d.at) {
		d.over = true
	}
	return d.over
}

// err is the refusal of a file whose extraction ran past the deadline.
func (d *deadline) err() error {
	return refuse(timedOutReason(d.timeout))
}

// timedOutReason is the Skipped reason of a file that ran past the
// deadline.
func timedOutReason(timeout time.Duration) string {
	return fmt.Sprintf("not read: extraction ran past the %v limit for one file (--file-timeout)", timeout)
}
