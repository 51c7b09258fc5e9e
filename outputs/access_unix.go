//go:build linux || darwin || freebsd

package outputs

import "syscall"

// canWrite asks the kernel whether this process may write path (access(2)
// with W_OK, POSIX.1-2017), for targets that are written in place.
func canWrite(path string) error { return syscall.Access(path, 0x2) }
