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
// Unlike the plain equiripple filter, whose flat stopband error puts spikes in
// the pulse's end samples, the stopband weight rises away from the band edge, the
// transition width is solved for the asked ripple, and the amplitude at zero
// offset is pinned so that the on-resonance rotation is the nominal flip.
// PulseContext lets a long design be cancelled.
//
// Units are those of package physics: seconds, tesla, hertz, radians, rad·s⁻¹·T⁻¹.
// Filter frequencies (Band) are in cycles per sample, 0 to 0.5.
//
// Entry points: Pulse and PulseContext (a designed *shape.Pulse), Forward, Inverse, Profile, Remez,
// LeastSquares, MinimumPhase, DInf, Ripples.
package slr
