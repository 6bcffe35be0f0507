package main

import (
	"fmt"
	"os"
)

// cmdKernel runs the Jupyter kernel.
func cmdKernel(args []string) int {
	fmt.Fprintln(os.Stderr, "nutate kernel: not built yet")
	return 1
}
