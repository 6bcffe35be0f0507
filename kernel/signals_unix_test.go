//go:build unix

package kernel

import (
	"os"
	"os/exec"
	"strconv"
	"syscall"
	"testing"
	"time"
)

// The parent watch notices a process that has exited (and been reaped), and
// stays quiet while it lives; values that name no process start no watch.
func TestWatchParentUnix(t *testing.T) {
	defer func(d time.Duration) { parentPollInterval = d }(parentPollInterval)
	parentPollInterval = 10 * time.Millisecond
	for _, v := range []string{"", "x", "0", "1", "-5"} {
		if watchParent(v, nil) != nil {
			t.Errorf("JPY_PARENT_PID=%q started a watch", v)
		}
	}
	cmd := exec.Command("sleep", "30")
	if err := cmd.Start(); err != nil {
		t.Skip("no sleep command:", err)
	}
	stop := make(chan struct{})
	defer close(stop)
	gone := watchParent(strconv.Itoa(cmd.Process.Pid), stop)
	select {
	case <-gone:
		t.Fatal("a live parent was reported gone")
	case <-time.After(5 * parentPollInterval):
	}
	cmd.Process.Kill()
	cmd.Wait()
	select {
	case <-gone:
	case <-time.After(10 * time.Second):
		t.Fatal("the parent's exit was not noticed")
	}
	// A live process id gets a watch.
	if g := watchParent(strconv.Itoa(os.Getpid()), stop); g == nil {
		t.Fatal("no watch of a live process")
	}
}

// SIGINT becomes an interrupt and SIGTERM a shutdown.
func TestNotifySystemUnix(t *testing.T) {
	sys := notifySystem()
	defer sys.stop()
	for _, c := range []struct {
		sig  syscall.Signal
		want <-chan struct{}
	}{{syscall.SIGINT, sys.interrupt}, {syscall.SIGTERM, sys.terminate}} {
		if err := syscall.Kill(os.Getpid(), c.sig); err != nil {
			t.Fatal(err)
		}
		select {
		case <-c.want:
		case <-time.After(10 * time.Second):
			t.Fatalf("%v was not reported", c.sig)
		}
	}
}
