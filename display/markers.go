package display

import (
	"image/color"
	"math"
	"sort"
	"strings"

	"gonum.org/v1/plot/vg"
	"gonum.org/v1/plot/vg/draw"
)

// Labelled markers (Mark.Marker): named positions the user set on a ppm or
// offset axis (a metabolite, a multiplet, the water line). They are drawn as
// solid lines in their own colour across every panel, each rising into a band
// above the top panel through a short leader to its label. Labels keep the
// order of their lines; when neighbours would overlap they are pushed apart as
// little as possible (clusters of touching labels centred on their lines), the
// leader bending over to its label; when horizontal labels would have to move
// far, every label is turned upright instead (rotated a quarter turn), which
// takes only the text's height across (about 45 labels over the width). Leaders
// never cross, since labels stay in the order of their lines. Beyond what fits
// upright, every other label is left out of the figure (not its line, and not
// of the table or JSON).

var markerColor = color.NRGBA{0x6b, 0x2c, 0x5e, 0xff} // plum, apart from the line colours

const (
	markerWidth  = 0.8 // line width of a marker
	leaderRise   = 3   // straight rise of a leader above the panel
	leaderBend   = 8   // height over which a leader bends to its label
	leaderFoot   = 2   // straight rise under the label
	markerGap    = 3   // least space between two labels
	markerShift  = 24  // largest push of a horizontal label before labels turn upright
	markerMargin = 2   // space under and over the labels
)

// placedMarker is a marker's label: its line's x, the centre of its label
// across, and its text.
type placedMarker struct {
	line, at vg.Length
	txt      string
}

// markerLayout is where the marker labels go: the labels, whether they stand
// upright, and the height of the band they need above the top panel.
type markerLayout struct {
	labels  []placedMarker
	upright bool
	height  vg.Length
}

// extent is the label's size across the axis: its width, or its height when
// upright.
func (l markerLayout) extent(txt string) vg.Length {
	ts := textStyle(markSize)
	if l.upright {
		return ts.Height(txt)
	}
	return ts.Width(txt)
}

// span is the label's extent across the axis, [left, right].
func (l markerLayout) span(pm placedMarker) (vg.Length, vg.Length) {
	e := l.extent(pm.txt)
	return pm.at - e/2, pm.at + e/2
}

// placeMarkers lays out the labels of the markers among ms (others are left
// to placeMarks) whose x lies in [lo, hi], over the data area [x0, x1].
// Markers whose lines a reader cannot tell apart share one label.
func placeMarkers(ms []Mark, trX func(float64) vg.Length, lo, hi float64, x0, x1 vg.Length) markerLayout {
	type raw struct {
		x   vg.Length
		txt string
	}
	var rs []raw
	for _, m := range ms {
		if !m.Marker || !finite(m.X) || m.X < lo || m.X > hi {
			continue
		}
		rs = append(rs, raw{x: trX(m.X), txt: m.Label})
	}
	if len(rs) == 0 {
		return markerLayout{}
	}
	sort.SliceStable(rs, func(i, j int) bool { return rs[i].x < rs[j].x })
	var lines []vg.Length
	var txts []string
	for i := 0; i < len(rs); {
		j := i + 1
		for j < len(rs) && rs[j].x-rs[j-1].x <= sameMark {
			j++
		}
		var sum vg.Length
		var ls []string
		for _, r := range rs[i:j] {
			sum += r.x
			if r.txt != "" {
				ls = append(ls, r.txt)
			}
		}
		lines = append(lines, sum/vg.Length(j-i))
		txts = append(txts, mergeLabels(ls))
		i = j
	}
	try := func(upright bool) (markerLayout, vg.Length) {
		l := markerLayout{upright: upright}
		lines, txts := lines, txts
		sizes := make([]vg.Length, len(lines))
		for i, t := range txts {
			sizes[i] = l.extent(t)
		}
		// Labels that cannot all stand side by side even touching are thinned
		// to every other one until they can (the lines stay, and the table and
		// JSON list every marker).
		for len(lines) > 1 && sum(sizes) > x1-x0 {
			lines, txts, sizes = everyOther(lines), everyOther(txts), everyOther(sizes)
		}
		at := spreadLabels(lines, sizes, markerGap, x0, x1)
		var moved vg.Length
		for i := range lines {
			l.labels = append(l.labels, placedMarker{line: lines[i], at: at[i], txt: txts[i]})
			moved = max(moved, vg.Length(math.Abs(float64(at[i]-lines[i]))))
		}
		ts := textStyle(markSize)
		var tall vg.Length
		for _, t := range txts {
			if upright {
				tall = max(tall, ts.Width(t))
			} else {
				tall = max(tall, ts.Height(t))
			}
		}
		l.height = leaderRise + leaderBend + leaderFoot + markerMargin + tall + markerMargin
		return l, moved
	}
	l, moved := try(false)
	if moved > markerShift {
		l, _ = try(true)
	}
	return l
}

func sum(v []vg.Length) vg.Length {
	var s vg.Length
	for _, x := range v {
		s += x
	}
	return s
}

// everyOther keeps the elements at even indices.
func everyOther[T any](v []T) []T {
	out := make([]T, 0, (len(v)+1)/2)
	for i := 0; i < len(v); i += 2 {
		out = append(out, v[i])
	}
	return out
}

// spreadLabels returns label centres, in the order of the lines xs (sorted),
// at least (sizes[i] + sizes[i+1])/2 + gap apart and inside [x0, x1], each
// cluster of labels that had to be pushed apart centred on the mean of its
// lines (the least total squared push). When the labels cannot all fit with
// the gap, the gap shrinks to what is left; the sizes must fit without one.
func spreadLabels(xs, sizes []vg.Length, gap, x0, x1 vg.Length) []vg.Length {
	n := len(xs)
	need := func(g vg.Length) vg.Length {
		t := sizes[0]/2 + sizes[n-1]/2
		for i := 0; i+1 < n; i++ {
			t += (sizes[i]+sizes[i+1])/2 + g
		}
		return t
	}
	if n > 1 && need(gap) > x1-x0 {
		gap = max(0, (x1-x0-need(0))/vg.Length(n-1))
	}
	// Offsets of each label from the first of its cluster, and clusters as
	// [first, last] index ranges with their first label's centre.
	type cluster struct {
		a, b int
		c    vg.Length // centre of label a
	}
	off := make([]vg.Length, n) // offset of label i from label 0 when packed tight
	for i := 1; i < n; i++ {
		off[i] = off[i-1] + (sizes[i-1]+sizes[i])/2 + gap
	}
	place := func(a, b int) vg.Length {
		// Mean of (x_i − off_i + off_a) over the cluster: its first centre.
		var s vg.Length
		for i := a; i <= b; i++ {
			s += xs[i] - (off[i] - off[a])
		}
		c := s / vg.Length(b-a+1)
		// Keep the cluster inside [x0, x1].
		left, right := c-sizes[a]/2, c+(off[b]-off[a])+sizes[b]/2
		if right > x1 {
			c -= right - x1
			left -= right - x1
		}
		if left < x0 {
			c += x0 - left
		}
		return c
	}
	cs := make([]cluster, 0, n)
	for i := range n {
		cs = append(cs, cluster{a: i, b: i, c: place(i, i)})
		// Merge backwards while the new cluster overlaps the one before.
		for len(cs) > 1 {
			p, q := cs[len(cs)-2], cs[len(cs)-1]
			pEnd := p.c + (off[p.b] - off[p.a]) // centre of p's last label
			if q.c-pEnd >= (sizes[p.b]+sizes[q.a])/2+gap-1e-9 {
				break
			}
			cs = cs[:len(cs)-2]
			cs = append(cs, cluster{a: p.a, b: q.b, c: place(p.a, q.b)})
		}
	}
	out := make([]vg.Length, n)
	for _, c := range cs {
		for i := c.a; i <= c.b; i++ {
			out[i] = c.c + off[i] - off[c.a]
		}
	}
	return out
}

// drawMarkerLabels draws the leaders and labels of l in the band above the
// top panel, whose top edge is at y (the panel's data top).
func drawMarkerLabels(c draw.Canvas, l markerLayout, y vg.Length) {
	if len(l.labels) == 0 {
		return
	}
	c.SetLineStyle(draw.LineStyle{Color: markerColor, Width: markerWidth})
	foot := y + leaderRise + leaderBend + leaderFoot
	for _, pm := range l.labels {
		var p vg.Path
		p.Move(vg.Point{X: pm.line, Y: y})
		p.Line(vg.Point{X: pm.line, Y: y + leaderRise})
		p.Line(vg.Point{X: pm.at, Y: y + leaderRise + leaderBend})
		p.Line(vg.Point{X: pm.at, Y: foot})
		c.Stroke(p)
	}
	ts := textStyle(markSize)
	ts.Color = markerColor
	for _, pm := range l.labels {
		if strings.TrimSpace(pm.txt) == "" {
			continue
		}
		if l.upright {
			ts.Rotation = math.Pi / 2
			ts.XAlign, ts.YAlign = draw.XLeft, draw.YCenter
		} else {
			ts.XAlign, ts.YAlign = draw.XCenter, draw.YBottom
		}
		c.FillText(ts, vg.Point{X: pm.at, Y: foot + markerMargin}, pm.txt)
	}
}

// name is the axis's name on the figure and in tables: "δ" for absolute
// shifts, else its label or def.
func (a Axis) name(def string) string {
	if a.Shift {
		return "δ"
	}
	return orDefault(a.Label, def)
}

// unit is the axis's unit, ppm for absolute shifts given without one.
func (a Axis) unit() string {
	if a.Shift && a.Unit == "" {
		return "ppm"
	}
	return a.Unit
}

// title is the axis's label with its unit: "δ (ppm)", "offset (Hz)".
func (a Axis) title(def string) string { return axisLabel(a.name(def), a.unit()) }

// MarkTable lists the labelled markers among ms (Mark.Marker) that have a
// label, in the order given, with their positions on axis x (its unit, "δ"
// for absolute shifts): the table a language shows for its marker list.
func MarkTable(ms []Mark, x Axis) Table {
	t := Table{Columns: []Column{{Name: "mark"}, {Name: x.name("position"), Unit: x.unit()}}}
	for _, m := range ms {
		if m.Marker && m.Label != "" {
			t.Rows = append(t.Rows, []string{m.Label, Num(m.X, 6)})
		}
	}
	return t
}

// markerNote names the profile's labelled markers in one line under its
// table ("marks (δ, ppm): NAA 2.01, Cr 3.03"), or "" when there are none.
func (p Profile) markerNote() string {
	var parts []string
	for _, m := range p.Marks {
		if m.Marker && m.Label != "" {
			parts = append(parts, m.Label+" "+Num(m.X, 6))
		}
	}
	if len(parts) == 0 {
		return ""
	}
	head := "marks"
	if u := p.X.unit(); u != "" {
		head += " (" + p.X.name("x") + ", " + u + ")"
	}
	return head + ": " + strings.Join(parts, ", ")
}
