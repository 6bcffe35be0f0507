package dsl

import (
	"context"
	"encoding/json"
	"strings"
	"testing"

	"Nutate/display"
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
		src := "pulse p = sinc(duration = 2 ms, flip = 90 deg, samples = " + formatNumber(float64(c.samples)) + ")\ndescribe p"
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
