package present

import (
	"math"
	"slices"
	"strings"
	"testing"
)

// rowValue finds a property's value by its label.
func rowValue(rows [][]string, label string) (string, bool) {
	for _, r := range rows {
		if r[0] == label {
			return r[1], true
		}
	}
	return "", false
}

// TestPropertiesTableHandMade renders describe's table from values made here,
// with no pulse, simulation or session: an imported, frequency-swept pulse
// off the carrier whose centre does not reach the half level.
func TestPropertiesTableHandMade(t *testing.T) {
	nan := math.NaN()
	p := PulseProperties{
		Name: "f", Shape: "import", Nucleus: "1H",
		Duration: Value{2, "ms"}, Samples: 400,
		Peak:     FieldValue{Value{11.74, "uT"}, Value{500, "Hz"}},
		Imported: true, FreqSweep: true, Area: "area following its frequency",
		Centre: &Value{1.5, "kHz"}, CentrePPM: nan,
		Flip: Value{90, "°"}, Rotation: Value{nan, "°"},
		RoleQuantity: "|Mxy|", FWHM: Value{nan, "Hz"}, PassValue: 1, OnBand: 0.2, PassDesign: true,
		TBWMeasured: nan, Transition: Value{nan, "Hz"}, PassRipple: nan, StopRipple: 0.012,
		Energy: 1.2e-15, B1rms: Value{nan, "µT"},
	}
	rows := PropertiesTable(p)
	for _, c := range []struct{ label, want string }{
		{"samples", "400 segments (variable dwell)"},
		{"peak B1", "11.74 µT (500 Hz)"},
		{"centre (middle of the file's frequency sweep)", "1.5 kHz"},
		{"area following its frequency (γ|∫B1 dt|)", "90°"},
		{"rotation at centre (measured)", "—"},
		{"bandwidth (measured FWHM, |Mxy| = 0.5)", "— (the centre does not reach the half level)"},
		{"ripple in |Mxy| (measured, pass / stop)", "— / 1.2 % of M0"},
		{"energy ∫B1² dt (relative)", "1.2 µT²·ms"},
	} {
		if got, ok := rowValue(rows, c.label); !ok || got != c.want {
			t.Errorf("%s: got %q (row present %v), want %q", c.label, got, ok, c.want)
		}
	}
	for _, absent := range []string{"flip (nominal)", "role", "TBW (design)", "TBW (measured, FWHM × duration)", "gradient"} {
		if _, ok := rowValue(rows, absent); ok {
			t.Errorf("row %q shown for a pulse without it", absent)
		}
	}
	p.Dwell, p.CentrePPM = &Value{5, "us"}, -3.5
	rows = PropertiesTable(p)
	if got, _ := rowValue(rows, "samples"); got != "400 (dwell 5 µs)" {
		t.Errorf("samples with a uniform dwell: got %q", got)
	}
	if got, _ := rowValue(rows, "centre (middle of the file's frequency sweep)"); got != "1.5 kHz (-3.5 ppm)" {
		t.Errorf("centre with a field: got %q", got)
	}
}

// TestReportTableHandMade lays out a methods table from rows made here: the
// threshold column appears with one adiabatic pulse, an unmet threshold is
// marked and its reason noted, and no slice column appears without a gradient.
func TestReportTableHandMade(t *testing.T) {
	nan := math.NaN()
	rep := Report{Nucleus: "1H", Rows: []ReportRow{
		{Name: "a", Shape: "sinc", DurationMs: 2, Samples: 200, PeakUT: 5.871, PeakHz: 250, Flip: 90, Rotation: 89.99,
			BandwidthHz: 2001.2, TBW: 4, TBWMeasured: 4.0024, EnergyUT2ms: 0.0123, CentrePPM: nan, ThresholdUT: nan},
		{Name: "h", Shape: "hs", DurationMs: 10, Samples: 1000, PeakUT: 15, PeakHz: 638.6, Flip: nan, Rotation: 180,
			BandwidthHz: nan, TBWMeasured: nan, EnergyUT2ms: 1.5, CentrePPM: nan, Adiabatic: true, ThresholdUT: nan,
			ThresholdReason: "no peak B1 meets it", Role: "invert"},
	}}
	tab := ReportTable(rep)
	var heads []string
	for _, c := range tab.Columns {
		heads = append(heads, c.Name)
	}
	if !slices.Contains(heads, "adiabatic threshold") || !slices.Contains(heads, "role") || slices.Contains(heads, "gradient") || slices.Contains(heads, "centre") {
		t.Errorf("columns %v: want the threshold and role columns, no gradient or centre", heads)
	}
	if len(tab.Rows) != 2 || len(tab.Rows[0]) != len(heads) {
		t.Fatalf("%d rows of %d cells for %d columns", len(tab.Rows), len(tab.Rows[0]), len(heads))
	}
	h := tab.Rows[1]
	if h[6] != "180 (simulated)" || h[7] != "—" || h[8] != "—" || h[10] != "not met†" || h[11] != "invert" {
		t.Errorf("row of h: %q", h)
	}
	if a := tab.Rows[0]; a[8] != "4" || a[10] != "—" || a[11] != "—" {
		t.Errorf("row of a: %q", a)
	}
	if !strings.Contains(strings.Join(tab.Notes, "\n"), "† adiabatic threshold not met: h: no peak B1 meets it") {
		t.Errorf("notes do not give the unmet threshold's reason:\n%s", strings.Join(tab.Notes, "\n"))
	}
}
