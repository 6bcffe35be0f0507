//go:build (linux || darwin) && !noprebind

package prebind

import "syscall"

// socketThenFlags opens a stream socket, then makes it close-on-exec and
// non-blocking, holding syscall.ForkLock as package net does so that no
// process started meanwhile inherits it. macOS needs this; Linux sets the
// flags in the socket call itself (socket_linux.go), and its tests run this
// one too.
func socketThenFlags(family int) (int, error) {
	syscall.ForkLock.RLock()
	fd, err := syscall.Socket(family, syscall.SOCK_STREAM, 0)
	if err == nil {
		syscall.CloseOnExec(fd)
	}
	syscall.ForkLock.RUnlock()
	if err != nil {
		return -1, err
	}
	if err := syscall.SetNonblock(fd, true); err != nil {
		syscall.Close(fd)
		return -1, err
	}
	return fd, nil
}
