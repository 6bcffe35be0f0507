//go:build windows

package kernel

import (
	"os/exec"
	"strconv"
	"syscall"
	"testing"
	"time"
)

var (
	kernel32    = syscall.NewLazyDLL("kernel32.dll")
	createEvent = kernel32.NewProc("CreateEventW")
	setEvent    = kernel32.NewProc("SetEvent")
)

// The interrupt event a Windows client passes in JPY_INTERRUPT_EVENT (an
// auto-reset event, as jupyter_client creates it) interrupts the running
// cell each time it is set.
func TestInterruptEvent(t *testing.T) {
	h, _, err := createEvent.Call(0, 0, 0, 0) // no attributes, auto-reset, not set, no name
	if h == 0 {
		t.Fatal("CreateEventW:", err)
	}
	defer syscall.CloseHandle(syscall.Handle(h))
	t.Setenv("JPY_INTERRUPT_EVENT", strconv.FormatUint(uint64(h), 10))
	sys := notifySystem()
	defer sys.stop()
	for i := 0; i < 2; i++ {
		if r, _, err := setEvent.Call(h); r == 0 {
			t.Fatal("SetEvent:", err)
		}
		select {
		case <-sys.interrupt:
		case <-time.After(10 * time.Second):
			t.Fatalf("interrupt %d: not reported", i+1)
		}
	}
	select {
	case <-sys.interrupt:
		t.Fatal("an interrupt reported with the event not set")
	case <-time.After(4 * waitSlice * time.Millisecond):
	}
}

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
