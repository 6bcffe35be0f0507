//go:build unix

package kernel

import (
	"errors"
	"os"
	"os/signal"
	"strconv"
	"syscall"
	"time"
)

// notifySystem turns SIGINT into an interrupt of the running cell (Jupyter's
// interrupt_mode "signal", and Ctrl-C in a terminal) and SIGTERM into a
// shutdown.
func notifySystem() systemEvents {
	sig := make(chan os.Signal, 4)
	signal.Notify(sig, syscall.SIGINT, syscall.SIGTERM)
	interrupt, terminate := make(chan struct{}, 1), make(chan struct{}, 1)
	done := make(chan struct{})
	go func() {
		for {
			select {
			case v := <-sig:
				if v == syscall.SIGINT {
					poke(interrupt)
				} else {
					poke(terminate)
				}
			case <-done:
				return
			}
		}
	}()
	return systemEvents{interrupt: interrupt, terminate: terminate, stop: func() {
		signal.Stop(sig)
		close(done)
	}}
}

// parentPollInterval is how often watchParent checks that the parent lives.
var parentPollInterval = time.Second

// watchParent returns a channel closed when the process whose id is v (the
// value of JPY_PARENT_PID, which jupyter_client sets to its process id on
// Unix) has exited, checked with signal 0 every parentPollInterval until stop
// closes. A value that is not a process id above 1 gives nil: no watch.
func watchParent(v string, stop <-chan struct{}) <-chan struct{} {
	pid, err := strconv.Atoi(v)
	if err != nil || pid <= 1 {
		return nil
	}
	p, err := os.FindProcess(pid)
	if err != nil {
		return nil
	}
	gone := make(chan struct{})
	go func() {
		tk := time.NewTicker(parentPollInterval)
		defer tk.Stop()
		for {
			select {
			case <-tk.C:
				if err := p.Signal(syscall.Signal(0)); errors.Is(err, os.ErrProcessDone) {
					close(gone)
					return
				}
			case <-stop:
				return
			}
		}
	}()
	return gone
}
