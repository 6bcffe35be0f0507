//go:build windows

package kernel

import (
	"os"
	"os/signal"
	"strconv"
	"syscall"
)

// notifySystem follows the Windows conventions of Jupyter. Kernelspecs ask for
// interrupts as interrupt_request messages (interrupt_mode "message", as
// `nutate install` writes), which need nothing here; a client that interrupts
// the Windows way instead sets the inheritable event named by
// JPY_INTERRUPT_EVENT, which interrupts the running cell as Ctrl-C or
// Ctrl-Break in the console does (os.Interrupt). Closing the console, logging
// off and system shutdown (which Go reports as syscall.SIGTERM) shut down.
func notifySystem() systemEvents {
	sig := make(chan os.Signal, 4)
	signal.Notify(sig, os.Interrupt, syscall.SIGTERM)
	interrupt, terminate := make(chan struct{}, 1), make(chan struct{}, 1)
	done := make(chan struct{})
	go func() {
		for {
			select {
			case v := <-sig:
				if v == os.Interrupt {
					poke(interrupt)
				} else {
					poke(terminate)
				}
			case <-done:
				return
			}
		}
	}()
	if h, ok := handleFromEnv(os.Getenv("JPY_INTERRUPT_EVENT")); ok {
		go func() {
			for {
				select {
				case <-done:
					return
				default:
				}
				// An auto-reset event (jupyter_client creates one): each wait
				// that sees it set also clears it.
				ev, err := syscall.WaitForSingleObject(h, waitSlice)
				switch {
				case err != nil:
					return
				case ev == syscall.WAIT_OBJECT_0:
					poke(interrupt)
				}
			}
		}()
	}
	return systemEvents{interrupt: interrupt, terminate: terminate, stop: func() {
		signal.Stop(sig)
		close(done)
	}}
}

// waitSlice bounds each wait on a handle (ms), so that a watch notices stop.
const waitSlice = 250

// handleFromEnv reads a handle value passed in an environment variable.
func handleFromEnv(v string) (syscall.Handle, bool) {
	n, err := strconv.ParseUint(v, 10, 64)
	if err != nil || n == 0 {
		return 0, false
	}
	return syscall.Handle(n), true
}

// watchParent returns a channel closed when the parent named by v has exited,
// or nil when v names none. jupyter_client on Windows sets JPY_PARENT_PID to
// an inheritable handle of its own process, not a process id; a value that is
// not a handle this process can wait on is tried as a process id (other
// launchers). The watch waits on the process handle, which Windows signals
// when the process exits, until stop closes.
func watchParent(v string, stop <-chan struct{}) <-chan struct{} {
	h, ok := handleFromEnv(v)
	if !ok {
		return nil
	}
	if _, err := syscall.WaitForSingleObject(h, 0); err != nil {
		pid, err := strconv.ParseUint(v, 10, 32)
		if err != nil {
			return nil
		}
		if h, err = syscall.OpenProcess(syscall.SYNCHRONIZE, false, uint32(pid)); err != nil {
			return nil
		}
	}
	gone := make(chan struct{})
	go func() {
		for {
			ev, err := syscall.WaitForSingleObject(h, waitSlice)
			if err != nil {
				return
			}
			if ev == syscall.WAIT_OBJECT_0 {
				close(gone)
				return
			}
			select {
			case <-stop:
				return
			default:
			}
		}
	}()
	return gone
}
