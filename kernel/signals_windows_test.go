//go:build windows

package kernel

import (
	"os/exec"
	"strconv"
	"syscall"
	"testing"
	"time"
)

// JPY_PARENT_PID as jupyter_client sets it on Windows, a handle of the parent
// process: the watch stays quiet while the process lives and reports its exit.
func TestWatchParentHandle(t *testing.T) {
	for _, v := range []string{"", "x", "0", "-5"} {
		if watchParent(v, nil) != nil {
			t.Errorf("JPY_PARENT_PID=%q started a watch", v)
		}
	}
	cmd := exec.Command("cmd", "/c", "ping -n 30 127.0.0.1 >nul")
	if err := cmd.Start(); err != nil {
		t.Skip("cannot start a child process:", err)
	}
	h, err := syscall.OpenProcess(syscall.SYNCHRONIZE, true, uint32(cmd.Process.Pid))
	if err != nil {
		t.Fatal(err)
	}
	defer syscall.CloseHandle(h)
	stop := make(chan struct{})
	defer close(stop)
	gone := watchParent(strconv.FormatUint(uint64(h), 10), stop)
	if gone == nil {
		t.Fatal("no watch of a process handle")
	}
	select {
	case <-gone:
		t.Fatal("a live parent was reported gone")
	case <-time.After(time.Second):
	}
	cmd.Process.Kill()
	cmd.Wait()
	select {
	case <-gone:
	case <-time.After(10 * time.Second):
		t.Fatal("the parent's exit was not noticed")
	}
}
