package shape

import (
	"fmt"
	"math"
)

// Window tapers a sinc.
type Window int

// Windows: generalised cosine windows w = (1−α) + α·cos(2πt/T), t ∈ [−T/2, T/2];
// Hann α = 0.5, Hamming α = 0.46, i.e. 0.54 + 0.46·cos (common practice).
const (
	WindowNone Window = iota
	WindowHann
	WindowHamming
)

var windowNames = [...]string{"none", "hann", "hamming"}

func (w Window) String() string {
	if w < 0 || int(w) >= len(windowNames) {
		return fmt.Sprintf("Window(%d)", int(w))
	}
	return windowNames[w]
}

// ParseWindow reads a window name.
func ParseWindow(s string) (Window, bool) {
	for i, n := range windowNames {
		if n == s {
			return Window(i), true
		}
	}
	return WindowNone, false
}

// WindowNames lists the window names.
func WindowNames() []string { return windowNames[:] }

// Sinc is a windowed sinc with tbw zero crossings over the duration (the
// time-bandwidth product; bandwidth ≈ tbw/T, Bernstein, King & Zhou 2004).
// Sample times are sample midpoints; the default of 257 samples (more for a
// wide band, see bandSamples) is odd so that the peak at the middle is a sample.
func Sinc(c Common, gamma float64, tbw float64, win Window) (*Pulse, error) {
	if !(tbw > 0) || math.IsInf(tbw, 0) {
		return nil, fmt.Errorf("sinc: tbw must be positive, got %g", tbw)
	}
	if win < WindowNone || win > WindowHamming {
		return nil, fmt.Errorf("sinc: window %d is not one of %v", int(win), windowNames)
	}
	n, dt, err := c.times(bandSamples(tbw))
	if err == nil {
		err = checkBandSamples(n, tbw)
	}
	if err != nil {
		return nil, fmt.Errorf("sinc: %w", err)
	}
	T := c.Duration
	u := make([]float64, n)
	for j := range u {
		t := (float64(j)+0.5)*dt - T/2
		x := tbw * t / T
		v := 1.0
		if x != 0 {
			v = math.Sin(math.Pi*x) / (math.Pi * x)
		}
		u[j] = v * window(win, t, T)
	}
	return amplitudeModulated("sinc", c, gamma, u, dt, tbw)
}

// SincLobes is Sinc with the width given as a number of lobes instead of tbw.
// lobes counts the main lobe and every side lobe over the whole pulse, a lobe
// running between neighbouring zero crossings: tbw = lobes + 1. For odd lobes
// the ends of the pulse are zero crossings and the pulse holds exactly that many
// whole lobes (3 lobes: tbw 4, zeros at ±T/4 and ±T/2); for even lobes the ends
// fall in the middle of a lobe and the two end half lobes count as one.
func SincLobes(c Common, gamma float64, lobes int, win Window) (*Pulse, error) {
	if lobes < 1 || lobes > 1_000_000 {
		return nil, fmt.Errorf("sinc: lobes must be 1 to 1000000, got %d", lobes)
	}
	return Sinc(c, gamma, TBWFromLobes(lobes), win)
}

// TBWFromLobes is the time-bandwidth product of a sinc of the given number of
// lobes (main lobe plus all side lobes): lobes + 1.
func TBWFromLobes(lobes int) float64 { return float64(lobes + 1) }

func window(w Window, t, T float64) float64 {
	var a float64
	switch w {
	case WindowHann:
		a = 0.5
	case WindowHamming:
		a = 0.46
	default:
		return 1
	}
	return (1 - a) + a*math.Cos(2*math.Pi*t/T)
}
