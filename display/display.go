// Package display turns plain tables, curves, maps and waveforms into MIME
// bundles (text/plain, text/html, image/svg+xml, image/png and the data under
// ResultMIME) for notebooks. It knows nothing of the pulse language or of the
// Jupyter protocol. Output is deterministic: the same input gives the same bytes.
//
// Entry points: Table.Bundle; Profile.Bundles, Map.Bundles and Waveform.Bundles
// (a figure and its table); FigureFile to write a figure as SVG, PNG or PDF;
// Num and NumColumn to format numbers for tables, and Text for plain messages.
//
// Bundles. text/plain is always present. Tables come as aligned text (units in
// the header), as an HTML <table> with the same cells, and as their data. A
// figure is two outputs: the figure (its title and a caption in text/plain,
// image/svg+xml, a PNG rendition at NotebookDPI and its data under ResultMIME,
// with no text/html), then its table (text/plain and text/html). Notebook front
// ends show only the highest-ranked type of a bundle: the classic Notebook and
// JupyterLab both rank text/html above images and JupyterLab ranks
// application/json above everything, while an untrusted notebook refuses SVG
// (both front ends) and sanitizes HTML. With this arrangement a trusted notebook
// shows the SVG, an untrusted one the PNG, and the table its HTML (see
// TestMIMERanking). A figure's table is the caller's Summary, or the data when
// a curve has at most 50 points, or each curve's extremes; the data carries
// every value. Data values are json.RawMessage (encoding/json embeds them
// verbatim), NaN and ±Inf are null, and numbers keep the digits that matter:
// magnetization (a quantity without a unit within ±1, in M0 units) 6 decimals
// (1e-6), angles in degrees 2 decimals (0.01°), axis values and other
// quantities SigDigits (6) significant digits. The caller bounds how many
// values a notebook keeps (package dsl decimates large maps and waveforms).
//
// Figures. gonum.org/v1/plot draws into its SVG backend. Text is SVG text in
// Liberation Sans with Arial, Helvetica and sans-serif as fallbacks; no font data
// is embedded, and each text carries its measured length so a different fallback
// font still fits the layout. There are no ids, timestamps or network references.
// Lines are thinned to what half-point columns can show and straight stretches
// drawn as one segment; heat maps are embedded PNG images (one pixel per cell,
// enlarged to blocks of pixels when the map has few cells so that it stays
// crisp when scaled smoothly, averaged down beyond 640 per side), so a 601-point
// two-pulse overlay of two quantities is about 20 kB and a 161 × 101 map about
// 43 kB of SVG, and sizes stay bounded as points or cells grow. The PNG
// rendition and FigureFile draw the same figure with gonum/plot's vgimg and
// vgpdf back ends. Pulses are told apart by colour-blind-safe colours and dash
// patterns; maps use this package's own perceptually uniform colour scale (see
// palette.go).
//
// Units are those of the fields (stated beside each); a Waveform's time is in
// seconds and is drawn in µs, ms or s as suits its length.
package display

// Bundle is one output: MIME type → content (a string; base64 for image/png;
// json.RawMessage for ResultMIME).
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
	// Log draws the axis on a logarithmic scale (T1, T2 or durations spanning
	// decades). On a profile, points at or below zero are then left out of the
	// figure (not of the JSON); a map draws such an axis linearly.
	Log bool
	// Shift says the values are absolute chemical shifts δ (ppm, a carrier's
	// shift set): the axis and table column are then named "δ" whatever Label
	// says (Label stays in the JSON), and the JSON says "shift": true.
	Shift bool
}

// Curve is one plotted line over the profile's X axis: a quantity of one pulse.
type Curve struct {
	Pulse    string    // legend name
	Quantity string    // "mxy", "phase", ...
	Unit     string    // "" for magnetization (M0 units), "deg" for phase
	Y        []float64 // one per X value
	// Label, when set, names the quantity on the y axis and in the caption
	// instead of Quantity ("b1rms at TR 10 ms"); curves are grouped by Quantity.
	Label string
}

// Mark is a vertical marker on a profile at X with a label: a feature of the
// curves (band edges, FWHM), drawn dashed with its label above the panels, or,
// with Marker set, a labelled marker the user placed (a chemical shift, a
// multiplet), drawn solid in its own colour with a leader up to its label (see
// markers.go) and listed under the profile's table.
type Mark struct {
	X      float64
	Label  string
	Marker bool
}

// Profile is one or more curves against one axis (offset in Hz or ppm, B1,
// position, T1/T2, a shape argument...). Curves of different quantities go on
// separate stacked panels sharing X; curves of one quantity overlay, one colour
// and dash pattern per pulse, with a legend when there are several pulses. Marks
// are dashed vertical lines on every panel, labelled above the top one; marks
// on one line share one label ("p1, p2 band edge"). Labelled markers
// (Mark.Marker) are solid lines whose labels stand in a band of their own
// right above the top panel, kept apart however many there are. Phase curves (unit "deg")
// get ticks at multiples of 90° and are not joined across a wrap.
//
// The x axis spans every finite value of X (every positive one on a log axis),
// so points without a value (NaN: left out of a sweep) show as a gap in the
// curves, not as a shorter axis.
//
// Y ranges: a quantity without a unit whose values lie within [−1, 1] is
// magnetization in M0 units and is drawn on [0, 1] (never negative) or [−1, 1];
// other quantities are drawn over at least 20 % of their largest magnitude (a
// quarter turn for degrees), widened without crossing zero, so that a property
// varying by rounding-level amounts over a sweep reads as nearly constant.
type Profile struct {
	Title   string
	X       Axis
	Curves  []Curve
	Marks   []Mark
	Summary Table // features of the curves (widths, ripple, extremes), shown as the table
	// Notes are drawn in small text under the figure itself (a caution that must
	// travel with the image), wrapped to its width; the table keeps its own.
	Notes []string
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
	// Label, when set, names the quantity on the colour bar and in the caption
	// instead of Quantity.
	Label string
	// Notes are drawn in small text under the figure, as for Profile.
	Notes []string
	// Cyclic marks an angle (a phase over ZMin..ZMax, one turn): it is drawn
	// with a colour wheel, so that both ends of the range share a colour, and
	// cells sharing a pixel are averaged on the circle.
	Cyclic bool

	memo *mapMemo // set within one Bundles call (heatmap.go)
}

// Waveform is a pulse's samples against time for `describe`: amplitude (µT),
// phase (deg), frequency offset (Hz) and gradient (mT/m), any of which may be nil.
// Amplitude and gradient are drawn down to 0 at the pulse's ends (off outside);
// phase and frequency are not, and the phase is left out where the amplitude is
// exactly 0 (undefined there).
type Waveform struct {
	Title     string
	Time      []float64 // s, sample midpoints
	Amplitude []float64 // µT
	Phase     []float64 // deg
	Frequency []float64 // Hz
	Gradient  []float64 // mT/m
}
