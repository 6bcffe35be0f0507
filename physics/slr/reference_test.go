package slr

import (
	"encoding/json"
	"fmt"
	"math"
	"math/cmplx"
	"os"
	"testing"

	"Nutate/physics/shape"
)

// refSLR is one row of ../../testdata/slr/slr_reference.json, written by
// gen_slr.py beside it: the published design (Pauly, Le Roux, Nishimura &
// Macovski, IEEE TMI 10:53, 1991) made independently with scipy.signal.remez,
// a numpy cepstrum and an inverse SLR written there, profiles by a Cayley–Klein
// simulation of the piecewise-constant RF.
type refSLR struct {
	Role         string  `json:"role"`
	FlipDeg      float64 `json:"flip_deg"`
	TBW          float64 `json:"tbw"`
	Phase        string  `json:"phase"`
	PassEdgeHz   float64 `json:"pass_edge_hz"`
	StopEdgeHz   float64 `json:"stop_edge_hz"`
	HalfHz       float64 `json:"half_hz"`
	PassRipple   float64 `json:"pass_ripple"`
	StopRipple   float64 `json:"stop_ripple"`
	TransitionHz float64 `json:"transition_hz"`
	PeakUT       float64 `json:"peak_ut"`
}

type refSLRFile struct {
	Duration float64  `json:"duration_s"`
	Samples  int      `json:"samples"`
	Ripple   float64  `json:"ripple"`
	Cases    []refSLR `json:"cases"`
}

// roleMeasure is the measurement gen_slr.py makes, on the profile of the role
// (excitation |Mxy|/sin θ, inversion and saturation Mz, refocusing |β|²) at
// offsets 0 to 2.5·TBW/T: the half-way offset, the largest deviations inside
// the published edges, and the transition from the last offset within twice
// the asked pass ripple to the first beyond which the profile stays within
// twice the asked stop ripple.
type roleMeasure struct {
	half, pass, stop, transition float64
}

func measureRole(t *testing.T, p *shape.Pulse, prof profileSpec, tbw, T, fp, fs, ripple float64, n int) roleMeasure {
	t.Helper()
	offs := offsets(0, 2.5*tbw/T, n)
	r := simulate(t, p, offs)
	v := make([]float64, n)
	for i := range offs {
		v[i] = prof.value(r.Mx[i], r.My[i], r.Mz[i], r.Beta[i])
	}
	pv, sv := prof.passTarget, prof.stopTarget
	mid := (pv + sv) / 2
	var m roleMeasure
	m.half = math.NaN()
	sgn := 1.0
	if pv < sv {
		sgn = -1
	}
	for i := 1; i < n; i++ {
		d0, d1 := sgn*(v[i-1]-mid), sgn*(v[i]-mid)
		if d0 >= 0 && d1 < 0 {
			m.half = offs[i-1] + (offs[i]-offs[i-1])*d0/(d0-d1)
			break
		}
	}
	firstOut, lastOut := -1, -1
	for i, f := range offs {
		if f <= fp {
			m.pass = math.Max(m.pass, math.Abs(v[i]-pv))
		}
		if f >= fs {
			m.stop = math.Max(m.stop, math.Abs(v[i]-sv))
		}
		if firstOut < 0 && math.Abs(v[i]-pv) > 2*ripple {
			firstOut = i
		}
		if math.Abs(v[i]-sv) > 2*ripple {
			lastOut = i
		}
	}
	pe := 0.0
	if firstOut > 0 {
		pe = offs[firstOut-1]
	}
	se := offs[min(lastOut+1, n-1)]
	m.transition = se - pe
	return m
}

// Every role × TBW 4/8/12 × linear and minimum phase (8 ms, 256 samples,
// 1 %/1 %) against the independent scipy design of the published method:
// the published transition width (D∞, Pauly et al. 1991) with its centre
// within 5 % of the published one; the role's profile half-way at TBW/(2T)
// within 2 % (CHECKS.md); pass and stop ripple inside the edges within 2× of
// the asked (CHECKS.md); the transition no wider than the reference's plus
// 10 %.
func TestAgainstScipyReference(t *testing.T) {
	raw, err := os.ReadFile("../../testdata/slr/slr_reference.json")
	if err != nil {
		t.Fatal(err)
	}
	var ref refSLRFile
	if err := json.Unmarshal(raw, &ref); err != nil {
		t.Fatal(err)
	}
	if len(ref.Cases) != 30 {
		t.Fatalf("reference has %d cases, want 30 (5 roles × 3 TBW × 2 phases)", len(ref.Cases))
	}
	g := proton(t)
	T := ref.Duration
	for _, rc := range ref.Cases {
		t.Run(fmt.Sprintf("%s%g_tbw%g_%s", rc.Role, rc.FlipDeg, rc.TBW, rc.Phase), func(t *testing.T) {
			var prof profileSpec
			found := false
			for _, p := range roleProfiles {
				if p.role.String() == rc.Role && (p.role != shape.RoleExcite || math.Abs(p.flip-deg(rc.FlipDeg)) < 1e-9) {
					prof, found = p, true
				}
			}
			if !found {
				t.Fatalf("no profile for %s %g°", rc.Role, rc.FlipDeg)
			}
			d, ok := ParseDesign(rc.Phase)
			if !ok {
				t.Fatalf("design %q", rc.Phase)
			}
			spec := NewSpec(prof.role)
			spec.TBW, spec.PassRipple, spec.StopRipple, spec.Design = rc.TBW, ref.Ripple, ref.Ripple, d
			cm := shape.NewCommon()
			cm.Duration, cm.Samples = T, ref.Samples
			if prof.role == shape.RoleExcite {
				cm.Flip = prof.flip
			}
			p, info, err := PulseInfo(spec, cm, g)
			if err != nil {
				t.Fatal(err)
			}
			// The published transition width; its centre moved by at most a
			// few per cent so that the role's profile is half-way at TBW/(2T).
			// For 90° excitation both designs fit the width to the levelled
			// error (the amendment, see shaping.fit and gen_slr.py), each to
			// within 0.85 to 1 × δ1 on its own grid: 3 % (measured 1.5 %).
			tol := 1e-9 * rc.StopEdgeHz
			if prof.role == shape.RoleExcite && rc.FlipDeg == 90 {
				tol = 0.03 * (rc.StopEdgeHz - rc.PassEdgeHz)
			}
			within(t, "transition width (Hz)", info.StopEdge-info.PassEdge, rc.StopEdgeHz-rc.PassEdgeHz, tol)
			shift := (info.PassEdge+info.StopEdge)/(rc.PassEdgeHz+rc.StopEdgeHz) - 1
			t.Logf("transition centre moved by %+.2f %% from the published one", 100*shift)
			if math.Abs(shift) > 0.05 {
				t.Errorf("transition centre moved by %+.2f %%, want within 5 %%", 100*shift)
			}
			m := measureRole(t, p, prof, rc.TBW, T, info.PassEdge, info.StopEdge, ref.Ripple, 20001)
			peak := 0.0
			for _, b := range p.Wave.B1 {
				peak = math.Max(peak, cmplx.Abs(b))
			}
			t.Logf("half %.2f Hz (ref %.2f), ripple pass %.4f (ref %.4f) stop %.4f (ref %.4f), transition %.1f Hz (ref %.1f), peak %.2f µT (ref %.2f)",
				m.half, rc.HalfHz, m.pass, rc.PassRipple, m.stop, rc.StopRipple, m.transition, rc.TransitionHz, peak*1e6, rc.PeakUT)
			want := rc.TBW / (2 * T)
			if math.Abs(m.half-want) > 0.02*want {
				t.Errorf("half-way at %.2f Hz, want %.2f ± 2 %%", m.half, want)
			}
			// Within 2× of the asked, or (where the published design itself
			// misses that: 90° minimum phase at TBW 4) within 1.25× of the
			// reference's own ripple.
			if m.pass > math.Max(2*ref.Ripple, 1.25*rc.PassRipple) {
				t.Errorf("pass ripple %.4f, want ≤ 2 × %g (reference %.4f)", m.pass, ref.Ripple, rc.PassRipple)
			}
			if m.stop > math.Max(2*ref.Ripple, 1.25*rc.StopRipple) {
				t.Errorf("stop ripple %.4f, want ≤ 2 × %g (reference %.4f)", m.stop, ref.Ripple, rc.StopRipple)
			}
			if m.transition > 1.1*rc.TransitionHz {
				t.Errorf("transition %.1f Hz, want ≤ 1.1 × %.1f (reference)", m.transition, rc.TransitionHz)
			}
		})
	}
}
