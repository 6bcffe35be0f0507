package physics

import (
	"context"
	"encoding/json"
	"math"
	"os"
	"strings"
	"testing"
)

type avgTable struct {
	Generator  string
	Provenance string
	Cases      []struct {
		Name         string
		W1, Duration float64
		Offset       float64
		T1, T2       refValue
		Setting      string
		Lo, Hi       float64
		Want         [3]float64
		Single       []float64
		ClosedFormMy float64 `json:"closed_form_my"`
	}
	GaussLegendre []struct {
		N    int
		X, W []float64
	} `json:"gauss_legendre"`
}

func readAvgTable(t *testing.T) avgTable {
	t.Helper()
	raw, err := os.ReadFile("../testdata/reference/average_reference.json")
	if err != nil {
		t.Fatal(err)
	}
	var tab avgTable
	if err := json.Unmarshal(raw, &tab); err != nil {
		t.Fatal(err)
	}
	if !strings.Contains(tab.Generator, "gen_average.py") || !strings.Contains(tab.Provenance, "leggauss") {
		t.Fatalf("table provenance %q / %q, want gen_average.py with numpy leggauss", tab.Generator, tab.Provenance)
	}
	return tab
}

// Nodes and weights against numpy's leggauss (../testdata/reference/
// gen_average.py), halved to a mean; tolerance 1e-13.
func TestGaussLegendreReference(t *testing.T) {
	tab := readAvgTable(t)
	if len(tab.GaussLegendre) < 5 {
		t.Fatalf("%d rules in the table, want at least 5", len(tab.GaussLegendre))
	}
	for _, g := range tab.GaussLegendre {
		x, w := GaussLegendre(g.N, -1, 1)
		if len(x) != g.N || len(w) != g.N {
			t.Fatalf("n = %d: got %d nodes, %d weights", g.N, len(x), len(w))
		}
		for i := range x {
			if math.Abs(x[i]-g.X[i]) > 1e-13 || math.Abs(w[i]-g.W[i]) > 1e-13 {
				t.Errorf("n = %d, node %d: got (%.16g, %.16g), want (%.16g, %.16g)", g.N, i, x[i], w[i], g.X[i], g.W[i])
			}
		}
	}
	if x, w := GaussLegendre(0, 0, 1); x != nil || w != nil {
		t.Errorf("n = 0: got %v %v, want nil", x, w)
	}
}

// An n-point rule averages polynomials of degree up to 2n−1 exactly on any
// interval (Abramowitz & Stegun 25.4.29): the mean of x^k over [a, b] is
// (b^(k+1) − a^(k+1))/((k+1)(b − a)); degree 2n is not exact.
func TestGaussLegendreExactness(t *testing.T) {
	for _, n := range []int{1, 2, 3, 4, 7, 10} {
		a, b := 0.0, 2.0
		x, w := GaussLegendre(n, a, b)
		for k := 0; k <= 2*n; k++ {
			got := 0.0
			for i := range x {
				got += w[i] * math.Pow(x[i], float64(k))
			}
			want := (math.Pow(b, float64(k+1)) - math.Pow(a, float64(k+1))) / (float64(k+1) * (b - a))
			exact := math.Abs(got-want) <= 1e-13*math.Max(1, math.Abs(want))
			if k <= 2*n-1 && !exact {
				t.Errorf("n = %d, degree %d: got %.16g, want %.16g", n, k, got, want)
			}
			if k == 2*n && exact {
				t.Errorf("n = %d, degree %d: exact, want a (small) error beyond 2n−1", n, k)
			}
		}
	}
}

func avgCase(t *testing.T, name string) (w *Waveform, iso Isochromats, s Spread, want [3]float64, single []float64, closed float64) {
	t.Helper()
	for _, c := range readAvgTable(t).Cases {
		if c.Name != name {
			continue
		}
		w = &Waveform{Dwell: []float64{c.Duration}, B1: []complex128{complex(c.W1, 0)}}
		iso = Isochromats{Offset: []float64{c.Offset}, T1: []float64{float64(c.T1)}, T2: []float64{float64(c.T2)}}
		s = Spread{Lo: c.Lo, Hi: c.Hi}
		switch c.Setting {
		case "offset":
			s.Setting = SpreadOffset
		case "b1":
			s.Setting = SpreadB1
		case "t2":
			s.Setting = SpreadT2
		default:
			t.Fatalf("case %q: setting %q", name, c.Setting)
		}
		return w, iso, s, c.Want, c.Single, c.ClosedFormMy
	}
	t.Fatalf("no case %q in the reference table", name)
	return
}

// Averages over a uniform spread against scipy's adaptive quadrature of the
// matrix-exponential solution (../testdata/reference/gen_average.py), with the
// automatic rule at tolerance 1e-8; tolerance 1e-6 (CHECKS.md).
func TestAveragedReference(t *testing.T) {
	tab := readAvgTable(t)
	if len(tab.Cases) < 4 {
		t.Fatalf("%d cases, want at least 4", len(tab.Cases))
	}
	for _, c := range tab.Cases {
		t.Run(c.Name, func(t *testing.T) {
			w, iso, s, want, _, _ := avgCase(t, c.Name)
			a, err := SimulateAveraged(context.Background(), w, 1, &iso, []Spread{s}, Options{}, AverageOptions{Tolerance: 1e-8})
			if err != nil {
				t.Fatal(err)
			}
			if !a.Converged {
				t.Errorf("not converged: change %g with %v points", a.Change, a.Points)
			}
			checkVec(t, "average", [3]float64{a.Mx[0], a.My[0], a.Mz[0]}, want, 1e-6)
		})
	}
}

// A hard 90° pulse (B1 along +x, positive γ: +z to +y) averaged over B1 scale
// 50–150 % gives My = mean of sin(πs/2) over [0.5, 1.5] = 2√2/π = 0.9003163
// (closed form; the reference table's quad agrees), Mx = 0, Mz = mean of
// cos(πs/2) = 0. The automatic rule at its default tolerance is within 1e-6.
func TestAveragedHard90OverB1(t *testing.T) {
	w, iso, s, _, _, closed := avgCase(t, "hard 90 over b1 50-150 %")
	if want := 2 * math.Sqrt2 / math.Pi; math.Abs(closed-want) > 1e-12 {
		t.Fatalf("reference closed form %v, want 2√2/π = %v", closed, want)
	}
	a, err := SimulateAveraged(context.Background(), w, 1, &iso, []Spread{s}, Options{}, AverageOptions{})
	if err != nil {
		t.Fatal(err)
	}
	checkVec(t, "hard 90 averaged", [3]float64{a.Mx[0], a.My[0], a.Mz[0]}, [3]float64{0, 2 * math.Sqrt2 / math.Pi, 0}, 1e-6)
	if !a.Converged || a.Points[0] < 16 {
		t.Errorf("rule: converged %v with %v points, want converged after at least one doubling", a.Converged, a.Points)
	}
}

// The quadrature error falls as the rule is refined: for the 2 s
// presaturation over B1 80–120 % (50.6 nutations, an oscillating integrand),
// the error against the reference falls from rule to rule once the rule
// resolves the oscillation, to rounding level; the automatic rule starts where
// it resolves it, and its Change bounds its actual error.
func TestAveragedConverges(t *testing.T) {
	w, iso, s, want, _, _ := avgCase(t, "presat 2 s over b1 80-120 %")
	var errs []float64
	for _, n := range []int{8, 16, 24, 32, 40, 48, 56, 64, 72} {
		s.Points = n
		a, err := SimulateAveraged(context.Background(), w, 1, &iso, []Spread{s}, Options{}, AverageOptions{})
		if err != nil {
			t.Fatal(err)
		}
		e := math.Max(math.Abs(a.Mx[0]-want[0]), math.Max(math.Abs(a.My[0]-want[1]), math.Abs(a.Mz[0]-want[2])))
		errs = append(errs, e)
	}
	// Below about 40 points (a quarter of the 127 rad of nutation across the
	// spread) the rule does not resolve the oscillation; from there on the
	// error falls until it reaches rounding.
	for i := 4; i < len(errs); i++ {
		if !(errs[i] < errs[i-1]) && errs[i] > 1e-13 {
			t.Errorf("error with rule %d is %g, not below the previous %g (all: %g)", i, errs[i], errs[i-1], errs)
		}
	}
	if last := errs[len(errs)-1]; last > 1e-13 {
		t.Errorf("error with 72 points %g, want < 1e-13 (all: %g)", last, errs)
	}
	s.Points = 0
	a, err := SimulateAveraged(context.Background(), w, 1, &iso, []Spread{s}, Options{}, AverageOptions{Tolerance: 1e-5})
	if err != nil {
		t.Fatal(err)
	}
	e := math.Max(math.Abs(a.My[0]-want[1]), math.Abs(a.Mz[0]-want[2]))
	if !a.Converged || e > math.Max(a.Change, 1e-13) || e > 1e-5 {
		t.Errorf("automatic rule: error %g, change %g, converged %v with %v points", e, a.Change, a.Converged, a.Points)
	}
}

// A 2 s presaturation (25.3 Hz of B1 on resonance) leaves one isochromat
// without relaxation at Mz = cos(0.6 turn) = −0.81; averaged over B1 80–120 %
// the nutations dephase and |Mz| < 0.01; with T1 1.5 s, T2 80 ms (a Lorentzian
// line of 4 Hz FWHM) averaged over a further uniform line of ±5 Hz, and with T2
// spread over 50–150 ms, |Mz| < 0.01 too. A uniform line of ±5 Hz alone, without
// relaxation, does not saturate (its nutation rates differ by at most 0.5 Hz,
// one turn in 2 s): Mz = −0.075 there, checked against the reference only.
func TestAveragedPresaturation(t *testing.T) {
	for _, name := range []string{"presat 2 s over b1 80-120 %", "presat 2 s relaxing over offset -5..5 Hz", "presat 2 s over t2 50-150 ms"} {
		w, iso, s, _, single, _ := avgCase(t, name)
		r := sim(t, w, 1, &iso, Options{})
		if name == "presat 2 s over b1 80-120 %" && math.Abs(r.Mz[0]-single[2]) > 1e-6 {
			t.Errorf("%s: one isochromat Mz = %.6f, want %.6f", name, r.Mz[0], single[2])
		}
		a, err := SimulateAveraged(context.Background(), w, 1, &iso, []Spread{s}, Options{}, AverageOptions{})
		if err != nil {
			t.Fatal(err)
		}
		if math.Abs(a.Mz[0]) > 0.01 {
			t.Errorf("%s: averaged Mz = %.4f, want |Mz| < 0.01 (one isochromat: %.4f)", name, a.Mz[0], r.Mz[0])
		}
	}
}

// Several isochromats, two spreads (a product rule), several workers: each
// isochromat's average equals the one computed alone, bit for bit, and the
// echo average is the mean of −β² (for a hard 180° over B1 80–120 %: mean of
// sin²(πs/2) = 1/2 + sin(0.4π)·... computed here by the same rule from the
// closed form |β|² = sin²(θ/2) on resonance, Pauly et al. 1991).
func TestAveragedProductAndEcho(t *testing.T) {
	w := &Waveform{Dwell: []float64{500e-6}, B1: []complex128{complex(2*math.Pi*1000, 0)}}
	spreads := []Spread{{Setting: SpreadB1, Lo: 0.8, Hi: 1.2, Points: 12}, {Setting: SpreadOffset, Lo: -50, Hi: 50, Points: 9}}
	all := Grid([]float64{0, 300, -700}, nil, nil, nil, nil)
	a, err := SimulateAveraged(context.Background(), w, 1, &all, spreads, Options{Workers: 2}, AverageOptions{})
	if err != nil {
		t.Fatal(err)
	}
	for i, off := range all.Offset {
		one := Grid([]float64{off}, nil, nil, nil, nil)
		b, err := SimulateAveraged(context.Background(), w, 1, &one, spreads, Options{Workers: 1}, AverageOptions{})
		if err != nil {
			t.Fatal(err)
		}
		if a.Mx[i] != b.Mx[0] || a.My[i] != b.My[0] || a.Mz[i] != b.Mz[0] || a.Echo[i] != b.Echo[0] {
			t.Errorf("offset %v: together (%v %v %v %v), alone (%v %v %v %v)", off, a.Mx[i], a.My[i], a.Mz[i], a.Echo[i], b.Mx[0], b.My[0], b.Mz[0], b.Echo[0])
		}
	}
	// On resonance, B1 spread only: |β|² = sin²(πs/2), echo −β² real and
	// negative of... its magnitude mean is mean sin²(πs/2) over [0.8, 1.2] =
	// 1/2 − (sin(1.2π) − sin(0.8π))/(2π·0.4) (closed form).
	one := Grid([]float64{0}, nil, nil, nil, nil)
	b, err := SimulateAveraged(context.Background(), w, 1, &one, spreads[:1], Options{}, AverageOptions{})
	if err != nil {
		t.Fatal(err)
	}
	want := 0.5 - (math.Sin(1.2*math.Pi)-math.Sin(0.8*math.Pi))/(2*math.Pi*0.4)
	if got := real(b.Echo[0]) * -1; math.Abs(math.Abs(got)-want) > 1e-9 || math.Abs(imag(b.Echo[0])) > 1e-9 {
		t.Errorf("echo average %v, want magnitude %v, real", b.Echo[0], want)
	}
}

// Bad spreads are refused with a message, never a panic.
func TestAveragedErrors(t *testing.T) {
	w := &Waveform{Dwell: []float64{1e-3}, B1: []complex128{1}}
	iso := Isochromats{}
	for _, tc := range []struct {
		spreads []Spread
		aopt    AverageOptions
		want    string
	}{
		{[]Spread{{Setting: SpreadB1, Lo: 1.2, Hi: 0.8}}, AverageOptions{}, "want the low end first"},
		{[]Spread{{Setting: SpreadB1, Lo: math.NaN(), Hi: 1}}, AverageOptions{}, "want finite ends"},
		{[]Spread{{Setting: SpreadT2, Lo: 0, Hi: 0.1}}, AverageOptions{}, "want a positive time"},
		{[]Spread{{Setting: SpreadB1, Lo: 0.8, Hi: 1.2, Points: -1}}, AverageOptions{}, "want at least 1"},
		{[]Spread{{Setting: SpreadB1, Lo: 0.8, Hi: 1.2}, {Setting: SpreadB1, Lo: 0.9, Hi: 1}}, AverageOptions{}, "spread twice"},
		{[]Spread{{Setting: SpreadSetting(9), Lo: 0, Hi: 1}}, AverageOptions{}, "want offset, b1 or t2"},
		{[]Spread{{Setting: SpreadB1, Lo: 0.8, Hi: 1.2, Points: 100}}, AverageOptions{MaxPoints: 50}, "want at most 50 points"},
		{[]Spread{{Setting: SpreadB1, Lo: 0.8, Hi: 1.2}}, AverageOptions{Tolerance: -1}, "want a positive number"},
	} {
		_, err := SimulateAveraged(context.Background(), w, 1, &iso, tc.spreads, Options{}, tc.aopt)
		if err == nil || !strings.Contains(err.Error(), tc.want) {
			t.Errorf("%+v: got %v, want an error saying %q", tc.spreads, err, tc.want)
		}
	}
	// A zero-width spread is one point; the rule then has nothing to refine.
	a, err := SimulateAveraged(context.Background(), w, 1, &iso, []Spread{{Setting: SpreadOffset, Lo: 5, Hi: 5}}, Options{}, AverageOptions{})
	if err != nil || a.Points[0] != 1 || !a.Converged {
		t.Errorf("zero-width spread: got %+v, %v", a, err)
	}
}

// AverageOver around a simulation of its own: two hard 90° pulses in a row
// (the second applied per isochromat through its Cayley–Klein parameters,
// Rotate) averaged over B1 80–120 % and a ±200 Hz line equal the average of
// one hard pulse of twice the duration (the same rotation) to 1e-12, and
// Expand and Reduce keep each isochromat's points together.
func TestAverageOverSequence(t *testing.T) {
	half := &Waveform{Dwell: []float64{250e-6}, B1: []complex128{complex(2*math.Pi*1000, 0)}}
	whole := &Waveform{Dwell: []float64{500e-6}, B1: []complex128{complex(2*math.Pi*1000, 0)}}
	iso := Grid([]float64{0, 400, -900}, nil, nil, nil, nil)
	spreads := []Spread{{Setting: SpreadB1, Lo: 0.8, Hi: 1.2}, {Setting: SpreadOffset, Lo: -200, Hi: 200}}
	aopt := AverageOptions{Tolerance: 1e-10, FirstPoints: 8, Steps: 2}
	got, info, err := AverageOver(context.Background(), &iso, spreads, aopt, func(ex *Isochromats) ([][]float64, error) {
		r1, err := Simulate(context.Background(), half, 1, ex, Options{})
		if err != nil {
			return nil, err
		}
		mx, my, mz := make([]float64, ex.Len()), make([]float64, ex.Len()), make([]float64, ex.Len())
		for i := range mx {
			mx[i], my[i], mz[i] = Rotate(r1.Alpha[i], r1.Beta[i], [3]float64{r1.Mx[i], r1.My[i], r1.Mz[i]})
		}
		return [][]float64{mx, my, mz}, nil
	})
	if err != nil {
		t.Fatal(err)
	}
	want, err := SimulateAveraged(context.Background(), whole, 1, &iso, []Spread{
		{Setting: SpreadB1, Lo: 0.8, Hi: 1.2, Points: info.Points[0]},
		{Setting: SpreadOffset, Lo: -200, Hi: 200, Points: info.Points[1]},
	}, Options{}, AverageOptions{})
	if err != nil {
		t.Fatal(err)
	}
	if !info.Converged {
		t.Errorf("not converged: %+v", info)
	}
	for i := range iso.Offset {
		checkVec(t, "two 90s", [3]float64{got[0][i], got[1][i], got[2][i]}, [3]float64{want.Mx[i], want.My[i], want.Mz[i]}, 1e-12)
	}
	ex, wts := Expand(&iso, spreads, []int{2, 3})
	if ex.Len() != 18 || len(wts) != 6 || ex.Offset[6] != 400+ex.Offset[0] || ex.B1Scale[6] != ex.B1Scale[0] {
		t.Errorf("Expand: %d isochromats, %d weights, offsets %v", ex.Len(), len(wts), ex.Offset)
	}
	if r := Reduce(ex.Offset, wts); math.Abs(r[1]-400) > 1e-12*400 || math.Abs(r[2]+900) > 1e-12*900 {
		t.Errorf("Reduce of the offsets: %v, want the isochromats' own (the spread is symmetric)", r)
	}
}
