//go:build (linux || darwin) && !noprebind

package prebind

import (
	"fmt"
	"net"
	"path/filepath"
	"syscall"
	"testing"
)

func TestBindAllTCP(t *testing.T) {
	ports := freePorts(t, 5)
	// One port is taken by someone else: it is skipped, the others are bound.
	busy, err := net.Listen("tcp", fmt.Sprintf("127.0.0.1:%d", ports[2]))
	if err != nil {
		t.Skip("port reused meanwhile:", err)
	}
	defer busy.Close()
	bindAll([]string{"nutate", "kernel", "--connection-file", writeConn(t, "tcp", "127.0.0.1", ports)})
	defer Release()
	for i, p := range ports {
		addr := fmt.Sprintf("127.0.0.1:%d", p)
		f := Take("tcp", addr)
		if i == 2 {
			if f != nil {
				t.Errorf("port %d was taken by another listener but prebind claims it", p)
				f.Close()
			}
			continue
		}
		if f == nil {
			t.Fatalf("%s not bound", addr)
		}
		if Take("tcp", addr) != nil {
			t.Errorf("%s handed out twice", addr)
		}
		ln, err := net.FileListener(f)
		f.Close()
		if err != nil {
			t.Fatal(err)
		}
		c, err := net.Dial("tcp", addr)
		if err != nil {
			t.Fatalf("dial %s: %v", addr, err)
		}
		s, err := ln.Accept()
		if err != nil {
			t.Fatal(err)
		}
		c.Write([]byte("x"))
		b := make([]byte, 1)
		if _, err := s.Read(b); err != nil || b[0] != 'x' {
			t.Errorf("read %q %v", b, err)
		}
		c.Close()
		s.Close()
		ln.Close()
	}
}

func TestReleaseFreesPorts(t *testing.T) {
	ports := freePorts(t, 5)
	bindAll([]string{"nutate", "kernel", writeConn(t, "tcp", "127.0.0.1", ports)})
	Release()
	for _, p := range ports {
		addr := fmt.Sprintf("127.0.0.1:%d", p)
		if Take("tcp", addr) != nil {
			t.Errorf("%s still held after Release", addr)
		}
		l, err := net.Listen("tcp", addr)
		if err != nil {
			t.Fatalf("after Release, %s cannot be bound: %v", addr, err)
		}
		l.Close()
	}
}

// Released unix sockets leave no file behind, so the kernel can bind the
// same paths itself.
func TestReleaseRemovesUnixFiles(t *testing.T) {
	base := filepath.Join(t.TempDir(), "kernel-ipc")
	bindAll([]string{"nutate", "kernel", writeConn(t, "ipc", base, []int{1, 2, 3, 4, 5})})
	Release()
	for p := 1; p <= 5; p++ {
		path := fmt.Sprintf("%s-%d", base, p)
		l, err := net.Listen("unix", path)
		if err != nil {
			t.Fatalf("after Release, %s cannot be bound: %v", path, err)
		}
		l.Close()
	}
}

func TestBindAllIPC(t *testing.T) {
	base := filepath.Join(t.TempDir(), "kernel-ipc")
	bindAll([]string{"nutate", "kernel", writeConn(t, "ipc", base, []int{1, 2, 3, 4, 5})})
	defer Release()
	for p := 1; p <= 5; p++ {
		path := fmt.Sprintf("%s-%d", base, p)
		f := Take("unix", path)
		if f == nil {
			t.Fatalf("%s not bound", path)
		}
		ln, err := net.FileListener(f)
		f.Close()
		if err != nil {
			t.Fatal(err)
		}
		c, err := net.Dial("unix", path)
		if err != nil {
			t.Fatalf("dial %s: %v", path, err)
		}
		c.Close()
		ln.Close()
	}
}

// Both ways of opening a socket (flags in the call on Linux, set afterwards
// on macOS) give one that is close-on-exec and non-blocking, as net.Listen's.
func TestSocketFlags(t *testing.T) {
	for name, open := range map[string]func(int) (int, error){"socket": socket, "socketThenFlags": socketThenFlags} {
		for _, family := range []int{syscall.AF_INET, syscall.AF_UNIX} {
			fd, err := open(family)
			if err != nil {
				t.Fatalf("%s(%d): %v", name, family, err)
			}
			fdFlags, _, e1 := syscall.Syscall(syscall.SYS_FCNTL, uintptr(fd), syscall.F_GETFD, 0)
			flFlags, _, e2 := syscall.Syscall(syscall.SYS_FCNTL, uintptr(fd), syscall.F_GETFL, 0)
			syscall.Close(fd)
			if e1 != 0 || e2 != 0 {
				t.Fatalf("fcntl: %v %v", e1, e2)
			}
			if fdFlags&syscall.FD_CLOEXEC == 0 {
				t.Errorf("%s(%d): not close-on-exec", name, family)
			}
			if flFlags&syscall.O_NONBLOCK == 0 {
				t.Errorf("%s(%d): blocking", name, family)
			}
		}
	}
}
