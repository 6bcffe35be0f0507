package dsl

import (
	"context"
	"fmt"
	"math"
	"strings"

	"Nutate/dsl/present"
	"Nutate/physics"
	"Nutate/physics/shape"
)

// meetsAdiabaticTarget reports whether an adiabatic pulse with a role meets its
// role's target at its own peak at the centre of its band. It costs one
// simulation of one spin, so a `pulse` statement can afford it where the
// threshold search cannot. A pulse that misses its target at the centre is below
// its threshold (shape.Measure asks the target of the centre among other
// offsets, and scans the pulse's own peak); the band's edges are left to the
// threshold itself, since some shapes never meet the target there at any peak.
// ok is true for pulses it does not apply to.
func meetsAdiabaticTarget(ctx context.Context, p *shape.Pulse) (bool, error) {
	if !p.Adiabatic || p.Role == shape.RoleNone || p.Peak() == 0 {
		return true, nil
	}
	offs := []float64{p.Center}
	w := p.Wave
	w.Gradient = nil
	r, err := physics.Simulate(ctx, &w, p.Gamma, &physics.Isochromats{Offset: offs}, physics.Options{})
	if err != nil {
		return false, err
	}
	for i := range offs {
		if !p.TargetMet(p.Role, r.Mx[i], r.My[i], r.Mz[i], r.Beta[i]) {
			return false, nil
		}
	}
	return true, nil
}

// roleVerb says what a pulse of the role does to its band.
func roleVerb(r shape.Role) string {
	switch r {
	case shape.RoleInvert:
		return "invert"
	case shape.RoleExcite:
		return "fully excite"
	case shape.RoleRefocus:
		return "refocus"
	case shape.RoleSaturate:
		return "saturate"
	}
	return "act on"
}

// pulseAction says what p does to object ("its band"): a plane rotation (bir4)
// is judged on its rotation, phase included, whatever its role.
func pulseAction(p *shape.Pulse, object string) string {
	if p.Plane {
		return "turn " + object + " as promised (phase included)"
	}
	return roleVerb(p.Role) + " " + object
}

// thresholdWarning is the plain warning for an adiabatic pulse played below its
// threshold, or above its upper B1 limit, or "" when the peak is enough. met is
// meetsAdiabaticTarget's answer, which speaks when no threshold was found.
func thresholdWarning(p *shape.Pulse, pr shape.Properties, met bool) string {
	gb := gammaBarOf(p)
	peak := fmtField(p.Peak(), gb)
	th, up := pr.Threshold, pr.ThresholdUpper
	switch {
	case !p.Adiabatic || (p.Role == shape.RoleNone && !p.Plane):
		return ""
	case !math.IsNaN(th) && th > p.Peak():
		return fmt.Sprintf("peak %s is below the adiabatic threshold %s: this pulse will not %s", peak, fmtField(th, gb), pulseAction(p, thresholdObject(p)))
	case !math.IsNaN(up) && p.Peak() >= up:
		return fmt.Sprintf("peak %s is above the upper B1 limit %s, where the target fails again: this pulse will not %s; keep the peak between %s and the limit", peak, fmtField(up, gb), pulseAction(p, thresholdObject(p)), fmtField(th, gb))
	case math.IsNaN(th) && !met:
		return fmt.Sprintf("peak %s does not %s, and no adiabatic threshold was found (`describe` says why)", peak, pulseAction(p, "even the centre of the band"))
	}
	return ""
}

// thresholdBanded reports whether p's threshold is judged over a band (±¼ of
// its design bandwidth, or of a file's sweep) rather than at its centre alone
// (BIR-4: no design band; see shape.Properties.Threshold).
func thresholdBanded(p *shape.Pulse) bool {
	return p.Bandwidth != 0 || (imported(p) && p.Sweep > 0)
}

// thresholdObject is what the threshold is judged on, for messages.
func thresholdObject(p *shape.Pulse) string {
	if thresholdBanded(p) {
		return "±¼ of its band"
	}
	return "its centre"
}

// thresholdLabel is the name of the threshold row, saying where it is judged.
func thresholdLabel(p *shape.Pulse) string {
	if thresholdBanded(p) {
		return "adiabatic threshold (measured, over ±¼ of the band)"
	}
	return "adiabatic threshold (measured, at the centre)"
}

// thresholdTargetText states the target the threshold asks of p.
func thresholdTargetText(p *shape.Pulse) string {
	var t string
	switch p.Role {
	case shape.RoleInvert:
		t = "Mz ≤ −0.9"
	case shape.RoleExcite:
		t = "|Mxy| ≥ 0.9·sin flip"
	case shape.RoleRefocus:
		t = "|β|² ≥ 0.9"
	case shape.RoleSaturate:
		t = "|Mz| ≤ 0.1"
	default:
		t = "|Mz − cos flip| ≤ 0.1"
	}
	if p.Plane {
		t += ", and M within 0.1 of the promised rotation, phase included"
	}
	return t
}

// thresholdReason says why an adiabatic pulse has no threshold (pr.Threshold is
// NaN): the target, where it is asked, the range of peak B1 searched, and where
// the search came closest.
func thresholdReason(p *shape.Pulse, pr shape.Properties) string {
	if !p.Adiabatic {
		return p.Shape + " is not an adiabatic pulse: a threshold applies to hsec, chirp, wurst, bir4 and swept imports"
	}
	if p.Role == shape.RoleNone && !p.Plane && (imported(p) || math.IsNaN(p.Flip)) {
		return "no target to meet: the pulse has no role and no nominal flip (give role)"
	}
	gb := gammaBarOf(p)
	where := "at every offset within ±¼ of the band"
	if !thresholdBanded(p) {
		where = "at the centre (it has no design band)"
	}
	s := fmt.Sprintf("no peak B1 from %s to %s meets the target (%s) %s over half an octave of B1 (the search range follows the sweep rate and stops at 45° of nutation per sample; the peak the pulse was given plays no part)", fmtField(pr.ThresholdScan[0], gb), fmtField(pr.ThresholdScan[1], gb), thresholdTargetText(p), where)
	if n := pr.ThresholdNear; !math.IsNaN(n.B1) {
		var got string
		switch p.Role {
		case shape.RoleInvert, shape.RoleSaturate:
			got = "Mz = " + present.Number(present.RoundSig(n.Mz, 3))
		case shape.RoleExcite:
			got = "|Mxy| = " + present.Number(present.RoundSig(math.Hypot(n.Mx, n.My), 3))
		case shape.RoleRefocus:
			got = "|β|² = " + present.Number(present.RoundSig(n.Beta2, 3))
		default:
			got = fmt.Sprintf("M = (%s, %s, %s)", present.Number(present.RoundSig(n.Mx, 3)), present.Number(present.RoundSig(n.My, 3)), present.Number(present.RoundSig(n.Mz, 3)))
		}
		s += fmt.Sprintf("; closest at %s, where the offset %s from the carrier reaches %s", fmtField(n.B1, gb), Quantity{n.Offset, dimFrequency}.String(), got)
	}
	return s
}

// thresholdText is the threshold as describe prints it: the value, or "not
// met: " and the reason.
func thresholdText(p *shape.Pulse, pr shape.Properties) string {
	if math.IsNaN(pr.Threshold) {
		return "not met: " + thresholdReason(p, pr)
	}
	s := fmtField(pr.Threshold, gammaBarOf(p))
	if w := amplitudeWarning("it", pr.Threshold, gammaBarOf(p)); w != "" {
		s += "; " + w
	}
	return s
}

// upperLimitText is the upper B1 limit as describe prints it.
func upperLimitText(p *shape.Pulse, pr shape.Properties) string {
	if math.IsNaN(pr.ThresholdUpper) {
		return "none up to " + fmtField(pr.ThresholdScan[1], gammaBarOf(p)) + " (the top of the search)"
	}
	return fmtField(pr.ThresholdUpper, gammaBarOf(p)) + " (the target fails again above it)"
}

// Plausible RF hardware (common practice): MRI body and head coils give tens of
// µT (1 to 2 kHz of nutation for 1H); NMR probes give up to about 100 kHz of
// nutation γ̄B1 (solid-state probes 100 to 250 kHz for 1H, a few mT), and no
// probe 10 mT. A pulse above either gets a warning, never a refusal: the
// physics holds at any amplitude.
const (
	hardwareNutation = 100e3 // Hz, γ̄B1
	hardwareB1       = 10e-3 // T
)

// hardwareField is the largest B1 (T) taken without a warning for a nucleus of
// γ̄ gammaBar (Hz/T): 100 kHz of nutation, at most 10 mT.
func hardwareField(gammaBar float64) float64 {
	gb := math.Abs(gammaBar)
	if gb == 0 {
		return hardwareB1
	}
	return math.Min(hardwareB1, hardwareNutation/gb)
}

// amplitudeWarning is the warning for a B1 (T) of what ("peak B1") beyond
// plausible hardware for a nucleus of γ̄ gammaBar, "" when within.
func amplitudeWarning(what string, b1, gammaBar float64) string {
	if !(math.Abs(b1) > hardwareField(gammaBar)) {
		return ""
	}
	return fmt.Sprintf("%s %s is beyond what RF hardware plausibly gives (warned above %s: 100 kHz of nutation γ̄B1, at most 10 mT; MRI coils give tens of µT, NMR probes up to about 100 kHz)", what, fmtFieldKHz(math.Abs(b1), gammaBar), fmtFieldKHz(hardwareField(gammaBar), gammaBar))
}

// fmtFieldKHz shows a B1 in µT and its nutation frequency in the unit that
// reads best (kHz for most probe fields).
func fmtFieldKHz(b, gammaBar float64) string {
	return fmt.Sprintf("%s (%s)", Quantity{b, dimField}.format("uT"), Quantity{b * math.Abs(gammaBar), dimFrequency}.String())
}

// sweepSamplingWarning warns when a frequency-swept pulse's samples are too
// coarse for its sweep: each sample holds the phase of B1 for a dwell, so at
// instantaneous frequency f the sample's field is weakened by sinc(π·f·dwell)
// (the spectrum of a sample-and-hold) and, from half a cycle per sample on,
// aliases to another frequency; and a nutation of more than 45° per sample
// no longer follows the turning effective field. "" when the samples are fine
// (the designed shapes default to at least 20 samples per cycle of the sweep's
// largest frequency: within about 0.4 %).
func sweepSamplingWarning(p *shape.Pulse) string {
	if p.Freq == nil || len(p.Freq) != p.Wave.Len() {
		return ""
	}
	cycles, nut := 0.0, 0.0 // largest cycles per sample of the sweep, turns of nutation per sample
	gb := gammaBarOf(p)
	for j, f := range p.Freq {
		dt := p.Wave.Dwell[j]
		if p.Wave.B1[j] == 0 {
			continue
		}
		cycles = math.Max(cycles, math.Abs(f)*dt)
		nut = math.Max(nut, gb*cmplxAbs(p.Wave.B1[j])*dt)
	}
	var why []string
	x := math.Pi * cycles
	switch {
	case cycles >= 0.5:
		why = append(why, fmt.Sprintf("the sweep reaches %s cycles per sample (%s samples per cycle of its largest frequency), where the sampled sweep aliases and plays elsewhere", present.Number(present.RoundSig(cycles, 3)), present.Number(present.RoundSig(1/cycles, 3))))
	case x > 0 && 1-math.Sin(x)/x >= 0.01:
		why = append(why, fmt.Sprintf("the sweep's largest frequency has %s samples per cycle, which weakens the field there by about %s %%", present.Number(present.RoundSig(1/cycles, 3)), present.Number(present.RoundSig(100*(1-math.Sin(x)/x), 2))))
	}
	if nut > 1.0/8 {
		why = append(why, fmt.Sprintf("the field nutates by up to %s deg per sample, too coarse to follow the turning effective field", present.Number(present.RoundSig(nut*360, 3))))
	}
	if len(why) == 0 {
		return ""
	}
	need := math.Ceil(float64(p.Wave.Len()) * math.Max(cycles/0.05, nut*8)) // 20 samples per cycle, 45° per sample
	return fmt.Sprintf("%s samples are too few for this frequency sweep: %s; the profile is distorted (about %s samples or more keep it faithful)", present.Number(float64(p.Wave.Len())), strings.Join(why, "; "), present.Number(need))
}

func cmplxAbs(z complex128) float64 { return math.Hypot(real(z), imag(z)) }
