// Package shape builds RF pulse waveforms and computes their properties. Units
// are those of package physics: seconds, tesla, hertz, radians, metres, T/m;
// γ in rad·s⁻¹·T⁻¹ (signed).
//
// Each shape is one file with a constructor that takes the shape's own
// parameters, the Common arguments every shape shares (duration, samples or
// dwell, phase, center, flip or peak, gradient or thickness, role) and γ, and
// returns a *Pulse:
//
//   - amplitude-modulated shapes (Rect, Sinc, SincLobes, Gauss) take exactly one
//     of flip (the amplitude is solved exactly for the nominal on-resonance flip
//     γ∫B1 dt of the sampled waveform) or peak;
//   - frequency-swept, adiabatic shapes (Hsec, Chirp, Wurst, Bir4) take peak
//     only (Bir4 also takes flip, its rotation angle); the sweep is integrated
//     into the phase of B1 and recorded per sample in Pulse.Freq;
//   - Train plays pulses back to back, each at its own phase, with gaps;
//   - FromSamples builds a pulse from sampled data (amplitude, phase,
//     frequency, gradient).
//
// Measure simulates a pulse (physics.Simulate) and reports its Properties: peak,
// flip, energy and B1rms, the role's profile with its bandwidth, transition
// width and ripples, the adiabatic threshold, slice thickness and chemical-shift
// displacement. Energy and B1rms are relative, waveform-only estimates, never a
// substitute for the scanner's SAR supervision, IEC 60601-2-33, local
// regulations or the site's MR safety officer.
//
// Sign of frequencies: as in package physics, the transverse magnetization of a
// spin at offset Δf turns as exp(−i·2πΔf·t) in the frame of the carrier, so an RF
// field at frequency f relative to the carrier (Common.Center, Pulse.Freq) has
// phase −2π∫f dt, and a pulse centred at f acts on spins at offset f.
// Sample times are sample midpoints; user errors are returned, never panics.
package shape

import (
	"context"
	"fmt"
	"math"

	"Nutate/physics"
)

// Role is what a pulse is for; it picks the default quantity and the target
// against which properties (bandwidth, threshold, ripple) are measured.
type Role int

// Roles.
const (
	RoleNone Role = iota
	RoleExcite
	RoleInvert
	RoleRefocus
	RoleSaturate
)

var roleNames = [...]string{"", "excite", "invert", "refocus", "saturate"}

func (r Role) String() string {
	if r < 0 || int(r) >= len(roleNames) {
		return fmt.Sprintf("Role(%d)", int(r))
	}
	return roleNames[r]
}

// ParseRole reads a role name.
func ParseRole(s string) (Role, bool) {
	for i, n := range roleNames {
		if i > 0 && n == s {
			return Role(i), true
		}
	}
	return RoleNone, false
}

// Common holds the arguments every shape takes. Unset float fields are NaN
// (use NewCommon), except Gradient and Thickness where 0 means unset.
type Common struct {
	Duration  float64 // s
	Samples   int     // 0: the shape's default
	Dwell     float64 // s; NaN: derived from Samples
	Phase     float64 // rad, constant phase added to the whole pulse
	Center    float64 // Hz, carrier offset of the pulse's band (applies a phase ramp)
	Flip      float64 // rad, nominal on-resonance flip; NaN if Peak is given
	Peak      float64 // T, peak |B1|; NaN if Flip is given
	Gradient  float64 // T/m slice-select gradient; 0: none
	Thickness float64 // m slice thickness (derives Gradient from the measured profile width, see SetSlice); 0: none
	Role      Role
}

// NewCommon returns Common with every optional value unset.
func NewCommon() Common {
	return Common{Dwell: math.NaN(), Flip: math.NaN(), Peak: math.NaN()}
}

// Pulse is a built RF pulse with what is known of it by design.
type Pulse struct {
	Shape     string
	Wave      physics.Waveform
	Gamma     float64 // rad·s⁻¹·T⁻¹ used to scale the amplitude
	Role      Role
	Flip      float64   // rad, nominal on-resonance flip; NaN where not defined (adiabatic)
	Bandwidth float64   // Hz, design bandwidth; 0 where none
	TBW       float64   // time-bandwidth product; 0 where none
	Adiabatic bool      // amplitude set by peak, flip by adiabatic passage
	Sweep     float64   // Hz, frequency-sweep range of a frequency-modulated pulse; 0 if none
	Freq      []float64 // Hz, instantaneous RF frequency relative to the carrier, per sample; nil if none
	Gradient  float64   // T/m, constant slice-select gradient; 0: none
	// Width is the measured full width (Hz) of the role's own profile at
	// half-way (ProfileWidth), set where a gradient or thickness is given (and
	// by the language where a bandwidth was asked); 0 otherwise. The selected thickness is Width/(γ̄·|Gradient|); the design
	// figure is Bandwidth/(γ̄·|Gradient|).
	Width  float64
	Center float64 // Hz
	// Plane is set for a plane rotation by Flip about a fixed transverse axis
	// at phase Axis (rad) whatever the B1 (BIR-4): its target holds the whole
	// magnetization to that rotation, phase included (see TargetMet).
	Plane bool
	Axis  float64
}

// Duration is the pulse length in seconds.
func (p *Pulse) Duration() float64 { return p.Wave.Duration() }

// Peak is the largest |B1| in tesla.
func (p *Pulse) Peak() float64 {
	m := 0.0
	for _, b := range p.Wave.B1 {
		m = math.Max(m, cabs(b))
	}
	return m
}

// Energy is ∫|B1|² dt in T²·s: a relative, waveform-only figure.
func (p *Pulse) Energy() float64 {
	e := 0.0
	for j, b := range p.Wave.B1 {
		e += (real(b)*real(b) + imag(b)*imag(b)) * p.Wave.Dwell[j]
	}
	return e
}

func cabs(z complex128) float64 { return math.Hypot(real(z), imag(z)) }

// times returns the sample count and dwell for a uniform waveform of c.Duration,
// checking c, including that exactly one of flip and peak is given.
func (c *Common) times(defaultSamples int) (n int, dt float64, err error) {
	n, dt, err = c.grid(defaultSamples)
	if err != nil {
		return 0, 0, err
	}
	hasFlip, hasPeak := !math.IsNaN(c.Flip), !math.IsNaN(c.Peak)
	if hasFlip && hasPeak {
		return 0, 0, fmt.Errorf("give flip or peak, not both")
	}
	if !hasFlip && !hasPeak {
		return 0, 0, fmt.Errorf("give flip or peak for the amplitude")
	}
	if hasFlip && (math.IsInf(c.Flip, 0)) {
		return 0, 0, fmt.Errorf("flip must be finite, got %g rad", c.Flip)
	}
	if hasPeak && (!(c.Peak >= 0) || math.IsInf(c.Peak, 0)) {
		return 0, 0, fmt.Errorf("peak must be finite and not negative, got %g T", c.Peak)
	}
	return n, dt, nil
}

// adiabaticTimes is times for a pulse whose amplitude is set by peak only; flip
// says whether the shape itself uses c.Flip (as BIR-4 does for its rotation).
func (c *Common) adiabaticTimes(defaultSamples int, flip bool) (n int, dt float64, err error) {
	n, dt, err = c.grid(defaultSamples)
	if err != nil {
		return 0, 0, err
	}
	if !flip && !math.IsNaN(c.Flip) {
		return 0, 0, fmt.Errorf("flip is not defined for an adiabatic pulse: give peak instead")
	}
	if math.IsNaN(c.Peak) {
		return 0, 0, fmt.Errorf("an adiabatic pulse needs peak (its flip comes from the sweep, not the area)")
	}
	if !(c.Peak >= 0) || math.IsInf(c.Peak, 0) {
		return 0, 0, fmt.Errorf("peak must be finite and not negative, got %g T", c.Peak)
	}
	return n, dt, nil
}

// grid checks duration, samples and dwell and returns the sample count and dwell.
func (c *Common) grid(defaultSamples int) (n int, dt float64, err error) {
	if !(c.Duration > 0) || math.IsInf(c.Duration, 0) {
		return 0, 0, fmt.Errorf("duration must be positive, got %g s", c.Duration)
	}
	if math.IsNaN(c.Phase) || math.IsInf(c.Phase, 0) {
		return 0, 0, fmt.Errorf("phase must be finite, got %g rad", c.Phase)
	}
	if math.IsNaN(c.Center) || math.IsInf(c.Center, 0) {
		return 0, 0, fmt.Errorf("center must be finite, got %g Hz", c.Center)
	}
	if c.Samples < 0 {
		return 0, 0, fmt.Errorf("samples must be positive, got %d", c.Samples)
	}
	n = c.Samples
	if !math.IsNaN(c.Dwell) {
		if !(c.Dwell > 0) || math.IsInf(c.Dwell, 0) {
			return 0, 0, fmt.Errorf("dwell must be positive, got %g s", c.Dwell)
		}
		if c.Samples != 0 {
			return 0, 0, fmt.Errorf("give samples or dwell, not both")
		}
		k := math.Round(c.Duration / c.Dwell)
		if k > maxSamples {
			return 0, 0, fmt.Errorf("dwell %g s gives %.0f samples, want at most %d", c.Dwell, k, maxSamples)
		}
		n = int(k)
		if n < 1 || math.Abs(float64(n)*c.Dwell-c.Duration) > 1e-9*c.Duration {
			return 0, 0, fmt.Errorf("dwell %g s does not divide duration %g s", c.Dwell, c.Duration)
		}
	}
	if n == 0 {
		n = defaultSamples
		// An off-centre band is a phase ramp held constant over each sample:
		// the held ramp scales the band by sinc(π·center·dwell) (the spectrum
		// of a sample-and-hold) and aliases beyond 1/(2·dwell). At 1/40 cycle
		// per sample the loss is 0.1 %.
		if need := math.Ceil(centerCyclesPerSample * math.Abs(c.Center) * c.Duration); need > float64(n) {
			if need > maxSamples {
				return 0, 0, fmt.Errorf("center %g Hz over %g s needs %.3g samples (1/%d cycle each), want at most %d: give samples or dwell, or a shorter duration", c.Center, c.Duration, need, centerCyclesPerSample, maxSamples)
			}
			n = int(need)
		}
	}
	if n < 1 || n > maxSamples {
		return 0, 0, fmt.Errorf("samples must be 1 to %d, got %d", maxSamples, n)
	}
	return n, c.Duration / float64(n), nil
}

const maxSamples = 1 << 22

// bandSamples is the default sample count of an amplitude-modulated pulse of
// time-bandwidth product tbw: 257, or 8·tbw + 1 (odd) for a wider band, so that
// the band (tbw/T wide) lies well inside the sampling rate (n/T).
func bandSamples(tbw float64) int {
	if n := 8*math.Ceil(tbw) + 1; n > 257 && n <= maxSamples {
		return int(n)
	}
	return 257
}

// checkBandSamples refuses fewer than 2·tbw samples: the band, tbw/T wide,
// would not fit inside the sampling rate n/T and would alias.
func checkBandSamples(n int, tbw float64) error {
	if need := math.Ceil(2 * tbw); float64(n) < need {
		return fmt.Errorf("%d samples cannot hold tbw %g: want at least 2·tbw = %.0f (the band, tbw/duration wide, must lie inside the sampling rate, samples/duration)", n, tbw, need)
	}
	return nil
}

// centerCyclesPerSample is the default samples per cycle of an off-centre
// band's phase ramp (see grid).
const centerCyclesPerSample = 40

// amplitudeModulated builds a pulse from a real unit-peak envelope u (one value per
// sample), scaling it so that its nominal on-resonance flip γ·∫B1 dt equals c.Flip,
// or its peak equals c.Peak; then applies Phase and Center, records the
// time-bandwidth product tbw and the bandwidth tbw/c.Duration, and sets the slice
// gradient.
func amplitudeModulated(name string, c Common, gamma float64, u []float64, dt, tbw float64) (*Pulse, error) {
	area := 0.0
	peak := 0.0
	for _, v := range u {
		area += v * dt
		peak = math.Max(peak, math.Abs(v))
	}
	var scale float64
	if !math.IsNaN(c.Flip) {
		if area == 0 {
			return nil, fmt.Errorf("%s: the shape has zero area, so no amplitude gives a flip", name)
		}
		scale = c.Flip / (math.Abs(gamma) * area)
	} else {
		scale = c.Peak / peak
	}
	p := &Pulse{Shape: name, Gamma: gamma, Role: c.Role, Center: c.Center, Flip: math.Abs(gamma) * scale * area}
	p.Wave.Dwell = make([]float64, len(u))
	p.Wave.B1 = make([]complex128, len(u))
	for j, v := range u {
		p.Wave.Dwell[j] = dt
		p.Wave.B1[j] = complex(scale*v, 0)
	}
	p.applyPhase(c.Phase, c.Center)
	p.TBW = tbw
	p.Bandwidth = tbw / c.Duration
	return p, p.setSlice(c)
}

// applyPhase rotates the waveform by a constant phase and moves its band to
// center Hz: B1(t) → B1(t)·exp(i(φ − 2π·center·(t − T/2))), the phase referenced to
// the pulse's midpoint so the centre of the band keeps the phase given. The minus
// sign follows package physics: the transverse magnetization of a spin at offset
// Δf turns as exp(−i·2πΔf·t) in the carrier frame, so an RF field at frequency f
// relative to the carrier has phase −2π∫f dt.
func (p *Pulse) applyPhase(phase, center float64) {
	if phase == 0 && center == 0 {
		return
	}
	T := p.Wave.Duration()
	t := 0.0
	for j := range p.Wave.B1 {
		mid := t + p.Wave.Dwell[j]/2
		ph := phase - 2*math.Pi*center*(mid-T/2)
		s, c := math.Sincos(ph)
		p.Wave.B1[j] *= complex(c, s)
		t += p.Wave.Dwell[j]
	}
	if p.Freq != nil {
		for j := range p.Freq {
			p.Freq[j] += center
		}
	}
}

// Rect is a hard pulse: constant amplitude. Its default is one sample, which is
// exact for a constant field.
func Rect(c Common, gamma float64) (*Pulse, error) {
	n, dt, err := c.times(1)
	if err != nil {
		return nil, fmt.Errorf("rect: %w", err)
	}
	u := make([]float64, n)
	for j := range u {
		u[j] = 1
	}
	// Rectangular pulse main-lobe width: first nulls of a small-tip sinc profile at
	// ±1/T, so tbw = 1.
	return amplitudeModulated("rect", c, gamma, u, dt, 1)
}

// setSlice sets the slice-select gradient, given or derived from the thickness:
// thickness = W/(γ̄·G) (common practice), W the measured width of the role's
// own profile (ProfileWidth), so that the pulse selects the thickness asked
// rather than the one its design bandwidth would give.
func (p *Pulse) setSlice(c Common) error {
	return SetSlice(p, c)
}

// SetSlice sets p's slice-select gradient from c.Gradient or c.Thickness (see
// setSlice) and records the measured profile width in p.Width. Shapes built
// outside this package (SLR) use it too.
func SetSlice(p *Pulse, c Common) error {
	if c.Gradient != 0 && c.Thickness != 0 {
		return fmt.Errorf("%s: give gradient or thickness, not both", p.Shape)
	}
	if math.IsNaN(c.Gradient) || math.IsInf(c.Gradient, 0) {
		return fmt.Errorf("%s: gradient must be finite, got %g T/m", p.Shape, c.Gradient)
	}
	g := c.Gradient
	if c.Thickness != 0 {
		if !(c.Thickness > 0) || math.IsInf(c.Thickness, 0) {
			return fmt.Errorf("%s: thickness must be positive, got %g m", p.Shape, c.Thickness)
		}
		if p.Bandwidth == 0 {
			if p.Sweep > 0 {
				return fmt.Errorf("%s: thickness needs a design band, and this pulse's bandwidth is a frequency sweep, which sets no slice: give gradient instead", p.Shape)
			}
			return fmt.Errorf("%s: thickness needs a pulse with a bandwidth: give gradient instead", p.Shape)
		}
		w, err := ProfileWidth(context.Background(), p)
		if err != nil {
			return fmt.Errorf("%s: thickness needs a profile with a half-way width (%v): give gradient instead", p.Shape, err)
		}
		p.Width = w
		g = 2 * math.Pi * w / (math.Abs(p.Gamma) * c.Thickness)
	} else if g != 0 {
		if w, err := ProfileWidth(context.Background(), p); err == nil {
			p.Width = w
		}
	}
	if g == 0 {
		return nil
	}
	p.Gradient = g
	p.Wave.Gradient = make([]float64, p.Wave.Len())
	for j := range p.Wave.Gradient {
		p.Wave.Gradient[j] = g
	}
	return nil
}
