//go:build !linux

package corpus

import (
	"io"
	"os"
	"slices"
)

// readFile reads at most limit+1 bytes of the file (one more than allowed,
// to notice a file that outgrew the limit), into buf when it has room for
// the size the walk saw and one byte more, else into a new buffer of that
// size.
func readFile(name string, size, limit int64, buf []byte) ([]byte, error) {
	f, err := os.Open(name)
	if err != nil {
		return nil, err
	}
	defer f.Close()
	buf = readBuffer(buf, min(size, limit)+1)
	for int64(len(buf)) <= limit {
		if len(buf) == cap(buf) {
			buf = slices.Grow(buf, max(512, min(len(buf), 1<<20)))
		}
		n, err := f.Read(buf[len(buf):cap(buf)])
		buf = buf[:len(buf)+n]
		if err == io.EOF {
			break
		}
		if err != nil {
			return nil, err
		}
	}
	return buf, nil
}
