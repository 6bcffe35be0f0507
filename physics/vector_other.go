//go:build !amd64

package physics

// haveVector is false where no vector kernel is written: the scalar kernel runs.
var haveVector = false

// haveAVX512 and use512 are false for the same reason.
var haveAVX512, use512 = false, false

func rotateVector(st *steps, j0, j1 int, off, pos, scale, scale2, ar, ai, br, bi []float64) int {
	return 0
}

func relaxVector(st *steps, j0, j1 int, off, pos, scale, r1, r2, mx, my, mz []float64, sc *relaxScratch) int {
	return 0
}

// relaxStep is used by the vector relaxation kernel only.
type relaxStep struct{}
