package dsl

import (
	"strings"

	"Nutate/dsl/present"
)

// Notes under tables and figures: a definition is given in full the first time
// in a session and then as a pointer to `help quantities`, which holds every
// one in full; the RF-safety caution is one short line wherever energy or B1rms
// is shown, pointing to `help safety`.

// safetyHelp is `help safety`: the full caution.
const safetyHelp = `RF safety
  Energy (∫B1² dt), B1rms (√(energy/TR)) and any SAR-related figure Nutate prints are
  relative, waveform-only estimates computed from the pulse's samples alone. They are
  not SAR: they know nothing of the coil, the body, the duty cycle of the whole
  sequence or the scanner's calibration. Defer to the scanner's own SAR supervision,
  IEC 60601-2-33, local regulations and the site's MR safety officer. Use these
  figures only to compare pulses with one another. RF heating can hurt people.`

// definitionNotes are the definitions given once per session, each under its
// heading in `help quantities`.
var definitionNotes = []struct{ Heading, Text string }{
	{"describe's measured figures", present.RippleNote},
	{"a sweep's feature table", present.HalfLevelNote},
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
