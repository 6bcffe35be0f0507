package dsl

import (
	"bufio"
	"bytes"
	"fmt"
	"math"
	"math/cmplx"
	"os"
	"path/filepath"
	"strconv"
	"strings"

	"Nutate/physics/shape"
)

// maxImportBytes bounds the size of an imported file.
const maxImportBytes = 256 << 20

// exportMarker starts the comment line of every waveform export; a file that does
// not start with it is never overwritten.
const exportMarker = "# nutate waveform export"

// exportColumns is the header row of an export (LANGUAGE.md "Files").
var exportColumns = []string{"time (s)", "amplitude (T)", "phase (rad)", "frequency offset (Hz)", "gradient (T/m)"}

func (ev *evaluator) path(p string) string {
	if filepath.IsAbs(p) || ev.sess.dir == "" {
		return p
	}
	return filepath.Join(ev.sess.dir, p)
}

// export runs `export NAME to "file.csv"`.
// `export sweep to "file.csv"` writes the last sweep's data instead.
func (ev *evaluator) export(s *ExportStmt) error {
	if s.Name.Name == "figure" {
		return ev.exportFigure(s) // figure_export.go
	}
	if s.Path == "" {
		return errAt(s.PathP, "export needs a file name, got \"\"")
	}
	path := ev.path(s.Path)
	if err := ev.checkOverwrite(s, path); err != nil {
		return err
	}
	if s.Name.Name == "sweep" {
		t := ev.st.last
		if t == nil {
			return errAt(s.Name.P, "no sweep has run yet in this session")
		}
		if err := os.WriteFile(path, t.csv(), 0o644); err != nil {
			return errAt(s.PathP, "cannot write %s: %v", s.Path, err)
		}
		ev.emit(textBundle(fmt.Sprintf("exported %s to %s: %s, columns %s", t.title, s.Path, plural(len(t.rows), "row"), strings.Join(t.columns, ", "))))
		return nil
	}
	d, err := ev.pulseNamed(s.Name)
	if err != nil {
		return err
	}
	var buf bytes.Buffer
	p := d.Pulse
	n := p.Wave.Len()
	dwell := "variable"
	if uniform(p.Wave.Dwell) {
		dwell = strconv.FormatFloat(p.Wave.Dwell[0], 'g', -1, 64) + " s"
	}
	role := ""
	if p.Role != shape.RoleNone {
		role = ", role " + p.Role.String()
	}
	fmt.Fprintf(&buf, "%s: pulse %s, nucleus %s, duration %s s, dwell %s, samples %d%s\n", exportMarker, d.Name, d.Nucleus.Name, strconv.FormatFloat(p.Duration(), 'g', -1, 64), dwell, n, role)
	buf.WriteString(strings.Join(exportColumns, ",") + "\n")
	t := 0.0
	g := func(v float64) string { return strconv.FormatFloat(v, 'g', -1, 64) }
	for j, b := range p.Wave.B1 {
		// The phase is B1's own, in the carrier frame (any offset's ramp
		// included); the frequency column says where the pulse plays: its
		// carrier offset, or its instantaneous frequency when swept.
		f, gr := p.Center, 0.0
		if p.Freq != nil {
			f = p.Freq[j]
		}
		if p.Wave.Gradient != nil {
			gr = p.Wave.Gradient[j]
		}
		fmt.Fprintf(&buf, "%s,%s,%s,%s,%s\n", g(t), g(math.Hypot(real(b), imag(b))), g(math.Atan2(imag(b), real(b))), g(f), g(gr))
		t += p.Wave.Dwell[j]
	}
	if err := os.WriteFile(path, buf.Bytes(), 0o644); err != nil {
		return errAt(s.PathP, "cannot write %s: %v", s.Path, err)
	}
	ev.emit(textBundle(fmt.Sprintf("exported %s to %s: %s, %d columns (%s)", d.Name, s.Path, plural(n, "sample"), len(exportColumns), strings.Join(exportColumns, ", "))))
	return nil
}

// checkOverwrite refuses to replace a file that is not one of our exports.
func (ev *evaluator) checkOverwrite(s *ExportStmt, path string) error {
	info, err := os.Stat(path)
	if err != nil {
		return nil
	}
	if info.IsDir() {
		return errAt(s.PathP, "%s is a folder; want a file name", s.Path)
	}
	f, err := os.Open(path)
	if err != nil {
		return errAt(s.PathP, "cannot check %s before overwriting it: %v", s.Path, err)
	}
	first, _ := bufio.NewReader(f).ReadString('\n')
	f.Close()
	if !strings.HasPrefix(first, exportMarker) && !strings.HasPrefix(first, sweepMarker) {
		return errAt(s.PathP, "%s exists and is not a waveform or sweep export; refusing to overwrite it (choose another name or remove the file)", s.Path)
	}
	return nil
}

func uniform(d []float64) bool {
	for _, x := range d {
		if math.Abs(x-d[0]) > 1e-12*d[0] {
			return false
		}
	}
	return len(d) > 0
}

// csvColumn describes how an import column maps into shape.Samples.
type csvColumn struct {
	key    string // time amplitude phase frequency gradient
	factor float64
	hz     bool // amplitude given in Hz (γ̄·B1)
}

// maxImportPeak (T) is the largest peak an import takes as read, above the
// strongest RF fields in use (solid-state NMR probes reach a few mT, 100 to
// 250 kHz for 1H; common practice).
const maxImportPeak = 10e-3

// importPulse runs `import NAME from "file.csv" [with dwell = EXPR]`.
func (ev *evaluator) importPulse(s *ImportStmt) error {
	if err := ev.checkRedefine(s.Name, true); err != nil {
		return err
	}
	set, err := ev.evalSettings(s.With, importSettings...)
	if err != nil {
		return err
	}
	if _, ok := set.given["flip"]; ok {
		if at, ok := set.given["peak"]; ok {
			return errAt(at, "give flip or peak, not both: each sets the amplitude")
		}
	}
	if info, err := os.Stat(ev.path(s.Path)); err == nil && info.Size() > maxImportBytes {
		return errAt(s.PathP, "%s has %d bytes, over the limit of %d for a waveform", s.Path, info.Size(), maxImportBytes)
	}
	data, err := os.ReadFile(ev.path(s.Path))
	if err != nil {
		if os.IsNotExist(err) {
			return errAt(s.PathP, "no file %s (paths are relative to the notebook's folder)", s.Path)
		}
		return errAt(s.PathP, "cannot read %s: %v", s.Path, err)
	}
	smp, duration, err := readWaveformCSV(s.Path, string(data), ev.st.nucleus.GammaBar, set.dwell > 0)
	if err != nil {
		return errAt(s.PathP, "%v", err)
	}
	// A time column sets the dwell; a dwell given as well would silently
	// replace the file's times (one row alone has no dwell to keep).
	if set.dwell > 0 && smp.Times != nil && (len(smp.Times) > 1 || duration > 0) {
		return errAt(set.given["dwell"], "%s has a time column, which sets the dwell; drop `with dwell` (it applies to files of amplitudes alone)", s.Path)
	}
	c := shape.NewCommon()
	c.Role = exportRole(string(data))
	if _, ok := set.given["role"]; ok {
		c.Role = set.role
	}
	c.Flip, c.Peak = set.flip, set.peak
	if set.dwell > 0 {
		smp.Dwell = set.dwell
		smp.Times = nil
	} else {
		if len(smp.Times) == 1 && duration == 0 {
			return errAt(s.PathP, "%s has one sample and no dwell: add `with dwell = ...`", s.Path)
		}
		c.Duration = duration
	}
	if smp.Times == nil && smp.Dwell == 0 {
		return errAt(s.PathP, "%s has no time column: add `with dwell = ...`", s.Path)
	}
	p, err := shape.FromSamples(smp, c, ev.st.nucleus.Gamma())
	if err != nil {
		return errAt(s.PathP, "%s: %v", s.Path, err)
	}
	if math.IsNaN(c.Flip) && math.IsNaN(c.Peak) && p.Peak() > maxImportPeak {
		// Most likely a normalised shape (peak 1) read in tesla.
		return errAt(s.PathP, "%s: peak amplitude %s, beyond any RF coil: amplitudes are read in tesla unless the header names a unit, e.g. `amplitude (uT)`; for a normalised shape, scale it `with flip = ...` or `with peak = ...`", s.Path, Quantity{p.Peak(), dimField})
	}
	def := &pulseDef{Name: s.Name.Name, Kind: "imported", Pulse: p, Nucleus: ev.st.nucleus, Source: s.Path}
	warning, err := ev.definitionWarning(def, s.Name.P)
	if err != nil {
		return err
	}
	if smp.Phase != nil && (smp.Freq != nil) {
		warning += phaseFrequencyWarning(p)
	}
	ev.st.define(s.Name.Name, &binding{pulse: def})
	ev.emit(textBundle(pulseSummary(def) + ", from " + s.Path + warning))
	return nil
}

// phaseFrequencyWarning checks a file that gives both a phase and a frequency
// column: the frequency says where the pulse plays and the phase must already
// hold it (its steps between samples are −2π·f·dwell; a step of π is a sign
// change of the amplitude, as between a sinc's lobes; steps next to a field
// below 5 % of the peak are skipped, where a design may jump its phase). When the phase drifts
// from the one the frequency implies by more than 45° over the pulse, the
// waveform plays where its phase says while describe measures it where the
// frequency says: say so.
func phaseFrequencyWarning(p *shape.Pulse) string {
	w := p.Wave
	drift, off := 0.0, 0.0
	floor := 0.05 * p.Peak() // phase jumps where the field nearly vanishes are a design's (BIR-4)
	for j := 0; j+1 < w.Len(); j++ {
		a, b := w.B1[j], w.B1[j+1]
		if cmplx.Abs(a) < floor || cmplx.Abs(b) < floor {
			continue
		}
		f := p.Center
		if p.Freq != nil {
			f = (p.Freq[j] + p.Freq[j+1]) / 2
		}
		step := cmplx.Phase(b / a)
		want := -2 * math.Pi * f * (w.Dwell[j] + w.Dwell[j+1]) / 2
		drift += math.Remainder(step-want, math.Pi) // modulo sign changes
		off = math.Max(off, math.Abs(drift))
	}
	if off <= math.Pi/4 {
		return ""
	}
	return fmt.Sprintf("\nwarning: the phase column drifts up to %.0f deg from the phase the frequency column implies: the waveform plays where its phase says, but describe and report measure it around the frequency column's centre %s; the frequency column must state what the phase already holds", off*180/math.Pi, Quantity{p.Center, dimFrequency})
}

// readWaveformCSV reads an export, a plain two-column time/amplitude file, or
// (when a dwell is given, amplitudesOnly) a plain one-column amplitude file in
// tesla, one sample a row; a header may then name amplitude without time.
// Comment lines start with #; an export's comment gives the duration. Faults name
// the row (line of the file) and column.
func readWaveformCSV(name, text string, gammaBar float64, amplitudesOnly bool) (shape.Samples, float64, error) {
	var smp shape.Samples
	var cols []csvColumn
	duration := 0.0
	text = strings.TrimPrefix(text, "\ufeff") // the byte-order mark spreadsheets write
	lines := strings.Split(strings.ReplaceAll(text, "\r\n", "\n"), "\n")
	rows := 0
	for li, line := range lines {
		row := li + 1
		line = strings.TrimSpace(line)
		if line == "" {
			continue
		}
		if strings.HasPrefix(line, "#") {
			if strings.HasPrefix(line, sweepMarker) {
				return smp, 0, fmt.Errorf("%s is a sweep export (a profile or map), not a waveform", name)
			}
			if strings.HasPrefix(line, exportMarker) {
				if i := strings.Index(line, "duration "); i >= 0 {
					f := strings.Fields(line[i+len("duration "):])
					if len(f) > 0 {
						duration, _ = strconv.ParseFloat(f[0], 64)
					}
				}
			}
			continue
		}
		fields := splitCSV(line)
		if cols == nil {
			if _, err := strconv.ParseFloat(strings.TrimSpace(fields[0]), 64); err != nil {
				c, err := headerColumns(name, row, fields, amplitudesOnly)
				if err != nil {
					return smp, 0, err
				}
				cols = c
				continue
			}
			switch len(fields) {
			case 1:
				if !amplitudesOnly {
					return smp, 0, fmt.Errorf("%s row %d: one column holds amplitudes alone; give their dwell with `with dwell = ...`, or add a time column", name, row)
				}
				cols = []csvColumn{{key: "amplitude", factor: 1}}
			case 2:
				cols = []csvColumn{{key: "time", factor: 1}, {key: "amplitude", factor: 1}}
			case 5:
				cols = []csvColumn{{key: "time", factor: 1}, {key: "amplitude", factor: 1}, {key: "phase", factor: 1}, {key: "frequency", factor: 1}, {key: "gradient", factor: 1}}
			default:
				return smp, 0, fmt.Errorf("%s row %d: want 1 column (amplitude, with a dwell), 2 (time, amplitude) or the 5 of an export without a header, got %d", name, row, len(fields))
			}
		}
		if len(fields) != len(cols) {
			return smp, 0, fmt.Errorf("%s row %d: got %s, want %d", name, row, plural(len(fields), "column"), len(cols))
		}
		for ci, f := range fields {
			v, err := strconv.ParseFloat(strings.TrimSpace(f), 64)
			if err != nil || math.IsNaN(v) || math.IsInf(v, 0) {
				return smp, 0, fmt.Errorf("%s row %d, column %d (%s): cannot read %q as a number", name, row, ci+1, cols[ci].key, strings.TrimSpace(f))
			}
			v *= cols[ci].factor
			switch cols[ci].key {
			case "time":
				smp.Times = append(smp.Times, v)
				if k := len(smp.Times); k > 1 && !(v > smp.Times[k-2]) {
					return smp, 0, fmt.Errorf("%s row %d, column %d (time): times must increase, got %g after %g", name, row, ci+1, v, smp.Times[k-2])
				}
			case "amplitude":
				if cols[ci].hz {
					v /= math.Abs(gammaBar)
				}
				smp.Amplitude = append(smp.Amplitude, v)
			case "phase":
				smp.Phase = append(smp.Phase, v)
			case "frequency":
				smp.Freq = append(smp.Freq, v)
			case "gradient":
				smp.Gradient = append(smp.Gradient, v)
			}
		}
		rows++
		if rows > 1<<22 {
			return smp, 0, fmt.Errorf("%s: more than %d samples", name, 1<<22)
		}
	}
	if rows == 0 {
		return smp, 0, fmt.Errorf("%s has no samples", name)
	}
	if smp.Amplitude == nil {
		return smp, 0, fmt.Errorf("%s has no amplitude column", name)
	}
	if allZero(smp.Gradient) {
		smp.Gradient = nil
	}
	if smp.Phase != nil && allZero(smp.Freq) {
		smp.Freq = nil
	}
	return smp, duration, nil
}

// exportRole reads the role an export's comment line states; none when the
// file is not an export or states no role.
func exportRole(text string) shape.Role {
	for _, line := range strings.SplitN(text, "\n", 8) {
		line = strings.TrimSpace(line)
		if !strings.HasPrefix(line, exportMarker) {
			continue
		}
		if i := strings.Index(line, ", role "); i >= 0 {
			if f := strings.Fields(line[i+len(", role "):]); len(f) > 0 {
				r, _ := shape.ParseRole(strings.TrimSuffix(f[0], ","))
				return r
			}
		}
	}
	return shape.RoleNone
}

func allZero(v []float64) bool {
	for _, x := range v {
		if x != 0 {
			return false
		}
	}
	return true
}

func splitCSV(line string) []string {
	if strings.Contains(line, ",") {
		return strings.Split(line, ",")
	}
	if strings.Contains(line, ";") {
		return strings.Split(line, ";")
	}
	// Space-separated: a unit in parentheses belongs to the name before it
	// ("amplitude (uT)").
	var out []string
	for _, f := range strings.Fields(line) {
		if strings.HasPrefix(f, "(") && len(out) > 0 {
			out[len(out)-1] += " " + f
			continue
		}
		out = append(out, f)
	}
	return out
}

// headerColumns reads a header row: names time, amplitude, phase, frequency,
// gradient, each with an optional unit in parentheses; time may be left out when
// amplitudesOnly (a dwell is given).
func headerColumns(name string, row int, fields []string, amplitudesOnly bool) ([]csvColumn, error) {
	defaults := map[string]string{"time": "s", "amplitude": "T", "phase": "rad", "frequency": "Hz", "gradient": "T/m"}
	dims := map[string]Dim{"time": dimTime, "amplitude": dimField, "phase": dimAngle, "frequency": dimFrequency, "gradient": dimGradient}
	var cols []csvColumn
	seen := map[string]bool{}
	for ci, f := range fields {
		f = strings.TrimSpace(strings.Trim(strings.TrimSpace(f), "\""))
		head, unit := f, ""
		if i := strings.Index(f, "("); i >= 0 && strings.HasSuffix(f, ")") {
			head, unit = strings.TrimSpace(f[:i]), strings.TrimSpace(f[i+1:len(f)-1])
		}
		key := ""
		for k := range defaults {
			if strings.HasPrefix(strings.ToLower(head), k) {
				key = k
			}
		}
		if key == "" {
			return nil, fmt.Errorf("%s row %d, column %d: unknown column %q, want time, amplitude, phase, frequency offset or gradient", name, row, ci+1, head)
		}
		if seen[key] {
			return nil, fmt.Errorf("%s row %d, column %d: column %s given twice", name, row, ci+1, key)
		}
		seen[key] = true
		if unit == "" {
			unit = defaults[key]
		}
		u, ok := lookupUnit(unit)
		c := csvColumn{key: key, factor: u.Factor}
		switch {
		case ok && u.Dim == dims[key]:
		case ok && key == "amplitude" && u.Dim == dimFrequency:
			c.hz = true
		default:
			return nil, fmt.Errorf("%s row %d, column %d: unit %q does not suit %s", name, row, ci+1, unit, key)
		}
		cols = append(cols, c)
	}
	if !seen["amplitude"] || !seen["time"] && !amplitudesOnly {
		return nil, fmt.Errorf("%s row %d: want at least the columns time and amplitude", name, row)
	}
	return cols, nil
}
