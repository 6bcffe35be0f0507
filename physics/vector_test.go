package physics

import (
	"math"
	"math/rand/v2"
	"testing"
)

// The vector rotation kernel gives the scalar kernel's results bit for bit (it
// runs the same operations in the same order), over random isochromats and
// waveforms with and without a gradient, step angles from tiny to beyond the
// angle-halving range, and block sizes that are not a multiple of 4.
func TestVectorMatchesScalar(t *testing.T) {
	if !haveVector {
		t.Log("this CPU has no vector kernel: both runs use the scalar kernel")
	}
	rng := rand.New(rand.NewPCG(4, 17))
	for trial := range 60 {
		nsteps := 1 + rng.IntN(300)
		w := &Waveform{Dwell: make([]float64, nsteps), B1: make([]complex128, nsteps)}
		// Peak B1 from 10 Hz to 100 kHz (gamma = 1: rad/s), dwell 1–100 µs.
		w1 := 2 * math.Pi * math.Pow(10, 1+4*rng.Float64())
		dt := math.Pow(10, -6+2*rng.Float64())
		for j := range nsteps {
			w.Dwell[j] = dt * (0.5 + rng.Float64())
			w.B1[j] = complex(w1*(2*rng.Float64()-1), w1*(2*rng.Float64()-1))
		}
		if trial%2 == 1 {
			w.Gradient = make([]float64, nsteps)
			for j := range nsteps {
				w.Gradient[j] = 2 * math.Pi * 1e5 * (2*rng.Float64() - 1) // rad/s/m
				if rng.IntN(5) == 0 {
					w.Gradient[j] = 0
				}
			}
		}
		n := 1 + rng.IntN(blockSpins)
		maxOff, maxPos, maxScale := 2*math.Pi*2e4, 0.1, 2.0
		st, err := newSteps(w, 1, maxOff, maxPos, maxScale)
		if err != nil {
			t.Fatal(err)
		}
		var in [10][]float64
		for k := range in {
			in[k] = make([]float64, n)
		}
		off, pos, scale, scale2, ar, ai, br, bi := in[0], in[1], in[2], in[3], in[4], in[5], in[6], in[7]
		for i := range n {
			off[i] = maxOff * (2*rng.Float64() - 1)
			pos[i] = maxPos * (2*rng.Float64() - 1)
			scale[i] = maxScale * rng.Float64()
			scale2[i] = scale[i] * scale[i]
			// A random unit quaternion as the starting Cayley–Klein state.
			q := [4]float64{rng.NormFloat64(), rng.NormFloat64(), rng.NormFloat64(), rng.NormFloat64()}
			l := math.Sqrt(q[0]*q[0] + q[1]*q[1] + q[2]*q[2] + q[3]*q[3])
			ar[i], ai[i], br[i], bi[i] = q[0]/l, q[1]/l, q[2]/l, q[3]/l
		}
		run := func(vector, wide bool) [4][]float64 {
			saved, saved512 := useVector, use512
			useVector, use512 = vector, wide
			defer func() { useVector, use512 = saved, saved512 }()
			var s [4][]float64
			for k := range s {
				s[k] = append([]float64(nil), in[4+k]...)
			}
			for j0 := 0; j0 < st.n; j0 += stepChunk {
				rotateBlock(st, j0, min(st.n, j0+stepChunk), off, pos, scale, scale2, s[0], s[1], s[2], s[3])
			}
			return s
		}
		s := run(false, false)
		for _, wide := range []bool{false, true} {
			v := run(haveVector, wide && haveAVX512)
			for k := range v {
				for i := range n {
					if v[k][i] != s[k][i] {
						t.Fatalf("trial %d (%d spins, %d steps, AVX-512 %v), spin %d, component %d: vector %.17g, scalar %.17g", trial, n, nsteps, wide && haveAVX512, i, k, v[k][i], s[k][i])
					}
				}
			}
		}
	}
}

// The vector relaxation kernel gives the scalar kernel's results bit for bit,
// over random isochromats with T1 and T2, waveforms with and without a gradient,
// short steps and steps cut into substeps (long ones take the scalar squaring),
// and block sizes that are not a multiple of 4.
func TestVectorRelaxMatchesScalar(t *testing.T) {
	rng := rand.New(rand.NewPCG(5, 17))
	for trial := range 60 {
		nsteps := 1 + rng.IntN(300)
		w := &Waveform{Dwell: make([]float64, nsteps), B1: make([]complex128, nsteps)}
		w1 := 2 * math.Pi * math.Pow(10, 1+3.5*rng.Float64())
		dt := math.Pow(10, -6+2.5*rng.Float64())
		for j := range nsteps {
			w.Dwell[j] = dt * (0.5 + rng.Float64())
			w.B1[j] = complex(w1*(2*rng.Float64()-1), w1*(2*rng.Float64()-1))
		}
		if trial%2 == 1 {
			w.Gradient = make([]float64, nsteps)
			for j := range nsteps {
				w.Gradient[j] = 2 * math.Pi * 1e5 * (2*rng.Float64() - 1)
			}
		}
		n := 1 + rng.IntN(blockSpins)
		maxOff, maxPos, maxScale, maxR := 2*math.Pi*5e3, 0.05, 1.5, 100.0
		st, err := newSteps(w, 1, maxOff, maxPos, maxScale)
		if err != nil {
			t.Fatal(err)
		}
		if err := st.planRelax(w, 1, maxOff, maxPos, maxScale, maxR); err != nil {
			t.Fatal(err)
		}
		var in [8][]float64
		for k := range in {
			in[k] = make([]float64, n)
		}
		off, pos, scale, r1, r2 := in[0], in[1], in[2], in[3], in[4]
		for i := range n {
			off[i] = maxOff * (2*rng.Float64() - 1)
			pos[i] = maxPos * (2*rng.Float64() - 1)
			scale[i] = maxScale * rng.Float64()
			r1[i] = maxR * rng.Float64() / 10
			r2[i] = maxR * rng.Float64()
			in[5][i], in[6][i], in[7][i] = rng.NormFloat64(), rng.NormFloat64(), rng.NormFloat64()
		}
		run := func(vector bool) [3][]float64 {
			saved := useVector
			useVector = vector
			defer func() { useVector = saved }()
			var m [3][]float64
			for k := range m {
				m[k] = append([]float64(nil), in[5+k]...)
			}
			var sc relaxScratch
			for j0 := 0; j0 < st.n; j0 += stepChunk {
				relaxBlock(st, j0, min(st.n, j0+stepChunk), off, pos, scale, r1, r2, m[0], m[1], m[2], &sc)
			}
			return m
		}
		v, s := run(haveVector), run(false)
		for k := range v {
			for i := range n {
				if v[k][i] != s[k][i] {
					t.Fatalf("trial %d (%d spins, %d steps), spin %d, component %d: vector %.17g, scalar %.17g", trial, n, nsteps, i, k, v[k][i], s[k][i])
				}
			}
		}
	}
}
