//go:build !noprebind

package prebind

import "syscall"

// socket opens a stream socket that is close-on-exec and non-blocking from
// the start.
func socket(family int) (int, error) {
	return syscall.Socket(family, syscall.SOCK_STREAM|syscall.SOCK_CLOEXEC|syscall.SOCK_NONBLOCK, 0)
}
