package kernel

import (
	"encoding/base64"
	"encoding/json"
	"strconv"
	"strings"
	"testing"
)

// mapBundle is a display the size of a large map's figure as package display
// makes it: its caption, an SVG of about 130 kB with an embedded image, a PNG
// rendition (base64) and 2500 points of data.
func mapBundle() map[string]any {
	img := make([]byte, 60000)
	for i := range img {
		img[i] = byte(i * 7919 >> 3)
	}
	png := base64.StdEncoding.EncodeToString(img)
	svg := `<svg xmlns="http://www.w3.org/2000/svg">` + strings.Repeat(`<path d="M1.5,2.5L3.5,4.5" style="stroke:#000"/>`, 1000) +
		`<image href="data:image/png;base64,` + png + `"/></svg>`
	data := []byte(`{"kind":"map","title":"sweep p over offset and b1","z":[`)
	for i := range 2500 {
		if i > 0 {
			data = append(data, ',')
		}
		data = strconv.AppendFloat(data, float64(i%997)/997, 'g', 6, 64)
	}
	data = append(data, "]}"...)
	return map[string]any{
		"text/plain":                         "sweep p over offset and b1\n(figure: mz over offset (Hz) × b1, 1000 × 1000 points)",
		"image/svg+xml":                      svg,
		"image/png":                          png,
		"application/vnd.nutate.result+json": json.RawMessage(data),
	}
}

// BenchmarkOutputEncode measures the content JSON of a large map's
// display_data message (about 300 kB): 1.3-1.5 ms and 240 kB allocated on the
// shared 2-core development machine, a small share of the map's output.
func BenchmarkOutputEncode(b *testing.B) {
	o := Output{Data: mapBundle()}
	b.ReportAllocs()
	for b.Loop() {
		if _, _, err := o.Encode(); err != nil {
			b.Fatal(err)
		}
	}
}
