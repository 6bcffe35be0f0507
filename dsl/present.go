package dsl

import (
	"fmt"
	"math"
	"slices"

	"Nutate/display"
)

// Presentation of a sweep: results → tables and figure bundles. The functions
// here take plain result values (axisView, curveView, profileView, mapView),
// which the study side (sweep.go) fills after running and measuring; they
// format numbers, choose rows and word the notes, and never simulate, measure
// or read the session. arch_test.go (TestPresentTakesPlainValues) holds this
// file to it.

// axisView is a sweep axis as shown.
type axisView struct {
	Kind    string
	Unit    string    // display unit (µT, not uT; "" plain)
	Values  []float64 // in Unit
	Reverse bool
	Log     bool
	At      func(i int) string // point i with its unit, for summaries
}

// curveView is one curve of a sweep, with what was measured on it when the
// sweep is summarized by features.
type curveView struct {
	Pulse, Quantity, Label string
	Unit                   string // display unit
	Values                 []float64
	Energy                 bool      // energy or B1rms: the caution goes with it
	Features               features  // a long one-axis curve's extremes, width, crossings, ripples
	Phase                  *phaseFit // phase and echophase of a long curve: the fitted line instead
}

// phaseFit is a line fitted to an unwrapped phase over x0 to x1 (phaseFeatures).
type phaseFit struct{ Slope, Dev, X0, X1 float64 }

// profileView is a one-axis sweep.
type profileView struct {
	Title     string
	X         axisView
	Curves    []curveView
	Marks     []display.Mark
	Notes     []string // about axes and runs, under the figure and the table
	LevelNote string   // the half-level definition (or its pointer) when a curve has levels
}

// mapView is one quantity of one pulse over two axes, with its extremes and the
// share of points that meet the role's target.
type mapView struct {
	Title      string
	X, Y       axisView
	Curve      curveView
	N0, N1     int
	Note       string   // the quantity chosen by default, if it was
	AxisNotes  []string // about axes and runs
	LeftOut    int      // cells not simulated (t2 > 2·t1)
	Lo, Hi     float64
	LoAt, HiAt int
	Target     *mapTarget
}

// mapTarget is a role's target on a map and how many points meet it.
type mapTarget struct {
	Level float64
	Text  string // "≤ −0.9"
	Met   int
}

// profileOutput draws the curves of a one-axis sweep with its summary.
func profileOutput(v profileView) figureOut {
	prof := display.Profile{
		Title: v.Title,
		X:     display.Axis{Label: v.X.Kind, Unit: v.X.Unit, Values: v.X.Values, Reverse: v.X.Reverse, Log: v.X.Log},
		Marks: v.Marks,
	}
	for _, c := range v.Curves {
		prof.Curves = append(prof.Curves, display.Curve{Pulse: c.Pulse, Quantity: c.Quantity, Label: c.Label, Unit: c.Unit, Y: c.Values})
	}
	prof.Summary = summaryTable(v)
	prof.Summary.Notes = append(slices.Clone(v.Notes), prof.Summary.Notes...)
	// The caution travels inside the image, which is what gets saved or pasted.
	prof.Notes = append(slices.Clone(v.Notes), energyNote(v.Curves, imageCaution)...)
	return profileBundle(prof)
}

func unitLabel(u string) string {
	switch u {
	case "uT":
		return "µT"
	case "us":
		return "µs"
	case "um":
		return "µm"
	}
	return u
}

// summaryTable lists up to 50 points row by row; longer curves are summarized by
// their features.
func summaryTable(v profileView) display.Table {
	a, x, curves := v.X, v.X.Values, v.Curves
	if len(x) <= 50 {
		t := display.Table{Title: v.Title, Columns: []display.Column{{Name: a.Kind, Unit: a.Unit}}}
		for _, c := range curves {
			name := c.Quantity
			if c.Label != "" {
				name = c.Label
			}
			if len(uniquePulses(curves)) > 1 {
				name = c.Pulse + " " + name
			}
			t.Columns = append(t.Columns, display.Column{Name: name, Unit: c.Unit})
		}
		for i := range x {
			row := []string{formatNumber(x[i])}
			for _, c := range curves {
				row = append(row, fmtCell(c.Values[i]))
			}
			t.Rows = append(t.Rows, row)
		}
		t.Notes = energyNote(curves, energyCaution)
		return t
	}
	t := display.Table{
		Title: v.Title + " (features; the data is in the JSON output and `export`)",
		Columns: []display.Column{{Name: "pulse"}, {Name: "quantity"}, {Name: "min"}, {Name: "max"},
			{Name: "width at half", Unit: a.Unit}, {Name: "half-level crossings", Unit: a.Unit}, {Name: "pass ripple", Unit: "% of M0"}, {Name: "stop ripple", Unit: "% of M0"}},
	}
	hasPhase, hasXY := false, false
	for _, c := range curves {
		switch c.Quantity {
		case "phase", "echophase":
			hasPhase = true
		case "mx", "my":
			hasXY = true
		}
	}
	if hasPhase {
		per := "deg/" + a.Unit
		if a.Unit == "" {
			per = "deg per unit " + a.Kind // a factor axis (b1)
		}
		t.Columns = append(t.Columns, display.Column{Name: "phase slope", Unit: per}, display.Column{Name: "phase off linear", Unit: "deg"})
	}
	var notes []string
	for _, c := range curves {
		if ph := c.Phase; ph != nil {
			row := []string{c.Pulse, c.Quantity, "—", "—", "—", "—", "—", "—", fmtCellOpt(ph.Slope), fmtCellOpt(ph.Dev)}
			t.Rows = append(t.Rows, row)
			if !math.IsNaN(ph.Slope) {
				band := "the band where mxy is at least half its maximum"
				if c.Quantity == "echophase" {
					band = "the band where echo is at least half its maximum"
				}
				span := formatNumber(roundSig(ph.X0, 5)) + " to " + formatNumber(roundSig(ph.X1, 5))
				if a.Unit != "" {
					span += " " + a.Unit
				}
				notes = append(notes, fmt.Sprintf("%s %s: unwrapped, fitted by a line over %s, %s; \"off linear\" is the largest deviation from that line.", c.Pulse, c.Quantity, band, span))
			}
			continue
		}
		f := c.Features
		row := []string{c.Pulse, c.Quantity,
			fmtCell(f.min) + " at " + formatNumber(f.minAt), fmtCell(f.max) + " at " + formatNumber(f.maxAt),
			fmtCellOpt(f.width), f.crossings, fmtCellOpt(100 * f.passRipple), fmtCellOpt(100 * f.stopRipple)}
		if hasPhase {
			row = append(row, "—", "—")
		}
		t.Rows = append(t.Rows, row)
	}
	var head []string
	if v.LevelNote != "" {
		head = append(head, v.LevelNote)
	}
	if hasXY {
		head = append(head, "mx and my: extremes only; they oscillate across an offset axis as the phase runs, so a half level, width or ripple of theirs says nothing (show phase for the slope of that phase).")
	}
	if hasPhase {
		head = append(head, "phase and echophase: no extremes (a phase's range depends on where it is unwrapped); a line is fitted to the unwrapped phase over the band where its magnitude (mxy or echo) is at least half its maximum.")
	}
	t.Notes = append(head, notes...)
	t.Notes = append(t.Notes, energyNote(curves, energyCaution)...)
	return t
}

// energyNote is caution when a curve shows energy or B1rms.
func energyNote(curves []curveView, caution string) []string {
	for _, c := range curves {
		if c.Energy {
			return []string{caution}
		}
	}
	return nil
}

func uniquePulses(curves []curveView) []string {
	var out []string
	for _, c := range curves {
		if !contains(out, c.Pulse) {
			out = append(out, c.Pulse)
		}
	}
	return out
}

func fmtCell(v float64) string {
	if math.IsNaN(v) {
		return "—"
	}
	if math.Abs(v) < 1e-10 {
		v = 0 // rounding noise of an exact zero
	}
	return fmt.Sprintf("%.4g", v)
}

func fmtCellOpt(v float64) string {
	if math.IsNaN(v) {
		return "—"
	}
	return formatNumber(roundSig(v, 5))
}

// colourRange is the fixed colour scale of a magnetization map, so that maps of
// different pulses or settings compare at a glance: −1…1 for the components,
// 0…1 for the magnitudes |Mxy| and |β|², −180…180 deg for the phases. Pulse
// properties get (0, 0): the data's own range.
func colourRange(q string) (lo, hi float64) {
	switch q {
	case "mx", "my", "mz":
		return -1, 1
	case "mxy", "echo":
		return 0, 1
	case "phase", "echophase":
		return -180, 180
	}
	return 0, 0
}

// mapOutput draws one quantity of one pulse over two axes with its summary.
func mapOutput(v mapView) figureOut {
	c, n0, n1 := v.Curve, v.N0, v.N1
	z := mapRows(c.Values, n0, n1)
	axis := func(a axisView) display.Axis {
		return display.Axis{Label: a.Kind, Unit: a.Unit, Values: a.Values, Reverse: a.Reverse, Log: a.Log}
	}
	m := display.Map{
		Title:    v.Title + ": " + c.Pulse + " " + c.Quantity,
		X:        axis(v.X),
		Y:        axis(v.Y),
		Pulse:    c.Pulse,
		Quantity: c.Quantity,
		Label:    c.Label,
		Unit:     c.Unit,
		Z:        z,
		Notes:    append(slices.Clone(v.AxisNotes), energyNote([]curveView{c}, imageCaution)...),
	}
	m.ZMin, m.ZMax = colourRange(c.Quantity)
	m.Cyclic = c.Quantity == "phase" || c.Quantity == "echophase"
	if v.Target != nil {
		m.Contour, m.HasContour = v.Target.Level, true
	}
	at := func(i int) string {
		return v.X.At(i/n1) + ", " + v.Y.At(i%n1)
	}
	rows := [][]string{
		{"points", fmt.Sprintf("%d × %d", n0, n1)},
		{"min", fmtCell(v.Lo) + " at " + at(v.LoAt)},
		{"max", fmtCell(v.Hi) + " at " + at(v.HiAt)},
	}
	if tg := v.Target; tg != nil {
		of, n := " % of the map", len(c.Values)
		if v.LeftOut > 0 {
			of, n = " % of the simulated points", n-v.LeftOut
		}
		rows = append(rows, []string{"target met (" + c.Quantity + " " + tg.Text + ")", formatNumber(roundSig(100*float64(tg.Met)/float64(n), 4)) + of})
	}
	m.Summary = display.Table{Title: m.Title, Columns: []display.Column{{Name: "feature"}, {Name: "value"}}, Rows: rows, Notes: append(slices.Clone(v.AxisNotes), energyNote([]curveView{c}, energyCaution)...)}
	if v.Note != "" {
		m.Summary.Notes = append([]string{v.Note}, m.Summary.Notes...)
	}
	return mapBundle(m)
}
