package display

import (
	"math"
	"slices"
	"sort"
	"strings"

	"gonum.org/v1/plot"
	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
	"gonum.org/v1/plot/vg/vgsvg"
)

// panel is one plot of a stacked figure: its y label and its lines.
type panel struct {
	label   string
	lines   []line
	degrees bool // phase axis: ticks at multiples of 90°
	zero    bool // the y range includes 0 (amplitudes, gradients)
	// magnet marks a quantity in M0 units (no unit): when its values lie
	// within [−1, 1] the axis is the fixed [0, 1] or [−1, 1].
	magnet bool
}

// Y-range rules, so a reader sees what changed and by how much rather than an
// axis magnified to whatever the data span:
const (
	// yPad is the fraction of the span added above and below, so curves do not
	// run along the frame.
	yPad = 0.06
	// minRelSpan is the smallest span, as a fraction of the largest |value|,
	// shown for a quantity with a unit: a property varying by 2 % over a sweep
	// reads as nearly constant, not as a zigzag across the panel. It matches
	// padRange's span for a constant (±10 %), so the axis does not jump as a
	// variation shrinks to nothing.
	minRelSpan = 0.2
	// minDegSpan is the smallest span of an axis in degrees: a quarter turn.
	minDegSpan = 90
	// magnetSlack is how far a magnetization may stray past 0 (rounding, a
	// simulation's last digits) and still take the one-sided axis.
	magnetSlack = 0.02
)

// yRange is the y range of the panel for data spanning [lo, hi] (lo > hi when
// there are none): magnetization on a fixed axis, otherwise the data widened to
// a minimum span (not crossing zero when the data do not) and padded.
func (pn panel) yRange(lo, hi float64) (float64, float64) {
	if !(lo <= hi) {
		return padRange(lo, hi, yPad)
	}
	if pn.magnet && lo >= -1-1e-6 && hi <= 1+1e-6 {
		// Magnitudes (mxy, echo, mz of an excitation) on [0, 1]; anything that
		// goes negative on the full [−1, 1], so an inversion shows where Mz
		// stands against both +M0 and −M0.
		if lo >= -magnetSlack {
			return padRange(0, 1, yPad)
		}
		return padRange(-1, 1, yPad)
	}
	if pn.zero {
		lo, hi = math.Min(lo, 0), math.Max(hi, 0)
	}
	span := minRelSpan * math.Max(math.Abs(lo), math.Abs(hi))
	if pn.degrees {
		span = minDegSpan
	}
	if hi-lo < span {
		mid := lo/2 + hi/2
		nlo, nhi := mid-span/2, mid+span/2
		// Widening keeps the data's side of zero: a flip angle of 8–65° is
		// drawn from 0, never from −15°.
		switch {
		case lo >= 0 && hi > 0 && nlo < 0:
			nlo, nhi = 0, span
		case hi <= 0 && lo < 0 && nhi > 0:
			nlo, nhi = -span, 0
		}
		lo, hi = nlo, nhi
	}
	return padRange(lo, hi, yPad)
}

// stack is a figure of panels stacked vertically over one shared x axis, with a
// title, a legend and labelled vertical marks above the top panel.
type stack struct {
	title   string
	xlabel  string
	reverse bool
	panels  []panel
	legend  []legendItem
	marks   []Mark
	// fromZero starts the x axis at 0 when the data start just after it (sample
	// midpoints of a waveform).
	fromZero bool
	// xpad widens the x range by this fraction on each side (dots or pulse edges
	// would otherwise sit on the frame).
	xpad float64
	// logX draws x on a logarithmic scale.
	logX bool
	// xs, when set, are the swept x values: the x range spans them even where
	// no curve has a value (points left out show as a gap, not as a shorter axis).
	xs []float64
	// notes are drawn in small text under the panels.
	notes []string
}

func panelHeightFor(n int) vg.Length {
	switch {
	case n == 1:
		return 2.5 * vg.Inch
	case n == 2:
		return 1.8 * vg.Inch
	case n == 3:
		return 1.5 * vg.Inch
	}
	return 1.25 * vg.Inch
}

// plots builds the gonum plots of the panels, all on one x range, and returns
// them with the marks inside the data's x range (those that are drawn).
func (s stack) plots() ([]*plot.Plot, []Mark) {
	for i := range s.panels {
		s.panels[i].lines = slices.Clone(s.panels[i].lines)
		for k := range s.panels[i].lines {
			s.panels[i].lines[k].logX = s.logX
		}
	}
	xlo, xhi := math.Inf(1), math.Inf(-1)
	for _, pn := range s.panels {
		for _, l := range pn.lines {
			a, b, _, _ := l.DataRange()
			xlo, xhi = math.Min(xlo, a), math.Max(xhi, b)
		}
	}
	if xlo <= xhi {
		for _, x := range s.xs {
			if finite(x) && (!s.logX || x > 0) {
				xlo, xhi = math.Min(xlo, x), math.Max(xhi, x)
			}
		}
	}
	if s.fromZero && xlo > 0 && xlo < 0.05*(xhi-xlo) {
		xlo = 0
	}
	if s.logX && !(xlo > 0 && xhi > xlo) {
		s.logX = false // nothing a log axis can show: fall back to linear
	}
	// Marks are shown over the data's range only (not over the padding).
	var shown []Mark
	for _, m := range s.marks {
		if tol := 1e-9 * (xhi - xlo); m.X >= xlo-tol && m.X <= xhi+tol {
			shown = append(shown, m)
		}
	}
	s.marks = shown
	if s.xpad == 0 && !s.logX && s.markAtEnd(xlo, xhi) {
		// A mark on the range's end would hide under the frame.
		s.xpad = 0.015
	}
	switch {
	case s.logX:
		f := math.Pow(xhi/xlo, s.xpad)
		xlo, xhi = xlo/f, xhi*f
	default:
		xlo, xhi = padRange(xlo, xhi, s.xpad)
	}
	ps := make([]*plot.Plot, len(s.panels))
	for i, pn := range s.panels {
		p := newPlot()
		ylo, yhi := math.Inf(1), math.Inf(-1)
		for _, l := range pn.lines {
			_, _, a, b := l.DataRange()
			ylo, yhi = math.Min(ylo, a), math.Max(yhi, b)
		}
		ylo, yhi = pn.yRange(ylo, yhi)
		p.X.Min, p.X.Max = xlo, xhi
		p.Y.Min, p.Y.Max = ylo, yhi
		var scale plot.Normalizer = plot.LinearScale{}
		if s.logX {
			scale = plot.LogScale{}
			p.X.Tick.Marker = logTicks{}
		}
		if s.reverse {
			scale = plot.InvertedScale{Normalizer: scale}
		}
		p.X.Scale = scale
		if pn.degrees {
			p.Y.Tick.Marker = degreeTicks{}
		} else if n := len(s.panels); n >= 3 {
			p.Y.Tick.Marker = niceTicks{n: 4}
		}
		p.Y.Label.Text = pn.label
		// A label longer than its panel is wrapped onto more lines.
		if avail := 0.95*panelHeightFor(len(s.panels)) - 6; textStyle(labelSize).Width(pn.label) > avail {
			p.Y.Label.Text = strings.Join(wrapText(pn.label, textStyle(labelSize), avail), "\n")
		}

		if i == len(s.panels)-1 {
			p.X.Label.Text = s.xlabel
		} else {
			p.X.Tick.Marker = noLabels{p.X.Tick.Marker}
		}
		p.Add(grid{x: true, y: true}, marks(s.marks))
		for _, l := range pn.lines {
			p.Add(l)
		}
		p.Add(frame{})
		ps[i] = p
	}
	return ps, s.marks
}

// markAtEnd reports whether a mark lies at (within 0.5 % of) an end of the
// x range [lo, hi].
func (s stack) markAtEnd(lo, hi float64) bool {
	tol := 0.005 * (hi - lo)
	for _, m := range s.marks {
		if finite(m.X) && (math.Abs(m.X-lo) <= tol || math.Abs(m.X-hi) <= tol) {
			return true
		}
	}
	return false
}

// marks draws dashed vertical lines at the marks inside the x range.
type marks []Mark

func (m marks) Plot(c draw.Canvas, p *plot.Plot) {
	trX, _ := p.Transforms(&c)
	var path, solid vg.Path
	for _, mk := range m {
		if !finite(mk.X) || mk.X < p.X.Min || mk.X > p.X.Max || mk.X <= 0 && isLog(p.X.Scale) {
			continue
		}
		x := trX(mk.X)
		if mk.Marker {
			solid.Move(vg.Point{X: x, Y: c.Min.Y})
			solid.Line(vg.Point{X: x, Y: c.Max.Y})
			continue
		}
		path.Move(vg.Point{X: x, Y: c.Min.Y})
		path.Line(vg.Point{X: x, Y: c.Max.Y})
	}
	if len(path) > 0 {
		c.SetLineStyle(draw.LineStyle{Color: markColor, Width: 0.7, Dashes: []vg.Length{3, 2}})
		c.Stroke(path)
	}
	if len(solid) > 0 {
		c.SetLineStyle(draw.LineStyle{Color: markerColor, Width: markerWidth})
		c.Stroke(solid)
	}
}

func isLog(n plot.Normalizer) bool {
	if inv, ok := n.(plot.InvertedScale); ok {
		n = inv.Normalizer
	}
	_, ok := n.(plot.LogScale)
	return ok
}

// placedMark is a mark label: its left edge, row above the top panel and text.
type placedMark struct {
	left vg.Length
	row  int
	txt  string
}

// placeMarks lays mark labels out above the top panel, left to right. A label is
// centred on its line when it fits; when the next mark is too close for both to
// be centred, the label goes to the left of its line and the next one to the
// right of its own, so a pair of close marks (a band edge and a half-width) still
// reads at a glance; only when no place is free on a row does a label move up a
// row.
func placeMarks(ms []Mark, trX func(float64) vg.Length, lo, hi float64, x0, x1 vg.Length) ([]placedMark, int) {
	ts := textStyle(markSize)
	type mk struct {
		x   vg.Length
		w   vg.Length
		txt string
	}
	type raw struct {
		x   vg.Length
		txt string
	}
	var rs []raw
	for _, m := range ms {
		if m.Label == "" || !finite(m.X) || m.X < lo || m.X > hi {
			continue
		}
		rs = append(rs, raw{x: trX(m.X), txt: m.Label})
	}
	sort.SliceStable(rs, func(i, j int) bool { return rs[i].x < rs[j].x })
	// Marks whose lines a reader cannot tell apart (two pulses with the same
	// band edge) get one label naming all of them, at their mean position.
	var in []mk
	for i := 0; i < len(rs); {
		j := i + 1
		for j < len(rs) && rs[j].x-rs[j-1].x <= sameMark {
			j++
		}
		var sum vg.Length
		var txts []string
		for _, r := range rs[i:j] {
			sum += r.x
			txts = append(txts, r.txt)
		}
		txt := mergeLabels(txts)
		in = append(in, mk{x: sum / vg.Length(j-i), w: ts.Width(txt), txt: txt})
		i = j
	}
	const gap, side = 4, 2
	var rows [][][2]vg.Length // occupied spans per row
	free := func(r int, a, b vg.Length) bool {
		if a < x0 || b > x1 {
			return false
		}
		if r >= len(rows) {
			return true
		}
		for _, sp := range rows[r] {
			if a < sp[1]+gap && b > sp[0]-gap {
				return false
			}
		}
		return true
	}
	var out []placedMark
	for i, m := range in {
		centre := max(min(m.x-m.w/2, x1-m.w), x0)
		right, left := m.x+side, m.x-side-m.w
		cands := []vg.Length{centre, right, left}
		if i+1 < len(in) && in[i+1].x-m.x < (m.w+in[i+1].w)/2+gap {
			cands = []vg.Length{left, centre, right}
		}
		for r := 0; ; r++ {
			placed := false
			for _, a := range cands {
				if free(r, a, a+m.w) {
					for len(rows) <= r {
						rows = append(rows, nil)
					}
					rows[r] = append(rows[r], [2]vg.Length{a, a + m.w})
					out = append(out, placedMark{left: a, row: r, txt: m.txt})
					placed = true
					break
				}
			}
			if placed {
				break
			}
			if r > len(in) { // wider than the figure: left out
				break
			}
		}
	}
	return out, len(rows)
}

// sameMark is the distance in points within which mark lines read as one.
const sameMark = 1.5

// mergeLabels joins the labels of marks at one place: repeats are dropped, and
// labels sharing a last word or words name their subjects once each ("p1, p2
// band edge"); others are joined with " / ".
func mergeLabels(ls []string) string {
	var u []string
	for _, l := range ls {
		if !slices.Contains(u, l) {
			u = append(u, l)
		}
	}
	if len(u) == 1 {
		return u[0]
	}
	// The longest common suffix that starts at a word.
	suf := u[0]
	for _, l := range u[1:] {
		for !strings.HasSuffix(l, suf) {
			k := strings.Index(suf, " ")
			if k < 0 {
				suf = ""
				break
			}
			suf = suf[k+1:]
		}
	}
	if suf != "" {
		var heads []string
		for _, l := range u {
			h := strings.TrimSpace(strings.TrimSuffix(l, suf))
			if h == "" || !strings.HasSuffix(l, " "+suf) {
				heads = nil
				break
			}
			heads = append(heads, h)
		}
		if heads != nil {
			return strings.Join(heads, ", ") + " " + suf
		}
	}
	return strings.Join(u, " / ")
}

// svg renders the stack.
func (s stack) svg() string { return finishSVG(s.draw(svgCanvas).(*vgsvg.Canvas)) }

// draw renders the stack on a canvas made by nc.
func (s stack) draw(nc canvasMaker) vg.CanvasWriterTo {
	ps, shown := s.plots()
	n := len(ps)
	ph := panelHeightFor(n)
	bodyH := vg.Length(n)*ph + 0.35*vg.Inch
	rows := legendRows(s.legend, figWidth-20)
	tiles := draw.Tiles{Rows: n, Cols: 1, PadY: 6, PadLeft: 4, PadRight: 14, PadBottom: 4}
	plotRows := make([][]*plot.Plot, n)
	for i, p := range ps {
		plotRows[i] = []*plot.Plot{p}
	}

	// The x layout does not depend on the height, so a first alignment on a
	// canvas of the body's size places the mark labels.
	probe := draw.Canvas{Rectangle: vg.Rectangle{Max: vg.Point{X: figWidth, Y: bodyH}}}
	cs := plot.Align(plotRows, tiles, probe)
	dc := ps[0].DataCanvas(cs[0][0])
	trX, _ := ps[0].Transforms(&dc)
	// Mark labels stay over the data area, so a mark at the end of the range is
	// labelled inside the frame's width, not over the tick labels or the edge.
	var features []Mark
	for _, m := range shown {
		if !m.Marker {
			features = append(features, m)
		}
	}
	placed, markRows := placeMarks(features, trX, ps[0].X.Min, ps[0].X.Max, dc.Min.X, dc.Max.X)
	// Labelled markers stand in a band of their own right above the panel,
	// under the feature labels.
	markers := placeMarkers(shown, trX, ps[0].X.Min, ps[0].X.Max, dc.Min.X, dc.Max.X)

	title := wrapText(s.title, boldStyle(titleSize), figWidth-24)
	var headH vg.Length = headPad
	if len(title) > 0 {
		headH += vg.Length(len(title))*rowHeight + 3
	}
	headH += vg.Length(len(rows)) * rowHeight
	headH += vg.Length(markRows) * markRow
	if markRows > 0 {
		headH += 2
	}
	headH += markers.height
	notes := wrapNotes(s.notes)
	footH := footHeight(notes)
	H := headH + bodyH + footH

	c := nc(figWidth, H)
	full := draw.New(c)
	full.SetColor(whiteColor)
	full.Fill(full.Rectangle.Path())

	y := H - headPad
	y = drawTitle(full, title, y)
	if len(rows) > 0 {
		drawLegend(full, rows, dc.Min.X, dc.Max.X, y-rowHeight/2)
		y -= vg.Length(len(rows)) * rowHeight
	}
	drawNotes(full, notes, footH)
	body := draw.Crop(full, 0, 0, footH, -(H - bodyH - footH))
	cs = plot.Align(plotRows, tiles, body)
	for i, row := range cs {
		ps[i].Draw(row[0])
	}
	top := ps[0].DataCanvas(cs[0][0]).Max.Y
	drawMarkerLabels(full, markers, top)
	top += markers.height
	if markRows > 0 {
		ms := textStyle(markSize)
		ms.Color = markColor
		ms.XAlign, ms.YAlign = draw.XLeft, draw.YBottom
		for _, pm := range placed {
			full.FillText(ms, vg.Point{X: pm.left, Y: top + 2 + vg.Length(pm.row)*markRow}, pm.txt)
		}
	}
	return c
}

// wrapNotes wraps each note to the figure's width in the notes' small type.
func wrapNotes(notes []string) []string {
	var out []string
	for _, n := range notes {
		out = append(out, wrapText(n, textStyle(markSize), figWidth-24)...)
	}
	return out
}

// footHeight is the height of the band under a figure holding the wrapped notes.
func footHeight(lines []string) vg.Length {
	if len(lines) == 0 {
		return 0
	}
	return vg.Length(len(lines))*markRow + headPad
}

// drawNotes draws the wrapped note lines left-aligned in the band of height
// footH at the bottom of the figure.
func drawNotes(c draw.Canvas, lines []string, footH vg.Length) {
	ns := textStyle(markSize)
	ns.Color = markColor
	ns.XAlign, ns.YAlign = draw.XLeft, draw.YTop
	y := footH - headPad/2
	for _, l := range lines {
		c.FillText(ns, vg.Point{X: 12, Y: y}, l)
		y -= markRow
	}
}

// drawTitle draws the wrapped title lines centred, top at y, and returns the y
// below them.
func drawTitle(c draw.Canvas, lines []string, y vg.Length) vg.Length {
	ts := boldStyle(titleSize)
	ts.XAlign, ts.YAlign = draw.XCenter, draw.YTop
	for _, l := range lines {
		c.FillText(ts, vg.Point{X: figWidth / 2, Y: y}, l)
		y -= rowHeight
	}
	if len(lines) > 0 {
		y -= 3
	}
	return y
}
