// Package slr designs RF pulses by the Shinnar–Le Roux (SLR) transform (Pauly, Le
// Roux, Nishimura & Macovski, IEEE Trans. Med. Imaging 10:53, 1991).
//
// A pulse of N samples is modelled as N hard rotations, each centred in its sample
// and separated by free precession over one dwell Δt. Its rotation is then described
// by two polynomials in z⁻¹ = exp(−i·2π·f·Δt) of degree N−1, A(z) and B(z), with the
// Cayley–Klein parameters at offset f (Hz)
//
//	α(f) = z^{N/2}·A(z),  β(f) = z^{(N−1)/2}·B(z).
//
// Forward maps rotation angles per sample (rad, complex: angle·e^{i·phase}) to
// (A, B); Inverse maps (A, B) back. Both are exact to rounding for the hard-pulse
// model. The profile of a piecewise-constant pulse with the same per-sample
// rotations differs from that model by a small amount that grows with offset·Δt.
//
// Design (Pulse) makes β a digital filter: equiripple by the Parks–McClellan
// (Remez exchange) algorithm, least squares when the exchange fails, in linear,
// minimum or maximum phase; it converts profile ripples to filter ripples per role,
// completes α as the minimum-phase factor of 1 − |β|², and inverts to the RF.
// The filter is the published one: transition D∞/TBW of the band wide
// (Herrmann, Rabiner & Chan 1973), pass and stop edges (1 ∓ W)·TBW/(2T). Two
// departures, neither of which widens the transition: the amplitude at zero
// offset is pinned so that the on-resonance rotation is the nominal flip, and
// the transition is moved (by a few per cent at most) so that the role's own
// profile is half-way at TBW/(2T). Like every plain equiripple design, its flat
// stopband error puts spikes in the pulse's first and last samples (up to the
// peak itself for saturation and minimum-phase 180° designs at small TBW).
// PulseContext lets a long design be cancelled.
//
// Units are those of package physics: seconds, tesla, hertz, radians, rad·s⁻¹·T⁻¹.
// Filter frequencies (Band) are in cycles per sample, 0 to 0.5.
//
// Entry points: Pulse and PulseContext (a designed *shape.Pulse), Forward, Inverse, Profile, Remez,
// LeastSquares, MinimumPhase, DInf, Ripples.
package slr
