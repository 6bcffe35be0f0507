package slr

import (
	"context"
	"fmt"
	"math"
	"math/cmplx"

	"Nutate/physics/shape"
)

// Defaults of a Spec made by NewSpec, and the design's size limit.
const (
	DefaultTBW     = 4
	DefaultRipple  = 0.01 // profile ripple, pass and stop, as a fraction
	DefaultSamples = 256
	// MaxSamples bounds the design: the exchange and the transforms cost O(N²),
	// so that a design of a few thousand samples takes seconds.
	MaxSamples = 4096
)

// Spec is an SLR design specification. Unset float fields are NaN (use NewSpec)
// and take the defaults; zero is not a valid value for any of them.
type Spec struct {
	Role       shape.Role // what the profile is for; Common.Role is used when RoleNone
	TBW        float64    // time-bandwidth product: bandwidth (Hz) × duration (s)
	PassRipple float64    // δe1: passband ripple of the profile, fraction
	StopRipple float64    // δe2: stopband ripple of the profile, fraction
	Design     Design     // phase of the β filter
	// Rising makes the β filter's stopband weight rise away from the
	// stopband edge (opt-in, linear phase only; see shaping), which lowers
	// the spikes the published flat stopband puts in the first and last
	// samples (from 5–80 % of the peak to about 1 % at TBW 4 to 12) at some
	// cost in ripple near the edges (most for 90° excitation, up to 5× the
	// asked pass ripple).
	Rising bool
}

// risingSlope is the exponent of the stopband weight of Spec.Rising.
const risingSlope = 2.0

// NewSpec returns a specification for role with every optional value unset.
func NewSpec(role shape.Role) Spec {
	return Spec{Role: role, TBW: math.NaN(), PassRipple: math.NaN(), StopRipple: math.NaN()}
}

// Info describes how a design was made.
type Info struct {
	D1, D2     float64 // β filter ripples (Ripples)
	DInf       float64 // D∞ of the equiripple filter that was designed
	PassEdge   float64 // Hz from the band centre: end of the filter's passband
	StopEdge   float64 // Hz from the band centre: start of the filter's stopband
	Method     string  // "remez" or "least squares", and the phase construction
	BetaScaled bool    // β was scaled down to keep |β| < 1
	// A and B are the designed polynomials in z⁻¹ (see the package doc); the
	// forward transform of the RF returns them to about 1e-8.
	A, B []complex128
}

func roleFlip(r shape.Role) float64 {
	switch r {
	case shape.RoleInvert, shape.RoleRefocus:
		return math.Pi
	case shape.RoleSaturate:
		return math.Pi / 2
	}
	return math.NaN()
}

// Pulse designs an SLR pulse for spec with the Common arguments c (duration,
// samples or dwell, flip for excitation, phase, center, gradient or thickness) for
// a nucleus of gyromagnetic ratio gamma (rad·s⁻¹·T⁻¹). Inversion and refocusing
// pulses are 180°, saturation 90°; excitation takes c.Flip in (0, 180°); c.Peak
// cannot be given, as the design sets the amplitude. The bandwidth TBW/duration
// is the full width of the role's own profile where it is half-way between its
// pass and stop values (excitation |Mxy|, inversion and saturation Mz,
// refocusing |β|²). Errors say which value cannot be met and the closest that
// can.
//
// The β filter is the published equiripple design (Pauly et al. 1991): pass and
// stop edges (1 ∓ W)·TBW/(2T), W = D∞(δ1, δ2)/TBW, with the filter ripples of
// Ripples, moved together (see centred) so that the role's profile is half-way
// at TBW/(2T). The profile ripples are those the published relations give
// (within 2× of the asked at TBW 4, 8 and 12). For 90° excitation, whose
// |Mxy| ripple is the square of the filter's (2δ1²), the transition width is
// fitted to the levelled error the exchange reaches rather than taken from
// the D∞ estimate alone (an amendment to the published design, which leaves
// up to 3.7× the asked ripple between TBW 4 and 8; see shaping.fit): its
// ripples are within 1.2× of the asked at TBW 4 to 12, its transition up to
// 19 % wider than the published one. The on-resonance rotation is the
// nominal flip: exactly (to about 0.01°) for excitation and saturation, whose β
// filter has amplitude 1 at zero offset; for 180° designs |β| at zero offset is
// pinned to the top of the passband and kept 1e-7 below 1 (1e-6 for minimum
// and maximum phase), which leaves the flip about 0.05° short of 180° (up to
// 0.6° for minimum phase, whose cepstral factor loses a little). Off centre,
// the default sampling takes 40 samples per cycle of the centre's phase ramp
// and the field is divided by the sample-and-hold loss sinc(π·center·dwell),
// so that the rotation at the band's centre is the one designed. The first
// and last samples carry the equiripple design's end spikes (see the package
// doc).
func Pulse(spec Spec, c shape.Common, gamma float64) (*shape.Pulse, error) {
	p, _, err := design(context.Background(), spec, c, gamma, true)
	return p, err
}

// PulseContext is Pulse that stops early with an error wrapping ctx.Err() when
// ctx is cancelled (checked before each of the filter designs a pulse is made
// of).
func PulseContext(ctx context.Context, spec Spec, c shape.Common, gamma float64) (*shape.Pulse, error) {
	p, _, err := design(ctx, spec, c, gamma, true)
	return p, err
}

// PulseInfoContext is PulseInfo that stops early with an error wrapping
// ctx.Err() when ctx is cancelled.
func PulseInfoContext(ctx context.Context, spec Spec, c shape.Common, gamma float64) (*shape.Pulse, *Info, error) {
	return design(ctx, spec, c, gamma, true)
}

// PulseInfo is Pulse that also returns how the design was made, including the
// polynomials A and B.
func PulseInfo(spec Spec, c shape.Common, gamma float64) (*shape.Pulse, *Info, error) {
	return design(context.Background(), spec, c, gamma, true)
}

// design makes the pulse; suggest lets a failure for a too small
// time-bandwidth product search for one that works (the search itself does not).
func design(ctx context.Context, spec Spec, c shape.Common, gamma float64, suggest bool) (*shape.Pulse, *Info, error) {
	fail := func(format string, args ...any) (*shape.Pulse, *Info, error) {
		return nil, nil, fmt.Errorf("slr: "+format, args...)
	}
	if gamma == 0 || math.IsNaN(gamma) || math.IsInf(gamma, 0) {
		return fail("gamma: got %g rad/s/T, want a finite non-zero value", gamma)
	}
	role := spec.Role
	if role == shape.RoleNone {
		role = c.Role
	} else if c.Role != shape.RoleNone && c.Role != role {
		return fail("role: got %v and %v, want one role", spec.Role, c.Role)
	}
	if role < shape.RoleExcite || role > shape.RoleSaturate {
		return fail("role: required, want excite, invert, refocus or saturate")
	}
	if spec.Design < Linear || spec.Design > Maximum {
		return fail("design: got %v, want linear, minimum or maximum", spec.Design)
	}
	if spec.Rising && spec.Design != Linear {
		return fail("stopband rising: got %v phase, want linear (the rising stopband lowers the end samples of linear-phase designs only)", spec.Design)
	}
	tbw := orDefault(spec.TBW, DefaultTBW)
	pass := orDefault(spec.PassRipple, DefaultRipple)
	stop := orDefault(spec.StopRipple, DefaultRipple)
	if !(tbw > 0) || math.IsInf(tbw, 0) {
		return fail("tbw: got %g, want > 0", tbw)
	}
	for _, r := range []struct {
		name string
		v    float64
	}{{"pass", pass}, {"stop", stop}} {
		if !(r.v > 0 && r.v < 1) {
			return fail("%s ripple: got %g, want between 0 and 1 (exclusive)", r.name, r.v)
		}
	}
	if math.IsNaN(c.Phase) || math.IsInf(c.Phase, 0) || math.IsNaN(c.Center) || math.IsInf(c.Center, 0) {
		return fail("phase and center: got %g rad and %g Hz, want finite values", c.Phase, c.Center)
	}
	if !math.IsNaN(c.Peak) {
		return fail("peak: the amplitude of an slr pulse follows from its design; give flip (excite) or neither")
	}
	flip := roleFlip(role)
	if role == shape.RoleExcite {
		if math.IsNaN(c.Flip) {
			return fail("flip: required for an excite pulse")
		}
		if !(c.Flip > 0 && c.Flip < math.Pi) {
			return fail("flip: got %.6g°, want above 0° and below 180° for excite (use role invert or refocus for 180°)", c.Flip*180/math.Pi)
		}
		flip = c.Flip
	} else if !math.IsNaN(c.Flip) && math.Abs(c.Flip-flip) > 1e-9 {
		return fail("flip: got %.6g°, want %.6g° for %v (or omit it)", c.Flip*180/math.Pi, flip*180/math.Pi, role)
	}
	n, dt, err := sampling(c, tbw)
	if err != nil {
		return nil, nil, fmt.Errorf("slr: %w", err)
	}
	d1, d2 := Ripples(role, flip, pass, stop)
	if !(d1 > 0 && d1 < 1 && d2 > 0 && d2 < 1) {
		return fail("pass %g, stop %g give filter ripples %.3g, %.3g for %v, want both between 0 and 1", pass, stop, d1, d2, role)
	}
	// Transition width ≈ D∞/taps cycles/sample (Herrmann, Rabiner & Chan 1973).
	dinf, taps := DInf(d1, d2), n
	if spec.Design != Linear {
		dinf, taps = DInf(2*d1, d2*d2/2), 2*n-1
	}
	if fp, _ := edges(n, taps, tbw, dinf); !(fp > 0) {
		// fp > 0 ⇔ W < 1 ⇔ tbw > n·D∞/taps: the transition fits the band.
		need := math.Ceil(float64(n)*dinf/float64(taps)*1.001*1000) / 1000
		return fail("tbw: got %g, too small for filter ripples %.3g and %.3g (pass %g, stop %g, %v, %v phase): want more than %.4g, or larger ripples",
			tbw, d1, d2, pass, stop, role, spec.Design, need)
	}
	if _, fs := edges(n, taps, tbw, dinf); !(fs < 0.5) {
		need := n
		for ; need <= MaxSamples; need++ {
			t := need
			if spec.Design != Linear {
				t = 2*need - 1
			}
			if _, s := edges(need, t, tbw, dinf); s < 0.5 {
				break
			}
		}
		if need > MaxSamples {
			return fail("tbw: got %g, too large for at most %d samples with these ripples", tbw, MaxSamples)
		}
		return fail("samples: got %d, fewer than the filter needs for tbw %g with these ripples; want at least %d", n, tbw, need)
	}
	cep := getCepstrum(gridSize(n))
	defer func() {
		if cep != nil {
			putCepstrum(cep)
		}
	}()
	// Where the passband ripple could carry |β| above 1, zero offset is kept
	// the passband's largest amplitude (see lowpass).
	top := math.Sin(flip/2)*(1+d1) > 1-betaMargin
	sh := shaping{top: top, fit: role == shape.RoleExcite && math.Abs(flip-math.Pi/2) <= nearRightAngle}
	if spec.Rising {
		sh.slope = risingSlope
	}
	h, fp, fs, method, err := betaFilter(ctx, n, tbw, d1, d2, HalfLevel(role, flip), spec.Design, sh, cep)
	if err != nil {
		return nil, nil, fmt.Errorf("slr: %w", err)
	}
	margin := betaMargin
	if spec.Design != Linear {
		margin = phaseMargin
	}
	a, b, scaled := polynomials(h, flip, margin, cep)
	rf := Inverse(a, b)
	// A design that failed numerically (an exchange that did not settle and
	// an ill-conditioned fallback) can come out as a near-zero pulse: refuse
	// it rather than hand on a pulse that does not turn as asked.
	if got := onResonanceFlip(rf); !(math.Abs(got-flip) <= maxFlipShortfall) {
		return fail("the design failed for tbw %g on %d samples (%s): it turns %.4g° on resonance, want %.4g°; try another tbw or fewer samples",
			tbw, n, method, got*180/math.Pi, flip*180/math.Pi)
	}
	p := &shape.Pulse{
		Shape:     "slr",
		Gamma:     gamma,
		Role:      role,
		Flip:      flip,
		Bandwidth: tbw / c.Duration,
		TBW:       tbw,
		Center:    c.Center,
	}
	p.Wave.Dwell = make([]float64, n)
	p.Wave.B1 = make([]complex128, n)
	T := c.Duration
	// The ramp held over each sample scales the field at the centre by
	// sinc(π·center·dwell) (the spectrum of a sample-and-hold); dividing it
	// out keeps the designed rotation at the band's centre (0.1 % of the flip,
	// 0.2° of a 180°, at the default 40 samples per cycle).
	hold := 1.0
	if x := math.Pi * c.Center * dt; x != 0 {
		hold = math.Sin(x) / x
	}
	for j, r := range rf {
		p.Wave.Dwell[j] = dt
		// rf = γ·B1·Δt. Phase and Center as for every shape: the ramp
		// exp(i(φ − 2π·center·(t − T/2))) at the sample midpoint moves the band
		// to offset +center in the convention of package physics, where a
		// spin at offset Δf turns as exp(−i·2πΔf·t) in the carrier frame.
		ph := c.Phase - 2*math.Pi*c.Center*((float64(j)+0.5)*dt-T/2)
		s, co := math.Sincos(ph)
		p.Wave.B1[j] = r / complex(gamma*dt*hold, 0) * complex(co, s)
	}
	if err := slice(p, c); err != nil {
		return nil, nil, err
	}
	// The D∞ designed: the estimate, or the width fitted to the ripples.
	dinf = (fs - fp) * float64(taps)
	info := &Info{D1: d1, D2: d2, DInf: dinf, PassEdge: fp / dt, StopEdge: fs / dt, Method: method, BetaScaled: scaled, A: a, B: b}
	return p, info, nil
}

func orDefault(v, def float64) float64 {
	if math.IsNaN(v) {
		return def
	}
	return v
}

// Samples per unit of tbw: the default takes samplesPerTBW (at least
// DefaultSamples, at most MaxSamples), and fewer than minSamplesPerTBW are
// refused. The filter's response repeats every samples/duration in frequency
// and the hard-pulse approximation holds for small rotations per sample, so the
// band (tbw/duration wide) must be a small part of that: at 4 samples per unit
// of tbw the 1 % ripples of a TBW-64 design already grow to 2 %, at 1.3 the stop
// band reaches 60 % (measured by simulation).
const (
	samplesPerTBW    = 8
	minSamplesPerTBW = 3
	// centerSamplesPerCycle is the default samples per cycle of an off-centre
	// band's phase ramp, as package shape takes for every other shape.
	centerSamplesPerCycle = 40
)

// sampling returns the number of samples and the dwell from c for a design of
// time-bandwidth product tbw.
func sampling(c shape.Common, tbw float64) (int, float64, error) {
	if !(c.Duration > 0) || math.IsInf(c.Duration, 0) {
		return 0, 0, fmt.Errorf("duration: got %g s, want > 0", c.Duration)
	}
	n := c.Samples
	if !math.IsNaN(c.Dwell) {
		if c.Samples != 0 {
			return 0, 0, fmt.Errorf("samples and dwell: got both, want one")
		}
		if !(c.Dwell > 0) {
			return 0, 0, fmt.Errorf("dwell: got %g s, want > 0", c.Dwell)
		}
		n = int(math.Round(c.Duration / c.Dwell))
		if n < 1 || math.Abs(float64(n)*c.Dwell-c.Duration) > 1e-9*c.Duration {
			return 0, 0, fmt.Errorf("dwell: got %g s, which does not divide duration %g s", c.Dwell, c.Duration)
		}
	}
	if n == 0 {
		n = min(MaxSamples, max(DefaultSamples, int(math.Ceil(samplesPerTBW*tbw))))
		// An off-centre band is a phase ramp held over each sample, which
		// scales the band by sinc(π·center·dwell) (the spectrum of a
		// sample-and-hold): as for every shape, the default takes at least
		// centerSamplesPerCycle samples per cycle of the ramp (0.1 %).
		if need := math.Ceil(centerSamplesPerCycle * math.Abs(c.Center) * c.Duration); need > float64(n) {
			if need > MaxSamples {
				return 0, 0, fmt.Errorf("center %g Hz over %g s needs %.0f samples (1/%d cycle each), want at most %d: give samples or dwell, or a shorter duration", c.Center, c.Duration, need, centerSamplesPerCycle, MaxSamples)
			}
			n = int(need)
		}
	}
	if n < 8 || n > MaxSamples {
		return 0, 0, fmt.Errorf("samples: got %d, want 8 to %d", n, MaxSamples)
	}
	if need := int(math.Ceil(minSamplesPerTBW * tbw)); n < need && need <= MaxSamples {
		return 0, 0, fmt.Errorf("samples: got %d, want at least %d (3·tbw for tbw %g): the band, tbw/duration, must be a small part of the sampling rate, samples/duration; the default takes %d·tbw", n, need, tbw, samplesPerTBW)
	}
	return n, c.Duration / float64(n), nil
}

// slice sets the slice-select gradient as for every shape (shape.SetSlice): a
// thickness is turned into a gradient through the measured width of the role's
// own profile.
func slice(p *shape.Pulse, c shape.Common) error {
	return shape.SetSlice(p, c)
}

// maxFlipShortfall bounds how far a design's on-resonance rotation may fall
// from its flip (1°; minimum-phase 180° designs keep |β| a little below 1 and
// turn about 179.7°).
const maxFlipShortfall = math.Pi / 180

// onResonanceFlip is the rotation angle of the hard-pulse sequence rf
// (γ·B1·Δt per sample) on resonance: the Cayley–Klein parameters of each
// sample, α = cos(θ/2), β = −i·e^{iφ}·sin(θ/2), composed in time order, give
// the flip 2·asin|β| (Pauly et al. 1991).
func onResonanceFlip(rf []complex128) float64 {
	a, b := complex(1, 0), complex(0, 0)
	for _, r := range rf {
		th := cmplx.Abs(r)
		if th == 0 {
			continue
		}
		s, c := math.Sincos(th / 2)
		aj := complex(c, 0)
		bj := complex(0, -s) * (r / complex(th, 0))
		a, b = aj*a-cmplx.Conj(bj)*b, bj*a+cmplx.Conj(aj)*b
	}
	return 2 * math.Asin(math.Min(1, cmplx.Abs(b)))
}
