// Package display turns plain tables, curves, maps and waveforms into MIME
// bundles (text/plain, text/html, image/svg+xml, application/json) for notebooks.
// It knows nothing of the pulse language or of the Jupyter protocol. Output is
// deterministic: the same input gives the same bytes.
package display

// Bundle is one output: MIME type → content (string, or a JSON-marshalable value
// for application/json).
type Bundle map[string]any

// Text is a plain-text bundle.
func Text(s string) Bundle { return Bundle{"text/plain": s} }

// Column heads a table column; Unit is shown in the header ("peak (µT)").
type Column struct {
	Name string
	Unit string
}

// Table is a table of already-formatted cells, with optional notes printed under it
// (e.g. the energy caution).
type Table struct {
	Title   string
	Columns []Column
	Rows    [][]string
	Notes   []string
}

// Axis is a plotted axis: its label, unit and sample values. Reverse draws it high
// to low (ppm axes, as spectroscopists read them).
type Axis struct {
	Label   string
	Unit    string
	Values  []float64
	Reverse bool
}

// Curve is one plotted line over the profile's X axis: a quantity of one pulse.
type Curve struct {
	Pulse    string    // legend name
	Quantity string    // "mxy", "phase", ...
	Unit     string    // "" for magnetization (M0 units), "deg" for phase
	Y        []float64 // one per X value
}

// Mark is a vertical marker on a profile (band edges, FWHM) at X with a label.
type Mark struct {
	X     float64
	Label string
}

// Profile is one or more curves against one axis. Curves of different quantities
// go on separate stacked panels sharing X; curves of one quantity overlay.
type Profile struct {
	Title   string
	X       Axis
	Curves  []Curve
	Marks   []Mark
	Summary Table // features of the curves (widths, ripple, extremes), shown as the table
}

// Map is one quantity over two axes (X horizontal), Z[iy][ix] at (X.Values[ix],
// Y.Values[iy]). Contour, when HasContour, draws the level at the role's target.
// The colour scale spans ZMin…ZMax when ZMin < ZMax (e.g. −1…1 for Mz), else the
// range of the data.
type Map struct {
	Title      string
	X, Y       Axis
	Pulse      string
	Quantity   string
	Unit       string
	Z          [][]float64
	Contour    float64
	HasContour bool
	Summary    Table
	ZMin, ZMax float64
}

// Waveform is a pulse's samples against time for `describe`: amplitude (µT),
// phase (deg), frequency offset (Hz) and gradient (mT/m), any of which may be nil.
type Waveform struct {
	Title     string
	Time      []float64 // s, sample midpoints
	Amplitude []float64 // µT
	Phase     []float64 // deg
	Frequency []float64 // Hz
	Gradient  []float64 // mT/m
}
