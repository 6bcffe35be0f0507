package physics

import (
	"context"
	"math"
	"testing"
)

// A 2 s presaturation (2000 samples of 1 ms) at 101 offsets averaged over
// B1 80–120 % with the automatic rule: the cost is that of Simulate over the
// quadrature's isochromats (about twice the final rule's, for the rules tried
// on the way).
func BenchmarkSimulateAveraged(b *testing.B) {
	n := 2000
	w := &Waveform{Dwell: make([]float64, n), B1: make([]complex128, n)}
	for j := range n {
		w.Dwell[j], w.B1[j] = 1e-3, complex(2*math.Pi*25.3, 0)
	}
	off := make([]float64, 101)
	for i := range off {
		off[i] = -50 + float64(i)
	}
	iso := Grid(off, nil, nil, nil, nil)
	spreads := []Spread{{Setting: SpreadB1, Lo: 0.8, Hi: 1.2}}
	for b.Loop() {
		a, err := SimulateAveraged(context.Background(), w, 1, &iso, spreads, Options{}, AverageOptions{})
		if err != nil || !a.Converged {
			b.Fatal(err, a.AverageInfo)
		}
		b.ReportMetric(float64(a.Points[0]), "points")
	}
}
