//go:build !(linux || darwin) || noprebind

package prebind

import "os"

// bind binds nothing on this system (or in a binary built with the tag
// noprebind): the kernel binds every port itself once main runs. The cost is
// start-up time only: a client that connects before then is refused and its
// ZeroMQ library tries again after its reconnect interval (100 ms).
func bind(transport, ip string, port int) (network, addr string, f *os.File) {
	return "", "", nil
}
