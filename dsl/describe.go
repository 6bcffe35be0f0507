package dsl

import (
	"errors"
	"fmt"
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

func fmtField(b, gammaBar float64) string {
	return fmt.Sprintf("%s (%s)", Quantity{b, dimField}.format("uT"), Quantity{b * gammaBar, dimFrequency}.format("Hz"))
}

// energyUnit shows ∫B1² dt in µT²·ms.
func fmtEnergy(e float64) string { return present.Number(e*1e12*1e3) + " µT²·ms" }

func fmtOpt(v float64, f func(float64) string) string {
	if math.IsNaN(v) || math.IsInf(v, 0) {
		return "—"
	}
	return f(v)
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

// centreText is a pulse's centre in Hz, and in ppm too once the field is set
// (Δf = γ̄·B0·δ with the sign of γ, README conventions).
func centreText(p *shape.Pulse, field float64) string {
	s := Quantity{p.Center, dimFrequency}.String()
	if f := field; f > 0 {
		ppm := p.Center / (signedGammaBar(p) * f) * 1e6
		s += " (" + present.Number(present.RoundSig(ppm, 6)) + " ppm)"
	}
	return s
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
	p := d.Pulse
	gb := gammaBarOf(p)
	rows := [][]string{
		{"shape", d.Kind},
		{"nucleus", d.Nucleus.Name},
		{"duration", Quantity{p.Duration(), dimTime}.String()},
		{"samples", samplesText(p)},
		{"peak B1", fmtField(p.Peak(), gb)},
	}
	if imported(p) {
		// The file's samples carry no design flip; γ|∫B1 dt| is only the
		// area where the file says the pulse plays (the rotation is the
		// simulated one below).
		if p.Center != 0 {
			from := "centre (the file's frequency offset)"
			if p.Freq != nil {
				from = "centre (middle of the file's frequency sweep)"
			}
			rows = append(rows, []string{from, centreText(p, field)})
		}
		rows = append(rows, []string{importedArea(p) + " (γ|∫B1 dt|)", Quantity{p.Flip, dimAngle}.format("deg")})
	} else {
		if p.Center != 0 {
			rows = append(rows, []string{"centre (carrier offset of the band)", centreText(p, field)})
		}
		if !math.IsNaN(p.Flip) {
			rows = append(rows, []string{"flip (nominal)", Quantity{p.Flip, dimAngle}.format("deg")})
		}
	}
	rows = append(rows, []string{"rotation at centre (measured)", fmtOpt(pr.Rotation, func(v float64) string { return Quantity{v, dimAngle}.format("deg") })})
	if p.Role != shape.RoleNone {
		rows = append(rows, []string{"role", p.Role.String()})
	}
	if p.Bandwidth == 0 && p.Sweep > 0 {
		// A sweep that is not a design band (BIR-4's, a file's).
		rows = append(rows, []string{"frequency sweep", Quantity{p.Sweep, dimFrequency}.String()})
	}
	if p.Bandwidth != 0 {
		rows = append(rows, []string{"bandwidth (design)", Quantity{p.Bandwidth, dimFrequency}.String()})
	}
	rows = append(rows,
		[]string{"bandwidth (measured FWHM, " + halfLevelText(p, pr) + ")", fwhmText(p, pr)},
	)
	if p.TBW != 0 {
		rows = append(rows, []string{"TBW (design)", present.Number(p.TBW)})
	}
	if !math.IsNaN(pr.Bandwidth) {
		rows = append(rows, []string{"TBW (measured, FWHM × duration)", present.Number(present.RoundSig(pr.Bandwidth*p.Duration(), 6))})
	}
	rows = append(rows,
		[]string{"transition (measured, 90 %–10 %)", fmtOpt(pr.Transition, func(v float64) string { return Quantity{v, dimFrequency}.String() })},
		[]string{"ripple in " + roleQuantity(p.Role) + " (measured, pass / stop)", fmtOpt(pr.PassRipple, pct) + " / " + fmtOpt(pr.StopRipple, pct) + " of M0"},
	)
	if p.Adiabatic {
		rows = append(rows, []string{thresholdLabel(p), thresholdText(p, pr)})
		if !math.IsNaN(pr.Threshold) {
			rows = append(rows, []string{"upper B1 limit (measured)", upperLimitText(p, pr)})
		}
	}
	rows = append(rows, []string{"energy ∫B1² dt (relative)", fmtEnergy(p.Energy())})
	if tr > 0 {
		rows = append(rows, []string{"B1rms at TR " + Quantity{tr, dimTime}.String() + " (relative)", fmtOpt(pr.B1rms, func(v float64) string { return Quantity{v, dimField}.format("uT") })})
	}
	if p.Gradient != 0 {
		rows = append(rows, []string{"gradient", Quantity{p.Gradient, dimGradient}.format("mT/m")})
		if p.Bandwidth != 0 {
			rows = append(rows, []string{"slice thickness (design)", Quantity{shape.SliceThickness(p.Bandwidth, p.Gamma, p.Gradient), dimLength}.format("mm")})
		}
		rows = append(rows, []string{"slice thickness (measured, FWHM)", fmtOpt(pr.Thickness, func(v float64) string { return Quantity{v, dimLength}.format("mm") })})
		if field > 0 {
			rows = append(rows, []string{"chemical-shift displacement", fmtOpt(pr.ShiftPerPPM, func(v float64) string { return Quantity{v, dimLength}.format("mm") + " per ppm" })})
		}
	}
	if d.Source != "" {
		rows = append(rows, []string{"imported from", d.Source})
	}
	return display.Table{
		Title:   "pulse " + d.Name,
		Columns: []display.Column{{Name: "property"}, {Name: "value"}},
		Rows:    rows,
	}
}

func pct(v float64) string { return present.Number(100*v) + " %" }

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

// halfLevelText says where the FWHM is taken: "Mz = 0".
func halfLevelText(p *shape.Pulse, pr shape.Properties) string {
	if math.IsNaN(pr.PassValue) {
		return "at half the centre value"
	}
	h := pr.PassValue / 2
	switch p.Role {
	case shape.RoleInvert:
		return "Mz = " + present.Number(present.RoundSig(1-2*h, 4))
	case shape.RoleSaturate:
		return "Mz = " + present.Number(present.RoundSig(1-h, 4))
	}
	if !pr.PassDesign {
		return roleQuantity(p.Role) + " = " + present.Number(present.RoundSig(h, 4)) + ", half the centre value"
	}
	return roleQuantity(p.Role) + " = " + present.Number(present.RoundSig(h, 4))
}

// fwhmText is the measured FWHM, or why there is none.
func fwhmText(p *shape.Pulse, pr shape.Properties) string {
	if !math.IsNaN(pr.Bandwidth) {
		return Quantity{pr.Bandwidth, dimFrequency}.String()
	}
	if pr.PassDesign && pr.OnBand < pr.PassValue/2 {
		return "— (the centre does not reach the half level)"
	}
	return "—"
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

// samplesText gives the sample count and the dwell; with a dwell that varies (a
// train, an imported table) each sample is a segment of its own length.
func samplesText(p *shape.Pulse) string {
	if !uniform(p.Wave.Dwell) {
		return fmt.Sprintf("%d segments (variable dwell)", p.Wave.Len())
	}
	return fmt.Sprintf("%d (dwell %s)", p.Wave.Len(), Quantity{p.Wave.Dwell[0], dimTime})
}
