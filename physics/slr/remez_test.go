package slr

import (
	"encoding/json"
	"fmt"
	"math"
	"os"
	"testing"
)

type refFilter struct {
	Name    string    `json:"name"`
	Taps    int       `json:"taps"`
	Edges   []float64 `json:"edges"`
	Gains   []float64 `json:"gains"`
	Weights []float64 `json:"weights"`
	H       []float64 `json:"h"`
}

func loadFilters(t *testing.T) (remez, firls []refFilter) {
	t.Helper()
	raw, err := os.ReadFile("../../testdata/slr/remez.json")
	if err != nil {
		t.Fatal(err)
	}
	var doc struct {
		Remez []refFilter `json:"remez"`
		Firls []refFilter `json:"firls"`
	}
	if err := json.Unmarshal(raw, &doc); err != nil {
		t.Fatal(err)
	}
	return doc.Remez, doc.Firls
}

func (r refFilter) bands() []Band {
	var b []Band
	for i := range r.Gains {
		b = append(b, Band{Lo: r.Edges[2*i], Hi: r.Edges[2*i+1], Gain: r.Gains[i], Weight: r.Weights[i]})
	}
	return b
}

// amplitude is the magnitude of the frequency response of h at f cycles/sample.
func amplitude(h []float64, f float64) float64 {
	var re, im float64
	for n, v := range h {
		s, c := math.Sincos(-2 * math.Pi * f * float64(n))
		re += v * c
		im += v * s
	}
	return math.Hypot(re, im)
}

// maxBandError is the largest weighted deviation of |H| from the band gains,
// sampled finely within the bands.
func maxBandError(h []float64, bands []Band) float64 {
	e := 0.0
	for _, b := range bands {
		for i := 0; i <= 400; i++ {
			f := b.Lo + (b.Hi-b.Lo)*float64(i)/400
			e = math.Max(e, b.Weight*math.Abs(amplitude(h, f)-math.Abs(b.Gain)))
		}
	}
	return e
}

// Reference filters from scipy.signal.remez and scipy.signal.firls
// (testdata/slr/gen_remez.py, Debian scipy).
func TestRemezMatchesScipy(t *testing.T) {
	rem, _ := loadFilters(t)
	for _, ref := range rem {
		t.Run(ref.Name, func(t *testing.T) {
			h, err := Remez(ref.Taps, ref.bands())
			if err != nil {
				t.Fatal(err)
			}
			d := 0.0
			for i := range h {
				d = math.Max(d, math.Abs(h[i]-ref.H[i]))
			}
			eGot, eRef := maxBandError(h, ref.bands()), maxBandError(ref.H, ref.bands())
			t.Logf("max coefficient difference %.3g; minimax error %.6g, scipy %.6g", d, eGot, eRef)
			// Both are minimax solutions on slightly different dense grids
			// (common practice: agreement to a small fraction of the ripple).
			if d > 0.02*eRef {
				t.Errorf("coefficients differ by %.3g from scipy, want ≤ %.3g", d, 0.02*eRef)
			}
			if eGot > eRef*1.01 {
				t.Errorf("minimax error %.6g, want ≤ scipy's %.6g (+1%%)", eGot, eRef)
			}
		})
	}
}

func TestLeastSquaresMatchesScipy(t *testing.T) {
	_, ls := loadFilters(t)
	for _, ref := range ls {
		t.Run(ref.Name, func(t *testing.T) {
			h, err := LeastSquares(ref.Taps, ref.bands())
			if err != nil {
				t.Fatal(err)
			}
			for i := range h {
				if math.Abs(h[i]-ref.H[i]) > 1e-9 {
					t.Fatalf("h[%d] = %.12g, want %.12g (scipy.signal.firls)", i, h[i], ref.H[i])
				}
			}
		})
	}
}

// The FFT evaluation of the interpolant on the dense grid (fastGrid) gives the
// designs of the direct barycentric sum within 1e-9 of the largest tap: the
// published β filters of 256 to 2047 taps, both filter types, with and
// without the pinned zero offset.
func TestFastGridMatchesDirect(t *testing.T) {
	defer func() { useFastGrid = true }()
	for _, k := range []struct {
		taps   int
		tbw    float64
		d1, d2 float64
		pin    bool
	}{
		{600, 8, 0.00125, 0.0707, false},
		{601, 4, 0.0707, 0.00707, true},
		{1024, 12, 0.0025, 0.1, true},
		{2047, 16, 0.0025, 0.0025, false},
		{4096, 8, 0.0707, 0.00707, true},
	} {
		t.Run(fmt.Sprint(k.taps), func(t *testing.T) {
			fp, fs := edges(k.taps, k.taps, k.tbw, DInf(k.d1, k.d2))
			bands := []Band{{0, fp, 1, 1}, {fs, 0.5, 0, k.d1 / k.d2}}
			var tg target
			if k.pin {
				tg = shaping{}.target(bands, 1, dcWeight)
			}
			design := func(fast bool) []float64 {
				useFastGrid = fast
				// As the design does: coarse grid first, then the full one.
				_, ext, _, err := remez(k.taps, bands, nil, coarseDensity, tg)
				if err != nil {
					t.Fatalf("fast %v: %v", fast, err)
				}
				h, _, _, err := remez(k.taps, bands, ext, gridDensity, tg)
				if err != nil {
					t.Fatal(err)
				}
				return h
			}
			direct, fast := design(false), design(true)
			top, diff := 0.0, 0.0
			for i := range direct {
				top = math.Max(top, math.Abs(direct[i]))
				diff = math.Max(diff, math.Abs(fast[i]-direct[i]))
			}
			t.Logf("largest difference %.3g of the largest tap", diff/top)
			if diff > 1e-9*top {
				t.Errorf("largest difference %.3g of the largest tap, want ≤ 1e-9", diff/top)
			}
		})
	}
}
