package main

import (
	"fmt"
	"os"
)

// cmdRun executes notebooks and scripts headless.
func cmdRun(args []string) int {
	fmt.Fprintln(os.Stderr, "nutate run: not built yet")
	return 1
}
