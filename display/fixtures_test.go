package display

import "math"

// The fixtures are smooth synthetic curves with the shapes and sizes of real
// output (a two-pulse slice profile, an offset × B1 map, a swept waveform); they
// test layout, encoding and size, not physics.

func linspace(a, b float64, n int) []float64 {
	v := make([]float64, n)
	for i := range v {
		v[i] = a + (b-a)*float64(i)/float64(n-1)
	}
	return v
}

func sampleTable() Table {
	return Table{
		Title:   "pulse p1",
		Columns: []Column{{Name: "property"}, {Name: "value"}, {Name: "unit"}},
		Rows: [][]string{
			{"duration", "5.12", "ms"},
			{"peak B1", "13.5", "µT"},
			{"bandwidth", "1200", "Hz"},
			{"energy <rel>", "2.3e-5", "J/Ω"},
		},
		Notes: []string{"energy is a relative, waveform-only estimate & not a SAR figure"},
	}
}

// sampleProfile is a 601-point two-pulse overlay of |Mxy| and phase with four
// marks, two of them close together.
func sampleProfile() Profile {
	x := linspace(-3000, 3000, 601)
	a, b := make([]float64, len(x)), make([]float64, len(x))
	pa, pb := make([]float64, len(x)), make([]float64, len(x))
	for i, f := range x {
		a[i] = 1 / (1 + math.Pow(f/600, 8))
		b[i] = math.Exp(-f * f / (2 * 450 * 450))
		pa[i] = 170 * math.Sin(f/900)
		pb[i] = math.Remainder(0.09*f, 360)
	}
	return Profile{
		Title: "Slice profile",
		X:     Axis{Label: "offset", Unit: "Hz", Values: x},
		Curves: []Curve{
			{Pulse: "p1", Quantity: "mxy", Y: a},
			{Pulse: "gauss", Quantity: "mxy", Y: b},
			{Pulse: "p1", Quantity: "phase", Unit: "deg", Y: pa},
			{Pulse: "gauss", Quantity: "phase", Unit: "deg", Y: pb},
		},
		Marks: []Mark{{X: -600, Label: "-FWHM/2"}, {X: 600, Label: "+FWHM/2"}, {X: -560, Label: "pass edge"}, {X: 560, Label: "pass edge"}},
		Summary: Table{
			Columns: []Column{{Name: "pulse"}, {Name: "FWHM", Unit: "Hz"}, {Name: "ripple", Unit: "%"}},
			Rows:    [][]string{{"p1", "1200", "0.2"}, {"gauss", "1060", "-"}},
		},
	}
}

// sampleMap is a 161 × 101 offset × B1 map with a contour at 0.5.
func sampleMap() Map { return sampleMapSized(161, 101) }

func sampleMapSized(nx, ny int) Map {
	x := linspace(-4000, 4000, nx)
	y := linspace(0.5, 1.5, ny)
	z := make([][]float64, len(y))
	for j, s := range y {
		z[j] = make([]float64, len(x))
		for i, f := range x {
			z[j][i] = math.Pow(math.Sin(math.Pi/2*s), 2) / (1 + math.Pow(f/(1500*s), 6))
		}
	}
	return Map{
		Title: "Inversion efficiency", X: Axis{Label: "offset", Unit: "Hz", Values: x},
		Y: Axis{Label: "B1 scale", Values: y}, Pulse: "hs1", Quantity: "mxy", Unit: "",
		Z: z, Contour: 0.5, HasContour: true,
		Summary: Table{Columns: []Column{{Name: "feature"}, {Name: "value"}}, Rows: [][]string{{"area above 0.5", "62 %"}}},
	}
}

// sampleWaveform is a 512-sample swept pulse with amplitude, phase and frequency.
func sampleWaveform(gradient bool) (Waveform, Table) {
	n := 512
	T := 10.24e-3
	w := Waveform{Title: "hs1 waveform", Time: make([]float64, n), Amplitude: make([]float64, n),
		Phase: make([]float64, n), Frequency: make([]float64, n)}
	if gradient {
		w.Gradient = make([]float64, n)
	}
	for i := range n {
		t := (float64(i) + 0.5) * T / float64(n)
		u := 2*t/T - 1
		w.Time[i] = t
		w.Amplitude[i] = 13.5 / math.Cosh(5.3*u)
		w.Frequency[i] = 2000 * math.Tanh(5.3*u)
		w.Phase[i] = math.Remainder(360*2000*T/2/5.3*math.Log(math.Cosh(5.3*u)), 360)
		if gradient {
			w.Gradient[i] = 10
		}
	}
	t := Table{Title: "properties", Columns: []Column{{Name: "property"}, {Name: "value"}, {Name: "unit"}},
		Rows: [][]string{{"duration", "10.24", "ms"}, {"peak", "13.5", "µT"}, {"peak", "575", "Hz"}}}
	return w, t
}

// sampleNote is a caution long enough to wrap under a figure.
const sampleNote = "energy and B1rms: relative, waveform-only estimates, not SAR; defer to the scanner's SAR supervision, IEC 60601-2-33, local rules and the MR safety officer"

// sampleRMSProfile is a 2-point property sweep with a labelled quantity and a
// note under the figure.
func sampleRMSProfile() Profile {
	return Profile{
		Title:  "sweep p over duration with tr = 10 ms",
		X:      Axis{Label: "duration", Unit: "ms", Values: []float64{1, 2}},
		Curves: []Curve{{Pulse: "p", Quantity: "b1rms", Label: "b1rms at TR 10 ms", Unit: "µT", Y: []float64{1.86, 1.31}}},
		Notes:  []string{sampleNote},
	}
}

// sampleNotedMap is a small map with a note under the figure.
func sampleNotedMap() Map {
	m := sampleMapSized(21, 11)
	m.Notes = []string{sampleNote}
	m.Label = "mxy after the pulse"
	return m
}

// geomspace is n values from a to b (both positive) in equal ratios.
func geomspace(a, b float64, n int) []float64 {
	v := make([]float64, n)
	for i := range v {
		v[i] = a * math.Pow(b/a, float64(i)/float64(n-1))
	}
	return v
}

// sampleLogMap is a 30 × 30 T1 × T2 map on log axes (values spaced
// geometrically), blank where T2 > 2·T1, with z linear in log10(T1·T2) so its
// contour z = 0.5 is the line T1·T2 = 10^4.15 ms².
func sampleLogMap() Map {
	x := geomspace(10, 2000, 30)
	y := geomspace(10, 1000, 30)
	z := make([][]float64, len(y))
	for j, t2 := range y {
		z[j] = make([]float64, len(x))
		for i, t1 := range x {
			z[j][i] = (math.Log10(t1*t2) - 2) / 4.3
			if t2 > 2*t1 {
				z[j][i] = math.NaN()
			}
		}
	}
	return Map{
		Title: "sweep p over t1 and t2", X: Axis{Label: "t1", Unit: "ms", Values: x, Log: true},
		Y: Axis{Label: "t2", Unit: "ms", Values: y, Log: true}, Pulse: "p", Quantity: "mxy",
		Z: z, Contour: 0.5, HasContour: true, ZMin: 0, ZMax: 1,
		Notes: []string{"t1 and t2 points spaced geometrically; points with t2 > 2·t1 left out"},
	}
}
