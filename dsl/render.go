package dsl

import (
	"encoding/json"
	"fmt"
	"strings"

	"Nutate/display"
)

// The functions here are the thin adapter between the language's outputs and
// package display, which renders text/plain, text/html, image/svg+xml and
// application/json (every value of a sweep, with axes and units).

func tableBundle(t display.Table) display.Bundle { return t.Bundle() }

func profileBundle(p display.Profile) display.Bundle { return p.Bundle() }

func mapBundle(m display.Map) display.Bundle { return m.Bundle() }

// maxJSONSamples bounds the waveform series in describe's application/json: a
// notebook keeps every output, and the full table is what `export` is for.
const maxJSONSamples = 4096

// waveformBundle draws every sample; past maxJSONSamples the application/json
// keeps one sample in k (the first of each k), says so in a "decimated" field,
// and the caption says so too.
func waveformBundle(w display.Waveform, props display.Table) display.Bundle {
	b := w.Bundle(props)
	n := len(w.Time)
	if n <= maxJSONSamples {
		return b
	}
	k := (n + maxJSONSamples - 1) / maxJSONSamples
	d := display.Waveform{Title: w.Title}
	pick := func(v []float64) []float64 {
		if v == nil {
			return nil
		}
		out := make([]float64, 0, n/k+1)
		for i := 0; i < len(v); i += k {
			out = append(out, v[i])
		}
		return out
	}
	d.Time, d.Amplitude, d.Phase, d.Frequency, d.Gradient = pick(w.Time), pick(w.Amplitude), pick(w.Phase), pick(w.Frequency), pick(w.Gradient)
	raw, ok := d.Bundle(props)["application/json"].(json.RawMessage)
	if !ok || len(raw) < 2 || raw[0] != '{' {
		return b
	}
	note := fmt.Sprintf("application/json holds %d of the %d samples (one in %d); `export` writes them all", len(d.Time), n, k)
	head, _ := json.Marshal(map[string]any{"samples": n, "shown": len(d.Time), "one_in": k, "note": note})
	b["application/json"] = json.RawMessage(`{"decimated":` + string(head) + "," + string(raw[1:]))
	if txt, ok := b["text/plain"].(string); ok {
		b["text/plain"] = strings.Replace(txt, "; all values in application/json)", "; "+note+")", 1)
	}
	return b
}

// withSettingsJSON adds the sweep's `with` settings, as written, to its
// application/json: {"settings": {"offset": "12 ppm", ...}, ...}. The title
// carries them too.
func withSettingsJSON(b display.Bundle, set *settings) display.Bundle {
	if len(set.written) == 0 {
		return b
	}
	raw, ok := b["application/json"].(json.RawMessage)
	if !ok || len(raw) < 2 || raw[0] != '{' {
		return b
	}
	m := make(map[string]string, len(set.written))
	for _, w := range set.written {
		m[w[0]] = w[1]
	}
	head, _ := json.Marshal(m)
	b["application/json"] = json.RawMessage(`{"settings":` + string(head) + "," + string(raw[1:]))
	return b
}
