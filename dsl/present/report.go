package present

import (
	"fmt"
	"math"
	"regexp"
	"strings"

	"Nutate/display"
)

// ReportRow is one pulse of a methods table, in the table's units: design
// figures as designed, measured ones NaN where the measurement found none.
type ReportRow struct {
	Name, Shape string // the shape with the arguments that define it
	DurationMs  float64
	Samples     int
	PeakUT      float64
	PeakHz      float64
	// Flip is the design flip in degrees, or NaN; Rotation the simulated
	// rotation at the centre, shown where there is no design flip.
	Flip, Rotation float64
	BandwidthHz    float64 // measured FWHM
	TBW            float64 // design TBW, 0 none
	TBWMeasured    float64 // measured FWHM × duration
	EnergyUT2ms    float64
	CentreHz       float64
	CentrePPM      float64 // NaN without a field
	Adiabatic      bool
	// ThresholdUT is the adiabatic threshold in µT (NaN: not met, for the
	// reason in ThresholdReason); ThresholdAtCentre when it was measured at
	// the centre only (no design band).
	ThresholdUT       float64
	ThresholdAtCentre bool
	ThresholdReason   string
	// Slice selection, when Gradient is not 0: SliceDesign 0 without a
	// design band.
	GradientMTm, SliceDesignMm, SliceFWHMMm, ShiftMmPerPPM float64
	Role                                                   string // "" none
}

// Report is a methods-section table of pulses.
type Report struct {
	Nucleus  string
	Field    float64 // T, 0 unset
	Rows     []ReportRow
	Warnings []string // one per pulse, under the notes
}

// ReportTable lays out a report: the columns every pulse has, then centre,
// adiabatic threshold, slice and role columns when a pulse needs them, and
// the notes defining the measured figures.
func ReportTable(rep Report) display.Table {
	cols, has := reportColumns(rep)
	var rows [][]string
	var unmet []string
	for _, r := range rep.Rows {
		row := append(r.cells(), r.optionalCells(has, rep.Field > 0)...)
		if r.Adiabatic && math.IsNaN(r.ThresholdUT) {
			unmet = append(unmet, r.Name+": "+r.ThresholdReason)
		}
		rows = append(rows, row)
	}
	context := "nucleus " + rep.Nucleus
	if rep.Field > 0 {
		context += fmt.Sprintf(", B0 = %s T", Number(rep.Field))
	}
	notes := []string{
		"Bandwidth (measured): full width of each pulse's simulated profile (exact Bloch simulation, " + context + ") where its role's quantity is half-way to its design pass-band value (Mz = 0 for inversion, |Mxy| = sin flip / 2 for excitation, echo |β|² = sin²(flip/2) / 2 for refocusing); TBW as designed, or FWHM × duration where the design has none.",
		"* Energy ∫B1² dt is a relative, waveform-only estimate, not SAR: defer to the scanner's own SAR supervision, IEC 60601-2-33, local regulations and the site's MR safety officer.",
	}
	if has.adiabatic {
		notes = append(notes, "Adiabatic threshold: the lowest peak B1 at which the simulated pulse meets its role's target (invert Mz ≤ −0.9, excite |Mxy| ≥ 0.9·sin flip, refocus |β|² ≥ 0.9, saturate |Mz| ≤ 0.1; bir4 also its rotation, phase included) at every offset within ±¼ of its band, or at its centre where marked (no design band), and keeps meeting it over half an octave of B1 above.")
	}
	if len(unmet) > 0 {
		notes = append(notes, "† adiabatic threshold not met: "+strings.Join(unmet, "; "))
	}
	notes = append(notes, rep.Warnings...)
	return display.Table{Title: "RF pulses (" + context + ")", Columns: cols, Rows: rows, Notes: notes}
}

// reportHas says which optional columns a report shows: a centre when a
// pulse is off the carrier, a threshold when one is adiabatic, the slice when
// one has a gradient, the role when one has a role.
type reportHas struct{ centre, adiabatic, slice, role bool }

// reportColumns are the report's columns: those every pulse has, then the
// optional ones some pulse needs.
func reportColumns(rep Report) ([]display.Column, reportHas) {
	cols := []display.Column{{Name: "pulse"}, {Name: "shape"}, {Name: "duration", Unit: "ms"}, {Name: "samples"},
		{Name: "peak B1", Unit: "µT"}, {Name: "peak B1", Unit: "Hz"}, {Name: "flip", Unit: "deg"}, {Name: "bandwidth (measured FWHM)", Unit: "Hz"},
		{Name: "TBW"}, {Name: "energy*", Unit: "µT²·ms"}}
	var has reportHas
	for _, r := range rep.Rows {
		has.centre = has.centre || r.CentreHz != 0
		has.adiabatic = has.adiabatic || r.Adiabatic
		has.slice = has.slice || r.GradientMTm != 0
		has.role = has.role || r.Role != ""
	}
	// An off-centre band is part of the method: where the pulse plays.
	if has.centre {
		cols = append(cols, display.Column{Name: "centre", Unit: "Hz"})
		if rep.Field > 0 {
			cols = append(cols, display.Column{Name: "centre", Unit: "ppm"})
		}
	}
	if has.adiabatic {
		cols = append(cols, display.Column{Name: "adiabatic threshold", Unit: "µT"})
	}
	// A methods table of slice-selective pulses gives the gradient and the
	// (design) slice thickness; roles say what each pulse is for.
	if has.slice {
		cols = append(cols, display.Column{Name: "gradient", Unit: "mT/m"}, display.Column{Name: "design slice thickness", Unit: "mm"},
			display.Column{Name: "slice FWHM", Unit: "mm"})
		if rep.Field > 0 {
			cols = append(cols, display.Column{Name: "chemical-shift displacement", Unit: "mm/ppm"})
		}
	}
	if has.role {
		cols = append(cols, display.Column{Name: "role"})
	}
	return cols, has
}

// optionalCells are the row's cells in the optional columns (withField: the
// field is set, so ppm figures are shown).
func (r ReportRow) optionalCells(has reportHas, withField bool) []string {
	var row []string
	if has.centre {
		row = append(row, Number(RoundSig(r.CentreHz, 6)))
		if withField {
			row = append(row, Number(RoundSig(r.CentrePPM, 6)))
		}
	}
	if has.adiabatic {
		th := "—"
		if r.Adiabatic {
			th = sig(r.ThresholdUT, 4)
			if r.ThresholdAtCentre && !math.IsNaN(r.ThresholdUT) {
				th += " (at the centre)"
			}
			if math.IsNaN(r.ThresholdUT) {
				th = "not met†"
			}
		}
		row = append(row, th)
	}
	if has.slice {
		g, th, fwhm, shift := "—", "—", "—", "—"
		if r.GradientMTm != 0 {
			g = Number(RoundSig(r.GradientMTm, 5))
			if r.SliceDesignMm != 0 {
				th = Number(RoundSig(r.SliceDesignMm, 5))
			}
			fwhm, shift = sig(r.SliceFWHMMm, 5), sig(r.ShiftMmPerPPM, 5)
		}
		row = append(row, g, th, fwhm)
		if withField {
			row = append(row, shift)
		}
	}
	if has.role {
		ro := "—"
		if r.Role != "" {
			ro = r.Role
		}
		row = append(row, ro)
	}
	return row
}

// cells are the columns every pulse has.
func (r ReportRow) cells() []string {
	flip := "—"
	if !math.IsNaN(r.Flip) {
		flip = Number(RoundSig(r.Flip, 5))
	} else if !math.IsNaN(r.Rotation) {
		flip = Number(RoundSig(r.Rotation, 4)) + " (simulated)"
	}
	tbw := "—"
	switch {
	case r.TBW > 0:
		tbw = Number(RoundSig(r.TBW, 4))
	case !math.IsNaN(r.TBWMeasured):
		tbw = Number(RoundSig(r.TBWMeasured, 4)) + " (measured)"
	}
	return []string{r.Name, r.Shape, Number(RoundSig(r.DurationMs, 6)), fmt.Sprint(r.Samples),
		Number(RoundSig(r.PeakUT, 5)), Number(RoundSig(r.PeakHz, 5)), flip,
		sig(r.BandwidthHz, 5), tbw, Number(RoundSig(r.EnergyUT2ms, 5))}
}

// sig rounds a measured figure to n significant digits, "—" where there is
// none (NaN or infinite).
func sig(v float64, n int) string {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return "—"
	}
	return Number(RoundSig(v, n))
}

// MarkdownTable and LatexTable write a table for a manuscript.
func colHead(c display.Column) string {
	if c.Unit == "" {
		return c.Name
	}
	return c.Name + " (" + c.Unit + ")"
}

func MarkdownTable(t display.Table) string {
	var b strings.Builder
	fmt.Fprintf(&b, "**%s**\n\n", t.Title)
	var heads, rule []string
	for _, c := range t.Columns {
		heads = append(heads, colHead(c))
		rule = append(rule, "---")
	}
	b.WriteString("| " + strings.Join(heads, " | ") + " |\n")
	b.WriteString("|" + strings.Join(rule, "|") + "|\n")
	for _, r := range t.Rows {
		esc := make([]string, len(r))
		for i, c := range r {
			esc[i] = strings.ReplaceAll(c, "|", "\\|")
		}
		b.WriteString("| " + strings.Join(esc, " | ") + " |\n")
	}
	for _, n := range t.Notes {
		b.WriteString("\n" + strings.Replace(n, "* ", "\\* ", 1) + "\n")
	}
	return b.String()
}

var latexEscaper = strings.NewReplacer(`\`, `\textbackslash{}`, "&", `\&`, "%", `\%`, "$", `\$`, "#", `\#`, "_", `\_`, "{", `\{`, "}", `\}`,
	"µ", `$\mu$`, "²", `$^2$`, "·", `$\cdot$`, "×", `$\times$`, "∫", `$\int$`, "—", "--", "–", "--",
	"σ", `$\sigma$`, "†", `$^\dagger$`, "±", `$\pm$`, "¼", `$\frac{1}{4}$`, "°", `$^\circ$`, "≤", `$\le$`, "≥", `$\ge$`, "−", `$-$`)

// Field and nucleus names typeset as a manuscript writes them: B0 and B1 as
// $B_0$, $B_1$, a nuclide such as 31P as $^{31}$P.
var (
	latexField   = regexp.MustCompile(`\bB([01])\b`)
	latexNuclide = regexp.MustCompile(`\b(\d{1,3})([A-Z][a-z]?)\b`)
)

// latexText escapes running text for LaTeX.
func latexText(s string) string {
	s = latexEscaper.Replace(s)
	s = latexField.ReplaceAllString(s, `$$B_$1$$`)
	return latexNuclide.ReplaceAllString(s, `$$^{$1}$$$2`)
}

func LatexTable(t display.Table) string {
	var b strings.Builder
	b.WriteString("\\begin{table}\n\\centering\n")
	fmt.Fprintf(&b, "\\caption{%s}\n", latexText(t.Title))
	// A wide table is scaled to the text width (\\resizebox needs graphicx).
	wide := len(t.Columns) > 10
	if wide {
		b.WriteString("% \\resizebox needs \\usepackage{graphicx}\n\\resizebox{\\textwidth}{!}{%\n")
	}
	b.WriteString("\\begin{tabular}{" + strings.Repeat("l", len(t.Columns)) + "}\n\\hline\n")
	var heads []string
	for _, c := range t.Columns {
		heads = append(heads, latexText(colHead(c)))
	}
	b.WriteString(strings.Join(heads, " & ") + " \\\\\n\\hline\n")
	for _, r := range t.Rows {
		cells := make([]string, len(r))
		for i, c := range r {
			cells[i] = latexEscaper.Replace(c)
		}
		b.WriteString(strings.Join(cells, " & ") + " \\\\\n")
	}
	b.WriteString("\\hline\n\\end{tabular}\n")
	if wide {
		b.WriteString("}\n")
	}
	for _, n := range t.Notes {
		b.WriteString("\n\\par\\footnotesize " + latexText(n) + "\n")
	}
	b.WriteString("\\end{table}\n")
	return b.String()
}
