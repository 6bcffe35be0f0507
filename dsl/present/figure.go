package present

import (
	"encoding/json"
	"fmt"
	"strings"

	"Nutate/display"
)

// Figure is a figure's outputs together with the figure, which the session
// keeps for `export figure`.
type Figure struct {
	Fig     display.Figure
	Bundles []display.Bundle
}

func ProfileBundle(p display.Profile) Figure {
	return Figure{Fig: p, Bundles: p.Bundles()}
}

// MaxJSONCells bounds the cells of a map kept in its data: a notebook keeps
// every output, and `export sweep` writes all of them.
const MaxJSONCells = 2500

// MapBundle draws every cell; past MaxJSONCells the data keeps every k-th row
// and column (the first of each k, k the same on both axes), says so in a
// "decimated" field, and the caption says so too.
func MapBundle(m display.Map) Figure {
	ny := len(m.Z)
	nx := len(m.X.Values)
	if ny > 0 {
		nx = min(nx, len(m.Z[0]))
	}
	ny = min(ny, len(m.Y.Values))
	if nx*ny <= MaxJSONCells {
		return Figure{Fig: m, Bundles: m.Bundles()}
	}
	k := 1
	for (nx+k-1)/k*((ny+k-1)/k) > MaxJSONCells {
		k++
	}
	d := m
	d.X.Values = every(m.X.Values[:nx], k)
	d.Y.Values = every(m.Y.Values[:ny], k)
	d.Z = nil
	for i := 0; i < ny; i += k {
		d.Z = append(d.Z, every(m.Z[i][:nx], k))
	}
	note := fmt.Sprintf("the data holds %d × %d of the %d × %d points (every %s row and column); `export sweep` writes them all",
		len(d.X.Values), len(d.Y.Values), nx, ny, ordinal(k))
	head, _ := json.Marshal(map[string]any{"points": []int{nx, ny}, "shown": []int{len(d.X.Values), len(d.Y.Values)}, "one_in": k, "note": note})
	out := Figure{Fig: m, Bundles: m.BundlesWith(d.JSON())}
	decimate(out.Bundles[0], out.Bundles[0][display.ResultMIME].(json.RawMessage), head, note)
	return out
}

// mapRows lays out the values of a two-axis sweep (point ix·n1+iy) as a map's
// rows, Z[iy][ix] with the first axis horizontal: one array for all rows,
// filled tile by tile so that both the reads and the writes stay in cache.
func mapRows(v []float64, n0, n1 int) [][]float64 {
	flat := make([]float64, n0*n1)
	z := make([][]float64, n1)
	for iy := range z {
		z[iy] = flat[iy*n0 : (iy+1)*n0 : (iy+1)*n0]
	}
	const tile = 32
	for ix0 := 0; ix0 < n0; ix0 += tile {
		for iy0 := 0; iy0 < n1; iy0 += tile {
			for ix := ix0; ix < min(ix0+tile, n0); ix++ {
				for iy := iy0; iy < min(iy0+tile, n1); iy++ {
					flat[iy*n0+ix] = v[ix*n1+iy]
				}
			}
		}
	}
	return z
}

// every keeps v[0], v[k], v[2k], ...
func every(v []float64, k int) []float64 {
	if v == nil {
		return nil
	}
	out := make([]float64, 0, len(v)/k+1)
	for i := 0; i < len(v); i += k {
		out = append(out, v[i])
	}
	return out
}

func ordinal(k int) string {
	switch k {
	case 2:
		return "second"
	case 3:
		return "third"
	}
	return fmt.Sprintf("%dth", k)
}

// decimate replaces a figure's data with raw, a decimated copy, preceded by a
// "decimated" field holding head, and puts note in its caption.
func decimate(b display.Bundle, raw json.RawMessage, head []byte, note string) {
	if len(raw) < 2 || raw[0] != '{' {
		return
	}
	b[display.ResultMIME] = json.RawMessage(`{"decimated":` + string(head) + "," + string(raw[1:]))
	if txt, ok := b["text/plain"].(string); ok {
		b["text/plain"] = strings.Replace(txt, "; data in "+display.ResultMIME+")", "; "+note+")", 1)
	}
}

// MaxJSONSamples bounds the waveform series in describe's data: a notebook
// keeps every output, and the full table is what `export` is for.
const MaxJSONSamples = 2048

// WaveformBundle draws every sample; past MaxJSONSamples the data keeps one
// sample in k (the first of each k), says so in a "decimated" field, and the
// caption says so too.
func WaveformBundle(w display.Waveform, props display.Table) Figure {
	out := Figure{Fig: w, Bundles: w.Bundles(props)}
	n := len(w.Time)
	if n <= MaxJSONSamples {
		return out
	}
	k := (n + MaxJSONSamples - 1) / MaxJSONSamples
	d := display.Waveform{Title: w.Title}
	d.Time, d.Amplitude, d.Phase, d.Frequency, d.Gradient = every(w.Time, k), every(w.Amplitude, k), every(w.Phase, k), every(w.Frequency, k), every(w.Gradient, k)
	note := fmt.Sprintf("the data holds %d of the %d samples (one in %d); `export` writes them all", len(d.Time), n, k)
	head, _ := json.Marshal(map[string]any{"samples": n, "shown": len(d.Time), "one_in": k, "note": note})
	decimate(out.Bundles[0], d.JSON(props), head, note)
	return out
}
