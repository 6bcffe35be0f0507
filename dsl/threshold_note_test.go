package dsl

import (
	"strings"
	"testing"
)

// An adiabatic pulse whose role's target is never met (an HS8 of 8 ms sweeping
// 2 kHz stays near Mz = −0.88 at ±¼ of its band at any B1; checked by simulation)
// says so in describe and report instead of printing a bare dash.
func TestThresholdNotMetExplained(t *testing.T) {
	s := NewSession(t.TempDir())
	execText(t, s, "pulse hs8 = hsec(duration = 8 ms, bandwidth = 2 kHz, order = 8, peak = 14 uT, role = invert)")
	if out := execText(t, s, "describe hs8"); !strings.Contains(out, "adiabatic threshold") || !strings.Contains(out, "not met: no peak B1 from") || !strings.Contains(out, "closest at") {
		t.Errorf("describe does not explain the unmet threshold:\n%s", out)
	}
	if out := execText(t, s, "report hs8"); !strings.Contains(out, "not met†") || !strings.Contains(out, "† adiabatic threshold not met: hs8: no peak B1 from") {
		t.Errorf("report does not explain the unmet threshold:\n%s", out)
	}
}
