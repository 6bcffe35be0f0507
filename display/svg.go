package display

import (
	"bytes"
	"fmt"
	"html"
	"image/color"
	"math"
	"regexp"
	"strconv"
	"strings"

	xfont "golang.org/x/image/font"
	"gonum.org/v1/plot"
	"gonum.org/v1/plot/font"
	"gonum.org/v1/plot/text"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
	"gonum.org/v1/plot/vg/vgsvg"
)

// Figure geometry, in points. A notebook shows an SVG at its stated size, so the
// width is that of a journal's single-and-a-half column.
const (
	figWidth   = 6 * vg.Inch
	headPad    = 6  // space above the title and below the header
	titleSize  = 11 // figure title, bold
	labelSize  = 10 // axis labels, legend
	tickSize   = 9  // tick labels
	markSize   = 8  // mark labels
	rowHeight  = 13 // one legend row
	markRow    = 11 // one row of mark labels
	sampleLen  = 22 // legend line sample
	legendGap  = 14 // between legend items
	lineWidth  = 1.3
	frameWidth = 0.7
)

// Text is measured with the Liberation fonts gonum/plot carries; they are metric
// compatible with Arial/Helvetica, which the SVG names as fallbacks (no font data
// is embedded).
var sansFont = font.Font{Typeface: "Liberation", Variant: "Sans"}

func textStyle(size vg.Length) text.Style {
	return text.Style{Color: color.Black, Font: font.From(sansFont, size), Handler: plot.DefaultTextHandler}
}

func boldStyle(size vg.Length) text.Style {
	s := textStyle(size)
	s.Font.Weight = xfont.WeightBold
	return s
}

// Line colours are the Okabe–Ito colour-blind-safe set (Okabe & Ito, "Color
// Universal Design", 2008), with yellow left out (too pale on white); each colour
// also gets its own dash pattern so curves stay apart in grey print.
var lineColors = []color.NRGBA{
	{0x00, 0x72, 0xb2, 0xff}, // blue
	{0xd5, 0x5e, 0x00, 0xff}, // vermillion
	{0x00, 0x9e, 0x73, 0xff}, // bluish green
	{0xcc, 0x79, 0xa7, 0xff}, // reddish purple
	{0xe6, 0x9f, 0x00, 0xff}, // orange
	{0x56, 0xb4, 0xe9, 0xff}, // sky blue
	{0x00, 0x00, 0x00, 0xff}, // black
}

var lineDashes = [][]vg.Length{nil, {5, 2.5}, {1.5, 1.8}, {6, 2, 1.5, 2}, {9, 3}, {3, 2}, {1, 1}}

// seriesStyle is the line style of the i-th pulse of a figure.
func seriesStyle(i int) draw.LineStyle {
	return draw.LineStyle{
		Color:  lineColors[i%len(lineColors)],
		Width:  lineWidth,
		Dashes: lineDashes[(i/len(lineColors)+i)%len(lineDashes)],
	}
}

var (
	whiteColor = color.White
	gridColor  = color.NRGBA{0xe4, 0xe4, 0xe4, 0xff}
	markColor  = color.NRGBA{0x55, 0x55, 0x55, 0xff}
)

// newPlot is a plot with the house style: sans-serif text, thin outward ticks,
// no gap between axes and data (a frame closes the box), no background of its own.
func newPlot() *plot.Plot {
	p := plot.New()
	p.BackgroundColor = nil
	for _, a := range []*plot.Axis{&p.X, &p.Y} {
		a.Label.TextStyle.Font = font.From(sansFont, labelSize)
		a.Label.Padding = 3
		a.Tick.Label.Font = font.From(sansFont, tickSize)
		a.Tick.Length = 4
		a.Tick.Width = frameWidth
		a.Width = frameWidth
		a.Padding = 0
		a.Tick.Marker = niceTicks{n: 5}
	}
	p.X.Tick.Marker = niceTicks{n: 7}
	return p
}

// axisLabel joins a label and its unit: "offset (Hz)", or the bare label.
func axisLabel(label, unit string) string {
	if unit == "" {
		return label
	}
	return label + " (" + unit + ")"
}

// frame strokes the border of the data area.
type frame struct{}

func (frame) Plot(c draw.Canvas, _ *plot.Plot) {
	c.SetLineStyle(draw.LineStyle{Color: color.Black, Width: frameWidth})
	c.Stroke(c.Rectangle.Path())
}

// grid draws light lines at the labelled ticks of both axes.
type grid struct{ x, y bool }

func (g grid) Plot(c draw.Canvas, p *plot.Plot) {
	trX, trY := p.Transforms(&c)
	var path vg.Path
	if g.x {
		for _, t := range p.X.Tick.Marker.Ticks(p.X.Min, p.X.Max) {
			if t.IsMinor() || t.Value < p.X.Min || t.Value > p.X.Max {
				continue
			}
			x := trX(t.Value)
			path.Move(vg.Point{X: x, Y: c.Min.Y})
			path.Line(vg.Point{X: x, Y: c.Max.Y})
		}
	}
	if g.y {
		for _, t := range p.Y.Tick.Marker.Ticks(p.Y.Min, p.Y.Max) {
			if t.IsMinor() || t.Value < p.Y.Min || t.Value > p.Y.Max {
				continue
			}
			y := trY(t.Value)
			path.Move(vg.Point{X: c.Min.X, Y: y})
			path.Line(vg.Point{X: c.Max.X, Y: y})
		}
	}
	if len(path) > 0 {
		c.SetLineStyle(draw.LineStyle{Color: gridColor, Width: 0.5})
		c.Stroke(path)
	}
}

// line is a polyline through (x, y), broken at non-finite values. It is drawn as
// one SVG path, thinned in canvas space to what half-point columns can show (the
// first, lowest, highest and last point of each column), which keeps the outline
// of any curve while bounding the file size.
type line struct {
	x, y  []float64
	style draw.LineStyle
	// jump, when positive, breaks the line where consecutive values differ by more
	// than it: a wrapped phase (jump 180°) is not drawn as a vertical stroke.
	jump float64
	// dots marks every point with a small disc (short series, so a reader sees
	// where the samples are).
	dots bool
	// logX leaves out points with x ≤ 0, which a logarithmic axis cannot show.
	logX bool
}

// ok reports whether point i can be drawn.
func (l line) ok(i int) bool {
	return finite(l.x[i]) && finite(l.y[i]) && (!l.logX || l.x[i] > 0)
}

func (l line) Plot(c draw.Canvas, p *plot.Plot) {
	trX, trY := p.Transforms(&c)
	var path vg.Path
	var run []vg.Point
	flush := func() {
		pts := straighten(thin(run), straightTol)
		if len(pts) == 1 {
			// A lone point: a short tick so it stays visible.
			pts = append(pts, vg.Point{X: pts[0].X + 0.8, Y: pts[0].Y})
		}
		for i, q := range pts {
			if i == 0 {
				path.Move(q)
			} else {
				path.Line(q)
			}
		}
		run = run[:0]
	}
	for i := range min(len(l.x), len(l.y)) {
		if !l.ok(i) {
			flush()
			continue
		}
		if l.jump > 0 && i > 0 && l.ok(i-1) && math.Abs(l.y[i]-l.y[i-1]) > l.jump {
			flush()
		}
		run = append(run, vg.Point{X: trX(l.x[i]), Y: trY(l.y[i])})
	}
	flush()
	if len(path) == 0 {
		return
	}
	c.SetLineStyle(l.style)
	c.Stroke(path)
	if l.dots {
		g := draw.GlyphStyle{Color: l.style.Color, Radius: 1.8, Shape: draw.CircleGlyph{}}
		for i := range min(len(l.x), len(l.y)) {
			if l.ok(i) {
				c.DrawGlyphNoClip(g, vg.Point{X: trX(l.x[i]), Y: trY(l.y[i])})
			}
		}
	}
}

func (l line) DataRange() (xmin, xmax, ymin, ymax float64) {
	xmin, ymin = math.Inf(1), math.Inf(1)
	xmax, ymax = math.Inf(-1), math.Inf(-1)
	for i := range min(len(l.x), len(l.y)) {
		if l.ok(i) {
			xmin, xmax = math.Min(xmin, l.x[i]), math.Max(xmax, l.x[i])
			ymin, ymax = math.Min(ymin, l.y[i]), math.Max(ymax, l.y[i])
		}
	}
	return
}

// thin keeps, of each run of consecutive points in one half-point column, the
// first, the lowest, the highest and the last, in their original order.
func thin(pts []vg.Point) []vg.Point {
	if len(pts) < 5 {
		return append([]vg.Point(nil), pts...)
	}
	out := make([]vg.Point, 0, len(pts))
	col := func(p vg.Point) float64 { return math.Floor(float64(p.X) * 2) }
	for i := 0; i < len(pts); {
		j, lo, hi := i, i, i
		for j+1 < len(pts) && col(pts[j+1]) == col(pts[i]) {
			j++
			if pts[j].Y < pts[lo].Y {
				lo = j
			}
			if pts[j].Y > pts[hi].Y {
				hi = j
			}
		}
		keep := []int{i, min(lo, hi), max(lo, hi), j}
		last := -1
		for _, k := range keep {
			if k > last {
				out = append(out, pts[k])
				last = k
			}
		}
		i = j + 1
	}
	return out
}

// straightTol is how far (in points) a dropped vertex may lie from the line
// drawn without it: a twentieth of a point, below what any screen or print
// shows.
const straightTol = 0.05

// straighten drops vertices that lie on the straight line between their kept
// neighbours (within tol, checked for every vertex dropped since the last kept
// one), so that flat and straight stretches cost two points instead of one per
// column.
func straighten(pts []vg.Point, tol vg.Length) []vg.Point {
	if len(pts) < 3 {
		return pts
	}
	out := []vg.Point{pts[0]}
	start := 0 // index of the last kept point
	for i := 1; i < len(pts)-1; i++ {
		// Would the segment from the last kept point to pts[i+1] pass within
		// tol of every point after the kept one, pts[i] included?
		if i-start < 256 && onSegment(pts[start], pts[i+1], pts[start+1:i+1], tol) {
			continue
		}
		out = append(out, pts[i])
		start = i
	}
	return append(out, pts[len(pts)-1])
}

// onSegment tells whether every point of mid lies within tol of segment a–b
// and between its ends.
func onSegment(a, b vg.Point, mid []vg.Point, tol vg.Length) bool {
	dx, dy := float64(b.X-a.X), float64(b.Y-a.Y)
	l2 := dx*dx + dy*dy
	if l2 == 0 {
		return false
	}
	for _, p := range mid {
		px, py := float64(p.X-a.X), float64(p.Y-a.Y)
		u := (px*dx + py*dy) / l2
		if u < 0 || u > 1 {
			return false
		}
		cross := px*dy - py*dx
		if cross*cross > float64(tol*tol)*l2 {
			return false
		}
	}
	return true
}

func finite(v float64) bool { return !math.IsNaN(v) && !math.IsInf(v, 0) }

// finiteRange is the range of the finite values, (+Inf, -Inf) when there are none.
func finiteRange(v []float64) (lo, hi float64) {
	lo, hi = math.Inf(1), math.Inf(-1)
	for _, x := range v {
		if finite(x) {
			lo, hi = math.Min(lo, x), math.Max(hi, x)
		}
	}
	return lo, hi
}

// padRange widens [lo, hi] by a fraction on each side so curves do not run along
// the frame; an empty or single-valued range becomes a unit-sized one.
func padRange(lo, hi, frac float64) (float64, float64) {
	switch {
	case lo > hi:
		return 0, 1
	case hi-lo <= 1e-9*math.Max(math.Abs(lo), math.Abs(hi)):
		// Equal, or equal but for rounding: show a span around the value rather
		// than magnifying floating-point noise.
		m := lo/2 + hi/2
		d := math.Max(math.Abs(m)*0.1, 1)
		if m == 0 {
			d = 1
		}
		return m - d, m + d
	}
	d := (hi - lo) * frac
	return lo - d, hi + d
}

// noLabels keeps the tick marks of a ticker but drops their labels (the shared X
// axis of upper panels).
type noLabels struct{ plot.Ticker }

func (n noLabels) Ticks(lo, hi float64) []plot.Tick {
	ts := n.Ticker.Ticks(lo, hi)
	for i := range ts {
		ts[i].Label = ""
	}
	return ts
}

// degreeTicks labels phase axes at multiples of 90° (45° or 30° for narrower
// ranges; for an unwrapped phase spanning turns, whole or half turns, at most
// about seven labels), falling back to the default ticker for small ranges.
type degreeTicks struct{}

func (degreeTicks) Ticks(lo, hi float64) []plot.Tick {
	span := hi - lo
	var step float64
	switch {
	case span >= 1080:
		step = 360 * math.Ceil(span/(360*6))
	case span >= 540:
		step = 180
	case span >= 270:
		step = 90
	case span >= 135:
		step = 45
	case span >= 90:
		step = 30
	default:
		return niceTicks{n: 5}.Ticks(lo, hi)
	}
	var ts []plot.Tick
	for v := math.Ceil(lo/step) * step; v <= hi; v += step {
		ts = append(ts, plot.Tick{Value: v, Label: minus(Num(v, 6))})
		if m := v + step/2; m <= hi && step >= 45 {
			ts = append(ts, plot.Tick{Value: m})
		}
	}
	if m := math.Ceil(lo/step)*step - step/2; m >= lo && step >= 45 {
		ts = append(ts, plot.Tick{Value: m})
	}
	return ts
}

// legendItem is one entry of a figure legend: a line sample and its name.
type legendItem struct {
	name  string
	style draw.LineStyle
	halo  bool // draw a white halo under the sample (contour lines)
}

// legendRows wraps legend items into rows no wider than width.
func legendRows(items []legendItem, width vg.Length) [][]legendItem {
	ts := textStyle(labelSize)
	var rows [][]legendItem
	var w vg.Length
	for _, it := range items {
		iw := sampleLen + 4 + ts.Width(it.name)
		if len(rows) == 0 || w+legendGap+iw > width {
			rows = append(rows, nil)
			w = -legendGap
		}
		rows[len(rows)-1] = append(rows[len(rows)-1], it)
		w += legendGap + iw
	}
	return rows
}

// drawLegend draws wrapped legend rows, each centred between x0 and x1, the first
// row's centre line at y.
func drawLegend(c draw.Canvas, rows [][]legendItem, x0, x1, y vg.Length) {
	ts := textStyle(labelSize)
	ts.YAlign = draw.YCenter
	for _, row := range rows {
		var w vg.Length = -legendGap
		for _, it := range row {
			w += legendGap + sampleLen + 4 + ts.Width(it.name)
		}
		x := (x0+x1)/2 - w/2
		for _, it := range row {
			if it.halo {
				c.StrokeLine2(draw.LineStyle{Color: color.White, Width: it.style.Width + 2}, x, y, x+sampleLen, y)
			}
			c.StrokeLine2(it.style, x, y, x+sampleLen, y)
			x += sampleLen + 4
			c.FillText(ts, vg.Point{X: x, Y: y}, it.name)
			x += ts.Width(it.name) + legendGap
		}
		y -= rowHeight
	}
}

// finishSVG writes the canvas and makes the text self-contained and portable:
// vgsvg names the measuring font (Liberation) without fallbacks and tags PNG data
// as JPEG; neither is what a browser should see. Each text also gets its measured
// length (textLength), so a viewer that falls back to a wider or narrower
// sans-serif still fits it into the space the layout gave it.
func finishSVG(c *vgsvg.Canvas) string {
	var buf bytes.Buffer
	if _, err := c.WriteTo(&buf); err != nil {
		panic("display: writing svg: " + err.Error())
	}
	s := buf.String()
	s = strings.Replace(s, "<!-- Generated by SVGo and Plotinum VG -->\n", "", 1)
	s = strings.ReplaceAll(s, "font-family:Liberation Sans;font-variant:normal;", "font-family:'Liberation Sans',Arial,Helvetica,sans-serif;")
	s = strings.ReplaceAll(s, ";font-weight:normal;font-style:normal", "")
	s = strings.ReplaceAll(s, ";font-style:normal", "")
	// Map cells are drawn as the blocks they are, not blurred into each other
	// by the viewer's scaling (CSS pixelated, with the SVG 1.1 hint for viewers
	// that do not know it).
	s = strings.ReplaceAll(s, `<image x=`, `<image preserveAspectRatio="none" image-rendering="optimizeSpeed" style="image-rendering:pixelated" x=`)
	s = strings.ReplaceAll(s, "data:image/jpg;base64,", "data:image/png;base64,")
	return svgText.ReplaceAllStringFunc(s, fitText)
}

var (
	svgText  = regexp.MustCompile(`<text x="[^"]*" y="[^"]*" transform="scale\(1, -1\)"\n\tstyle="[^"]*">[^<]*</text>`)
	fontSize = regexp.MustCompile(`font-size:([0-9.]+)px`)
)

// fitText adds textLength to one vgsvg <text> element.
func fitText(el string) string {
	m := fontSize.FindStringSubmatch(el)
	if m == nil {
		return el
	}
	size, err := strconv.ParseFloat(m[1], 64)
	if err != nil {
		return el
	}
	ts := textStyle(vg.Length(size))
	if strings.Contains(el, "font-weight:bold") {
		ts = boldStyle(vg.Length(size))
	}
	open := strings.Index(el, ">")
	txt := html.UnescapeString(strings.TrimSuffix(el[open+1:], "</text>"))
	w := ts.Width(txt)
	if w <= 0 {
		return el
	}
	return el[:open] + fmt.Sprintf(` textLength="%.5g" lengthAdjust="spacingAndGlyphs"`, float64(w)) + el[open:]
}

// wrapText breaks s at spaces into lines no wider than width.
func wrapText(s string, ts text.Style, width vg.Length) []string {
	var lines []string
	cur := ""
	for _, w := range strings.Fields(s) {
		try := strings.TrimSpace(cur + " " + w)
		if cur != "" && ts.Width(try) > width {
			lines = append(lines, cur)
			cur = w
			continue
		}
		cur = try
	}
	if cur != "" {
		lines = append(lines, cur)
	}
	return lines
}

// minus writes a leading hyphen as the typographic minus sign, for tick labels.
func minus(s string) string {
	if strings.HasPrefix(s, "-") {
		return "−" + s[1:]
	}
	return s
}

// niceStep is the tick step for about n labelled ticks over [lo, hi]: 1, 2, 2.5
// or 5 times a power of ten; mant is that factor.
func niceStep(lo, hi float64, n int) (step, mant float64) {
	raw := (hi - lo) / float64(max(n, 2))
	mag := math.Pow(10, math.Floor(math.Log10(raw)))
	mant = 10
	for _, m := range []float64{1, 2, 2.5, 5, 10} {
		// A little slack lets a range just over a round one (cell edges of a
		// 0…25 grid) keep the round step.
		if m*mag >= raw*0.85 {
			mant = m
			break
		}
	}
	return mant * mag, mant
}

// niceTicks labels about n ticks at steps of 1, 2, 2.5 or 5 times a power of ten,
// all with the same number of decimals, with unlabelled minor ticks between.
type niceTicks struct{ n int }

func (nt niceTicks) Ticks(lo, hi float64) []plot.Tick {
	if !(hi > lo) || !finite(lo) || !finite(hi) {
		return nil
	}
	step, mant := niceStep(lo, hi, nt.n)
	minors := 5
	if mant == 2 {
		minors = 4
	}
	dec := max(0, int(-math.Floor(math.Log10(step)+1e-9)))
	if mant == 2.5 && step < 10 {
		dec++
	}
	label := func(v float64) string {
		if math.Abs(v) < step*1e-6 {
			v = 0
		}
		if step >= 1e5 || step < 1e-4 {
			return minus(Num(v, 4))
		}
		return minus(strconv.FormatFloat(v, 'f', dec, 64))
	}
	var ts []plot.Tick
	k0, k1 := math.Ceil(lo/step-1e-9), math.Floor(hi/step+1e-9)
	if !(k1-k0 < 1000) || k0 == k0+1 {
		// A span too small for the values' precision: no ladder of ticks to build
		// (and k++ would not advance).
		return []plot.Tick{{Value: lo, Label: label(lo)}}
	}
	for k := k0 - 1; k <= k1; k++ {
		v := k * step
		if k >= k0 {
			ts = append(ts, plot.Tick{Value: v, Label: label(v)})
		}
		for j := 1; j < minors; j++ {
			m := v + float64(j)*step/float64(minors)
			if m >= lo && m <= hi {
				ts = append(ts, plot.Tick{Value: m})
			}
		}
	}
	return ts
}

// logTicks labels a logarithmic axis at 1, 2 and 5 times powers of ten when it
// spans less than two decades, else at the powers of ten, with minor ticks at
// the other integer multiples.
type logTicks struct{}

func (logTicks) Ticks(lo, hi float64) []plot.Tick {
	if !(lo > 0) || !(hi > lo) || !finite(hi) {
		return nil
	}
	few := math.Log10(hi/lo) < 2
	var ts []plot.Tick
	for e := math.Floor(math.Log10(lo)); e <= math.Ceil(math.Log10(hi)); e++ {
		p := math.Pow(10, e)
		for k := 1; k < 10; k++ {
			v := float64(k) * p
			if v < lo*(1-1e-9) || v > hi*(1+1e-9) {
				continue
			}
			t := plot.Tick{Value: v}
			if k == 1 || few && (k == 2 || k == 5) {
				t.Label = Num(v, 3)
			}
			ts = append(ts, t)
		}
	}
	return ts
}
