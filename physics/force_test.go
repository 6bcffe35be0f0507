package physics

import (
	"os"
	"testing"
)

// NUTATE_SCALAR=1 in the environment runs the whole test suite with the scalar
// rotation kernel, NUTATE_AVX2=1 without the AVX-512 one (go test ./physics with and without it tests both kernels
// everywhere); the tests below that matter most run both kernels either way.
func init() {
	if os.Getenv("NUTATE_SCALAR") != "" {
		useVector = false
	}
	if os.Getenv("NUTATE_AVX2") != "" {
		use512 = false
	}
}

// forBothKernels runs f with the vector rotation kernel (when this machine has
// one), with the 4-spin one alone where the 8-spin one is the default, and with
// the scalar kernel forced, so that all are always tested.
func forBothKernels(t *testing.T, f func(t *testing.T)) {
	t.Run("default", f)
	saved, saved512 := useVector, use512
	defer func() { useVector, use512 = saved, saved512 }()
	if use512 {
		use512 = false
		t.Run("avx2", f)
	}
	useVector = false
	t.Run("scalar", f)
}
