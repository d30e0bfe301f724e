//go:build !unix

package catalog

import "os"

// canWrite reports whether path looks writable from its permission bits;
// without access(2) that is the best a read-only check can do.
var canWrite = func(path string) bool {
	fi, err := os.Stat(path)
	return err == nil && fi.Mode().Perm()&0o200 != 0
}
