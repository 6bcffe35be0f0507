package physics

import "testing"

// forBothKernels runs f with the vector rotation kernel (when this machine has
// one) and again with the scalar kernel forced, so that both are always tested.
func forBothKernels(t *testing.T, f func(t *testing.T)) {
	t.Run("default", f)
	saved := useVector
	useVector = false
	defer func() { useVector = saved }()
	t.Run("scalar", f)
}
