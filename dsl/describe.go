package dsl

import (
	"errors"
	"math"
	"strings"

	"Nutate/display"
	"Nutate/dsl/present"
	"Nutate/physics/shape"
)

// measure runs shape.Measure for a pulse with the session's field and the tr
// given, telling prog (when not nil) of its progress.
func (ev *evaluator) measure(d *pulseDef, tr float64, prog *progress) (shape.Properties, error) {
	opt := ev.measureOptions(d, tr)
	if prog != nil {
		// The cost is an estimate: stop short of the pulse's share until it is
		// done (prog adds the shares of the pulses before).
		most := 0.99 * shape.MeasureCost(d.Pulse, opt)
		opt.Progress = func(steps float64) { prog.report(math.Min(steps, most)) }
	}
	pr, err := shape.Measure(ev.ctx, d.Pulse, opt)
	if prog != nil && err == nil {
		prog.mu.Lock()
		prog.base += shape.MeasureCost(d.Pulse, opt)
		prog.mu.Unlock()
	}
	return pr, withoutPrefix(err, "measure: ")
}

// measureOptions are the options describe and report measure a pulse with.
func (ev *evaluator) measureOptions(d *pulseDef, tr float64) shape.MeasureOptions {
	opt := shape.MeasureOptions{TR: tr, Field: ev.st.field}
	if p := d.Pulse; imported(p) && p.Sweep > 0 {
		// A file's sweep has no design bandwidth beside it; the designed
		// swept shapes (hsec, chirp, wurst) have bandwidth = sweep, and their
		// profile is looked at over twice it: do the same, so that an export
		// read back is measured on the original's span.
		opt.Span = math.Max(2*p.Sweep, 4/p.Duration())
		opt.Band = p.Sweep // the threshold is judged over the sweep's central half
	}
	return opt
}

// measureProgress starts a progress display for measuring the pulses of defs
// when the work is long (over progressSteps isochromat-steps, as for sweeps; a
// sinc of about 40 000 samples and up), nil otherwise, its label saying how
// long the work will take when that is long. done ends it at 100 %. Work over
// the session's work budget is refused before it starts.
func (ev *evaluator) measureProgress(task string, defs []*pulseDef) (prog *progress, done func(), err error) {
	total := 0.0
	for _, d := range defs {
		total += shape.MeasureCost(d.Pulse, ev.measureOptions(d, 0))
	}
	if err := ev.checkWork(task, total); err != nil {
		return nil, nil, err
	}
	if total <= progressSteps || ev.sink.Progress == nil {
		return nil, func() {}, nil
	}
	prog = &progress{sink: ev.sink.Progress, task: workLabel(task, total), total: total, last: -1}
	prog.report(0)
	return prog, func() {
		if prog.last < 100 {
			prog.sink(prog.task, 100, 100)
		}
	}, nil
}

// withoutPrefix drops a package's prefix from an error shown to the user, keeping
// any other error (a cancellation) as it is.
func withoutPrefix(err error, prefix string) error {
	if err == nil || !strings.HasPrefix(err.Error(), prefix) {
		return err
	}
	return errors.New(strings.TrimPrefix(err.Error(), prefix))
}

func gammaBarOf(p *shape.Pulse) float64 { return math.Abs(p.Gamma) / (2 * math.Pi) }

// signedGammaBar is γ/2π with its sign, for offsets: a shift δ or a position x in
// a gradient G is the offset γ̄·B0·δ or γ̄·G·x (see convert).
func signedGammaBar(p *shape.Pulse) float64 { return p.Gamma / (2 * math.Pi) }

func fmtField(b, gammaBar float64) string { return fieldValue(b, gammaBar).String() }

// fieldValue is a B1 in µT with its nutation frequency γ̄B1 in Hz.
func fieldValue(b, gammaBar float64) present.FieldValue {
	return present.FieldValue{B1: Quantity{b, dimField}.shown("uT"), Hz: Quantity{b * gammaBar, dimFrequency}.shown("Hz")}
}

// describe runs `describe NAME, ... [with tr = ...]`: a waveform plot and a table
// of properties per pulse.
func (ev *evaluator) describe(s *DescribeStmt) error {
	defs, err := ev.pulses(s.Names)
	if err != nil {
		return err
	}
	set, err := ev.evalSettings(s.With, "tr")
	if err != nil {
		return err
	}
	prog, done, err := ev.measureProgress("describe "+joinNames(s.Names), defs)
	if err != nil {
		return errAt(s.P, "%v", err)
	}
	defer done()
	for _, d := range defs {
		if err := ev.checkCtx(); err != nil {
			return err
		}
		if err := set.checkTR(d.Name, d.Pulse); err != nil {
			return err
		}
		pr, err := ev.measure(d, set.tr, prog)
		if err != nil {
			return err
		}
		t := propertiesTable(d, pr, set.tr, ev.st.field)
		t.Notes = []string{ev.st.definition(present.RippleNote, present.RippleBrief), present.EnergyCaution}
		if w, err := ev.thresholdWarning(d, pr); err != nil {
			return err
		} else if w != "" {
			t.Notes = append([]string{"warning: " + w}, t.Notes...)
		}
		f, err := ev.buildBundle(func() present.Figure { return present.WaveformBundle(waveformOf(d), t) })
		if err != nil {
			return err
		}
		ev.emitFigure(f)
	}
	return nil
}

// buildBundle makes a display bundle on a goroutine of its own, so that an interrupt
// need not wait for the plot of a long waveform (about a second for 10⁶ samples):
// the evaluator returns ctx.Err() at once and the abandoned build, which touches
// no session state, finishes in the background and is dropped. A panic in f is
// raised again on the evaluator's goroutine, where the session recovers it.
func (ev *evaluator) buildBundle(f func() present.Figure) (present.Figure, error) {
	type result struct {
		b     present.Figure
		panic any
	}
	ch := make(chan result, 1)
	go func() {
		var r result
		defer func() {
			r.panic = recover()
			ch <- r
		}()
		r.b = f()
	}()
	select {
	case r := <-ch:
		if r.panic != nil {
			panic(r.panic)
		}
		return r.b, nil
	case <-ev.ctx.Done():
		return present.Figure{}, ev.ctx.Err()
	}
}

// thresholdWarning warns when an adiabatic pulse's peak is below its measured
// threshold (see thresholdWarning).
func (ev *evaluator) thresholdWarning(d *pulseDef, pr shape.Properties) (string, error) {
	met := true
	if math.IsNaN(pr.Threshold) {
		var err error
		if met, err = meetsAdiabaticTarget(ev.ctx, d.Pulse); err != nil {
			return "", err
		}
	}
	return thresholdWarning(d.Pulse, pr, met), nil
}

// waveformOf gives the display's view of a pulse's samples.
func waveformOf(d *pulseDef) display.Waveform {
	p := d.Pulse
	n := p.Wave.Len()
	w := display.Waveform{Title: d.Name + " (" + d.Kind + ")", Time: make([]float64, n), Amplitude: make([]float64, n), Phase: make([]float64, n)}
	t := 0.0
	for j, b := range p.Wave.B1 {
		w.Time[j] = t + p.Wave.Dwell[j]/2
		t += p.Wave.Dwell[j]
		w.Amplitude[j] = math.Hypot(real(b), imag(b)) * 1e6
		w.Phase[j] = math.Atan2(imag(b), real(b)) * 180 / math.Pi
	}
	if p.Freq != nil {
		w.Frequency = append([]float64(nil), p.Freq...)
	}
	if p.Wave.Gradient != nil {
		w.Gradient = make([]float64, n)
		for j, g := range p.Wave.Gradient {
			w.Gradient[j] = g * 1e3
		}
	}
	return w
}

// propertiesTable is the table `describe` shows under the waveform.
func propertiesTable(d *pulseDef, pr shape.Properties, tr, field float64) display.Table {
	return display.Table{
		Title:   "pulse " + d.Name,
		Columns: []display.Column{{Name: "property"}, {Name: "value"}},
		Rows:    present.PropertiesTable(pulseProperties(d, pr, tr, field)),
	}
}

// pulseProperties gives what describe measured on d, with its design figures,
// as the plain values present.PropertiesTable shows.
func pulseProperties(d *pulseDef, pr shape.Properties, tr, field float64) present.PulseProperties {
	p := d.Pulse
	gb := gammaBarOf(p)
	q := func(v float64, dim Dim, unit string) present.Value { return Quantity{v, dim}.shown(unit) }
	ptr := func(v present.Value) *present.Value { return &v }
	v := present.PulseProperties{
		Name: d.Name, Shape: d.Kind, Nucleus: d.Nucleus.Name,
		Duration: q(p.Duration(), dimTime, ""),
		Samples:  p.Wave.Len(),
		Peak:     fieldValue(p.Peak(), gb),
		Imported: imported(p), FreqSweep: p.Freq != nil, Area: importedArea(p),
		CentrePPM:    math.NaN(),
		Flip:         q(p.Flip, dimAngle, "deg"),
		Rotation:     q(pr.Rotation, dimAngle, "deg"),
		RoleQuantity: roleQuantity(p.Role),
		FWHM:         q(pr.Bandwidth, dimFrequency, ""),
		PassValue:    pr.PassValue, OnBand: pr.OnBand, PassDesign: pr.PassDesign,
		TBW:         p.TBW,
		TBWMeasured: pr.Bandwidth * p.Duration(),
		Transition:  q(pr.Transition, dimFrequency, ""),
		PassRipple:  pr.PassRipple, StopRipple: pr.StopRipple,
		Energy:    p.Energy(),
		B1rms:     q(pr.B1rms, dimField, "uT"),
		SliceFWHM: q(pr.Thickness, dimLength, "mm"),
		Source:    d.Source,
	}
	if uniform(p.Wave.Dwell) {
		v.Dwell = ptr(q(p.Wave.Dwell[0], dimTime, ""))
	}
	if p.Center != 0 {
		v.Centre = ptr(q(p.Center, dimFrequency, ""))
		if field > 0 {
			v.CentrePPM = p.Center / (signedGammaBar(p) * field) * 1e6
		}
	}
	if p.Role != shape.RoleNone {
		v.Role = p.Role.String()
	}
	if p.Bandwidth == 0 && p.Sweep > 0 {
		// A sweep that is not a design band (BIR-4's, a file's).
		v.Sweep = ptr(q(p.Sweep, dimFrequency, ""))
	}
	if p.Bandwidth != 0 {
		v.Bandwidth = ptr(q(p.Bandwidth, dimFrequency, ""))
	}
	if p.Adiabatic {
		v.Threshold = &present.Threshold{Label: thresholdLabel(p), Text: thresholdText(p, pr)}
		if !math.IsNaN(pr.Threshold) {
			v.Threshold.Upper = upperLimitText(p, pr)
		}
	}
	if tr > 0 {
		v.TR = ptr(q(tr, dimTime, ""))
	}
	if p.Gradient != 0 {
		v.Gradient = ptr(q(p.Gradient, dimGradient, "mT/m"))
		if p.Bandwidth != 0 {
			v.SliceDesign = ptr(q(shape.SliceThickness(p.Bandwidth, p.Gamma, p.Gradient), dimLength, "mm"))
		}
		if field > 0 {
			v.ShiftPerPPM = ptr(q(pr.ShiftPerPPM, dimLength, "mm"))
		}
	}
	return v
}

// roleQuantity names the quantity a role's profile is measured in.
func roleQuantity(r shape.Role) string {
	switch r {
	case shape.RoleInvert, shape.RoleSaturate:
		return "Mz"
	case shape.RoleRefocus:
		return "echo |β|²"
	}
	return "|Mxy|"
}

// importedArea names where an imported pulse's area γ|∫B1 dt| is taken: at the
// carrier, at the file's constant frequency offset (its centre), or in the frame
// that follows its frequency modulation (shape.FromSamples).
func importedArea(p *shape.Pulse) string {
	switch {
	case p.Freq != nil:
		return "area following its frequency"
	case p.Center != 0:
		return "area at its centre"
	}
	return "area at the carrier"
}

// imported reports whether p was read from a file (shape.FromSamples).
func imported(p *shape.Pulse) bool { return p.Shape == "import" }
