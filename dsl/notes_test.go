package dsl

import (
	"strings"
	"testing"

	"Nutate/dsl/present"
)

// `help quantities` holds every definition note in full (wrapped), since later
// answers point there instead of repeating it.
func TestHelpQuantitiesHoldsDefinitions(t *testing.T) {
	text, err := Help("quantities")
	if err != nil {
		t.Fatal(err)
	}
	flat := strings.Join(strings.Fields(text), " ")
	for _, d := range definitionNotes {
		if !strings.Contains(flat, strings.Join(strings.Fields(d.Text), " ")) {
			t.Errorf("help quantities lacks the full note %q", d.Heading)
		}
	}
}

// `help safety` holds the full caution the short line points to.
func TestHelpSafety(t *testing.T) {
	text, err := Help("safety")
	if err != nil {
		t.Fatal(err)
	}
	flat := strings.Join(strings.Fields(text), " ")
	for _, w := range []string{"relative, waveform-only estimates", "not SAR", "scanner's own SAR supervision", "IEC 60601-2-33", "local regulations", "MR safety officer"} {
		if !strings.Contains(flat, w) {
			t.Errorf("help safety lacks %q", w)
		}
	}
	if !strings.Contains(present.EnergyCaution, "`help safety`") || !strings.Contains(present.EnergyCaution, "waveform-only") {
		t.Errorf("the short caution %q should say waveform-only and point to help safety", present.EnergyCaution)
	}
}

// A definition note appears in full once per session, then as its pointer; a
// new session gives it in full again; `reset` does not. The energy caution is
// under every table that shows energy, once.
func TestDefinitionsOncePerSession(t *testing.T) {
	const src = "pulse p = sinc(duration = 2 ms, tbw = 4, flip = 90 deg)\n"
	const describe = "describe p\n"
	const sweep = "sweep p over offset -3 kHz to 3 kHz points 61\n"
	s := NewSession(t.TempDir())
	first := execText(t, s, src+describe+sweep)
	again := execText(t, s, describe+sweep)
	afterReset := execText(t, s, "reset\n"+src+describe+sweep)
	fresh := execText(t, NewSession(t.TempDir()), src+describe+sweep)
	for _, c := range []struct {
		name, text string
		full       bool
	}{{"first", first, true}, {"again", again, false}, {"after reset", afterReset, false}, {"new session", fresh, true}} {
		for _, n := range []struct{ full, brief string }{{present.RippleNote, present.RippleBrief}, {present.HalfLevelNote, present.HalfLevelBrief}} {
			if got := strings.Count(c.text, n.full); got != map[bool]int{true: 1, false: 0}[c.full] {
				t.Errorf("%s: full note %.30q %d times, want it %v", c.name, n.full, got, c.full)
			}
			if got := strings.Count(c.text, n.brief); got != map[bool]int{true: 0, false: 1}[c.full] {
				t.Errorf("%s: pointer %q %d times", c.name, n.brief, got)
			}
		}
		if got := strings.Count(c.text, present.EnergyCaution); got != 1 {
			t.Errorf("%s: energy caution %d times, want 1 (one describe table shows energy)", c.name, got)
		}
	}
}
