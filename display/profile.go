package display

import (
	"fmt"
	"slices"
	"strings"

	"gonum.org/v1/plot/vg"
)

// maxListed is the longest curve listed row by row in a table; longer curves are
// summarised and travel whole in the JSON.
const maxListed = 50

// maxDots is the longest curve whose points are marked with dots.
const maxDots = 30

// Bundles shows the profile: a figure (image/svg+xml and its PNG rendition,
// with the title and a caption in text/plain and every value under ResultMIME),
// then a table in text/plain and text/html: the caller's Summary when it has
// rows or notes, otherwise the data itself when there are at most 50 points,
// otherwise each curve's extremes. The data is {"kind": "profile", "title",
// "x": {"label", "unit", "reverse", "values"}, "curves": [{"pulse", "quantity",
// "unit", "label" (when set), "y"}], "marks": [{"x", "label", "marker": true
// (labelled markers only)}], "summary": table, "notes" (when any)}; the x axis
// also says "shift": true when its values are absolute shifts δ, numbers rounded as the package doc states;
// non-finite values are null.
//
// Curves of one quantity and unit share a panel; different quantities get stacked
// panels over the shared x axis, in order of first appearance. Each pulse keeps
// one colour and dash pattern across panels, named in a legend when there are
// several. Curves shorter or longer than X are cut to the common length.
func (p Profile) Bundles() []Bundle {
	return figureBundles(p, p.SVG(), p.Title, p.caption(), p.table(), p.JSON())
}

// Bundle is the figure of Bundles alone.
func (p Profile) Bundle() Bundle { return p.Bundles()[0] }

// caption says in words what the figure shows, for text-only readers.
func (p Profile) caption() string {
	var qs []string
	for _, g := range p.groups() {
		qs = append(qs, axisLabel(g[0].label(), g[0].Unit))
	}
	if len(qs) == 0 {
		return "(no curves)"
	}
	return fmt.Sprintf("(figure: %s against %s, %d points; data in "+ResultMIME+")",
		strings.Join(qs, ", "), p.X.title("x"), len(p.X.Values))
}

func orDefault(s, d string) string {
	if s == "" {
		return d
	}
	return s
}

// groups splits the curves into panels: one per quantity and unit, in order of
// first appearance.
func (p Profile) groups() [][]Curve {
	var out [][]Curve
	index := map[[2]string]int{}
	for _, c := range p.Curves {
		k := [2]string{c.Quantity, c.Unit}
		i, ok := index[k]
		if !ok {
			i = len(out)
			index[k] = i
			out = append(out, nil)
		}
		out[i] = append(out[i], c)
	}
	return out
}

// pulses lists the distinct pulse names in order of first appearance.
func pulses(cs []Curve) []string {
	var out []string
	seen := map[string]bool{}
	for _, c := range cs {
		if !seen[c.Pulse] {
			seen[c.Pulse] = true
			out = append(out, c.Pulse)
		}
	}
	return out
}

// label names the curve's quantity on axes and in captions.
func (c Curve) label() string { return orDefault(c.Label, c.Quantity) }

func isDegrees(unit string) bool { return unit == "deg" || unit == "°" || unit == "degree" }

// SVG renders the profile figure alone.
func (p Profile) SVG() string { return p.stack().svg() }

func (p Profile) draw(nc canvasMaker) vg.CanvasWriterTo { return p.stack().draw(nc) }

// stack lays out the profile's panels.
func (p Profile) stack() stack {
	names := pulses(p.Curves)
	style := map[string]int{}
	for i, n := range names {
		style[n] = i
	}
	s := stack{
		title:   p.Title,
		xlabel:  p.X.title("x"),
		reverse: p.X.Reverse,
		marks:   p.Marks,
		logX:    p.X.Log,
		notes:   p.Notes,
		xs:      p.X.Values,
	}
	if len(p.X.Values) <= maxDots {
		s.xpad = 0.025
	}
	for _, g := range p.groups() {
		pn := panel{label: axisLabel(orDefault(g[0].label(), "y"), g[0].Unit), degrees: isDegrees(g[0].Unit), magnet: g[0].Unit == ""}
		for _, c := range g {
			l := line{x: p.X.Values, y: c.Y, style: seriesStyle(style[c.Pulse])}
			if pn.degrees {
				l.jump = 180
			}
			l.dots = len(p.X.Values) <= maxDots
			pn.lines = append(pn.lines, l)
		}
		s.panels = append(s.panels, pn)
	}
	if len(s.panels) == 0 {
		s.panels = []panel{{label: "(no curves)"}}
	}
	if len(names) > 1 {
		for i, n := range names {
			s.legend = append(s.legend, legendItem{name: orDefault(n, "(unnamed)"), style: seriesStyle(i)})
		}
	}
	return s
}

// table is the table shown with the figure, with a note naming the labelled
// markers when there are any.
func (p Profile) table() Table {
	var t Table
	switch {
	case !p.Summary.isEmpty():
		t = p.Summary
	case len(p.X.Values) <= maxListed:
		t = p.dataTable()
	default:
		t = p.extremes()
	}
	if n := p.markerNote(); n != "" {
		t.Notes = append(slices.Clone(t.Notes), n)
	}
	return t
}

// curveName names a curve in a table: "mxy" for one pulse, "p1 mxy" for several.
func (p Profile) curveName(c Curve) string {
	if len(pulses(p.Curves)) > 1 && c.Pulse != "" {
		return c.Pulse + " " + c.Quantity
	}
	return c.Quantity
}

func (p Profile) dataTable() Table {
	t := Table{Columns: []Column{{Name: p.X.name("x"), Unit: p.X.unit()}}}
	for _, c := range p.Curves {
		t.Columns = append(t.Columns, Column{Name: p.curveName(c), Unit: c.Unit})
	}
	cols := [][]string{NumColumn(p.X.Values, 6)}
	for _, c := range p.Curves {
		y := c.Y[:min(len(c.Y), len(p.X.Values))]
		cols = append(cols, NumColumn(y, 4))
	}
	for i := range p.X.Values {
		row := make([]string, len(cols))
		for k, col := range cols {
			row[k] = "-"
			if i < len(col) {
				row[k] = col[i]
			}
		}
		t.Rows = append(t.Rows, row)
	}
	return t
}

// extremes lists each curve's lowest and highest value and where they occur.
func (p Profile) extremes() Table {
	xu := p.X.unit()
	t := Table{Columns: []Column{
		{Name: "curve"}, {Name: "unit"},
		{Name: "min"}, {Name: "at", Unit: xu},
		{Name: "max"}, {Name: "at", Unit: xu},
	}}
	for _, c := range p.Curves {
		lo, hi := -1, -1
		for i := range min(len(c.Y), len(p.X.Values)) {
			if !finite(c.Y[i]) {
				continue
			}
			if lo < 0 || c.Y[i] < c.Y[lo] {
				lo = i
			}
			if hi < 0 || c.Y[i] > c.Y[hi] {
				hi = i
			}
		}
		row := []string{p.curveName(c), orDefault(c.Unit, "-"), "-", "-", "-", "-"}
		if lo >= 0 {
			row[2], row[3] = Num(c.Y[lo], 4), Num(p.X.Values[lo], 6)
			row[4], row[5] = Num(c.Y[hi], 4), Num(p.X.Values[hi], 6)
		}
		t.Rows = append(t.Rows, row)
	}
	return t
}
