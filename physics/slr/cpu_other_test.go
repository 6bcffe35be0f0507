//go:build !unix

package slr

import "time"

func processCPU() time.Duration { return 0 }
