package dsl

import (
	"math"
	"strconv"
	"strings"

	"Nutate/physics/shape"
)

// settingSpec is one `with` setting.
type settingSpec struct {
	Name string
	Help string
}

// settingTable lists the `with` settings (LANGUAGE.md "Settings").
var settingTable = []settingSpec{
	{"offset", "frequency offset of the spins from the carrier (Hz, or ppm once `field` is set); default 0"},
	{"b1", "B1 scale: a factor (0.9), a percent (90%), or an absolute peak (T units or Hz); default 1"},
	{"t1", "longitudinal relaxation time during the pulse; default none"},
	{"t2", "transverse relaxation time during the pulse; at most 2·t1 (T2 ≤ 2·T1); default none, or 2·t1 when t1 is given"},
	{"start", "initial magnetization: z (default), -z, x, y"},
	{"tr", "repetition time, for the time-averaged B1 (b1rms)"},
	{"dwell", "sample length of an imported waveform (import only)"},
	{"flip", "scales an imported waveform to this nominal flip, γ|∫B1 dt| at its centre (import only; give flip or peak)"},
	{"peak", "scales an imported waveform to this peak B1, in T units or Hz (import only; give flip or peak)"},
	{"role", "what an imported pulse is for: excite, invert, refocus, saturate (import only; an export's own role otherwise)"},
}

// importSettings apply to `import` alone.
var importSettings = []string{"dwell", "flip", "peak", "role"}

func settingNames() []string {
	var out []string
	for _, s := range settingTable {
		if !contains(importSettings, s.Name) {
			out = append(out, s.Name)
		}
	}
	return out
}

// settings are the evaluated `with` settings.
type settings struct {
	offset  float64 // Hz
	b1      *Value  // raw, resolved per pulse by b1Factor
	t1, t2  float64 // s; 0: none
	start   [3]float64
	tr      float64 // s; 0: none
	dwell   float64
	flip    float64 // rad; NaN: not given (import)
	peak    float64 // T; NaN: not given (import)
	role    shape.Role
	given   map[string]Pos
	b1Label string
	written [][2]string // name and value as written, in order, for titles and JSON
}

// text is setting name as written ("0.5 ms"), or "".
func (s *settings) text(name string) string {
	for _, w := range s.written {
		if w[0] == name {
			return w[1]
		}
	}
	return ""
}

// checkTR refuses a tr shorter than pulse p (named name): B1rms over one
// repetition needs the whole pulse inside it. The error points at the tr value
// and quotes it as written.
func (s *settings) checkTR(name string, p *shape.Pulse) error {
	if s.tr > 0 && s.tr < p.Duration() {
		return errAt(s.given["tr"], "tr = %s is shorter than %s (%s): want tr at least the pulse's duration", s.text("tr"), name, Quantity{p.Duration(), dimTime})
	}
	return nil
}

// caption is " with NAME = VALUE, ..." for the settings given, or "": two sweeps
// differing only in their settings get different titles.
func (s *settings) caption() string {
	if len(s.written) == 0 {
		return ""
	}
	parts := make([]string, len(s.written))
	for i, w := range s.written {
		parts[i] = w[0] + " = " + w[1]
	}
	return " with " + strings.Join(parts, ", ")
}

// evalSettings reads `with` settings; allowed limits which are accepted here.
func (ev *evaluator) evalSettings(list []Setting, allowed ...string) (*settings, error) {
	s := &settings{start: [3]float64{0, 0, 1}, given: map[string]Pos{}, flip: math.NaN(), peak: math.NaN()}
	for _, st := range list {
		name := st.Name.Name
		if !contains(allowed, name) {
			all := []string{}
			for _, x := range settingTable {
				all = append(all, x.Name)
			}
			if contains(all, name) {
				return nil, errAt(st.Name.P, "setting %s does not apply here; want %s", name, strings.Join(allowed, ", "))
			}
			return nil, errAt(st.Name.P, "unknown setting %s%s (settings: %s)", quoteText(name), suggest(name, allowed), strings.Join(allowed, ", "))
		}
		if _, dup := s.given[name]; dup {
			return nil, errAt(st.Name.P, "setting %s given twice", name)
		}
		s.given[name] = st.Value.Position()
		p := st.Value.Position()
		if name == "role" {
			w, _ := wordOf(st.Value)
			r, ok := shape.ParseRole(w)
			if !ok || w == "" {
				roles := []string{"excite", "invert", "refocus", "saturate"}
				return nil, errAt(p, "role expects excite, invert, refocus or saturate, got %s%s", exprText(st.Value, w), suggest(w, roles))
			}
			s.role = r
			s.written = append(s.written, [2]string{name, w})
			continue
		}
		if name == "start" {
			w, _ := wordOf(st.Value)
			dirs := map[string][3]float64{"z": {0, 0, 1}, "-z": {0, 0, -1}, "x": {1, 0, 0}, "y": {0, 1, 0}, "-x": {-1, 0, 0}, "-y": {0, -1, 0}}
			d, ok := dirs[w]
			if !ok {
				return nil, errAt(p, "start expects z, -z, x or y, got %s%s", exprText(st.Value, w), suggest(w, []string{"z", "-z", "x", "y"}))
			}
			s.start = d
			s.written = append(s.written, [2]string{name, w})
			continue
		}
		v, err := ev.evalExpr(st.Value)
		if err != nil {
			return nil, err
		}
		s.written = append(s.written, [2]string{name, v.String()})
		switch name {
		case "offset":
			if s.offset, err = ev.want(v, dimFrequency, "offset", p); err != nil {
				return nil, err
			}
		case "b1":
			if v.Q.D != dimNumber && v.Q.D != dimField && v.Q.D != dimFrequency {
				return nil, errAt(p, "b1 expects a factor, a percent or a peak B1 (T units or Hz), got %s", describeValue(v))
			}
			if !(v.Q.V >= 0) || math.IsInf(v.Q.V, 0) {
				return nil, errAt(p, "b1 must not be negative, got %s", v)
			}
			vv := v
			s.b1 = &vv
		case "flip":
			if s.flip, err = ev.want(v, dimAngle, "flip", p); err != nil {
				return nil, err
			}
			if math.IsInf(s.flip, 0) {
				return nil, errAt(p, "flip must be finite, got %s", v)
			}
		case "peak":
			if s.peak, err = ev.want(v, dimField, "peak", p); err != nil {
				return nil, err
			}
			if !(s.peak > 0) || math.IsInf(s.peak, 0) {
				return nil, errAt(p, "peak must be positive, got %s", v)
			}
		case "t1", "t2", "tr", "dwell":
			x, err := ev.want(v, dimTime, name, p)
			if err != nil {
				return nil, err
			}
			if !(x > 0) || math.IsInf(x, 0) {
				return nil, errAt(p, "%s must be positive, got %s", name, v)
			}
			if name == "t1" || name == "t2" {
				if err := checkRelaxTime(name, v, p); err != nil {
					return nil, err
				}
			}
			switch name {
			case "t1":
				s.t1 = x
			case "t2":
				s.t2 = x
			case "tr":
				s.tr = x
			default:
				s.dwell = x
			}
		}
	}
	if s.t1 > 0 && s.t2 > 0 && beyondRelaxLimit(s.t1, s.t2) {
		// T2 ≤ 2·T1 for any relaxing spin ensemble (common practice: Abragam,
		// The Principles of Nuclear Magnetism, 1961; from memory).
		t2, t1, limit := s.writtenValue("t2"), s.writtenValue("t1"), Quantity{2 * s.t1, dimTime}.String()
		if t2 == limit {
			// Apart only beyond the shown digits: show them all, in seconds.
			full := func(x float64) string { return strconv.FormatFloat(x, 'g', -1, 64) + " s" }
			t2, t1, limit = full(s.t2), full(s.t1), full(2*s.t1)
		}
		return nil, errAt(s.given["t2"], "t2 = %s with t1 = %s: want t2 ≤ 2·t1 = %s (beyond it the Bloch equations let |M| exceed M0)", t2, t1, limit)
	}
	return s, nil
}

// writtenValue is the value of a setting as evaluated and shown ("10 ms").
func (s *settings) writtenValue(name string) string {
	for _, w := range s.written {
		if w[0] == name {
			return w[1]
		}
	}
	return ""
}

func exprText(e Expr, w string) string {
	if w != "" {
		return quoteText(w)
	}
	return "a value"
}

// b1Factor resolves a b1 value for a pulse of the given peak (T) and γ̄ (Hz/T).
func b1Factor(v Value, peak, gammaBar float64) (float64, bool) {
	switch v.Q.D {
	case dimNumber:
		return v.Q.V, true
	case dimField:
		if peak == 0 {
			return 0, false
		}
		return v.Q.V / peak, true
	case dimFrequency:
		if peak == 0 {
			return 0, false
		}
		return v.Q.V / math.Abs(gammaBar) / peak, true
	}
	return 0, false
}

// minRelaxTime is the shortest T1 or T2 accepted. Shorter times are far below any
// tissue's or sample's and below any dwell, where the decay over one sample
// underflows; 0 would be read by the physics layer as "no relaxation".
const minRelaxTime = 1e-9

// checkRelaxTime refuses a relaxation time (what names the setting or axis) that is
// not positive, not finite, or below minRelaxTime.
func checkRelaxTime(what string, v Value, p Pos) error {
	x := v.Q.V
	switch {
	case !(x > 0):
		return errAt(p, "%s must be positive, got %s", what, v)
	case math.IsInf(x, 0):
		return errAt(p, "%s must be finite, got %s", what, v)
	case x < minRelaxTime:
		return errAt(p, "%s must be at least 1 ns, got %s", what, v)
	}
	return nil
}
