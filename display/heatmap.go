package display

import (
	"encoding/json"
	"fmt"
	"image"
	"image/color"
	"math"
	"strings"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
	"gonum.org/v1/plot/vg/vgsvg"
)

// maxPixels bounds the heat-map image on each side: about twice the points the
// data area spans, beyond which a viewer cannot see more. Larger maps are
// averaged down in the image only; the JSON keeps every value.
const maxPixels = 640

// Bundles shows the map as a heat map with a colour bar (a figure as for a
// Profile), then a table in text/plain and text/html (the caller's Summary, or
// else the extremes and the contour level). The data under ResultMIME is
// {"kind": "map", "title", "pulse",
// "quantity", "unit", "x", "y" (axes as in a profile), "z": [[row at y[0]], ...],
// "contour": level or null, "summary": table, "label" and "notes" (when set)};
// non-finite values are null.
//
// The heat map is an embedded PNG of the cells, each cell drawn as a block of
// several pixels (nearest neighbour) when the map has fewer cells than the
// image has room for, so that it stays crisp when a viewer scales it smoothly,
// coloured with this package's own perceptually uniform scale (see rampAnchors);
// NaN cells are left transparent. The contour, when HasContour, is traced on the
// full-resolution grid by marching squares and drawn black on a white halo so it
// shows over dark and light colours alike. An axis with Log set (and only
// positive values) is drawn logarithmically: cells span geometric midpoints,
// ticks fall at 1, 2, 5 × powers of ten as on a profile, and the contour is
// interpolated in the logarithm of the axis values.
func (m Map) Bundles() []Bundle { return m.BundlesWith(m.JSON()) }

// BundlesWith is Bundles with data in place of m.JSON() under ResultMIME (the
// data of a decimated copy of a large map), so that the JSON of every cell is
// never built only to be dropped.
func (m Map) BundlesWith(data json.RawMessage) []Bundle {
	m.memo = &mapMemo{} // this copy's: the SVG and the PNG share the work on the cells
	return figureBundles(m, m.SVG(), m.Title, m.caption(), m.table(), data)
}

// mapMemo keeps what drawing a map computes from every cell, so that the SVG
// and the PNG rendition of one Bundles call compute it once: the contour, and
// the raster image with the pixel grid it was made for (reused only for the
// same grid, so both renditions stay what they would be alone).
type mapMemo struct {
	lines    contourLines
	hasLines bool
	img      *image.Paletted
	imgKey   [4]int // pixels across and down, the reversals of x and y
}

// Bundle is the figure of Bundles alone.
func (m Map) Bundle() Bundle { return m.Bundles()[0] }

func (m Map) caption() string {
	nx, ny := m.dims()
	return fmt.Sprintf("(figure: %s over %s × %s, %d × %d points; data in "+ResultMIME+")",
		axisLabel(orDefault(m.label(), "z"), m.Unit), m.X.title("x"),
		m.Y.title("y"), nx, ny)
}

// label names the map's quantity on the colour bar and in the caption.
func (m Map) label() string { return orDefault(m.Label, m.Quantity) }

// dims is the usable grid size: the axis lengths, cut to what Z holds.
func (m Map) dims() (nx, ny int) {
	nx, ny = len(m.X.Values), min(len(m.Y.Values), len(m.Z))
	for _, row := range m.Z[:ny] {
		nx = min(nx, len(row))
	}
	if ny == 0 {
		nx = 0
	}
	return nx, ny
}

// zRange is the colour scale's range: ZMin…ZMax when given, else the data's.
func (m Map) zRange() (lo, hi float64) {
	if finite(m.ZMin) && finite(m.ZMax) && m.ZMin < m.ZMax {
		return m.ZMin, m.ZMax
	}
	nx, ny := m.dims()
	lo, hi = math.Inf(1), math.Inf(-1)
	for _, row := range m.Z[:ny] {
		a, b := finiteRange(row[:nx])
		lo, hi = math.Min(lo, a), math.Max(hi, b)
	}
	lo, hi = padRange(lo, hi, 0)
	// A range that nearly starts or ends on a tick is widened to it, so the bar
	// is labelled at its ends (0…1, not 2e-5…1).
	step, _ := niceStep(lo, hi, 5)
	if f := math.Floor(lo/step) * step; lo-f < 0.03*(hi-lo) {
		lo = f
	}
	if c := math.Ceil(hi/step) * step; c-hi < 0.03*(hi-lo) {
		hi = c
	}
	return lo, hi
}

func (m Map) table() Table {
	if !m.Summary.isEmpty() {
		return m.Summary
	}
	nx, ny := m.dims()
	t := Table{Columns: []Column{{Name: "feature"}, {Name: orDefault(m.Quantity, "z"), Unit: m.Unit},
		{Name: m.X.name("x"), Unit: m.X.unit()}, {Name: m.Y.name("y"), Unit: m.Y.unit()}}}
	lo, hi := [2]int{-1, -1}, [2]int{-1, -1}
	for j := range ny {
		for i := range nx {
			z := m.Z[j][i]
			if !finite(z) {
				continue
			}
			if lo[0] < 0 || z < m.Z[lo[1]][lo[0]] {
				lo = [2]int{i, j}
			}
			if hi[0] < 0 || z > m.Z[hi[1]][hi[0]] {
				hi = [2]int{i, j}
			}
		}
	}
	if lo[0] >= 0 {
		for _, e := range []struct {
			name string
			at   [2]int
		}{{"min", lo}, {"max", hi}} {
			t.Rows = append(t.Rows, []string{e.name, Num(m.Z[e.at[1]][e.at[0]], 4),
				Num(m.X.Values[e.at[0]], 6), Num(m.Y.Values[e.at[1]], 6)})
		}
	}
	if m.HasContour {
		t.Rows = append(t.Rows, []string{"contour", Num(m.Contour, 4), "", ""})
	}
	return t
}

// SVG renders the map figure alone.
func (m Map) SVG() string { return finishSVG(m.draw(svgCanvas).(*vgsvg.Canvas)) }

// draw renders the map figure on a canvas made by nc.
func (m Map) draw(nc canvasMaker) vg.CanvasWriterTo {
	nx, ny := m.dims()
	zlo, zhi := m.zRange()
	const bodyH = 300

	xs, xnote := drawable(m.X.Values[:nx])
	ys, ynote := drawable(m.Y.Values[:ny])
	// Cells and contours are laid out in log10 of the values on a log axis, so
	// that cell edges fall at geometric midpoints and the contour is
	// interpolated along the drawn distance.
	xl := newMapScale(xs, m.X.Log && xnote == "")
	yl := newMapScale(ys, m.Y.Log && ynote == "")
	var legend []legendItem
	var lines contourLines
	if m.HasContour && nx > 0 && finite(m.Contour) {
		if m.memo != nil && m.memo.hasLines {
			lines = m.memo.lines
		} else {
			lines = mapContour(xl, yl, m.Z[:ny], m.Contour)
			if m.memo != nil {
				m.memo.lines, m.memo.hasLines = lines, true
			}
		}
	}
	if m.HasContour {
		name := fmt.Sprintf("%s = %s", orDefault(m.Quantity, "z"), minus(strings.TrimSpace(Num(m.Contour, 4)+" "+m.Unit)))
		if len(lines) == 0 {
			name += " (not reached)"
		}
		legend = append(legend, legendItem{name: name, style: contourStyle, halo: true})
	}
	rows := legendRows(legend, figWidth-20)
	heading := m.Title
	if m.Pulse != "" && !strings.Contains(heading, m.Pulse) {
		heading = strings.TrimSpace(heading + " (" + m.Pulse + ")")
	}
	title := wrapText(heading, boldStyle(titleSize), figWidth-24)
	var headH vg.Length = headPad
	if len(title) > 0 {
		headH += vg.Length(len(title))*rowHeight + 3
	}
	headH += vg.Length(len(rows)) * rowHeight
	notes := wrapNotes(m.Notes)
	footH := footHeight(notes)
	H := headH + bodyH + footH

	c := nc(figWidth, H)
	full := draw.New(c)
	full.SetColor(whiteColor)
	full.Fill(full.Rectangle.Path())

	p := newPlot()
	p.X.Label.Text = m.X.title("x") + xnote
	p.Y.Label.Text = m.Y.title("y") + ynote
	xl.setAxis(&p.X, m.X.Reverse)
	yl.setAxis(&p.Y, m.Y.Reverse)
	if nx > 0 {
		r := &raster{x: xl, y: yl, z: m.Z[:ny], nx: nx, zlo: zlo, zhi: zhi, cyclic: m.Cyclic, memo: m.memo}
		p.Add(r)
		if len(lines) > 0 {
			p.Add(lines)
		}
	}
	p.Add(frame{})

	// Colour bar column: gap, bar, ticks and labels, the rotated quantity label.
	ticks := niceTicks{n: 5}.Ticks(zlo, zhi)
	ts := textStyle(tickSize)
	var tw vg.Length
	for _, t := range ticks {
		tw = max(tw, ts.Width(t.Label))
	}
	const barGap, barW, tickLen = 12, 12, 3
	ls := textStyle(labelSize)
	barCol := barGap + barW + tickLen + 2 + tw + 6 + ls.Height("M") + 6

	drawNotes(full, notes, footH)
	body := draw.Crop(full, 0, 0, footH, -(H - bodyH - footH))
	main := draw.Crop(body, 4, -barCol, 4, 0)
	p.Draw(main)
	dc := p.DataCanvas(main)

	y := H - headPad
	y = drawTitle(full, title, y)
	if len(rows) > 0 {
		drawLegend(full, rows, dc.Min.X, dc.Max.X, y-rowHeight/2)
	}

	// The bar: a gradient image, a frame, ticks, labels, the contour level.
	bx := dc.Max.X + barGap
	bar := vg.Rectangle{Min: vg.Point{X: bx, Y: dc.Min.Y}, Max: vg.Point{X: bx + barW, Y: dc.Max.Y}}
	colours := ramp
	if m.Cyclic {
		colours = wheel
	}
	grad := image.NewNRGBA(image.Rect(0, 0, 1, rampSize))
	for i := range rampSize {
		grad.SetNRGBA(0, rampSize-1-i, colours[i])
	}
	full.DrawImage(bar, grad)
	full.SetLineStyle(draw.LineStyle{Color: color.Black, Width: frameWidth})
	full.Stroke(bar.Path())
	yOf := func(v float64) vg.Length {
		return bar.Min.Y + vg.Length((v-zlo)/(zhi-zlo))*(bar.Max.Y-bar.Min.Y)
	}
	ts.YAlign = draw.YCenter
	var tpath vg.Path
	for _, t := range ticks {
		if t.Value < zlo || t.Value > zhi {
			continue
		}
		ty := yOf(t.Value)
		n := vg.Length(tickLen)
		if t.IsMinor() {
			n /= 2
		}
		tpath.Move(vg.Point{X: bar.Max.X, Y: ty})
		tpath.Line(vg.Point{X: bar.Max.X + n, Y: ty})
		if t.Label != "" {
			full.FillText(ts, vg.Point{X: bar.Max.X + tickLen + 2, Y: ty}, t.Label)
		}
	}
	full.SetLineStyle(draw.LineStyle{Color: color.Black, Width: frameWidth})
	full.Stroke(tpath)
	if m.HasContour && m.Contour >= zlo && m.Contour <= zhi {
		cy := yOf(m.Contour)
		full.StrokeLine2(contourHalo, bar.Min.X, cy, bar.Max.X, cy)
		full.StrokeLine2(contourStyle, bar.Min.X, cy, bar.Max.X, cy)
	}
	ls.Rotation = math.Pi / 2
	ls.XAlign, ls.YAlign = draw.XCenter, draw.YTop
	full.FillText(ls, vg.Point{X: bar.Max.X + tickLen + 2 + tw + 6, Y: (bar.Min.Y + bar.Max.Y) / 2},
		axisLabel(orDefault(m.label(), "z"), m.Unit))
	return c
}

var (
	contourStyle = draw.LineStyle{Color: color.Black, Width: 1.1}
	contourHalo  = draw.LineStyle{Color: color.White, Width: 3}
)

// mapScale is one axis of a map: the drawable values in layout coordinates
// (log10 of the values on a logarithmic axis, else the values), in which cells
// and contours are computed, and the way back to data coordinates.
type mapScale struct {
	layout []float64
	log    bool
}

// newMapScale lays out the values v, on a log scale when log is asked for and
// every value is positive (else linearly, as a profile falls back).
func newMapScale(v []float64, log bool) mapScale {
	if log {
		for _, x := range v {
			if !(x > 0) {
				log = false
				break
			}
		}
	}
	if !log || len(v) == 0 {
		return mapScale{layout: v}
	}
	l := make([]float64, len(v))
	for i, x := range v {
		l[i] = math.Log10(x)
	}
	return mapScale{layout: l, log: true}
}

// data turns a layout coordinate back into a data value.
func (s mapScale) data(u float64) float64 {
	if s.log {
		return math.Pow(10, u)
	}
	return u
}

// edges are the cell edges in data coordinates, ascending: midpoints in layout
// coordinates, so geometric midpoints on a log axis.
func (s mapScale) edges() []float64 {
	e := cellEdges(s.layout)
	for i := range e {
		e[i] = s.data(e[i])
	}
	return e
}

// setAxis gives the plot axis its scale and ticks.
func (s mapScale) setAxis(a *plot.Axis, reverse bool) {
	var n plot.Normalizer = plot.LinearScale{}
	if s.log {
		n = plot.LogScale{}
		a.Tick.Marker = logTicks{}
	}
	if reverse {
		n = plot.InvertedScale{Normalizer: n}
	}
	a.Scale = n
}

// mapContour traces the level in layout coordinates and returns it in data
// coordinates: on a log axis the crossing of a cell edge is interpolated in the
// logarithm, where the axis draws the edge straight.
func mapContour(x, y mapScale, z [][]float64, level float64) contourLines {
	lines := contour(x.layout, y.layout, z, level)
	for _, l := range lines {
		for i := range l {
			l[i] = [2]float64{x.data(l[i][0]), y.data(l[i][1])}
		}
	}
	return lines
}

// raster draws the map cells as one image spanning the cells' outer edges.
type raster struct {
	x, y     mapScale
	z        [][]float64
	nx       int
	zlo, zhi float64
	cyclic   bool
	memo     *mapMemo // nil: nothing kept
}

func (r *raster) DataRange() (xmin, xmax, ymin, ymax float64) {
	xe, ye := r.x.edges(), r.y.edges()
	return xe[0], xe[len(xe)-1], ye[0], ye[len(ye)-1]
}

func (r *raster) Plot(c draw.Canvas, p *plot.Plot) {
	trX, trY := p.Transforms(&c)
	// Pixels are even in layout coordinates, which the axes draw evenly.
	xe, ye := cellEdges(r.x.layout), cellEdges(r.y.layout)
	x0, x1 := trX(r.x.data(xe[0])), trX(r.x.data(xe[len(xe)-1]))
	y0, y1 := trY(r.y.data(ye[0])), trY(r.y.data(ye[len(ye)-1]))
	hx, hy := max(int(math.Abs(float64(x1-x0))*2), 1), max(int(math.Abs(float64(y1-y0))*2), 1)
	xs := pixelCells(xe, hx)
	ys := pixelCells(ye, hy)
	toInput(xs, r.x.layout)
	toInput(ys, r.y.layout)
	// Pixels run left to right and top to bottom; cells run along the axes.
	key := [4]int{hx, hy, b2i(x0 > x1), b2i(y0 < y1)}
	rect := vg.Rectangle{Min: vg.Point{X: min(x0, x1), Y: min(y0, y1)}, Max: vg.Point{X: max(x0, x1), Y: max(y0, y1)}}
	if r.memo != nil && r.memo.img != nil && r.memo.imgKey == key {
		c.DrawImage(rect, r.memo.img)
		return
	}
	if x0 > x1 {
		reverseRanges(xs)
	}
	if y0 < y1 {
		reverseRanges(ys)
	}
	colours := ramp
	if r.cyclic {
		colours = wheel
	}
	pal := make(color.Palette, rampSize+1)
	for i, col := range colours {
		pal[i] = col
	}
	pal[rampSize] = color.NRGBA{}
	img := image.NewPaletted(image.Rect(0, 0, len(xs), len(ys)), pal)
	for py, yr := range ys {
		for px, xr := range xs {
			var sum, sc, ss float64 // sc, ss: the mean on the circle (cyclic)
			var n int
			for j := yr[0]; j < yr[1]; j++ {
				for i := xr[0]; i < xr[1]; i++ {
					v := r.z[j][i]
					if !finite(v) {
						continue
					}
					n++
					if !r.cyclic {
						sum += v
						continue
					}
					s, c := math.Sincos(2 * math.Pi * (v - r.zlo) / (r.zhi - r.zlo))
					sc, ss = sc+c, ss+s
				}
			}
			idx := uint8(rampSize)
			switch {
			case n > 0 && r.cyclic:
				idx = uint8(wheelIndex(math.Atan2(ss, sc) / (2 * math.Pi)))
			case n > 0:
				idx = uint8(rampIndex((sum/float64(n) - r.zlo) / (r.zhi - r.zlo)))
			}
			img.SetColorIndex(px, py, idx)
		}
	}
	out := blocks(img, hx/len(xs), hy/len(ys))
	if r.memo != nil {
		r.memo.img, r.memo.imgKey = out, key
	}
	c.DrawImage(rect, out)
}

func b2i(b bool) int {
	if b {
		return 1
	}
	return 0
}

// blocks enlarges img by whole factors (nearest neighbour), so that each cell
// of a small map is a block of pixels: a viewer or converter that scales the
// image smoothly (CSS image-rendering is not honoured everywhere) then blurs
// only the edges between cells, not whole cells into each other.
func blocks(img *image.Paletted, kx, ky int) *image.Paletted {
	kx, ky = max(kx, 1), max(ky, 1)
	if kx == 1 && ky == 1 {
		return img
	}
	w, h := img.Rect.Dx(), img.Rect.Dy()
	out := image.NewPaletted(image.Rect(0, 0, w*kx, h*ky), img.Palette)
	for y := range h * ky {
		src := img.Pix[(y/ky)*img.Stride:]
		dst := out.Pix[y*out.Stride:]
		for x := range w * kx {
			dst[x] = src[x/kx]
		}
	}
	return out
}

// drawable returns the axis values to draw a map with: the values themselves when
// they are finite and strictly monotonic, else the indices 0, 1, … with a note for
// the axis label (cells cannot be placed by values out of order).
func drawable(v []float64) ([]float64, string) {
	ok := true
	for i, x := range v {
		if !finite(x) || i >= 2 && (x-v[i-1])*(v[1]-v[0]) <= 0 || i == 1 && x == v[0] {
			ok = false
			break
		}
	}
	if ok {
		return v, ""
	}
	idx := make([]float64, len(v))
	for i := range idx {
		idx[i] = float64(i)
	}
	return idx, " by index (values not monotonic)"
}

// cellEdges turns cell centres into cell edges: midpoints between neighbours and
// half a step beyond the ends; the result is ascending whatever the input order.
func cellEdges(v []float64) []float64 {
	n := len(v)
	e := make([]float64, n+1)
	if n == 1 {
		d := math.Max(math.Abs(v[0])*0.05, 0.5)
		return []float64{v[0] - d, v[0] + d}
	}
	for i := 1; i < n; i++ {
		e[i] = (v[i-1] + v[i]) / 2
	}
	e[0] = v[0] - (v[1]-v[0])/2
	e[n] = v[n-1] + (v[n-1]-v[n-2])/2
	if e[0] > e[n] {
		for i, j := 0, n; i < j; i, j = i+1, j-1 {
			e[i], e[j] = e[j], e[i]
		}
	}
	return e
}

// pixelCells maps image pixels along an axis (low to high) to the half-open range
// of cells each shows. The image has one pixel per cell when cells are even and
// at most maxPixels (capped also by the canvas resolution hint), else the cells
// whose centres fall in a pixel are averaged, or for uneven cells the nearest is
// taken at a finer pixel pitch. Index ranges refer to the ascending edge order;
// cellIndex turns them back into input order.
func pixelCells(edges []float64, hint int) [][2]int {
	n := len(edges) - 1
	even := true
	w := (edges[n] - edges[0]) / float64(n)
	for i := range n {
		if math.Abs(edges[i+1]-edges[i]-w) > 0.01*math.Abs(w) {
			even = false
			break
		}
	}
	limit := min(maxPixels, max(hint, 16))
	if even && n <= limit {
		out := make([][2]int, n)
		for i := range out {
			out[i] = [2]int{i, i + 1}
		}
		return out
	}
	np := limit
	if even {
		np = min(n, limit)
	}
	out := make([][2]int, np)
	k := 0
	for p := range np {
		a := edges[0] + (edges[n]-edges[0])*float64(p)/float64(np)
		b := edges[0] + (edges[n]-edges[0])*float64(p+1)/float64(np)
		// Cells whose centre lies in [a, b).
		for k < n && (edges[k]+edges[k+1])/2 < a {
			k++
		}
		j := k
		for j < n && (edges[j]+edges[j+1])/2 < b {
			j++
		}
		if j == k { // no centre inside: the cell under the pixel centre
			mid := (a + b) / 2
			c := k
			for c < n-1 && edges[c+1] <= mid {
				c++
			}
			for c > 0 && edges[c] > mid {
				c--
			}
			out[p] = [2]int{c, c + 1}
			continue
		}
		out[p] = [2]int{k, j}
	}
	return out
}

// toInput turns cell ranges in ascending order into ranges of input indices, for
// axes given high to low.
func toInput(r [][2]int, v []float64) {
	n := len(v)
	if n < 2 || v[0] <= v[n-1] {
		return
	}
	for i := range r {
		r[i] = [2]int{n - r[i][1], n - r[i][0]}
	}
	reverseRanges(r)
}

func reverseRanges(r [][2]int) {
	for i, j := 0, len(r)-1; i < j; i, j = i+1, j-1 {
		r[i], r[j] = r[j], r[i]
	}
}
