package display

import (
	"fmt"
	"math"
	"strings"
)

// Bundle shows the waveform as stacked panels over a shared time axis (amplitude,
// phase, frequency offset, gradient; nil series are left out) together with the
// caller's properties table t in text/plain and text/html (text/html also holds
// the SVG inline). Time is drawn in µs, ms or s and the frequency in Hz or kHz,
// whichever reads best; application/json keeps SI-style units as given:
// {"kind": "waveform", "title", "time": {"label", "unit": "s", "values"},
// "series": [{"quantity", "unit", "values"}], "properties": table}.
func (w Waveform) Bundle(t Table) Bundle {
	svg := w.SVG()
	plain := t.Plain()
	if w.Title != "" && t.Title == "" {
		plain = w.Title + "\n" + plain
	}
	plain += "\n" + w.caption()
	return Bundle{
		"text/plain":       strings.TrimLeft(plain, "\n"),
		"text/html":        figureHTML(svg, t),
		"image/svg+xml":    svg,
		"application/json": w.json(t),
	}
}

// waveSeries is one non-nil series of a waveform with its unit as stored.
type waveSeries struct {
	quantity, unit string
	values         []float64
}

func (w Waveform) series() []waveSeries {
	var out []waveSeries
	for _, s := range []waveSeries{
		{"amplitude", "µT", w.Amplitude},
		{"phase", "deg", w.Phase},
		{"frequency", "Hz", w.Frequency},
		{"gradient", "mT/m", w.Gradient},
	} {
		if s.values != nil {
			out = append(out, s)
		}
	}
	return out
}

func (w Waveform) caption() string {
	var qs []string
	for _, s := range w.series() {
		qs = append(qs, axisLabel(s.quantity, s.unit))
	}
	if len(qs) == 0 {
		return "(no waveform samples)"
	}
	return fmt.Sprintf("(figure: %s against time, %d samples; all values in application/json)",
		strings.Join(qs, ", "), len(w.Time))
}

// timeScale picks the time unit for the axis from the largest |t|.
func timeScale(t []float64) (float64, string) {
	lo, hi := finiteRange(t)
	m := math.Max(math.Abs(lo), math.Abs(hi))
	switch {
	case lo > hi || m >= 1:
		return 1, "s"
	case m >= 1e-3:
		return 1e3, "ms"
	}
	return 1e6, "µs"
}

func scaled(v []float64, f float64) []float64 {
	if f == 1 {
		return v
	}
	out := make([]float64, len(v))
	for i, x := range v {
		out[i] = x * f
	}
	return out
}

// SVG renders the waveform figure alone.
func (w Waveform) SVG() string {
	tf, tu := timeScale(w.Time)
	tx := scaled(w.Time, tf)
	s := stack{title: w.Title, xlabel: axisLabel("time", tu), fromZero: true}
	for _, ser := range w.series() {
		v, unit := ser.values, ser.unit
		if ser.quantity == "frequency" {
			lo, hi := finiteRange(v)
			if math.Max(math.Abs(lo), math.Abs(hi)) >= 1e4 {
				v, unit = scaled(v, 1e-3), "kHz"
			}
		}
		l := line{x: tx, y: v, style: seriesStyle(0)}
		pn := panel{label: axisLabel(ser.quantity, unit), lines: []line{l},
			zero: ser.quantity == "amplitude" || ser.quantity == "gradient"}
		if ser.quantity == "phase" {
			pn.degrees = true
			pn.lines[0].jump = 180
		}
		s.panels = append(s.panels, pn)
	}
	if len(s.panels) == 0 {
		s.panels = []panel{{label: "(no samples)"}}
	}
	return s.svg()
}
