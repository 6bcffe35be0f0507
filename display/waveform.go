package display

import (
	"fmt"
	"gonum.org/v1/plot/vg"
	"math"
	"slices"
	"strings"
)

// Bundles shows the waveform as stacked panels over a shared time axis
// (amplitude, phase, frequency offset, gradient; nil series are left out; a
// figure as for a Profile), then the caller's properties table t in text/plain
// and text/html. Time is drawn in µs, ms or s and the frequency in Hz or kHz,
// whichever reads best; the data under ResultMIME keeps the units as given:
// {"kind": "waveform", "title", "time": {"label", "unit": "s", "values"},
// "series": [{"quantity", "unit", "values"}], "properties": table}.
func (w Waveform) Bundles(t Table) []Bundle {
	return figureBundles(w, w.SVG(), w.Title, w.caption(), t, w.JSON(t))
}

// Bundle is the figure of Bundles alone.
func (w Waveform) Bundle(t Table) Bundle { return w.Bundles(t)[0] }

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
	return fmt.Sprintf("(figure: %s against time, %s; data in "+ResultMIME+")",
		strings.Join(qs, ", "), plural(len(w.Time), "sample"))
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
func (w Waveform) SVG() string { return w.stack().svg() }

func (w Waveform) draw(nc canvasMaker) vg.CanvasWriterTo { return w.stack().draw(nc) }

// stack lays out the waveform's panels.
func (w Waveform) stack() stack {
	tf, tu := timeScale(w.Time)
	tx := scaled(w.Time, tf)
	s := stack{title: w.Title, xlabel: axisLabel("time", tu), fromZero: true, xpad: 0.015}
	for _, ser := range w.series() {
		v, unit := ser.values, ser.unit
		if ser.quantity == "frequency" {
			lo, hi := finiteRange(v)
			if math.Max(math.Abs(lo), math.Abs(hi)) >= 1e4 {
				v, unit = scaled(v, 1e-3), "kHz"
			}
		}
		if ser.quantity == "phase" {
			v = phaseWhereOn(v, w.Amplitude)
		}
		sx, sy := steps(tx, v, ser.quantity == "amplitude" || ser.quantity == "gradient", len(tx) <= maxHeld)
		l := line{x: sx, y: sy, style: seriesStyle(0)}
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
	return s
}

// phaseWhereOn leaves the phase out (NaN) where the amplitude is exactly zero:
// there it is undefined (atan2(0, 0) reads 0), and drawing it would pull the
// trace to 0° at the ends of a windowed pulse or through its gaps.
func phaseWhereOn(phase, amp []float64) []float64 {
	if len(amp) < len(phase) {
		return phase
	}
	out := slices.Clone(phase)
	for i := range out {
		if amp[i] == 0 {
			out[i] = math.NaN()
		}
	}
	return out
}

// maxHeld is the most samples drawn as held steps; beyond it a sample is under a
// point wide and a line through the midpoints shows the same without the
// staircase.
const maxHeld = 200

// steps turns samples at midpoints t into the piecewise-constant waveform the
// hardware plays when hold is set: each value holds from halfway after the
// previous sample to halfway before the next (the first and last sample as long
// as their neighbours' spacing; a lone sample from 0 to twice its midpoint).
// Without hold the line runs through the midpoints, held flat over the first and
// last half sample so it spans the whole pulse. With zeroEnds the line also
// drops straight to 0 at the pulse's start and end (RF and gradients are off
// outside); without it (phase, frequency) the trace simply ends there.
func steps(t, y []float64, zeroEnds, hold bool) (sx, sy []float64) {
	n := min(len(t), len(y))
	if n == 0 {
		return nil, nil
	}
	b := make([]float64, n+1)
	switch {
	case n == 1 && t[0] > 0:
		b[0], b[1] = 0, 2*t[0]
	case n == 1:
		b[0], b[1] = t[0], t[0]
	default:
		for i := 1; i < n; i++ {
			b[i] = (t[i-1] + t[i]) / 2
		}
		b[0] = t[0] - (t[1]-t[0])/2
		b[n] = t[n-1] + (t[n-1]-t[n-2])/2
	}
	sx = make([]float64, 0, 2*n+2)
	sy = make([]float64, 0, 2*n+2)
	if zeroEnds {
		sx, sy = append(sx, b[0]), append(sy, 0)
	}
	if !hold && b[0] < t[0] {
		sx, sy = append(sx, b[0]), append(sy, y[0])
	}
	for i := range n {
		if hold {
			sx, sy = append(sx, b[i], b[i+1]), append(sy, y[i], y[i])
		} else {
			sx, sy = append(sx, t[i]), append(sy, y[i])
		}
	}
	if !hold && b[n] > t[n-1] {
		sx, sy = append(sx, b[n]), append(sy, y[n-1])
	}
	if zeroEnds {
		sx, sy = append(sx, b[n]), append(sy, 0)
	}
	return sx, sy
}

func plural(n int, word string) string {
	if n == 1 {
		return "1 " + word
	}
	return fmt.Sprintf("%d %ss", n, word)
}
