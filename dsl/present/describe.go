package present

import (
	"fmt"
	"math"
)

// Value is a figure in the unit the study chose for it: V in Unit ("" a plain
// number; "%" and "°" follow the number without a space).
type Value struct {
	V    float64
	Unit string
}

func (v Value) String() string {
	s := Number(v.V)
	switch v.Unit {
	case "":
		return s
	case "%", "°":
		return s + v.Unit
	}
	return s + " " + UnitLabel(v.Unit)
}

// opt shows a measured figure, or "—" where there is none (NaN or infinite).
func opt(v Value, suffix string) string {
	if math.IsNaN(v.V) || math.IsInf(v.V, 0) {
		return "—"
	}
	return v.String() + suffix
}

// FieldValue is a B1 in µT with its nutation frequency γ̄B1 in Hz.
type FieldValue struct{ B1, Hz Value }

func (f FieldValue) String() string { return fmt.Sprintf("%s (%s)", f.B1, f.Hz) }

// PulseProperties is what describe measured on one pulse, with its design
// figures, as plain values: the study fills it (dsl/describe.go), and
// PropertiesTable shows it. Optional figures are nil; measured ones are NaN
// where the measurement found none.
type PulseProperties struct {
	Name, Shape, Nucleus string
	Duration             Value
	Samples              int
	Dwell                *Value // nil: a variable dwell (a train, an imported table)
	Peak                 FieldValue
	// Imported pulses have no design flip: Flip is the area γ|∫B1 dt| named
	// by Area ("area at the carrier", "area at its centre", "area following
	// its frequency"); FreqSweep is set when a file's frequency is modulated.
	Imported, FreqSweep bool
	Area                string
	Centre              *Value  // the band's carrier offset in Hz; nil at the carrier
	CentrePPM           float64 // the same in ppm once the field is set, else NaN
	Flip                Value   // nominal flip (NaN: none) or an imported pulse's area
	Rotation            Value   // simulated rotation at the centre
	Role                string  // "" none
	RoleQuantity        string  // the quantity the role's profile is measured in ("Mz", "|Mxy|", "echo |β|²")
	Sweep               *Value  // a frequency sweep that is not a design band
	Bandwidth           *Value  // the design bandwidth
	// The measured profile: FWHM at the half level between the stop-band
	// value and PassValue (the design's when PassDesign, else the centre's);
	// OnBand is the value at the centre.
	FWHM                   Value
	PassValue, OnBand      float64
	PassDesign             bool
	TBW                    float64 // the design TBW, 0 none
	TBWMeasured            float64 // the measured FWHM × duration, NaN none
	Transition             Value
	PassRipple, StopRipple float64 // fractions of M0, NaN none
	Threshold              *Threshold
	Energy                 float64 // ∫B1² dt in T²·s
	TR                     *Value  // the TR B1rms is taken at
	B1rms                  Value
	Gradient               *Value
	SliceDesign            *Value
	SliceFWHM              Value
	ShiftPerPPM            *Value // nil without a field
	Source                 string // the file an imported pulse came from
}

// Threshold is an adiabatic pulse's measured threshold as worded by the study
// (its reasons and warnings name the search it ran).
type Threshold struct {
	Label, Text string
	Upper       string // "" when no threshold was met
}

// PropertiesTable is the table describe shows under a pulse's waveform.
func PropertiesTable(p PulseProperties) [][]string {
	dwell := fmt.Sprintf("%d segments (variable dwell)", p.Samples)
	if p.Dwell != nil {
		dwell = fmt.Sprintf("%d (dwell %s)", p.Samples, p.Dwell)
	}
	rows := [][]string{
		{"shape", p.Shape},
		{"nucleus", p.Nucleus},
		{"duration", p.Duration.String()},
		{"samples", dwell},
		{"peak B1", p.Peak.String()},
	}
	rows = append(rows, p.centreFlipRows()...)
	rows = append(rows, []string{"rotation at centre (measured)", opt(p.Rotation, "")})
	if p.Role != "" {
		rows = append(rows, []string{"role", p.Role})
	}
	if p.Sweep != nil {
		rows = append(rows, []string{"frequency sweep", p.Sweep.String()})
	}
	if p.Bandwidth != nil {
		rows = append(rows, []string{"bandwidth (design)", p.Bandwidth.String()})
	}
	rows = append(rows, []string{"bandwidth (measured FWHM, " + p.halfLevelText() + ")", p.fwhmText()})
	if p.TBW != 0 {
		rows = append(rows, []string{"TBW (design)", Number(p.TBW)})
	}
	if !math.IsNaN(p.TBWMeasured) {
		rows = append(rows, []string{"TBW (measured, FWHM × duration)", Number(RoundSig(p.TBWMeasured, 6))})
	}
	pct := func(v float64) string {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return "—"
		}
		return Number(100*v) + " %"
	}
	rows = append(rows,
		[]string{"transition (measured, 90 %–10 %)", opt(p.Transition, "")},
		[]string{"ripple in " + p.RoleQuantity + " (measured, pass / stop)", pct(p.PassRipple) + " / " + pct(p.StopRipple) + " of M0"},
	)
	if th := p.Threshold; th != nil {
		rows = append(rows, []string{th.Label, th.Text})
		if th.Upper != "" {
			rows = append(rows, []string{"upper B1 limit (measured)", th.Upper})
		}
	}
	rows = append(rows, []string{"energy ∫B1² dt (relative)", Number(p.Energy*1e12*1e3) + " µT²·ms"})
	if p.TR != nil {
		rows = append(rows, []string{"B1rms at TR " + p.TR.String() + " (relative)", opt(p.B1rms, "")})
	}
	if p.Gradient != nil {
		rows = append(rows, []string{"gradient", p.Gradient.String()})
		if p.SliceDesign != nil {
			rows = append(rows, []string{"slice thickness (design)", p.SliceDesign.String()})
		}
		rows = append(rows, []string{"slice thickness (measured, FWHM)", opt(p.SliceFWHM, "")})
		if p.ShiftPerPPM != nil {
			rows = append(rows, []string{"chemical-shift displacement", opt(*p.ShiftPerPPM, " per ppm")})
		}
	}
	if p.Source != "" {
		rows = append(rows, []string{"imported from", p.Source})
	}
	return rows
}

// centreFlipRows give the centre and the flip: the design flip, or for an
// imported pulse the area where the file says it plays.
func (p PulseProperties) centreFlipRows() [][]string {
	var rows [][]string
	if p.Imported {
		// The file's samples carry no design flip; γ|∫B1 dt| is only the
		// area where the file says the pulse plays (the rotation is the
		// simulated one below).
		if p.Centre != nil {
			from := "centre (the file's frequency offset)"
			if p.FreqSweep {
				from = "centre (middle of the file's frequency sweep)"
			}
			rows = append(rows, []string{from, p.centreText()})
		}
		rows = append(rows, []string{p.Area + " (γ|∫B1 dt|)", p.Flip.String()})
	} else {
		if p.Centre != nil {
			rows = append(rows, []string{"centre (carrier offset of the band)", p.centreText()})
		}
		if !math.IsNaN(p.Flip.V) {
			rows = append(rows, []string{"flip (nominal)", p.Flip.String()})
		}
	}
	return rows
}

// centreText is the centre in Hz, and in ppm too once the field is set.
func (p PulseProperties) centreText() string {
	s := p.Centre.String()
	if !math.IsNaN(p.CentrePPM) {
		s += " (" + Number(RoundSig(p.CentrePPM, 6)) + " ppm)"
	}
	return s
}

// halfLevelText says where the FWHM is taken: "Mz = 0".
func (p PulseProperties) halfLevelText() string {
	if math.IsNaN(p.PassValue) {
		return "at half the centre value"
	}
	h := p.PassValue / 2
	switch p.Role {
	case "invert":
		return "Mz = " + Number(RoundSig(1-2*h, 4))
	case "saturate":
		return "Mz = " + Number(RoundSig(1-h, 4))
	}
	if !p.PassDesign {
		return p.RoleQuantity + " = " + Number(RoundSig(h, 4)) + ", half the centre value"
	}
	return p.RoleQuantity + " = " + Number(RoundSig(h, 4))
}

// fwhmText is the measured FWHM, or why there is none.
func (p PulseProperties) fwhmText() string {
	if !math.IsNaN(p.FWHM.V) {
		return p.FWHM.String()
	}
	if p.PassDesign && p.OnBand < p.PassValue/2 {
		return "— (the centre does not reach the half level)"
	}
	return "—"
}
