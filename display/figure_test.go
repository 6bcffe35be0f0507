package display

import (
	"bytes"
	"crypto/sha256"
	"encoding/base64"
	"fmt"
	"image/png"
	"os"
	"path/filepath"
	"regexp"
	"slices"
	"strings"
	"testing"
)

// classicOrder is the classic Notebook's (6.x) display order, from
// notebook/static/notebook/js/outputarea.js (OutputArea.display_order): the
// first type of the order present in a bundle is shown. An untrusted notebook
// shows a type only if it is "safe" (text/plain, text/latex, image/png,
// image/jpeg, image/gif: OutputArea.safe_outputs) or text/html, which it
// sanitizes; anything else (image/svg+xml among them) is skipped.
var classicOrder = []string{"application/javascript", "text/html", "text/markdown", "text/latex",
	"image/svg+xml", "image/png", "image/jpeg", "image/gif", "application/pdf", "text/plain"}

var classicSafe = []string{"text/plain", "text/latex", "image/png", "image/jpeg", "image/gif", "text/html"}

func classicPick(b Bundle, trusted bool) string {
	for _, m := range classicOrder {
		if _, ok := b[m]; ok && (trusted || slices.Contains(classicSafe, m)) {
			return m
		}
	}
	return ""
}

// labRank is JupyterLab 4's default renderer ranking: the defaultRank of
// @jupyterlab/rendermime's standardRendererFactories (packages/rendermime/src/
// factories.ts) and the JSON viewer of @jupyterlab/json-extension, rank 0. A
// lower rank wins. RenderMimeRegistry.preferredMimeType is asked with 'any' for
// a trusted output and 'ensure' for an untrusted one, which considers only
// factories marked safe (not SVG, not JavaScript). Types without a factory,
// such as ResultMIME, are never picked.
var labRank = []struct {
	mime string
	rank int
	safe bool
}{
	{"application/json", 0, true},
	{"text/html", 50, true},
	{"text/markdown", 60, true},
	{"text/latex", 70, true},
	{"image/svg+xml", 80, false},
	{"image/bmp", 90, true}, {"image/png", 90, true}, {"image/jpeg", 90, true}, {"image/gif", 90, true}, {"image/webp", 90, true},
	{"text/javascript", 110, false}, {"application/javascript", 110, false},
	{"text/plain", 120, true},
}

func labPick(b Bundle, trusted bool) string {
	best, rank := "", 1<<30
	for _, r := range labRank { // in registration order: ties keep the first
		if _, ok := b[r.mime]; ok && (trusted || r.safe) && r.rank < rank {
			best, rank = r.mime, r.rank
		}
	}
	return best
}

// Every kind of output shows what it is meant to in both front ends, trusted
// or not: a figure its SVG (trusted) or its PNG rendition (untrusted, where
// both front ends refuse SVG), a table its HTML, a message its text; never the
// data.
func TestMIMERanking(t *testing.T) {
	w, wt := sampleWaveform(true)
	figures := map[string][]Bundle{
		"profile":  sampleProfile().Bundles(),
		"map":      sampleMap().Bundles(),
		"waveform": w.Bundles(wt),
	}
	for name, bs := range figures {
		if len(bs) != 2 {
			t.Fatalf("%s: %d outputs, want the figure and its table", name, len(bs))
		}
		for _, trusted := range []bool{true, false} {
			want := "image/svg+xml"
			if !trusted {
				want = "image/png"
			}
			if got := classicPick(bs[0], trusted); got != want {
				t.Errorf("%s figure, trusted %v: classic Notebook shows %s, want %s", name, trusted, got, want)
			}
			if got := labPick(bs[0], trusted); got != want {
				t.Errorf("%s figure, trusted %v: JupyterLab shows %s, want %s", name, trusted, got, want)
			}
			for _, front := range []func(Bundle, bool) string{classicPick, labPick} {
				if got := front(bs[1], trusted); got != "text/html" {
					t.Errorf("%s table, trusted %v: shows %s, want text/html", name, trusted, got)
				}
			}
		}
	}
	for name, b := range map[string]Bundle{"table": sampleTable().Bundle(), "text": Text("nucleus 1H"), "error text": Text("line 1:1: got x, want y")} {
		want := "text/html"
		if name != "table" {
			want = "text/plain"
		}
		for _, trusted := range []bool{true, false} {
			if got := classicPick(b, trusted); got != want {
				t.Errorf("%s, trusted %v: classic Notebook shows %s, want %s", name, trusted, got, want)
			}
			if got := labPick(b, trusted); got != want {
				t.Errorf("%s, trusted %v: JupyterLab shows %s, want %s", name, trusted, got, want)
			}
		}
	}
}

// The notebook's PNG renditions keep their bytes: a hash per sample figure in
// testdata/png.sha256 (go test -update rewrites it; a new Go release may change
// compress/flate's output and so the hashes, never the pixels' meaning).
func TestGoldenPNG(t *testing.T) {
	var lines []string
	for name, b := range samples() {
		s, _ := b["image/png"].(string)
		raw, err := base64.StdEncoding.DecodeString(s)
		if err != nil {
			t.Fatalf("%s: %v", name, err)
		}
		lines = append(lines, fmt.Sprintf("%x  %s.png", sha256.Sum256(raw), name))
	}
	slices.Sort(lines)
	got := strings.Join(lines, "\n") + "\n"
	path := filepath.Join("testdata", "png.sha256")
	if *update {
		if err := os.WriteFile(path, []byte(got), 0o644); err != nil {
			t.Fatal(err)
		}
	}
	want, err := os.ReadFile(path)
	if err != nil {
		t.Fatalf("%v (run go test -update to create it)", err)
	}
	if got != string(want) {
		t.Errorf("png renditions differ from %s:\n%s\nwant:\n%s", path, got, want)
	}
}

// A figure file is the same bytes each time, in the format asked, marked as an
// export (and only our exports are).
func TestFigureFile(t *testing.T) {
	for _, format := range []string{"svg", "png", "pdf"} {
		t.Run(format, func(t *testing.T) {
			a, err := FigureFile(sampleProfile(), format)
			if err != nil {
				t.Fatal(err)
			}
			b, _ := FigureFile(sampleProfile(), format)
			if !bytes.Equal(a, b) {
				t.Errorf("two exports differ")
			}
			if !IsFigureFile(format, a) {
				t.Errorf("an export is not recognised as one")
			}
			for _, other := range []string{"svg", "png", "pdf"} {
				if other != format && IsFigureFile(other, a) {
					t.Errorf("a %s export is taken for %s", format, other)
				}
			}
			switch format {
			case "svg":
				checkXML(t, string(a))
				if IsFigureFile("svg", []byte(sampleProfile().SVG())) {
					t.Errorf("a notebook's SVG is taken for an export")
				}
			case "png":
				img, err := png.Decode(bytes.NewReader(a))
				if err != nil {
					t.Fatal(err)
				}
				if w := img.Bounds().Dx(); w != 6*FileDPI {
					t.Errorf("png is %d pixels wide, want %d (6 in at %d dpi)", w, 6*FileDPI, FileDPI)
				}
			case "pdf":
				if !bytes.HasPrefix(a, []byte("%PDF-")) || !bytes.Contains(a, []byte("/CreationDate (D:20000101000000)")) {
					t.Errorf("pdf lacks its header or the fixed creation date")
				}
				// The bold title's face is embedded under a name of its own.
				if !bytes.Contains(a, []byte("/BaseFont /LiberationSans-Bold")) {
					t.Errorf("pdf lacks the bold face")
				}
			}
		})
	}
	if _, err := FigureFile(sampleProfile(), "jpg"); err == nil {
		t.Errorf("jpg: no error")
	}
	if IsFigureFile("svg", []byte(`<svg xmlns="http://www.w3.org/2000/svg"/>`)) || IsFigureFile("pdf", []byte("%PDF-1.4 someone's paper")) {
		t.Errorf("foreign files taken for exports")
	}
}

// A small map's cells are blocks of pixels in the embedded image, so a viewer
// that scales it smoothly blurs only their edges.
func TestMapCellsAreBlocks(t *testing.T) {
	m := sampleMapSized(11, 7)
	svg := m.SVG()
	img := regexp.MustCompile(`<image [^>]*width="([0-9.]+)"[^>]*href="data:image/png;base64,([^"]+)"`).FindStringSubmatch(svg)
	if img == nil {
		t.Fatalf("no embedded image in the map's svg")
	}
	raw, err := base64.StdEncoding.DecodeString(img[2])
	if err != nil {
		t.Fatal(err)
	}
	p, err := png.Decode(bytes.NewReader(raw))
	if err != nil {
		t.Fatal(err)
	}
	w, h := p.Bounds().Dx(), p.Bounds().Dy()
	if w%11 != 0 || h%7 != 0 || w/11 < 8 || h/7 < 8 {
		t.Fatalf("image %d × %d for 11 × 7 cells: want whole blocks of at least 8 pixels", w, h)
	}
	// Every pixel of a block has its cell's colour.
	kx, ky := w/11, h/7
	for y := range h {
		for x := range w {
			if p.At(x, y) != p.At(x/kx*kx, y/ky*ky) {
				t.Fatalf("pixel (%d, %d) differs from its block's corner", x, y)
			}
		}
	}
}

// PDF text goes through Windows-1252 (the code page vgpdf embeds fonts with);
// the values are those of its published table.
func TestCP1252(t *testing.T) {
	for r, want := range map[rune]byte{'a': 'a', 'µ': 0xb5, '²': 0xb2, '×': 0xd7, '€': 0x80, '‚': 0x82, '–': 0x96, '—': 0x97, 'Ÿ': 0x9f, '∫': '?', 'γ': '?'} {
		if got := cp1252(r); got != want {
			t.Errorf("%q: got %#x, want %#x", r, got, want)
		}
	}
}
