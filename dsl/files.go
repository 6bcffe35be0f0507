package dsl

import (
	"bufio"
	"bytes"
	"context"
	"errors"
	"fmt"
	"io"
	"math"
	"math/cmplx"
	"os"
	"strconv"
	"strings"

	"Nutate/dsl/safefile"
	"Nutate/physics/shape"
)

// maxImportBytes bounds the bytes read from an imported file, counted while
// reading (a device or a /proc file reports a size of 0).
const maxImportBytes = 256 << 20

// maxRecord bounds one row of a CSV file: five numbers, or a header with
// units, fit many times over.
const maxRecord = 4096

// exportMarker starts the comment line of every waveform export; a file that does
// not start with it is never overwritten.
const exportMarker = "# nutate waveform export"

// exportColumns is the header row of an export (LANGUAGE.md "Files").
var exportColumns = []string{"time (s)", "amplitude (T)", "phase (rad)", "frequency offset (Hz)", "gradient (T/m)"}

// AllowFiles lets the session read and write files inside dirs as well as its
// own folder (LANGUAGE.md "Files"). It is for the person starting Nutate (a flag
// of `nutate run`, the kernel's setting), never for the notebook. Each folder
// must exist.
func (s *Session) AllowFiles(dirs []string) error {
	if _, err := safefile.NewPolicy(s.dir, dirs); err != nil {
		return err
	}
	s.allow = append([]string(nil), dirs...)
	return nil
}

// resolvePath applies the file policy to a path written in the notebook: the
// resolved path and how outputs name it (relative to the notebook's folder
// when inside it).
func (ev *evaluator) resolvePath(name string, at Pos) (real, shown string, err error) {
	pol, err := safefile.NewPolicy(ev.sess.dir, ev.sess.allow)
	if err != nil {
		return "", "", errAt(at, "cannot use the notebook's folder: %v", err)
	}
	real, err = pol.Resolve(name)
	if errors.Is(err, safefile.ErrOutside) {
		return "", "", errAt(at, "%s", pol.Outside(name))
	}
	if err != nil {
		return "", "", errAt(at, "cannot use %s: %v", name, err)
	}
	return real, pol.Show(real), nil
}

// WriteFile writes a file named in a notebook (export statements): the path
// policy (inside the notebook's folder or one allowed when Nutate started),
// no overwriting of a file that does not start with one of the given
// markers (none given: any regular file may be replaced), and an atomic
// write (the original stays on any failure). It returns how outputs name the
// file (its resolved path).
func (ev *evaluator) writeFile(name string, at Pos, markers []string, write func(w io.Writer) error) (shown string, err error) {
	if name == "" {
		return "", errAt(at, "export needs a file name, got \"\"")
	}
	real, shown, err := ev.resolvePath(name, at)
	if err != nil {
		return "", err
	}
	if err := checkOverwrite(real, shown, at, markers); err != nil {
		return "", err
	}
	if err := safefile.WriteFile(real, write); err != nil {
		return "", errAt(at, "%v", strings.Replace(err.Error(), real, shown, 1))
	}
	return shown, nil
}

// export runs `export NAME to "file.csv"`.
// `export sweep to "file.csv"` writes the last sweep's data instead.
func (ev *evaluator) export(s *ExportStmt) error {
	if s.Name.Name == "figure" {
		return ev.exportFigure(s) // figure_export.go
	}
	markers := []string{exportMarker, sweepMarker}
	if s.Name.Name == "sweep" {
		t := ev.st.last
		if t == nil {
			return errAt(s.Name.P, "no sweep has run yet in this session")
		}
		shown, err := ev.writeFile(s.Path, s.PathP, markers, t.writeCSV)
		if err != nil {
			return err
		}
		ev.emit(textBundle(fmt.Sprintf("exported %s to %s: %s, columns %s", t.title, shown, plural(t.points(), "row"), strings.Join(t.columns, ", "))))
		return nil
	}
	d, err := ev.pulseNamed(s.Name)
	if err != nil {
		return err
	}
	if s.Path == "" {
		return errAt(s.PathP, "export needs a file name, got \"\"")
	}
	p := d.Pulse
	n := p.Wave.Len()
	shown, err := ev.writeFile(s.Path, s.PathP, markers, func(w io.Writer) error {
		return writeWaveformCSV(w, d)
	})
	if err != nil {
		return err
	}
	ev.emit(textBundle(fmt.Sprintf("exported %s to %s: %s, %d columns (%s)", d.Name, shown, plural(n, "sample"), len(exportColumns), strings.Join(exportColumns, ", "))))
	return nil
}

// headerSeconds writes a duration or dwell for the comment line: at most 12
// significant digits, so sums of dwells print as "0.003", not
// "0.0030000000000000022".
func headerSeconds(v float64) string { return strconv.FormatFloat(v, 'g', 12, 64) }

// writeWaveformCSV writes a pulse as an export: the comment line, the header
// row, one sample a row (numbers as they round-trip).
func writeWaveformCSV(w io.Writer, d *pulseDef) error {
	p := d.Pulse
	n := p.Wave.Len()
	dwell := "variable"
	if uniform(p.Wave.Dwell) {
		dwell = headerSeconds(p.Wave.Dwell[0]) + " s"
	}
	role := ""
	if p.Role != shape.RoleNone {
		role = ", role " + p.Role.String()
	}
	if _, err := fmt.Fprintf(w, "%s: pulse %s, nucleus %s, duration %s s, dwell %s, samples %d%s\n", exportMarker, d.Name, d.Nucleus.Name, headerSeconds(p.Duration()), dwell, n, role); err != nil {
		return err
	}
	if _, err := io.WriteString(w, strings.Join(exportColumns, ",")+"\n"); err != nil {
		return err
	}
	t := 0.0
	var line []byte
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
		line = line[:0]
		for k, v := range [5]float64{t, math.Hypot(real(b), imag(b)), math.Atan2(imag(b), real(b)), f, gr} {
			if k > 0 {
				line = append(line, ',')
			}
			line = strconv.AppendFloat(line, v, 'g', -1, 64)
		}
		line = append(line, '\n')
		if _, err := w.Write(line); err != nil {
			return err
		}
		t += p.Wave.Dwell[j]
	}
	return nil
}

// checkOverwrite refuses to replace anything but a regular file starting with
// one of the markers (none given: any regular file).
func checkOverwrite(real, shown string, at Pos, markers []string) error {
	info, err := os.Lstat(real)
	if err != nil {
		return nil
	}
	if info.IsDir() {
		return errAt(at, "%s is a folder; want a file name", shown)
	}
	f, err := safefile.Open(real)
	if err != nil {
		return errAt(at, "cannot check %s before overwriting it: %v", shown, strings.Replace(err.Error(), real, shown, 1))
	}
	defer f.Close()
	if len(markers) == 0 {
		return nil
	}
	first, _ := bufio.NewReader(io.LimitReader(f, maxRecord)).ReadString('\n')
	for _, m := range markers {
		if strings.HasPrefix(first, m) {
			return nil
		}
	}
	return errAt(at, "%s exists and is not a waveform or sweep export; refusing to overwrite it (choose another name or remove the file)", shown)
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
	real, shown, err := ev.resolvePath(s.Path, s.PathP)
	if err != nil {
		return err
	}
	f, err := safefile.Open(real)
	if err != nil {
		if os.IsNotExist(err) {
			return errAt(s.PathP, "no file %s (paths are relative to the notebook's folder)", shown)
		}
		return errAt(s.PathP, "cannot read %s: %v", shown, strings.Replace(err.Error(), real, shown, 1))
	}
	smp, duration, role, err := readWaveformCSV(shown, ctxReader{ev.ctx, safefile.LimitReader(f, maxImportBytes)}, ev.st.nucleus.GammaBar, set.dwell > 0)
	f.Close()
	if err != nil {
		return errAt(s.PathP, "%v", err)
	}
	// A time column sets the dwell; a dwell given as well would silently
	// replace the file's times (one row alone has no dwell to keep).
	if set.dwell > 0 && smp.Times != nil && (len(smp.Times) > 1 || duration > 0) {
		return errAt(set.given["dwell"], "%s has a time column, which sets the dwell; drop `with dwell` (it applies to files of amplitudes alone)", shown)
	}
	c := shape.NewCommon()
	c.Role = role
	if _, ok := set.given["role"]; ok {
		c.Role = set.role
	}
	c.Flip, c.Peak = set.flip, set.peak
	if set.dwell > 0 {
		smp.Dwell = set.dwell
		smp.Times = nil
	} else {
		if len(smp.Times) == 1 && duration == 0 {
			return errAt(s.PathP, "%s has one sample and no dwell: add `with dwell = ...`", shown)
		}
		c.Duration = duration
	}
	if smp.Times == nil && smp.Dwell == 0 {
		return errAt(s.PathP, "%s has no time column: add `with dwell = ...`", shown)
	}
	p, err := shape.FromSamples(smp, c, ev.st.nucleus.Gamma())
	if err != nil {
		return errAt(s.PathP, "%s: %v", shown, err)
	}
	if math.IsNaN(c.Flip) && math.IsNaN(c.Peak) && p.Peak() > maxImportPeak {
		// Most likely a normalised shape (peak 1) read in tesla.
		return errAt(s.PathP, "%s: peak amplitude %s, beyond any RF coil: amplitudes are read in tesla unless the header names a unit, e.g. `amplitude (uT)`; for a normalised shape, scale it `with flip = ...` or `with peak = ...`", shown, Quantity{p.Peak(), dimField})
	}
	def := &pulseDef{Name: s.Name.Name, Kind: "imported", Pulse: p, Nucleus: ev.st.nucleus, Source: shown}
	warning, err := ev.definitionWarning(def, s.Name.P)
	if err != nil {
		return err
	}
	if smp.Phase != nil && (smp.Freq != nil) {
		warning += phaseFrequencyWarning(p)
	}
	ev.st.define(s.Name.Name, &binding{pulse: def})
	ev.emit(textBundle(pulseSummary(def) + ", from " + shown + warning))
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
// Comment lines start with #; an export's comment gives the duration and role.
// It streams: one row of at most maxRecord bytes at a time, stopping at the
// first faulty row, which it names (line of the file) with its column; it
// quotes at most a few characters of the file.
func readWaveformCSV(name string, r io.Reader, gammaBar float64, amplitudesOnly bool) (shape.Samples, float64, shape.Role, error) {
	var smp shape.Samples
	var cols []csvColumn
	duration := 0.0
	role := shape.RoleNone
	br := bufio.NewReaderSize(r, maxRecord)
	rows := 0
	for row := 1; ; row++ {
		raw, rerr := br.ReadSlice('\n')
		if rerr == bufio.ErrBufferFull {
			return smp, 0, role, fmt.Errorf("%s row %d: longer than %d bytes, want one sample a row", name, row, maxRecord)
		}
		if rerr != nil && rerr != io.EOF {
			return smp, 0, role, fmt.Errorf("%s row %d: %v", name, row, rerr)
		}
		if rerr == io.EOF && len(raw) == 0 {
			break
		}
		if row == 1 {
			raw = bytes.TrimPrefix(raw, []byte("\ufeff")) // the byte-order mark spreadsheets write
		}
		line := strings.TrimSpace(string(raw))
		if err := readRow(name, row, line, &smp, &cols, &duration, &role, &rows, gammaBar, amplitudesOnly); err != nil {
			return smp, 0, role, err
		}
		if rerr == io.EOF {
			break
		}
	}
	if rows == 0 {
		return smp, 0, role, fmt.Errorf("%s has no samples", name)
	}
	if smp.Amplitude == nil {
		return smp, 0, role, fmt.Errorf("%s has no amplitude column", name)
	}
	if allZero(smp.Gradient) {
		smp.Gradient = nil
	}
	if smp.Phase != nil && allZero(smp.Freq) {
		smp.Freq = nil
	}
	// The comment line's duration (12 significant digits) matters only when the
	// last sample lasts other than the one before it.
	if n := len(smp.Times); n > 1 && duration > 0 {
		last := smp.Times[n-1] - smp.Times[n-2]
		if math.Abs(smp.Times[n-1]-smp.Times[0]+last-duration) <= 1e-9*duration {
			duration = 0
		}
	}
	return smp, duration, role, nil
}

// readRow reads one trimmed row of a waveform CSV into smp.
func readRow(name string, row int, line string, smp *shape.Samples, colsp *[]csvColumn, duration *float64, role *shape.Role, rows *int, gammaBar float64, amplitudesOnly bool) error {
	if line == "" {
		return nil
	}
	if strings.HasPrefix(line, "#") {
		if strings.HasPrefix(line, sweepMarker) {
			return fmt.Errorf("%s is a sweep export (a profile or map), not a waveform", name)
		}
		if strings.HasPrefix(line, exportMarker) {
			if i := strings.Index(line, "duration "); i >= 0 {
				f := strings.Fields(line[i+len("duration "):])
				if len(f) > 0 {
					*duration, _ = strconv.ParseFloat(f[0], 64)
				}
			}
			if i := strings.Index(line, ", role "); i >= 0 {
				if f := strings.Fields(line[i+len(", role "):]); len(f) > 0 {
					*role, _ = shape.ParseRole(strings.TrimSuffix(f[0], ","))
				}
			}
		}
		return nil
	}
	fields := splitCSV(line)
	cols := *colsp
	if cols == nil {
		if _, err := strconv.ParseFloat(strings.TrimSpace(fields[0]), 64); err != nil {
			c, err := headerColumns(name, row, fields, amplitudesOnly)
			if err != nil {
				return err
			}
			*colsp = c
			return nil
		}
		switch len(fields) {
		case 1:
			if !amplitudesOnly {
				return fmt.Errorf("%s row %d: one column holds amplitudes alone; give their dwell with `with dwell = ...`, or add a time column", name, row)
			}
			cols = []csvColumn{{key: "amplitude", factor: 1}}
		case 2:
			cols = []csvColumn{{key: "time", factor: 1}, {key: "amplitude", factor: 1}}
		case 5:
			cols = []csvColumn{{key: "time", factor: 1}, {key: "amplitude", factor: 1}, {key: "phase", factor: 1}, {key: "frequency", factor: 1}, {key: "gradient", factor: 1}}
		default:
			return fmt.Errorf("%s row %d: want 1 column (amplitude, with a dwell), 2 (time, amplitude) or the 5 of an export without a header, got %d", name, row, len(fields))
		}
		*colsp = cols
	}
	if len(fields) != len(cols) {
		return fmt.Errorf("%s row %d: got %s, want %d", name, row, plural(len(fields), "column"), len(cols))
	}
	if *rows >= maxPulseSamples {
		return fmt.Errorf("%s row %d: more than %d samples, the limit per pulse", name, row, maxPulseSamples)
	}
	for ci, f := range fields {
		v, err := strconv.ParseFloat(strings.TrimSpace(f), 64)
		if err != nil || math.IsNaN(v) || math.IsInf(v, 0) {
			return fmt.Errorf("%s row %d, column %d (%s): cannot read %s as a number", name, row, ci+1, cols[ci].key, quoteFew(strings.TrimSpace(f)))
		}
		v *= cols[ci].factor
		switch cols[ci].key {
		case "time":
			smp.Times = append(smp.Times, v)
			if k := len(smp.Times); k > 1 && !(v > smp.Times[k-2]) {
				return fmt.Errorf("%s row %d, column %d (time): times must increase, got %g after %g", name, row, ci+1, v, smp.Times[k-2])
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
	*rows++
	return nil
}

// ctxReader stops reading once the context is done (an interrupt).
type ctxReader struct {
	ctx context.Context
	r   io.Reader
}

func (c ctxReader) Read(p []byte) (int, error) {
	if err := c.ctx.Err(); err != nil {
		return 0, err
	}
	return c.r.Read(p)
}

// quoteFew quotes at most a few characters of a file's text, so that an error
// (which lands in the notebook's outputs) never carries a secret the file
// holds.
func quoteFew(s string) string {
	const few = 8
	r := []rune(s)
	if len(r) > few {
		return strconv.Quote(string(r[:few])) + "…"
	}
	return strconv.Quote(s)
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
			return nil, fmt.Errorf("%s row %d, column %d: unknown column %s, want time, amplitude, phase, frequency offset or gradient", name, row, ci+1, quoteFew(head))
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
			return nil, fmt.Errorf("%s row %d, column %d: unit %s does not suit %s", name, row, ci+1, quoteFew(unit), key)
		}
		cols = append(cols, c)
	}
	if !seen["amplitude"] || !seen["time"] && !amplitudesOnly {
		return nil, fmt.Errorf("%s row %d: want at least the columns time and amplitude", name, row)
	}
	return cols, nil
}
