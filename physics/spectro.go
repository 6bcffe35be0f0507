package physics

import "math"

// Fields named by the proton frequency and absolute chemical shifts, as
// spectroscopists write them.

// ProtonGammaBar is γ/2π of the (unshielded) proton in Hz/T, CODATA 2018:
// 42.577478518 MHz/T. The nucleus table's "1H" uses this value.
const ProtonGammaBar = 42.577478518e6

// FieldFromProton returns the main field B0 (T) whose 1H resonance frequency is
// f (Hz): B0 = f / γ̄(1H), as magnets are named ("600 MHz" is 14.092 T). The
// unshielded proton's γ̄ is used; a sample's shielding (a few ppm) is left to
// the chemical shift.
func FieldFromProton(f float64) float64 { return f / ProtonGammaBar }

// ProtonFrequency returns the 1H resonance frequency (Hz) at field b0 (T), the
// inverse of FieldFromProton.
func ProtonFrequency(b0 float64) float64 { return b0 * ProtonGammaBar }

// ShiftOffset returns the offset (Hz, from the carrier) of a spin at absolute
// chemical shift delta (ppm) when the carrier sits at the shift carrier (ppm):
// Δf = (δ − δc)·1e-6·γ̄·B0, with gammaBar the nucleus's signed γ/2π (Hz/T) and
// b0 in tesla. The sign of γ̄ is kept, as everywhere offsets come from ppm in
// this engine: for a negative-γ nucleus (15N, 29Si, 129Xe) a higher shift is a
// more negative offset in the frame of the carrier, and a pulse centred at
// ShiftOffset(δ, ...) acts on the spins at δ whatever the sign of γ.
func ShiftOffset(delta, carrier, gammaBar, b0 float64) float64 {
	return (delta - carrier) * 1e-6 * gammaBar * b0
}

// OffsetShift is the inverse of ShiftOffset: the absolute shift (ppm) of a spin
// at offset (Hz) from a carrier at the shift carrier (ppm). It is NaN when
// γ̄·B0 is 0 (no field).
func OffsetShift(offset, carrier, gammaBar, b0 float64) float64 {
	s := gammaBar * b0
	if s == 0 {
		return math.NaN()
	}
	return carrier + offset/s*1e6
}
