package dsl

import (
	"context"
	"encoding/json"
	"fmt"
	"slices"
	"strings"
	"testing"

	"Nutate/display"
	"Nutate/dsl/present"
)

// TestDescribeJSONDecimated checks that describe's data carries at
// most maxJSONSamples waveform samples, says so, and keeps short pulses whole.
func TestDescribeJSONDecimated(t *testing.T) {
	for _, c := range []struct {
		samples, shown, oneIn int
	}{
		{2048, 2048, 0}, // at the limit: every sample
		{6000, 2000, 3}, // ceil(6000/2048) = 3: samples 0, 3, ..., 5997
	} {
		s := NewSession(t.TempDir())
		var bundles []display.Bundle
		src := "pulse p = sinc(duration = 2 ms, flip = 90 deg, samples = " + present.Number(float64(c.samples)) + ")\ndescribe p"
		if err := s.Exec(context.Background(), src, Sink{Display: func(b display.Bundle) { bundles = append(bundles, b) }}); err != nil {
			t.Fatal(err)
		}
		b := lastFigure(bundles)
		var got struct {
			Decimated *struct {
				Samples int
				Shown   int
				OneIn   int `json:"one_in"`
			}
			Time   struct{ Values []float64 }
			Series []struct{ Values []float64 }
		}
		raw, _ := b[display.ResultMIME].(json.RawMessage)
		if err := json.Unmarshal(raw, &got); err != nil {
			t.Fatalf("%d samples: %v", c.samples, err)
		}
		if len(got.Time.Values) != c.shown || len(got.Series) == 0 || len(got.Series[0].Values) != c.shown {
			t.Errorf("%d samples: %d times in the JSON, want %d", c.samples, len(got.Time.Values), c.shown)
		}
		plain := b["text/plain"].(string)
		if c.oneIn == 0 {
			if got.Decimated != nil || !strings.Contains(plain, "data in "+display.ResultMIME) {
				t.Errorf("%d samples: decimated %+v, caption %q; want every sample", c.samples, got.Decimated, plain)
			}
			continue
		}
		if got.Decimated == nil || got.Decimated.OneIn != c.oneIn || got.Decimated.Samples != c.samples || got.Decimated.Shown != c.shown {
			t.Fatalf("%d samples: decimated %+v, want one in %d", c.samples, got.Decimated, c.oneIn)
		}
		if !strings.Contains(plain, "one in 3") || !strings.Contains(plain, "`export` writes them all") {
			t.Errorf("%d samples: caption does not say the JSON is decimated:\n%s", c.samples, plain)
		}
	}
}

// A map's data keeps at most maxJSONCells points (every k-th row and column,
// k the smallest that fits), says so, and keeps small maps whole.
func TestMapJSONDecimated(t *testing.T) {
	for _, c := range []struct {
		nx, ny, oneIn, sx, sy int
	}{
		{50, 50, 0, 50, 50},   // 2500 = present.MaxJSONCells: every point
		{101, 51, 2, 51, 26},  // 5151 points; one in 2: 51 × 26 = 1326 ≤ 2500
		{201, 101, 3, 67, 34}, // one in 2 leaves 101 × 51 = 5151; one in 3: 67 × 34 = 2278
	} {
		src := fmt.Sprintf("pulse p = rect(duration = 1 ms, flip = 90 deg)\nsweep p over offset -1 kHz to 1 kHz points %d, b1 0.5 to 1.5 points %d show mz", c.nx, c.ny)
		out, b := lastJSON(t, src)
		var x, y struct{ Values []float64 }
		var z [][]*float64
		if json.Unmarshal(out["x"], &x) != nil || json.Unmarshal(out["y"], &y) != nil || json.Unmarshal(out["z"], &z) != nil {
			t.Fatalf("%d × %d: undecodable map data", c.nx, c.ny)
		}
		if len(x.Values) != c.sx || len(y.Values) != c.sy || len(z) != c.sy || len(z[0]) != c.sx {
			t.Errorf("%d × %d: data %d × %d (z %d rows), want %d × %d", c.nx, c.ny, len(x.Values), len(y.Values), len(z), c.sx, c.sy)
		}
		plain := b["text/plain"].(string)
		if c.oneIn == 0 {
			if out["decimated"] != nil || !strings.Contains(plain, "data in "+display.ResultMIME) {
				t.Errorf("%d × %d: decimated %s; want every point", c.nx, c.ny, out["decimated"])
			}
			continue
		}
		var d struct {
			Points, Shown []int
			OneIn         int `json:"one_in"`
		}
		if err := json.Unmarshal(out["decimated"], &d); err != nil || d.OneIn != c.oneIn || !slices.Equal(d.Points, []int{c.nx, c.ny}) || !slices.Equal(d.Shown, []int{c.sx, c.sy}) {
			t.Errorf("%d × %d: decimated %s (%v), want one in %d", c.nx, c.ny, out["decimated"], err, c.oneIn)
		}
		if !strings.Contains(plain, "`export sweep` writes them all") {
			t.Errorf("%d × %d: caption does not say the data is decimated:\n%s", c.nx, c.ny, plain)
		}
	}
}
