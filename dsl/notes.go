package dsl

import "strings"

// Notes under tables and figures: a definition is given in full the first time
// in a session and then as a pointer to `help quantities`, which holds every
// one in full; the RF-safety caution is one short line wherever energy or B1rms
// is shown, pointing to `help safety`.

// energyCaution goes under every table or figure that shows energy or B1rms.
const energyCaution = "Energy and B1rms are relative, waveform-only estimates, not SAR: defer to the scanner's SAR supervision (`help safety`)."

// imageCaution goes inside a figure's image that shows energy or B1rms: an
// image is saved and pasted where `help` cannot be reached, so it carries the
// caution in full.
const imageCaution = "Energy and B1rms are relative, waveform-only estimates, not SAR: defer to the scanner's own SAR supervision, IEC 60601-2-33, local regulations and the site's MR safety officer."

// safetyHelp is `help safety`: the full caution.
const safetyHelp = `RF safety
  Energy (∫B1² dt), B1rms (√(energy/TR)) and any SAR-related figure Nutate prints are
  relative, waveform-only estimates computed from the pulse's samples alone. They are
  not SAR: they know nothing of the coil, the body, the duty cycle of the whole
  sequence or the scanner's calibration. Defer to the scanner's own SAR supervision,
  IEC 60601-2-33, local regulations and the site's MR safety officer. Use these
  figures only to compare pulses with one another. RF heating can hurt people.`

// rippleNote states describe's definitions (help quantities).
const rippleNote = "Measured figures come from the simulated profile of the role's quantity (Mz for invert and saturate, |Mxy| for excite or no role, echo |β|² for refocus): FWHM is the width where it is half-way between its stop-band value and its design pass-band value (Mz = 0 for inversion, |Mxy| = sin flip / 2 for excitation; the centre's value where the design fixes none); the transition is the mean 90 %–10 % width of the two edges; pass ripple is the largest deviation from the pass-band value within the band edges moved inward by one transition width, stop ripple the largest deviation from the stop-band value beyond the edges moved outward by one transition width, both in % of M0 in that quantity (as slr's pass and stop are given). A sweep's feature table uses the same definitions on its points."

// rippleBrief stands for rippleNote after its first time in a session.
const rippleBrief = "Definitions of the measured figures: `help quantities`."

// halfLevelNote explains the half level, the width and the ripples of a sweep's
// feature table, naming the regions the ripples cover; describe's ripple
// (shape.Measure) uses other regions, and the note says so.
const halfLevelNote = "Measured from the swept points, with the definitions of describe (help quantities): half level midway between the magnetization far from the band (the start state; at b1 = 0 on a b1 axis) and the pass-band value (the design's: mz = cos flip, −1 for inversion, 0 for saturation, mxy = sin flip, echo = sin²(flip/2), 1 for an adiabatic pulse; otherwise the curve's extreme); width at half: the distance between the crossings around the band (the FWHM), \"—\" when the curve does not pass the half level and come back on both sides inside the window. Pass ripple: the largest distance from the pass-band value within the band edges moved inward by one 90 %–10 % transition width; stop ripple: the largest distance from the far-from-band value beyond the edges moved outward by one transition width; both in % of M0 in the quantity shown (for inversion, of Mz). Crossings are interpolated between points, so a coarse grid can miss a ripple's extreme; describe refines by simulation."

// halfLevelBrief stands for halfLevelNote after its first time in a session.
const halfLevelBrief = "Definitions of half level, width and ripples: `help quantities`."

// definitionNotes are the definitions given once per session, each under its
// heading in `help quantities`.
var definitionNotes = []struct{ Heading, Text string }{
	{"describe's measured figures", rippleNote},
	{"a sweep's feature table", halfLevelNote},
}

// definition returns full the first time it is asked for in the session (the
// state's record of it commits with the statement), brief afterwards.
func (s *state) definition(full, brief string) string {
	if s.shown[full] {
		return brief
	}
	if s.shown == nil {
		s.shown = map[string]bool{}
	}
	s.shown[full] = true
	return full
}

// definitionNotesHelp gives each definition note in full, wrapped, for
// `help quantities`.
func definitionNotesHelp() string {
	var b strings.Builder
	b.WriteString("Notes given once per session (later as a pointer here)")
	for _, d := range definitionNotes {
		b.WriteString("\n  " + d.Heading + ":")
		line := "   "
		for _, w := range strings.Fields(d.Text) {
			if len(line)+1+len(w) > 88 && strings.TrimSpace(line) != "" {
				b.WriteString("\n" + line)
				line = "   "
			}
			line += " " + w
		}
		b.WriteString("\n" + line)
	}
	return b.String()
}
