package display

import (
	"bytes"
	"cmp"
	"encoding/base64"
	"encoding/binary"
	"encoding/json"
	"fmt"
	"hash/crc32"
	"image"
	"image/color"
	"image/png"
	"slices"
	"strings"
	"sync"
	"time"

	"codeberg.org/go-pdf/fpdf"
	xfont "golang.org/x/image/font"
	"gonum.org/v1/plot/font"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/vgimg"
	"gonum.org/v1/plot/vg/vgpdf"
	"gonum.org/v1/plot/vg/vgsvg"
)

// ResultMIME is the MIME type of the data behind a figure or table: a vendor
// type of this project's own (the Jupyter convention for tool-specific JSON).
// Front ends skip types they do not know, so the data travels in the notebook
// and in `nutate run --json` without being drawn in place of the figure, as
// application/json would be by JupyterLab (its JSON viewer outranks every image).
const ResultMIME = "application/vnd.nutate.result+json"

// Figure is a drawing of this package: a Profile, a Map or a Waveform. It can
// be written as a file with FigureFile.
type Figure interface {
	draw(nc canvasMaker) vg.CanvasWriterTo
	// colours is the palette size of the notebook's PNG rendition: 16 for
	// line figures (white, black, greys, the pulses' colours and their
	// anti-aliased edges; a 4-bit PNG), 256 for maps (the colour scale).
	colours() int
}

func (Profile) colours() int  { return 16 }
func (Waveform) colours() int { return 16 }
func (Map) colours() int      { return 256 }

// canvasMaker makes the canvas of one gonum/plot back end at a figure's size.
type canvasMaker func(w, h vg.Length) vg.CanvasWriterTo

func svgCanvas(w, h vg.Length) vg.CanvasWriterTo { return vgsvg.New(w, h) }

// pngCanvas draws at dpi dots per inch on white.
func pngCanvas(dpi int) canvasMaker {
	return func(w, h vg.Length) vg.CanvasWriterTo {
		return vgimg.PngCanvas{Canvas: vgimg.NewWith(vgimg.UseWH(w, h), vgimg.UseDPI(dpi))}
	}
}

// NotebookDPI is the resolution of the PNG rendition in a figure bundle: one
// CSS pixel per pixel (a notebook shows a PNG at its pixel size, and the SVG at
// its stated size of 6 in = 576 CSS pixels), which keeps a notebook small.
const NotebookDPI = 96

// FileDPI is the resolution of `export figure` to a PNG file (print quality).
const FileDPI = 300

// pdfEpoch is the creation and modification date written into every PDF, so
// that a figure gives the same bytes each time (fpdf would write the clock).
var pdfEpoch = time.Date(2000, 1, 1, 0, 0, 0, 0, time.UTC)

var pdfDefaults sync.Once

func pdfCanvas(w, h vg.Length) vg.CanvasWriterTo {
	pdfDefaults.Do(func() {
		fpdf.SetDefaultCreationDate(pdfEpoch)
		fpdf.SetDefaultModificationDate(pdfEpoch)
		fpdf.SetDefaultCatalogSort(true)
	})
	return pdfText{vgpdf.New(w, h)}
}

// pdfText adapts text to vgpdf, which embeds each font with the Windows-1252
// code page and takes the string's bytes as they are: text is encoded to that
// code page (the typographic minus becomes a hyphen, other characters outside
// it a question mark), and a bold face is named as a font of its own, since
// vgpdf registers every face under a name but asks for bold by style too.
type pdfText struct{ *vgpdf.Canvas }

func (c pdfText) FillString(f font.Face, pt vg.Point, s string) {
	if f.Font.Weight == xfont.WeightBold {
		f.Font.Weight = xfont.WeightNormal
		f.Font.Variant += "Bold"
	}
	b := make([]byte, 0, len(s))
	for _, r := range strings.ReplaceAll(s, "−", "-") {
		b = append(b, cp1252(r))
	}
	c.Canvas.FillString(f, pt, string(b))
}

// cp1252 is r's byte in the Windows-1252 code page, '?' when it has none:
// Latin-1 but for 0x80–0x9F, which hold typographic punctuation and a few
// letters.
func cp1252(r rune) byte {
	if r < 0x80 || r >= 0xa0 && r < 0x100 {
		return byte(r)
	}
	if i := strings.IndexRune(cp1252High, r); i >= 0 {
		return byte(0x80 + len([]rune(cp1252High[:i])))
	}
	return '?'
}

// cp1252High is 0x80–0x9F of Windows-1252 in order; '?' marks the unused
// positions.
const cp1252High = "€?‚ƒ„…†‡ˆ‰Š‹Œ?Ž??‘’“”•–—˜™š›œ?žŸ"

// renderPNG draws f at dpi and encodes it with fixed settings (no metadata; a
// fixed compression level), so the bytes depend only on the figure (and on
// the Go version's compress/flate). A paletted rendition keeps the figure's
// most used colours (a third to a sixth of the size). The text chunk, when
// given, is written after the header as tEXt "Software".
func renderPNG(f Figure, dpi int, paletted bool, software string) []byte {
	c := f.draw(pngCanvas(dpi)).(vgimg.PngCanvas)
	var img image.Image = c.Image()
	if rgba, ok := img.(*image.RGBA); ok && paletted {
		img = mostUsedColours(rgba, f.colours())
	}
	var buf bytes.Buffer
	// The notebook's rendition takes the default level: best compression
	// would save about 7 % at five to eight times the time.
	enc := png.Encoder{CompressionLevel: png.DefaultCompression}
	if !paletted {
		enc.CompressionLevel = png.BestCompression
	}
	if err := enc.Encode(&buf, img); err != nil {
		panic("display: encoding png: " + err.Error())
	}
	b := buf.Bytes()
	if software == "" {
		return b
	}
	// The signature (8 bytes) and the IHDR chunk (25 bytes) come first.
	data := append([]byte("Software\x00"), software...)
	chunk := binary.BigEndian.AppendUint32(nil, uint32(len(data)))
	chunk = append(chunk, "tEXt"...)
	chunk = append(chunk, data...)
	chunk = binary.BigEndian.AppendUint32(chunk, crc32.ChecksumIEEE(chunk[4:]))
	out := append([]byte{}, b[:33]...)
	out = append(out, chunk...)
	return append(out, b[33:]...)
}

// mostUsedColours maps img onto a palette of its n most frequent colours (ties
// broken by colour value), every other colour to the nearest of them.
func mostUsedColours(img *image.RGBA, n int) *image.Paletted {
	b := img.Bounds()
	key := func(i int) uint32 { return binary.BigEndian.Uint32(img.Pix[i : i+4]) }
	// Counted in runs: most of a figure is long runs of white.
	count := map[uint32]int{}
	for y := b.Min.Y; y < b.Max.Y; y++ {
		run, n := key(img.PixOffset(b.Min.X, y)), 0
		for x := b.Min.X; x < b.Max.X; x++ {
			if k := key(img.PixOffset(x, y)); k != run {
				count[run] += n
				run, n = k, 0
			}
			n++
		}
		count[run] += n
	}
	keys := make([]uint32, 0, len(count))
	for k := range count {
		keys = append(keys, k)
	}
	slices.SortFunc(keys, func(a, b uint32) int {
		if count[a] != count[b] {
			return count[b] - count[a]
		}
		return cmp.Compare(a, b)
	})
	rgba := func(k uint32) color.RGBA { return color.RGBA{uint8(k >> 24), uint8(k >> 16), uint8(k >> 8), uint8(k)} }
	pal := make(color.Palette, 0, 256)
	for _, k := range keys[:min(len(keys), n)] {
		pal = append(pal, rgba(k))
	}
	index := make(map[uint32]uint8, len(keys))
	for _, k := range keys {
		index[k] = uint8(pal.Index(rgba(k)))
	}
	out := image.NewPaletted(b, pal)
	for y := b.Min.Y; y < b.Max.Y; y++ {
		prev := key(img.PixOffset(b.Min.X, y))
		i := index[prev]
		for x := b.Min.X; x < b.Max.X; x++ {
			if k := key(img.PixOffset(x, y)); k != prev {
				prev, i = k, index[k]
			}
			out.Pix[out.PixOffset(x, y)] = i
		}
	}
	return out
}

// FigureTitle is the title of a figure of this package.
func FigureTitle(f Figure) string {
	switch f := f.(type) {
	case Profile:
		return f.Title
	case Map:
		return f.Title
	case Waveform:
		return f.Title
	}
	return ""
}

// figureMark is the mark every exported figure file carries (an SVG comment, a
// PNG text chunk, the PDF's fixed dates), so that an export replaces only a
// file it wrote itself.
const figureMark = "Nutate figure export"

// FigureFile encodes f as a file of the given format, "svg", "png" (FileDPI)
// or "pdf" (fonts embedded), with gonum/plot's own back ends. The bytes are the
// same for the same figure.
func FigureFile(f Figure, format string) ([]byte, error) {
	switch format {
	case "svg":
		s := finishSVG(f.draw(svgCanvas).(*vgsvg.Canvas))
		if i := strings.Index(s, "<svg"); i >= 0 {
			s = s[:i] + "<!-- " + figureMark + " -->\n" + s[i:]
		}
		return []byte(s), nil
	case "png":
		return renderPNG(f, FileDPI, false, figureMark), nil
	case "pdf":
		var buf bytes.Buffer
		if _, err := f.draw(pdfCanvas).WriteTo(&buf); err != nil {
			return nil, err
		}
		return buf.Bytes(), nil
	}
	return nil, fmt.Errorf("display: unknown figure format %q", format)
}

// IsFigureFile tells whether data, a file's content, is a figure FigureFile
// wrote in the given format (a PDF says so near its end).
func IsFigureFile(format string, head []byte) bool {
	switch format {
	case "svg":
		return bytes.Contains(head, []byte("<!-- "+figureMark+" -->"))
	case "png":
		return bytes.HasPrefix(head, []byte("\x89PNG")) && bytes.Contains(head, []byte("Software\x00"+figureMark))
	case "pdf":
		return bytes.HasPrefix(head, []byte("%PDF-")) && bytes.Contains(head, []byte("/CreationDate ("+pdfEpoch.Format("D:20060102150405")+")"))
	}
	return false
}

// figureBundles is a figure's output: the figure (its title and caption in
// text/plain, the SVG, a PNG rendition and the data under ResultMIME; no
// text/html, which front ends would rank above the images), then its table as an
// output of its own in text/plain and text/html, when there is one.
func figureBundles(f Figure, svg, title, caption string, t Table, data json.RawMessage) []Bundle {
	plain := caption
	if title != "" {
		plain = title + "\n" + caption
	}
	fig := Bundle{
		"text/plain":    plain,
		"image/svg+xml": svg,
		"image/png":     base64.StdEncoding.EncodeToString(renderPNG(f, NotebookDPI, true, "")),
		ResultMIME:      data,
	}
	out := []Bundle{fig}
	if t.Title == title {
		t.Title = "" // said once, by the figure
	}
	if !t.isEmpty() {
		out = append(out, Bundle{"text/plain": t.Plain(), "text/html": t.HTML()})
	}
	return out
}
