package main

import (
	"fmt"
	"os"
)

// cmdInstall writes the kernelspec.
func cmdInstall(args []string) int {
	fmt.Fprintln(os.Stderr, "nutate install: not built yet")
	return 1
}
