package display

import (
	"bytes"
	"encoding/xml"
	"flag"
	"io"
	"os"
	"path/filepath"
	"testing"
)

var update = flag.Bool("update", false, "rewrite the golden SVG files in testdata")

// samples are the fixed figures checked against golden files.
func samples() map[string]Bundle {
	w, wt := sampleWaveform(false)
	wg, wgt := sampleWaveform(true)
	return map[string]Bundle{
		"profile":           sampleProfile().Bundle(),
		"map":               sampleMap().Bundle(),
		"waveform":          w.Bundle(wt),
		"waveform_gradient": wg.Bundle(wgt),
	}
}

func TestGoldenSVG(t *testing.T) {
	for name, b := range samples() {
		t.Run(name, func(t *testing.T) {
			got, ok := b["image/svg+xml"].(string)
			if !ok {
				t.Fatalf("bundle has no image/svg+xml string")
			}
			path := filepath.Join("testdata", name+".svg")
			if *update {
				if err := os.WriteFile(path, []byte(got), 0o644); err != nil {
					t.Fatal(err)
				}
			}
			want, err := os.ReadFile(path)
			if err != nil {
				t.Fatalf("%v (run go test -update to create it)", err)
			}
			if !bytes.Equal([]byte(got), want) {
				t.Errorf("svg differs from %s (%d bytes, want %d); inspect it and run go test -update if the change is intended", path, len(got), len(want))
			}
		})
	}
}

// checkXML fails unless s parses as XML to the end.
func checkXML(t *testing.T, s string) {
	t.Helper()
	d := xml.NewDecoder(bytes.NewReader([]byte(s)))
	for {
		_, err := d.Token()
		if err == io.EOF {
			return
		}
		if err != nil {
			t.Fatalf("svg is not well-formed XML: %v", err)
		}
	}
}
