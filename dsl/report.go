package dsl

import (
	"html"
	"math"
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
	var rows []present.ReportRow
	var warnings []string
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
		rows = append(rows, ev.reportRow(d, pr))
	}
	t := present.ReportTable(present.Report{Nucleus: defs[0].Nucleus.Name, Field: ev.st.field, Rows: rows, Warnings: warnings})
	switch {
	case s.Format == nil:
		ev.emit(tableBundle(t))
	case s.Format.Name == "markdown":
		md := present.MarkdownTable(t)
		ev.emit(display.Bundle{"text/markdown": md, "text/plain": md})
	default:
		// The LaTeX source is meant to be copied into a manuscript: it travels
		// as text (a notebook's math renderer cannot typeset a tabular).
		tex := present.LatexTable(t)
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

// reportRow gives one pulse's row of a methods table, from its design and what
// was measured on it.
func (ev *evaluator) reportRow(d *pulseDef, pr shape.Properties) present.ReportRow {
	p := d.Pulse
	gb := gammaBarOf(p)
	row := present.ReportRow{Name: d.Name, Shape: describeShape(d), DurationMs: p.Duration() * 1e3, Samples: p.Wave.Len(),
		PeakUT: p.Peak() * 1e6, PeakHz: p.Peak() * gb, Flip: math.NaN(), Rotation: pr.Rotation * 180 / math.Pi,
		BandwidthHz: pr.Bandwidth, TBW: p.TBW, TBWMeasured: pr.Bandwidth * p.Duration(), EnergyUT2ms: p.Energy() * 1e15,
		CentreHz: p.Center, CentrePPM: math.NaN(), Adiabatic: p.Adiabatic,
		ThresholdUT: pr.Threshold * 1e6, ThresholdAtCentre: !thresholdBanded(p),
		GradientMTm: p.Gradient * 1e3, SliceFWHMMm: pr.Thickness * 1e3, ShiftMmPerPPM: pr.ShiftPerPPM * 1e3}
	if !math.IsNaN(p.Flip) && !imported(p) {
		row.Flip = p.Flip * 180 / math.Pi
	}
	if f := ev.st.field; f > 0 {
		// Δf = γ̄·B0·δ with the sign of γ (README conventions).
		row.CentrePPM = p.Center / (signedGammaBar(p) * f) * 1e6
	}
	if p.Adiabatic && math.IsNaN(pr.Threshold) {
		row.ThresholdReason = thresholdReason(p, pr)
	}
	if p.Gradient != 0 && p.Bandwidth != 0 {
		row.SliceDesignMm = shape.SliceThickness(p.Bandwidth, p.Gamma, p.Gradient) * 1e3
	}
	if p.Role != shape.RoleNone {
		row.Role = p.Role.String()
	}
	return row
}
