package physics

import (
	"os"
	"testing"
)

// NUTATE_SCALAR=1 in the environment runs the whole test suite with the scalar
// rotation kernel (go test ./physics with and without it tests both kernels
// everywhere); the tests below that matter most run both kernels either way.
func init() {
	if os.Getenv("NUTATE_SCALAR") != "" {
		useVector = false
	}
}

// forBothKernels runs f with the vector rotation kernel (when this machine has
// one) and again with the scalar kernel forced, so that both are always tested.
func forBothKernels(t *testing.T, f func(t *testing.T)) {
	t.Run("default", f)
	saved := useVector
	useVector = false
	defer func() { useVector = saved }()
	t.Run("scalar", f)
}
