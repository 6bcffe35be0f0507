//go:build !unix && !windows

package kernel

import (
	"os"
	"os/signal"
)

// notifySystem on other systems interrupts the running cell on os.Interrupt,
// the one signal Go promises everywhere.
func notifySystem() systemEvents {
	sig := make(chan os.Signal, 4)
	signal.Notify(sig, os.Interrupt)
	interrupt := make(chan struct{}, 1)
	done := make(chan struct{})
	go func() {
		for {
			select {
			case <-sig:
				poke(interrupt)
			case <-done:
				return
			}
		}
	}()
	return systemEvents{interrupt: interrupt, stop: func() {
		signal.Stop(sig)
		close(done)
	}}
}

// watchParent watches no parent on other systems.
func watchParent(v string, stop <-chan struct{}) <-chan struct{} { return nil }
