package shape

import (
	"context"
	"fmt"
	"math"

	"Nutate/physics"
)

// MeasureOptions control Measure.
type MeasureOptions struct {
	// TR (s) is the repetition time for B1rms; 0: not computed.
	TR float64
	// Field (T) is B0 for the chemical-shift displacement; 0: not computed.
	Field float64
	// Points is the number of offsets of the simulated profile (made odd so the
	// centre is a point); 0: a step of at most 1/(12·duration), and 401
	// points where that is cheap (see profilePoints).
	Points int
	// Span (Hz) is the half-width of the simulated profile about the pulse's
	// centre; 0: twice the design bandwidth, at least half the sweep and 4/T. It
	// widens (by 4× steps, up to 64×) until the profile falls below half of its
	// on-band value on both sides.
	Span float64
	// Workers is passed to the simulation; 0: GOMAXPROCS.
	Workers int
	// Offset (Hz) moves the centre about which the band is sought from the
	// pulse's Center to Center + Offset (for data whose band is elsewhere).
	Offset float64
	// Progress, when non-nil, is told of the work done so far, in
	// isochromat-steps (isochromats × samples), during and after each
	// simulation. It may be called from several goroutines at once, so a
	// call may bring a value smaller than one already seen. How many steps a
	// measurement takes depends on the profile found; MeasureCost estimates it.
	Progress func(steps float64)
	// Band (Hz) is the band over whose central half (±Band/4 about the centre)
	// an adiabatic pulse must meet its role's target for the threshold; 0: the
	// design bandwidth. A swept waveform read from a file has no design
	// bandwidth; its sweep is the natural band.
	Band float64
}

// MeasureCost estimates the isochromat-steps Measure takes for p with opt: the
// profile's points (once; a profile that must widen costs more), about 40
// single-isochromat runs refining its crossings, and for an adiabatic pulse the
// threshold search (49 scans and about 28 bisection steps over 11 offsets). It
// is an estimate, for progress displays.
func MeasureCost(p *Pulse, opt MeasureOptions) float64 {
	n := float64(p.Wave.Len())
	span := opt.Span
	if span == 0 {
		span = defaultSpan(p)
	}
	points := opt.Points
	if points == 0 {
		points = profilePoints(span, p.Duration(), p.Wave.Len())
	}
	cost := (1 + float64(points) + 40) * n
	if p.Adiabatic {
		cost += (thresholdScans + 28) * thresholdOffsets * n
	}
	return cost
}

// Profile is a simulated response against frequency offset.
type Profile struct {
	Offset []float64 // Hz from the carrier
	Value  []float64 // the role's quantity, see Measure
}

// Properties are what Measure finds. NaN marks a figure that does not apply or
// could not be found.
type Properties struct {
	Duration float64 // s
	Peak     float64 // T, largest |B1|
	PeakHz   float64 // Hz, γ̄·Peak
	Flip     float64 // rad, Pulse.Flip: nominal on-resonance flip γ∫B1 dt; BIR-4's rotation angle; NaN for adiabatic sweeps and trains
	// Rotation (rad) is the simulated rotation angle at the pulse's centre
	// frequency, 2·asin|β| (Pauly et al., IEEE TMI 10:53, 1991).
	Rotation float64
	// Energy is ∫|B1|² dt (T²·s) and B1rms = √(Energy/TR) (T): relative,
	// waveform-only estimates, never a substitute for the scanner's SAR
	// supervision, IEC 60601-2-33, local regulations or the site's MR safety
	// officer.
	Energy, B1rms float64
	// Role is the role whose profile was measured: for excite and none |Mxy|,
	// invert (1 − Mz)/2, refocus |β|², saturate 1 − |Mz|, all from +z.
	Role Role
	// OnBand is the profile's value at the pulse's centre frequency.
	OnBand float64
	// PassValue is the value the role's profile has in its pass band by
	// design: invert and saturate 1; refocus sin²(θ/2) and excite or no role
	// |sin θ| for a pulse with a nominal flip θ; 1 for an adiabatic refocus or
	// excite. Where the design fixes none (a file's waveform with no role to
	// invert or saturate, a pulse without role or flip) it is OnBand, and
	// PassDesign is false. The stop-band value is 0 for every role.
	PassValue  float64
	PassDesign bool
	// Bandwidth (Hz) is the full width at half of the pass-band value: the
	// distance between the offsets, nearest the centre on either side, where
	// the simulated profile crosses PassValue/2 (refined between grid points
	// by regula falsi on single-isochromat simulations, to within 1e-10 of the
	// level); Edges are those offsets. For inversion that is where Mz crosses
	// 0, for a 90° excitation where |Mxy| crosses 0.5. NaN when the centre
	// does not reach PassValue/2.
	Bandwidth float64
	Edges     [2]float64
	// Transition (Hz) is the mean over both edges of the distance between the
	// crossings of 90 % and 10 % of PassValue, searched outward from the
	// centre.
	Transition float64
	// PassRipple and StopRipple are in the units of the role's quantity as a
	// user states ripples (Pauly et al., IEEE TMI 10:53, 1991): Mz for invert
	// and saturate, |Mxy| for excite and no role, |β|² for refocus, all in M0
	// units. PassRipple is the largest deviation from the pass-band value
	// within Bandwidth/2 − Transition of the band's middle (the midpoint of
	// Edges; inversion: max|Mz + 1|);
	// StopRipple the largest deviation from the stop-band value beyond
	// Bandwidth/2 + Transition over the simulated offsets (inversion:
	// max(1 − Mz)). NaN where a band is empty.
	PassRipple, StopRipple float64
	// Threshold (T) is the adiabatic threshold, for adiabatic pulses only: the
	// lowest peak B1 at which the role's target is met at every offset within a
	// quarter of the design bandwidth of the centre (11 evenly spaced offsets;
	// MeasureOptions.Band for a file's sweep; only the centre where there is
	// no band, as for BIR-4, whose tolerance of offsets grows with B1) and keeps being met for at least
	// half an octave of B1 above. Targets: invert Mz ≤ −0.9; excite |Mxy| ≥
	// 0.9; refocus |β|² ≥ 0.9; saturate |Mz| ≤ 0.1; none |Mz − cos θ| ≤ 0.1
	// with θ the nominal flip. Search: the B1 is scanned in quarter octaves
	// over a range set by the pulse's shape alone (ThresholdScan; the peak the
	// pulse was given plays no part), then bisected to 1e-4 relative.
	// ThresholdHz is γ̄·Threshold. ThresholdUpper (T) is the lowest B1 above
	// the threshold where the target fails again (a sweep too short for a
	// strong B1, a WURST or chirp whose sweep does not reach far enough past
	// the band); NaN when the target holds to the top of the scan.
	Threshold, ThresholdHz, ThresholdUpper float64
	// ThresholdScan is the range of peak B1 (T) the threshold search tried,
	// and ThresholdNear where it came closest to the target (the lowest B1 of
	// the smallest miss; Miss 0 where the target was met): both say why a
	// threshold was not found.
	ThresholdScan [2]float64
	ThresholdNear ThresholdMiss
	// Thickness (m) is Bandwidth/(γ̄|G|) for a pulse with a constant gradient.
	Thickness float64
	// ShiftPerPPM (m/ppm) is the chemical-shift displacement of the slice per ppm
	// at MeasureOptions.Field.
	ShiftPerPPM float64
	// Profile is the simulated profile the figures come from (gradient off: a
	// constant gradient G maps offset f to position f/(γ̄G)).
	Profile Profile
}

// Threshold targets, see Properties.Threshold.
const (
	thresholdTarget  = 0.9
	thresholdScans   = 49 // quarter octaves from 1/32 to 128 times the grid's reference
	thresholdScanLow = 20 // grid index of the reference
	thresholdHold    = 2  // further grid points that must meet the target
	thresholdOffsets = 11
)

// Measure computes a pulse's properties, simulating its profile with
// physics.Simulate (gradient off). It returns ctx.Err() when cancelled.
func Measure(ctx context.Context, p *Pulse, opt MeasureOptions) (Properties, error) {
	var pr Properties
	if p == nil || p.Wave.Len() == 0 {
		return pr, fmt.Errorf("measure: empty pulse")
	}
	if err := p.Wave.Validate(); err != nil {
		return pr, fmt.Errorf("measure: %w", err)
	}
	if p.Gamma == 0 || math.IsNaN(p.Gamma) {
		return pr, fmt.Errorf("measure: gyromagnetic ratio is %g, want non-zero", p.Gamma)
	}
	if opt.TR < 0 || math.IsNaN(opt.TR) {
		return pr, fmt.Errorf("measure: tr must be positive, got %g s", opt.TR)
	}
	if opt.Points < 0 || opt.Points > 100001 {
		return pr, fmt.Errorf("measure: points must be 3 to 100001, got %d", opt.Points)
	}
	if math.IsNaN(opt.Offset) || math.IsInf(opt.Offset, 0) {
		return pr, fmt.Errorf("measure: offset must be finite, got %g Hz", opt.Offset)
	}
	m := &meter{ctx: ctx, p: p, gammaBar: math.Abs(p.Gamma) / (2 * math.Pi), workers: opt.Workers, center: p.Center + opt.Offset, band: p.Bandwidth, progress: opt.Progress}
	if opt.Band > 0 {
		m.band = opt.Band
	}
	m.w = p.Wave
	m.w.Gradient = nil
	m.role = p.Role

	T := p.Duration()
	pr.Duration = T
	pr.Peak = p.Peak()
	pr.PeakHz = m.gammaBar * pr.Peak
	pr.Flip = p.Flip
	pr.Energy = p.Energy()
	pr.B1rms = math.NaN()
	if opt.TR > 0 {
		if opt.TR < T {
			return pr, fmt.Errorf("measure: tr %g s is shorter than the pulse (%g s)", opt.TR, T)
		}
		// B1rms over one repetition: √(∫B1² dt / TR) (common practice).
		pr.B1rms = math.Sqrt(pr.Energy / opt.TR)
	}
	pr.Role = m.role
	nan := math.NaN()
	pr.Bandwidth, pr.Edges, pr.Transition, pr.PassRipple, pr.StopRipple = nan, [2]float64{nan, nan}, nan, nan, nan
	pr.PassValue = nan
	pr.Threshold, pr.ThresholdHz, pr.ThresholdUpper, pr.Thickness, pr.ShiftPerPPM = nan, nan, nan, nan, nan

	r, err := m.sim([]float64{m.center}, nil)
	if err != nil {
		return pr, err
	}
	pr.Rotation = 2 * math.Asin(math.Min(1, cabs(r.Beta[0])))

	span := opt.Span
	if span == 0 {
		span = defaultSpan(p)
	}
	if !(span > 0) || math.IsInf(span, 0) {
		return pr, fmt.Errorf("measure: span must be positive, got %g Hz", span)
	}
	for widen := 0; ; widen++ {
		points := opt.Points
		if points == 0 {
			points = profilePoints(span, T, p.Wave.Len())
		}
		if points < 3 {
			points = 3
		}
		if points%2 == 0 {
			points++
		}
		if err := m.profile(span, points); err != nil {
			return pr, err
		}
		if m.wideEnough(span) || widen == 3 {
			break
		}
		span *= 4
	}
	pr.Profile = Profile{Offset: m.off, Value: m.val}
	if err := m.features(&pr); err != nil {
		return pr, err
	}
	if p.Gradient != 0 && !math.IsNaN(pr.Bandwidth) {
		pr.Thickness = SliceThickness(pr.Bandwidth, p.Gamma, p.Gradient)
	}
	if opt.Field > 0 && p.Gradient != 0 {
		pr.ShiftPerPPM = ShiftPerPPM(opt.Field, p.Gradient)
	}
	if p.Adiabatic && pr.Peak > 0 {
		th, up, near, err := m.threshold()
		if err != nil {
			return pr, err
		}
		pr.ThresholdNear = near
		pr.ThresholdScan[0], pr.ThresholdScan[1] = math.NaN(), math.NaN()
		if g := m.thresholdGrid(); len(g) > 0 {
			pr.ThresholdScan = [2]float64{g[0], g[len(g)-1]}
		}
		pr.Threshold = th
		pr.ThresholdHz = m.gammaBar * th
		pr.ThresholdUpper = up
	}
	return pr, nil
}

// defaultSpan is the default half-width (Hz) of a profile: twice the design
// bandwidth, at least half the sweep and 4/T.
func defaultSpan(p *Pulse) float64 {
	return math.Max(math.Max(2*p.Bandwidth, p.Sweep/2), 4/p.Duration())
}

// profilePoints is the default number of offsets of a profile of half-width
// span (Hz) for a pulse of duration T (s) and n samples: a step of at most
// 1/(12·T), so that the profile's finest features (side lobes and the nulls
// between them are about 1/T wide) are resolved whatever the sample count, and
// at least 401 points while that costs under 800 000 isochromat-steps (101 at
// least, 4001 at most). The crossings are then refined by simulation and the
// ripples read from resolved lobes, so the figures do not depend on how finely
// the same waveform is sampled.
func profilePoints(span, T float64, n int) int {
	resolved := 24*span*T + 1
	if !(resolved < 4001) {
		return 4001
	}
	return max(int(math.Ceil(resolved)), min(401, max(101, 800_000/max(1, n))))
}

// SliceThickness is the thickness (m) excited by a band of bandwidth Hz under a
// gradient G (T/m): bandwidth/(γ̄|G|) (common practice), γ in rad·s⁻¹·T⁻¹.
func SliceThickness(bandwidth, gamma, gradient float64) float64 {
	return bandwidth * 2 * math.Pi / math.Abs(gamma*gradient)
}

// ShiftPerPPM is the slice displacement (m) per ppm of chemical shift at field B0
// (T) under gradient G (T/m): a shift of 1 ppm is Δf = γ̄·B0·1e-6 Hz, and a
// frequency Δf moves the slice by Δf/(γ̄G) = (Δf/bandwidth)·thickness, so γ
// cancels: B0·1e-6/G. The sign follows G.
func ShiftPerPPM(field, gradient float64) float64 {
	return field * 1e-6 / gradient
}

type meter struct {
	ctx      context.Context
	p        *Pulse
	w        physics.Waveform
	role     Role
	gammaBar float64
	workers  int
	center   float64 // Hz, where the band is sought
	band     float64 // Hz, over whose central half the threshold is judged
	off, val []float64
	mid      int // index of the centre in off
	progress func(steps float64)
	steps    float64 // isochromat-steps of the simulations finished so far
}

func (m *meter) sim(offsets, scales []float64) (*physics.Result, error) {
	iso := physics.Grid(offsets, scales, nil, nil, nil)
	opt := physics.Options{Workers: m.workers}
	n := float64(m.w.Len())
	if m.progress != nil && iso.Len() > 1 {
		// m.steps is written only between simulations, so the workers read a
		// settled value.
		base := m.steps
		opt.Progress = func(done, _ int) { m.progress(base + float64(done)*n) }
	}
	r, err := physics.Simulate(m.ctx, &m.w, m.p.Gamma, &iso, opt)
	if err != nil {
		return nil, err
	}
	m.steps += float64(iso.Len()) * n
	if m.progress != nil {
		m.progress(m.steps)
	}
	return r, nil
}

// value is the role's profile quantity for isochromat i of r.
func (m *meter) value(r *physics.Result, i int) float64 {
	switch m.role {
	case RoleInvert:
		return (1 - r.Mz[i]) / 2
	case RoleRefocus:
		b := r.Beta[i]
		return real(b)*real(b) + imag(b)*imag(b)
	case RoleSaturate:
		return 1 - math.Abs(r.Mz[i])
	default:
		return math.Hypot(r.Mx[i], r.My[i])
	}
}

func (m *meter) at(f float64) (float64, error) {
	r, err := m.sim([]float64{f}, nil)
	if err != nil {
		return 0, err
	}
	return m.value(r, 0), nil
}

func (m *meter) profile(span float64, points int) error {
	c := m.center
	m.off = make([]float64, points)
	for i := range m.off {
		m.off[i] = c - span + 2*span*float64(i)/float64(points-1)
	}
	m.mid = points / 2
	m.off[m.mid] = c
	r, err := m.sim(m.off, nil)
	if err != nil {
		return err
	}
	m.val = make([]float64, points)
	for i := range m.val {
		m.val[i] = m.value(r, i)
	}
	return nil
}

func (m *meter) onBand() float64 { return m.val[m.mid] }

// crossing searches outward from the centre (dir ±1) for the first grid point
// below level and refines the crossing by bisection. ok is false when the
// profile stays at or above level to the end of the grid.
func (m *meter) crossing(level float64, dir int) (f float64, ok bool, err error) {
	i := m.mid
	for {
		j := i + dir
		if j < 0 || j >= len(m.val) {
			return math.NaN(), false, nil
		}
		if m.val[j] < level {
			break
		}
		i = j
	}
	// Regula falsi with the Illinois modification (Dowell & Jarratt, BIT 11:168,
	// 1971) on single-isochromat simulations, keeping the bracket
	// v(a) ≥ level > v(b); stops when the bracket is below 1e-9 of the grid
	// step or the value is within 1e-10 of the level.
	a, b := m.off[i], m.off[i+dir]
	fa, fb := m.val[i]-level, m.val[i+dir]-level
	tol := 1e-9 * math.Abs(b-a)
	x := (a + b) / 2
	side := 0
	for k := 0; k < 60 && math.Abs(b-a) > tol; k++ {
		x = b - fb*(b-a)/(fb-fa)
		if !(x > math.Min(a, b) && x < math.Max(a, b)) {
			x = (a + b) / 2
		}
		v, err := m.at(x)
		if err != nil {
			return 0, false, err
		}
		fx := v - level
		if math.Abs(fx) <= 1e-10 {
			return x, true, nil
		}
		if fx >= 0 {
			a, fa = x, fx
			if side == -1 {
				fb /= 2
			}
			side = -1
		} else {
			b, fb = x, fx
			if side == 1 {
				fa /= 2
			}
			side = 1
		}
	}
	return x, true, nil
}

// hasBand reports whether the profile has a band about its centre: an on-band
// value of at least a tenth of the profile's largest.
func (m *meter) hasBand() bool {
	top := 0.0
	for _, v := range m.val {
		top = math.Max(top, v)
	}
	v0 := m.onBand()
	return v0 > 1e-12 && v0 >= 0.1*top
}

// wideEnough tells whether a profile of half-width span shows the whole band
// with room for its transitions and stop band: both ends are below half the
// on-band value, and the band's half-level points lie within the inner half of
// the span (a file's waveform has no design bandwidth to size the span by).
func (m *meter) wideEnough(span float64) bool {
	v0 := m.onBand()
	if !m.hasBand() {
		return true // no band to find; widening would not help
	}
	half := v0 / 2
	if ref, ok := m.passValue(); ok {
		if !(v0 >= ref/2) {
			return true // the centre does not reach the band's half level
		}
		half = ref / 2
	}
	if !(m.val[0] < half && m.val[len(m.val)-1] < half) {
		return false
	}
	for _, dir := range []int{-1, 1} {
		i := m.mid
		for i+dir >= 0 && i+dir < len(m.val) && m.val[i+dir] >= half {
			i += dir
		}
		if math.Abs(m.off[i]-m.center) > span/2 {
			return false
		}
	}
	return true
}

func (m *meter) features(pr *Properties) error {
	v0 := m.onBand()
	pr.OnBand = v0
	ref, design := m.passValue()
	if !design {
		ref = v0
	}
	pr.PassValue, pr.PassDesign = ref, design
	if !m.hasBand() || !(v0 >= ref/2) || !(ref > 1e-12) {
		return nil
	}
	var cross [3][2]float64 // levels 0.5, 0.9, 0.1; sides left, right
	for k, lv := range []float64{0.5, 0.9, 0.1} {
		for s, dir := range []int{-1, 1} {
			f, ok, err := m.crossing(lv*ref, dir)
			if err != nil {
				return err
			}
			if !ok {
				f = math.NaN()
			}
			cross[k][s] = f
		}
	}
	pr.Edges = cross[0]
	pr.Bandwidth = cross[0][1] - cross[0][0]
	pr.Transition = ((cross[2][1] - cross[1][1]) + (cross[1][0] - cross[2][0])) / 2
	if math.IsNaN(pr.Bandwidth) || math.IsNaN(pr.Transition) {
		return nil
	}
	// The ripple in the role's quantity: Mz = 1 − 2v for inversion, and the
	// profile itself for the others (saturation: |Mz| = 1 − v).
	k := 1.0
	if m.role == RoleInvert {
		k = 2
	}
	c := (pr.Edges[0] + pr.Edges[1]) / 2
	pass, stop := math.NaN(), math.NaN()
	for i, f := range m.off {
		d := math.Abs(f - c)
		v := m.val[i]
		if d <= pr.Bandwidth/2-pr.Transition {
			pass = maxNaN(pass, k*math.Abs(v-ref))
		}
		if d >= pr.Bandwidth/2+pr.Transition {
			stop = maxNaN(stop, k*v)
		}
	}
	// The regions' ends, simulated: a region may begin on a steep slope (a
	// main lobe's tail), whose value there a grid point would miss.
	ends := []float64{c - pr.Bandwidth/2 - pr.Transition, c + pr.Bandwidth/2 + pr.Transition}
	inner := pr.Bandwidth/2 - pr.Transition
	if inner >= 0 {
		ends = append(ends, c-inner, c+inner)
	}
	r, err := m.sim(ends, nil)
	if err != nil {
		return err
	}
	for i := range ends {
		v := m.value(r, i)
		if i < 2 {
			stop = maxNaN(stop, k*v)
		} else {
			pass = maxNaN(pass, k*math.Abs(v-ref))
		}
	}
	pr.PassRipple, pr.StopRipple = pass, stop
	return nil
}

// passValue is the design pass-band value of the role's profile (see
// Properties.PassValue); ok is false where the design fixes none.
func (m *meter) passValue() (v float64, ok bool) {
	flip := m.p.nominalFlip()
	switch m.role {
	case RoleInvert, RoleSaturate:
		return 1, true
	case RoleRefocus:
		if !math.IsNaN(flip) {
			return sq(math.Sin(flip / 2)), true
		}
		return 1, m.p.Adiabatic
	case RoleExcite:
		if !math.IsNaN(flip) {
			return math.Abs(math.Sin(flip)), true
		}
		return 1, m.p.Adiabatic
	}
	if !math.IsNaN(flip) && !m.p.Adiabatic {
		return math.Abs(math.Sin(flip)), true
	}
	return math.NaN(), false
}

func maxNaN(a, b float64) float64 {
	if math.IsNaN(a) {
		return b
	}
	return math.Max(a, b)
}

// met reports, for each B1 scale, whether the role's target holds at every
// threshold offset.
func (m *meter) met(scales []float64) ([]bool, error) {
	ok, _, err := m.metNear(scales)
	return ok, err
}

// metNear is met, also giving for each scale the offset that misses the
// target the most (see ThresholdMiss).
func (m *meter) metNear(scales []float64) ([]bool, []ThresholdMiss, error) {
	offs := m.thresholdOffsets()
	r, err := m.sim(offs, scales)
	if err != nil {
		return nil, nil, err
	}
	ok := make([]bool, len(scales))
	worst := make([]ThresholdMiss, len(scales))
	for s := range ok {
		ok[s] = true
		worst[s].Miss = -1
	}
	peak := m.p.Peak()
	for io := range offs {
		for s := range scales {
			i := io*len(scales) + s
			var beta complex128
			if r.Beta != nil {
				beta = r.Beta[i]
			}
			ok[s] = ok[s] && m.p.TargetMet(m.role, r.Mx[i], r.My[i], r.Mz[i], beta)
			if d := m.p.targetMiss(m.role, r.Mx[i], r.My[i], r.Mz[i], beta); d > worst[s].Miss {
				worst[s] = ThresholdMiss{B1: scales[s] * peak, Offset: offs[io], Mx: r.Mx[i], My: r.My[i], Mz: r.Mz[i], Beta2: real(beta)*real(beta) + imag(beta)*imag(beta), Miss: d}
			}
		}
	}
	return ok, worst, nil
}

// ThresholdMiss describes where the threshold search came closest to the
// target without meeting it: at peak B1 (T), the offset (Hz) that missed it
// the most, the magnetization there from +z and |β|², and by how much it
// missed (in the units of the role's target, 0 when met).
type ThresholdMiss struct {
	B1, Offset, Mx, My, Mz, Beta2, Miss float64
}

// targetMiss is how far the magnetization is from Pulse.TargetMet's target,
// in the target's own units (0 when it is met).
func (p *Pulse) targetMiss(r Role, mx, my, mz float64, beta complex128) float64 {
	d := 0.0
	if p.Plane && !math.IsNaN(p.Flip) {
		s, c := math.Sincos(p.Axis)
		st, ct := math.Sincos(p.Flip)
		if p.Gamma < 0 {
			st = -st
		}
		ex, ey := -s*st, c*st
		sf, cf := math.Sincos(-math.Pi * p.Center * p.Duration())
		ex, ey = ex*cf-ey*sf, ex*sf+ey*cf
		d = math.Max(0, math.Sqrt(sq(mx-ex)+sq(my-ey)+sq(mz-ct))-(1-thresholdTarget))
	}
	flip := p.nominalFlip()
	var e float64
	switch r {
	case RoleInvert:
		e = mz + thresholdTarget
	case RoleExcite:
		s := 1.0
		if !math.IsNaN(flip) {
			s = math.Abs(math.Sin(flip))
		}
		e = thresholdTarget*s - math.Hypot(mx, my)
	case RoleRefocus:
		e = thresholdTarget - (real(beta)*real(beta) + imag(beta)*imag(beta))
	case RoleSaturate:
		e = math.Abs(mz) - (1 - thresholdTarget)
	default:
		e = math.Abs(mz-math.Cos(flip)) - (1 - thresholdTarget)
	}
	return math.Max(d, math.Max(0, e))
}

// TargetMet tells whether the magnetization after p from +z (and its β) meets
// the target of role r that the adiabatic threshold asks of every offset it
// checks: invert Mz ≤ −0.9; excite |Mxy| ≥ 0.9·sin θ (θ the nominal flip, 90°
// when there is none); refocus |β|² ≥ 0.9; saturate |Mz| ≤ 0.1; no role
// |Mz − cos θ| ≤ 0.1. A plane rotation (BIR-4) must also land within 0.1 of
// the rotation it promises, R(θ about the axis at its phase)·z =
// (−sin φ·sin θ, cos φ·sin θ, cos θ) (README conventions): its worth is that
// the phase holds too.
func (p *Pulse) TargetMet(r Role, mx, my, mz float64, beta complex128) bool {
	if p.Plane && !math.IsNaN(p.Flip) {
		// The promised vector in the frame of the pulse's centre, where the
		// phase is referenced at the pulse's midpoint; a negative γ turns the
		// other way. Back in the carrier frame at the pulse's end it has
		// precessed by −2π·center·T/2 (Mxy ∝ e^{−i2πΔf·t}, package physics).
		s, c := math.Sincos(p.Axis)
		st, ct := math.Sincos(p.Flip)
		if p.Gamma < 0 {
			st = -st
		}
		ex, ey := -s*st, c*st
		sf, cf := math.Sincos(-math.Pi * p.Center * p.Duration())
		ex, ey = ex*cf-ey*sf, ex*sf+ey*cf
		if math.Sqrt(sq(mx-ex)+sq(my-ey)+sq(mz-ct)) > 1-thresholdTarget {
			return false
		}
	}
	return TargetMet(r, p.nominalFlip(), mx, my, mz, beta)
}

// nominalFlip is the rotation p promises, NaN where it promises none: an
// imported waveform's Flip is the area of its samples, not a design.
func (p *Pulse) nominalFlip() float64 {
	if p.Shape == "import" {
		return math.NaN()
	}
	return p.Flip
}

func sq(x float64) float64 { return x * x }

// TargetMet is the role's target alone (see Pulse.TargetMet).
func TargetMet(r Role, flip, mx, my, mz float64, beta complex128) bool {
	switch r {
	case RoleInvert:
		return mz <= -thresholdTarget
	case RoleExcite:
		s := 1.0
		if !math.IsNaN(flip) {
			s = math.Abs(math.Sin(flip))
		}
		return math.Hypot(mx, my) >= thresholdTarget*s
	case RoleRefocus:
		return real(beta)*real(beta)+imag(beta)*imag(beta) >= thresholdTarget
	case RoleSaturate:
		return math.Abs(mz) <= 1-thresholdTarget
	}
	return math.Abs(mz-math.Cos(flip)) <= 1-thresholdTarget
}

func (m *meter) thresholdOffsets() []float64 {
	c, bw := m.center, m.band
	if !(bw > 0) {
		return []float64{c}
	}
	const k = thresholdOffsets
	offs := make([]float64, k)
	for i := range offs {
		offs[i] = c + bw/4*(2*float64(i)/(k-1)-1)
	}
	return offs
}

// thresholdGrid is the B1 grid (T) the threshold is scanned on: quarter
// octaves of nutation frequency γ̄B1 from ν/32 to 128ν (or 45° per sample, if
// lower), with ν = √(sweep/T)
// (the rate scale of a frequency sweep: adiabaticity asks (γ̄B1)² well above
// the sweep rate, Garwood & DelaBarre, J. Magn. Reson. 153:155, 2001) or 1/T
// without a sweep. It depends on the pulse's shape alone, never on the peak
// it was given, so the threshold does not either.
func (m *meter) thresholdGrid() []float64 {
	T := m.p.Duration()
	r := math.Max(m.band, m.p.Sweep)
	nu := 1 / T
	if r > 0 {
		nu = math.Sqrt(r / T)
	}
	// Above a nutation of 45° per sample the samples no longer describe the
	// shape (the piecewise-constant pulse is simulated exactly, but it is
	// another pulse): the scan stops there.
	dt := 0.0
	for _, d := range m.p.Wave.Dwell {
		dt = math.Max(dt, d)
	}
	top := math.Inf(1)
	if dt > 0 {
		top = 1 / (8 * dt)
	}
	g := make([]float64, 0, thresholdScans)
	for i := 0; i < thresholdScans; i++ {
		v := nu * math.Exp2(float64(i-thresholdScanLow)/4)
		if v > top && len(g) > thresholdHold+1 {
			break
		}
		g = append(g, v/m.gammaBar)
	}
	return g
}

// threshold finds the adiabatic threshold and the upper B1 limit (T, NaN where
// none) on the grid of thresholdGrid: the lowest grid B1 that meets the target
// with the next thresholdHold grid points (a guard against an isolated hit:
// the target must hold over at least half an octave of B1), refined by
// bisection against the grid point below to 1e-4 relative; then the first
// grid B1 above it that fails, refined the same way, is the upper limit.
func (m *meter) threshold() (th, upper float64, near ThresholdMiss, err error) {
	th, upper = math.NaN(), math.NaN()
	near = ThresholdMiss{B1: math.NaN(), Offset: math.NaN(), Mx: math.NaN(), My: math.NaN(), Mz: math.NaN(), Beta2: math.NaN(), Miss: math.NaN()}
	if m.role == RoleNone && math.IsNaN(m.p.nominalFlip()) {
		return th, upper, near, nil
	}
	peak := m.p.Peak()
	grid := m.thresholdGrid()
	scales := make([]float64, len(grid))
	for i, b := range grid {
		scales[i] = b / peak
	}
	ok, miss, err := m.metNear(scales)
	if err != nil {
		return th, upper, near, err
	}
	for i, w := range miss {
		if i == 0 || w.Miss < near.Miss {
			near = w
		}
	}
	lowest := -1
	for i := 0; i+thresholdHold < len(ok); i++ {
		all := true
		for j := i; j <= i+thresholdHold; j++ {
			all = all && ok[j]
		}
		if all {
			lowest = i
			break
		}
	}
	if lowest < 0 {
		return th, upper, near, nil
	}
	// edge bisects between a scale that fails (lo) and one that meets the
	// target (hi) or the other way round, returning the scale of the change.
	edge := func(fail, meet float64) (float64, error) {
		for math.Abs(meet-fail) > 1e-4*meet {
			mid := (fail + meet) / 2
			r, err := m.met([]float64{mid})
			if err != nil {
				return 0, err
			}
			if r[0] {
				meet = mid
			} else {
				fail = mid
			}
		}
		return meet, nil
	}
	if lowest == 0 {
		th = scales[0] * peak
	} else {
		s, err := edge(scales[lowest-1], scales[lowest])
		if err != nil {
			return th, upper, near, err
		}
		th = s * peak
	}
	for j := lowest + thresholdHold + 1; j < len(ok); j++ {
		if !ok[j] {
			s, err := edge(scales[j], scales[j-1])
			if err != nil {
				return th, upper, near, err
			}
			upper = s * peak
			break
		}
	}
	return th, upper, near, nil
}
