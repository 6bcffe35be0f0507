package present

// The wording of notes under tables and figures. A definition is given in
// full the first time in a session and then as its brief pointer to `help
// quantities` (the session decides which); the RF-safety caution is one short
// line wherever energy or B1rms is shown, pointing to `help safety`.

// EnergyCaution goes under every table or figure that shows energy or B1rms.
const EnergyCaution = "Energy and B1rms are relative, waveform-only estimates, not SAR: defer to the scanner's SAR supervision (`help safety`)."

// ImageCaution goes inside a figure's image that shows energy or B1rms: an
// image is saved and pasted where `help` cannot be reached, so it carries the
// caution in full.
const ImageCaution = "Energy and B1rms are relative, waveform-only estimates, not SAR: defer to the scanner's own SAR supervision, IEC 60601-2-33, local regulations and the site's MR safety officer."

// RippleNote states describe's definitions (help quantities).
const RippleNote = "Measured figures come from the simulated profile of the role's quantity (Mz for invert and saturate, |Mxy| for excite or no role, echo |β|² for refocus): FWHM is the width where it is half-way between its stop-band value and its design pass-band value (Mz = 0 for inversion, |Mxy| = sin flip / 2 for excitation; the centre's value where the design fixes none); the transition is the mean 90 %–10 % width of the two edges; pass ripple is the largest deviation from the pass-band value within the band edges moved inward by one transition width, stop ripple the largest deviation from the stop-band value beyond the edges moved outward by one transition width, both in % of M0 in that quantity (as slr's pass and stop are given). A sweep's feature table uses the same definitions on its points."

// RippleBrief stands for RippleNote after its first time in a session.
const RippleBrief = "Definitions of the measured figures: `help quantities`."

// HalfLevelNote explains the half level, the width and the ripples of a sweep's
// feature table, naming the regions the ripples cover; describe's ripple
// (shape.Measure) uses other regions, and the note says so.
const HalfLevelNote = "Measured from the swept points, with the definitions of describe (help quantities): half level midway between the magnetization far from the band (the start state; at b1 = 0 on a b1 axis) and the pass-band value (the design's: mz = cos flip, −1 for inversion, 0 for saturation, mxy = sin flip, echo = sin²(flip/2), 1 for an adiabatic pulse; otherwise the curve's extreme); width at half: the distance between the crossings around the band (the FWHM), \"—\" when the curve does not pass the half level and come back on both sides inside the window. Pass ripple: the largest distance from the pass-band value within the band edges moved inward by one 90 %–10 % transition width; stop ripple: the largest distance from the far-from-band value beyond the edges moved outward by one transition width; both in % of M0 in the quantity shown (for inversion, of Mz). Crossings are interpolated between points, so a coarse grid can miss a ripple's extreme; describe refines by simulation."

// HalfLevelBrief stands for HalfLevelNote after its first time in a session.
const HalfLevelBrief = "Definitions of half level, width and ripples: `help quantities`."
