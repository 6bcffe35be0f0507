//go:build !noprebind

package prebind

// socket: macOS has no SOCK_CLOEXEC or SOCK_NONBLOCK flags.
func socket(family int) (int, error) { return socketThenFlags(family) }
