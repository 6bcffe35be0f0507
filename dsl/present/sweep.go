package present

import (
	"fmt"
	"math"
	"slices"

	"Nutate/display"
)

// Presentation of a sweep: results → tables and figure bundles. The functions
// here take plain result values (Axis, Curve, Profile, Map), which the study
// side (dsl/sweep.go) fills after running and measuring; they format numbers,
// choose rows and word the notes, and never simulate, measure or read the
// session.

// Axis is a sweep axis as shown.
type Axis struct {
	Kind    string
	Unit    string    // display unit (µT, not uT; "" plain)
	Values  []float64 // in Unit
	Reverse bool
	Log     bool
	At      func(i int) string // point i with its unit, for summaries
}

// Curve is one curve of a sweep, with what was measured on it when the
// sweep is summarized by features.
type Curve struct {
	Pulse, Quantity, Label string
	Unit                   string // display unit
	Values                 []float64
	Energy                 bool      // energy or B1rms: the caution goes with it
	Features               Features  // a long one-axis curve's extremes, width, crossings, ripples
	Phase                  *PhaseFit // phase and echophase of a long curve: the fitted line instead
}

// Features summarize a long curve for the table under a plot (measured by
// the study side, curveFeatures).
type Features struct {
	Min, MinAt, Max, MaxAt float64
	Width                  float64 // distance between the half-level crossings around the main extreme
	Crossings              string  // every half-level crossing, up to 6
	PassRipple, StopRipple float64
}

// PhaseFit is a line fitted to an unwrapped phase over x0 to x1 (phaseFeatures).
type PhaseFit struct{ Slope, Dev, X0, X1 float64 }

// Profile is a one-axis sweep.
type Profile struct {
	Title     string
	X         Axis
	Curves    []Curve
	Marks     []display.Mark
	Notes     []string // about axes and runs, under the figure and the table
	LevelNote string   // the half-level definition (or its pointer) when a curve has levels
}

// Map is one quantity of one pulse over two axes, with its extremes and the
// share of points that meet the role's target.
type Map struct {
	Title      string
	X, Y       Axis
	Curve      Curve
	N0, N1     int
	Note       string   // the quantity chosen by default, if it was
	AxisNotes  []string // about axes and runs
	LeftOut    int      // cells not simulated (t2 > 2·t1)
	Lo, Hi     float64
	LoAt, HiAt int
	Target     *Target
}

// Target is a role's target on a map and how many points meet it.
type Target struct {
	Level float64
	Text  string // "≤ −0.9"
	Met   int
}

// ProfileFigure draws the curves of a one-axis sweep with its summary.
func ProfileFigure(v Profile) Figure {
	prof := display.Profile{
		Title: v.Title,
		X:     display.Axis{Label: v.X.Kind, Unit: v.X.Unit, Values: v.X.Values, Reverse: v.X.Reverse, Log: v.X.Log},
		Marks: v.Marks,
	}
	for _, c := range v.Curves {
		prof.Curves = append(prof.Curves, display.Curve{Pulse: c.Pulse, Quantity: c.Quantity, Label: c.Label, Unit: c.Unit, Y: c.Values})
	}
	prof.Summary = SummaryTable(v)
	prof.Summary.Notes = append(slices.Clone(v.Notes), prof.Summary.Notes...)
	// The caution travels inside the image, which is what gets saved or pasted.
	prof.Notes = append(slices.Clone(v.Notes), energyNote(v.Curves, ImageCaution)...)
	return ProfileBundle(prof)
}

// SummaryTable lists up to 50 points row by row; longer curves are summarized by
// their features.
func SummaryTable(v Profile) display.Table {
	a, x, curves := v.X, v.X.Values, v.Curves
	if len(x) <= 50 {
		return pointsTable(v)
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
			row := []string{c.Pulse, c.Quantity, "—", "—", "—", "—", "—", "—", CellOpt(ph.Slope), CellOpt(ph.Dev)}
			t.Rows = append(t.Rows, row)
			if !math.IsNaN(ph.Slope) {
				band := "the band where mxy is at least half its maximum"
				if c.Quantity == "echophase" {
					band = "the band where echo is at least half its maximum"
				}
				span := Number(RoundSig(ph.X0, 5)) + " to " + Number(RoundSig(ph.X1, 5))
				if a.Unit != "" {
					span += " " + a.Unit
				}
				notes = append(notes, fmt.Sprintf("%s %s: unwrapped, fitted by a line over %s, %s; \"off linear\" is the largest deviation from that line.", c.Pulse, c.Quantity, band, span))
			}
			continue
		}
		f := c.Features
		row := []string{c.Pulse, c.Quantity,
			Cell(f.Min) + " at " + Number(f.MinAt), Cell(f.Max) + " at " + Number(f.MaxAt),
			CellOpt(f.Width), f.Crossings, CellOpt(100 * f.PassRipple), CellOpt(100 * f.StopRipple)}
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
	t.Notes = append(t.Notes, energyNote(curves, EnergyCaution)...)
	return t
}

// pointsTable lists a short sweep's points row by row, a column per curve.
func pointsTable(v Profile) display.Table {
	a, x, curves := v.X, v.X.Values, v.Curves
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
		row := []string{Number(x[i])}
		for _, c := range curves {
			row = append(row, Cell(c.Values[i]))
		}
		t.Rows = append(t.Rows, row)
	}
	t.Notes = energyNote(curves, EnergyCaution)
	return t
}

// energyNote is caution when a curve shows energy or B1rms.
func energyNote(curves []Curve, caution string) []string {
	for _, c := range curves {
		if c.Energy {
			return []string{caution}
		}
	}
	return nil
}

func uniquePulses(curves []Curve) []string {
	var out []string
	for _, c := range curves {
		if !slices.Contains(out, c.Pulse) {
			out = append(out, c.Pulse)
		}
	}
	return out
}

// ColourRange is the fixed colour scale of a magnetization map, so that maps of
// different pulses or settings compare at a glance: −1…1 for the components,
// 0…1 for the magnitudes |Mxy| and |β|², −180…180 deg for the phases. Pulse
// properties get (0, 0): the data's own range.
func ColourRange(q string) (lo, hi float64) {
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

// MapFigure draws one quantity of one pulse over two axes with its summary.
func MapFigure(v Map) Figure {
	c, n0, n1 := v.Curve, v.N0, v.N1
	z := mapRows(c.Values, n0, n1)
	axis := func(a Axis) display.Axis {
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
		Notes:    append(slices.Clone(v.AxisNotes), energyNote([]Curve{c}, ImageCaution)...),
	}
	m.ZMin, m.ZMax = ColourRange(c.Quantity)
	m.Cyclic = c.Quantity == "phase" || c.Quantity == "echophase"
	if v.Target != nil {
		m.Contour, m.HasContour = v.Target.Level, true
	}
	at := func(i int) string {
		return v.X.At(i/n1) + ", " + v.Y.At(i%n1)
	}
	rows := [][]string{
		{"points", fmt.Sprintf("%d × %d", n0, n1)},
		{"min", Cell(v.Lo) + " at " + at(v.LoAt)},
		{"max", Cell(v.Hi) + " at " + at(v.HiAt)},
	}
	if tg := v.Target; tg != nil {
		of, n := " % of the map", len(c.Values)
		if v.LeftOut > 0 {
			of, n = " % of the simulated points", n-v.LeftOut
		}
		rows = append(rows, []string{"target met (" + c.Quantity + " " + tg.Text + ")", Number(RoundSig(100*float64(tg.Met)/float64(n), 4)) + of})
	}
	m.Summary = display.Table{Title: m.Title, Columns: []display.Column{{Name: "feature"}, {Name: "value"}}, Rows: rows, Notes: append(slices.Clone(v.AxisNotes), energyNote([]Curve{c}, EnergyCaution)...)}
	if v.Note != "" {
		m.Summary.Notes = append([]string{v.Note}, m.Summary.Notes...)
	}
	return MapBundle(m)
}
