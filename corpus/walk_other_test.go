//go:build !unix

package corpus

import "errors"

// makeFifo: named pipes are a Unix thing.
func makeFifo(string) error { return errors.ErrUnsupported }
