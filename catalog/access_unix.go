//go:build unix

package catalog

import "syscall"

// canWrite reports whether this process may write path (a file or a
// directory), as the kernel judges it for the real user (access(2)).
var canWrite = func(path string) bool { return syscall.Access(path, 2 /* W_OK */) == nil }
