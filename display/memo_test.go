package display

import (
	"bytes"
	"encoding/base64"
	"testing"
)

// TestMapBundlesShareWork: the SVG and PNG of Map.Bundles, which draw the
// cells once for both, are the bytes SVG and a PNG rendition give alone, for
// maps with a contour, a cyclic one, reversed axes and a map small enough to
// be drawn in blocks of pixels.
func TestMapBundlesShareWork(t *testing.T) {
	cyclic := sampleMapSized(300, 200)
	cyclic.Cyclic, cyclic.HasContour, cyclic.ZMin, cyclic.ZMax = true, false, -180, 180
	for i, row := range cyclic.Z {
		for j := range row {
			cyclic.Z[i][j] = float64((i*7+j*13)%360) - 180
		}
	}
	reversed := sampleMapSized(700, 120)
	reversed.X.Reverse, reversed.Y.Reverse = true, true
	for name, m := range map[string]Map{
		"contour":  sampleMapSized(1000, 700),
		"cyclic":   cyclic,
		"reversed": reversed,
		"blocks":   sampleMapSized(21, 11),
	} {
		t.Run(name, func(t *testing.T) {
			b := m.Bundle()
			if got, want := b["image/svg+xml"].(string), m.SVG(); got != want {
				t.Errorf("the bundle's SVG differs from SVG() (%d and %d bytes)", len(got), len(want))
			}
			png, err := base64.StdEncoding.DecodeString(b["image/png"].(string))
			if err != nil {
				t.Fatal(err)
			}
			if want := renderPNG(m, NotebookDPI, true, ""); !bytes.Equal(png, want) {
				t.Errorf("the bundle's PNG differs from a rendition alone (%d and %d bytes)", len(png), len(want))
			}
		})
	}
}
