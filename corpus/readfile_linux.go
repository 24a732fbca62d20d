package corpus

import (
	"io/fs"
	"slices"
	"syscall"
)

// readFile reads at most limit+1 bytes of the file (one more than allowed,
// to notice a file that outgrew the limit), into buf when it has room for
// the size the walk saw and one byte more, else into a new buffer of that
// size.
//
// On Linux it calls open, read and close itself: os.Open also registers
// every file with the runtime's network poller (a refused epoll_ctl for a
// regular file), one system call in four for a small file, and a corpus
// is mostly small files. A file is read until read returns 0, or until a
// short read ends exactly at the size the walk saw (the end of a file that
// has not changed), so a short read elsewhere never cuts a text.
func readFile(name string, size, limit int64, buf []byte) ([]byte, error) {
	var fd int
	var err error
	for {
		fd, err = syscall.Open(name, syscall.O_RDONLY|syscall.O_CLOEXEC, 0)
		if err != syscall.EINTR {
			break
		}
	}
	if err != nil {
		return nil, &fs.PathError{Op: "open", Path: name, Err: err}
	}
	defer syscall.Close(fd)
	buf = readBuffer(buf, min(size, limit)+1)
	for int64(len(buf)) <= limit {
		if len(buf) == cap(buf) {
			buf = slices.Grow(buf, max(512, min(len(buf), 1<<20)))
		}
		want := cap(buf) - len(buf)
		n, err := syscall.Read(fd, buf[len(buf):cap(buf)])
		if err == syscall.EINTR {
			continue
		}
		if err != nil {
			return nil, &fs.PathError{Op: "read", Path: name, Err: err}
		}
		if n == 0 {
			break
		}
		buf = buf[:len(buf)+n]
		if n < want && int64(len(buf)) == size {
			// Short, and exactly the size the walk saw: the end of the
			// file, without a last read to hear it say so.
			break
		}
	}
	return buf, nil
}
