package physics

// useVector selects the vector rotation and relaxation kernels; it is set at start-up from the
// CPU's features (see vector_amd64.go) and tests clear it to force the scalar
// kernel.
var useVector = haveVector
