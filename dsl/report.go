package dsl

import (
	"fmt"
	"html"
	"math"
	"regexp"
	"strings"

	"Nutate/display"
	"Nutate/dsl/present"
	"Nutate/physics/shape"
)

// report runs `report NAME, ... [as markdown | as latex]`: a methods-section table
// of the pulses.
func (ev *evaluator) report(s *ReportStmt) error {
	defs, err := ev.pulses(s.Names)
	if err != nil {
		return err
	}
	cols := []display.Column{{Name: "pulse"}, {Name: "shape"}, {Name: "duration", Unit: "ms"}, {Name: "samples"},
		{Name: "peak B1", Unit: "µT"}, {Name: "peak B1", Unit: "Hz"}, {Name: "flip", Unit: "deg"}, {Name: "bandwidth (measured FWHM)", Unit: "Hz"},
		{Name: "TBW"}, {Name: "energy*", Unit: "µT²·ms"}}
	adiabatic, slice, role, centre := false, false, false, false
	for _, d := range defs {
		centre = centre || d.Pulse.Center != 0
		adiabatic = adiabatic || d.Pulse.Adiabatic
		slice = slice || d.Pulse.Gradient != 0
		role = role || d.Pulse.Role != shape.RoleNone
	}
	// An off-centre band is part of the method: where the pulse plays.
	if centre {
		cols = append(cols, display.Column{Name: "centre", Unit: "Hz"})
		if ev.st.field > 0 {
			cols = append(cols, display.Column{Name: "centre", Unit: "ppm"})
		}
	}
	if adiabatic {
		cols = append(cols, display.Column{Name: "adiabatic threshold", Unit: "µT"})
	}
	// A methods table of slice-selective pulses gives the gradient and the
	// (design) slice thickness; roles say what each pulse is for.
	if slice {
		cols = append(cols, display.Column{Name: "gradient", Unit: "mT/m"}, display.Column{Name: "design slice thickness", Unit: "mm"},
			display.Column{Name: "slice FWHM", Unit: "mm"})
		if ev.st.field > 0 {
			cols = append(cols, display.Column{Name: "chemical-shift displacement", Unit: "mm/ppm"})
		}
	}
	if role {
		cols = append(cols, display.Column{Name: "role"})
	}
	var rows [][]string
	var warnings []string
	var unmet []string
	prog, done, err := ev.measureProgress("report "+joinNames(s.Names), defs)
	if err != nil {
		return errAt(s.P, "%v", err)
	}
	defer done()
	for _, d := range defs {
		if err := ev.checkCtx(); err != nil {
			return err
		}
		pr, err := ev.measure(d, 0, prog)
		if err != nil {
			return err
		}
		if w, err := ev.thresholdWarning(d, pr); err != nil {
			return err
		} else if w != "" {
			warnings = append(warnings, "Warning ("+d.Name+"): "+w+".")
		}
		p := d.Pulse
		gb := gammaBarOf(p)
		shp := describeShape(d)
		flip := "—"
		if !math.IsNaN(p.Flip) && !imported(p) {
			flip = present.Number(present.RoundSig(p.Flip*180/math.Pi, 5))
		} else if !math.IsNaN(pr.Rotation) {
			flip = present.Number(present.RoundSig(pr.Rotation*180/math.Pi, 4)) + " (simulated)"
		}
		tbw := "—"
		switch {
		case p.TBW > 0:
			tbw = present.Number(present.RoundSig(p.TBW, 4))
		case !math.IsNaN(pr.Bandwidth):
			tbw = present.Number(present.RoundSig(pr.Bandwidth*p.Duration(), 4)) + " (measured)"
		}
		row := []string{d.Name, shp, present.Number(present.RoundSig(p.Duration()*1e3, 6)), fmt.Sprint(p.Wave.Len()),
			present.Number(present.RoundSig(p.Peak()*1e6, 5)), present.Number(present.RoundSig(p.Peak()*gb, 5)), flip,
			fmtOpt(pr.Bandwidth, func(v float64) string { return present.Number(present.RoundSig(v, 5)) }), tbw,
			present.Number(present.RoundSig(p.Energy()*1e15, 5))}
		if centre {
			row = append(row, present.Number(present.RoundSig(p.Center, 6)))
			if f := ev.st.field; f > 0 {
				// Δf = γ̄·B0·δ with the sign of γ (README conventions).
				row = append(row, present.Number(present.RoundSig(p.Center/(signedGammaBar(p)*f)*1e6, 6)))
			}
		}
		if adiabatic {
			th := "—"
			if p.Adiabatic {
				th = fmtOpt(pr.Threshold, func(v float64) string { return present.Number(present.RoundSig(v*1e6, 4)) })
				if !thresholdBanded(p) && !math.IsNaN(pr.Threshold) {
					th += " (at the centre)"
				}
				if math.IsNaN(pr.Threshold) {
					th = "not met†"
					unmet = append(unmet, d.Name+": "+thresholdReason(p, pr))
				}
			}
			row = append(row, th)
		}
		if slice {
			g, th, fwhm, shift := "—", "—", "—", "—"
			if p.Gradient != 0 {
				g = present.Number(present.RoundSig(p.Gradient*1e3, 5))
				if p.Bandwidth != 0 {
					th = present.Number(present.RoundSig(shape.SliceThickness(p.Bandwidth, p.Gamma, p.Gradient)*1e3, 5))
				}
				fwhm = fmtOpt(pr.Thickness, func(v float64) string { return present.Number(present.RoundSig(v*1e3, 5)) })
				shift = fmtOpt(pr.ShiftPerPPM, func(v float64) string { return present.Number(present.RoundSig(v*1e3, 5)) })
			}
			row = append(row, g, th, fwhm)
			if ev.st.field > 0 {
				row = append(row, shift)
			}
		}
		if role {
			r := "—"
			if p.Role != shape.RoleNone {
				r = p.Role.String()
			}
			row = append(row, r)
		}
		rows = append(rows, row)
	}
	nuc := defs[0].Nucleus.Name
	context := "nucleus " + nuc
	if ev.st.field > 0 {
		context += fmt.Sprintf(", B0 = %s T", present.Number(ev.st.field))
	}
	notes := []string{
		"Bandwidth (measured): full width of each pulse's simulated profile (exact Bloch simulation, " + context + ") where its role's quantity is half-way to its design pass-band value (Mz = 0 for inversion, |Mxy| = sin flip / 2 for excitation, echo |β|² = sin²(flip/2) / 2 for refocusing); TBW as designed, or FWHM × duration where the design has none.",
		"* Energy ∫B1² dt is a relative, waveform-only estimate, not SAR: defer to the scanner's own SAR supervision, IEC 60601-2-33, local regulations and the site's MR safety officer.",
	}
	if adiabatic {
		notes = append(notes, "Adiabatic threshold: the lowest peak B1 at which the simulated pulse meets its role's target (invert Mz ≤ −0.9, excite |Mxy| ≥ 0.9·sin flip, refocus |β|² ≥ 0.9, saturate |Mz| ≤ 0.1; bir4 also its rotation, phase included) at every offset within ±¼ of its band, or at its centre where marked (no design band), and keeps meeting it over half an octave of B1 above.")
	}
	if len(unmet) > 0 {
		notes = append(notes, "† adiabatic threshold not met: "+strings.Join(unmet, "; "))
	}
	notes = append(notes, warnings...)
	t := display.Table{Title: "RF pulses (" + context + ")", Columns: cols, Rows: rows, Notes: notes}
	switch {
	case s.Format == nil:
		ev.emit(tableBundle(t))
	case s.Format.Name == "markdown":
		md := markdownTable(t)
		ev.emit(display.Bundle{"text/markdown": md, "text/plain": md})
	default:
		// The LaTeX source is meant to be copied into a manuscript: it travels
		// as text (a notebook's math renderer cannot typeset a tabular).
		tex := latexTable(t)
		ev.emit(display.Bundle{"text/plain": tex, "text/html": "<pre>" + html.EscapeString(tex) + "</pre>"})
	}
	return nil
}

// describeShape names the shape with the arguments that define it, as a
// methods section needs them: each of the shape's own arguments as given, or
// its default (a group of alternatives, such as tbw or lobes, by the one
// given); a train by its elements, their phases and the gap.
func describeShape(d *pulseDef) string {
	if d.Kind == "train" {
		var els []string
		for _, e := range d.Elems {
			s := e.Def.Name
			if strings.Contains(s, "[") { // written inline in the train: name its shape
				s = "(" + describeShape(e.Def) + ")"
			}
			if e.Phase != 0 {
				s += " at " + present.Number(present.RoundSig(e.Phase*180/math.Pi, 6)) + " deg"
			}
			els = append(els, s)
		}
		out := "train of " + strings.Join(els, ", ")
		if a, ok := d.Args["gap"]; ok && a.Val.Q.V != 0 {
			out += "; gap " + a.Val.String()
		}
		if a, ok := d.Args["phase"]; ok && a.Val.Q.V != 0 {
			out += "; phase " + a.Val.String()
		}
		return out
	}
	if d.Spec == nil {
		return d.Kind
	}
	parts := []string{d.Kind}
	groups := map[string]bool{}
	for _, as := range d.Spec.Args {
		if _, ok := d.Args[as.Name]; ok && as.Group != "" {
			groups[as.Group] = true
		}
	}
	for _, as := range d.Spec.Args {
		a, given := d.Args[as.Name]
		switch {
		case given && a.Word != "":
			parts = append(parts, as.Name+" "+a.Word)
		case given:
			parts = append(parts, as.Name+" "+a.Val.String())
		case as.Default != "" && !groups[as.Group]:
			text := as.Name + " " + as.Default // "beta 5.3", "window none"
			if _, ok := d.Spec.arg(strings.Fields(as.Default)[0]); ok {
				text = as.Default // the default names another argument: "cutoff 1.1 % (T = 6σ)"
			}
			parts = append(parts, text)
			if as.Group != "" {
				groups[as.Group] = true
			}
		}
	}
	return strings.Join(parts, ", ")
}

func colHead(c display.Column) string {
	if c.Unit == "" {
		return c.Name
	}
	return c.Name + " (" + c.Unit + ")"
}

func markdownTable(t display.Table) string {
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

func latexTable(t display.Table) string {
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
