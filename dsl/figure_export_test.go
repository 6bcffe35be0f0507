package dsl

import (
	"bytes"
	"context"
	"image/png"
	"os"
	"path/filepath"
	"testing"

	"Nutate/display"
)

// export figure writes the last figure, whichever statement drew it, in the
// format its extension names; an existing export is replaced.
func TestExportFigureFiles(t *testing.T) {
	dir := t.TempDir()
	s := NewSession(dir)
	src := "pulse p = rect(duration = 1 ms, flip = 90 deg)\nsweep p over offset -1 kHz to 1 kHz points 5 show mz\ndescribe p\n" +
		"export figure to \"w.svg\"\nexport figure to \"w.png\"\nexport figure to \"w.pdf\"\nexport figure to \"w.svg\""
	if err := s.Exec(context.Background(), src, Sink{Display: func(display.Bundle) {}}); err != nil {
		t.Fatal(err)
	}
	read := func(name string) []byte {
		b, err := os.ReadFile(filepath.Join(dir, name))
		if err != nil {
			t.Fatal(err)
		}
		return b
	}
	svg := read("w.svg")
	if !bytes.Contains(svg, []byte("p (rect)")) || bytes.Contains(svg, []byte("sweep p over offset")) {
		t.Errorf("w.svg is not the last figure (describe's)")
	}
	img, err := png.Decode(bytes.NewReader(read("w.png")))
	if err != nil || img.Bounds().Dx() != 6*display.FileDPI {
		t.Errorf("w.png: %v, want a %d-pixel-wide image", err, 6*display.FileDPI)
	}
	if pdf := read("w.pdf"); !display.IsFigureFile("pdf", pdf) {
		t.Errorf("w.pdf is not a PDF figure export")
	}
}
