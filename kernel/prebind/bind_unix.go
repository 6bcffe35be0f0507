//go:build (linux || darwin) && !noprebind

package prebind

import (
	"os"
	"syscall"
)

// bind creates a listening socket as net.Listen would (SO_REUSEADDR, close on
// exec, non-blocking) and returns it with the network and address the kernel
// will ask for.
func bind(transport, ip string, port int) (network, addr string, f *os.File) {
	var sa syscall.Sockaddr
	family := syscall.AF_INET
	switch transport {
	case "", "tcp":
		a, ok := parseIPv4(ip)
		if !ok {
			return "", "", nil // IPv6 and host names: the kernel binds them itself
		}
		network, addr = "tcp", ip+":"+itoa(port)
		sa = &syscall.SockaddrInet4{Port: port, Addr: a}
	case "ipc":
		family = syscall.AF_UNIX
		network, addr = "unix", ip+"-"+itoa(port)
		sa = &syscall.SockaddrUnix{Name: addr}
	default:
		return "", "", nil
	}
	fd, err := socket(family)
	if err != nil {
		return "", "", nil
	}
	if family != syscall.AF_UNIX {
		err = syscall.SetsockoptInt(fd, syscall.SOL_SOCKET, syscall.SO_REUSEADDR, 1)
	}
	if err == nil {
		err = syscall.Bind(fd, sa)
	}
	if err == nil {
		err = syscall.Listen(fd, 4096) // the system caps it (somaxconn)
	}
	if err != nil {
		syscall.Close(fd)
		return "", "", nil
	}
	return network, addr, os.NewFile(uintptr(fd), addr)
}
