package display

import (
	"bytes"
	"encoding/base64"
	"image"
	"image/color"
	"image/png"
	"math"
	"regexp"
	"slices"
	"strconv"
	"strings"
	"testing"

	"gonum.org/v1/plot/vg"
)

// A circle z = x² + y² = r² traced by marching squares: every point lies on the
// circle up to the linear-interpolation error h²/(8r) (analytic bound), and the
// line closes on itself.
func TestContourCircle(t *testing.T) {
	x, y := linspace(-2, 2, 81), linspace(-2, 2, 81)
	z := make([][]float64, len(y))
	for j := range y {
		z[j] = make([]float64, len(x))
		for i := range x {
			z[j][i] = x[i]*x[i] + y[j]*y[j]
		}
	}
	h := x[1] - x[0]
	lines := contour(x, y, z, 1)
	if len(lines) != 1 {
		t.Fatalf("got %d lines, want 1 closed loop", len(lines))
	}
	l := lines[0]
	if l[0] != l[len(l)-1] {
		t.Errorf("loop not closed: starts %v, ends %v", l[0], l[len(l)-1])
	}
	tol := h * h / 8 * 1.01
	for _, p := range l {
		if r := math.Hypot(p[0], p[1]); math.Abs(r-1) > tol {
			t.Fatalf("point %v at radius %v, want 1 ± %.2g", p, r, tol)
		}
	}
	// A gap in the data opens the loop instead of failing.
	z[40][60] = math.NaN() // (x, y) = (1, 0): on the circle
	if lines := contour(x, y, z, 1); len(lines) != 1 || lines[0][0] == lines[0][len(lines[0])-1] {
		t.Errorf("with a NaN cell on the circle: got %d lines, want one open chain", len(lines))
	}
	if lines := contour(x, y, z, 100); len(lines) != 0 {
		t.Errorf("level above the data: got %d lines, want none", len(lines))
	}
}

// OKLab reference values: sRGB red is oklch(62.8% 0.2577 29.23°) in CSS Color
// Module Level 4 (W3C), i.e. a = 0.2249, b = 0.1258; white is L = 1, a = b = 0
// (Ottosson 2020).
func TestOKLab(t *testing.T) {
	for _, tc := range []struct {
		name string
		c    [3]uint8
		want oklab
	}{
		{"red", [3]uint8{255, 0, 0}, oklab{0.62796, 0.22486, 0.12585}},
		{"white", [3]uint8{255, 255, 255}, oklab{1, 0, 0}},
	} {
		t.Run(tc.name, func(t *testing.T) {
			got := toOKLab(rgb(tc.c))
			if math.Abs(got.L-tc.want.L) > 1e-3 || math.Abs(got.a-tc.want.a) > 1e-3 || math.Abs(got.b-tc.want.b) > 1e-3 {
				t.Errorf("got %+v, want %+v ± 1e-3", got, tc.want)
			}
			if back := fromOKLab(got); back != rgb(tc.c) {
				t.Errorf("round trip: got %v, want %v", back, rgb(tc.c))
			}
		})
	}
}

// The ramp is perceptually ordered and even: OKLab lightness rises along it, and
// consecutive samples are equal OKLab distances apart along the anchor polyline
// (a step that turns a corner at an anchor is a shorter chord; there are at most
// as many of those as inner anchors).
func TestRamp(t *testing.T) {
	lab := rampLab(rampAnchors, rampSize)
	var total float64
	for i := 1; i < len(rampAnchors); i++ {
		d := toOKLab(rampAnchors[i]).sub(toOKLab(rampAnchors[i-1]))
		total += math.Sqrt(d.L*d.L + d.a*d.a + d.b*d.b)
	}
	step := total / (rampSize - 1)
	corners := 0
	for i := 1; i < rampSize; i++ {
		d := lab[i].sub(lab[i-1])
		dist := math.Sqrt(d.L*d.L + d.a*d.a + d.b*d.b)
		switch {
		case math.Abs(dist-step) < 1e-9*step:
		case dist < step && dist > 0.5*step:
			corners++
		default:
			t.Fatalf("step %d: OKLab distance %v, want %v", i, dist, step)
		}
		if lab[i].L <= lab[i-1].L {
			t.Fatalf("lightness falls at %d: %v → %v", i, lab[i-1].L, lab[i].L)
		}
	}
	if corners > len(rampAnchors)-2 {
		t.Errorf("%d uneven steps, want at most %d (one per inner anchor)", corners, len(rampAnchors)-2)
	}
	if ramp[0] != rampAnchors[0] || ramp[rampSize-1] != rampAnchors[len(rampAnchors)-1] {
		t.Errorf("ramp ends %v…%v, want the first and last anchors", ramp[0], ramp[rampSize-1])
	}
}

func TestThinKeepsOutline(t *testing.T) {
	var pts []vg.Point
	for i := range 10000 {
		x := float64(i) * 0.01 // 100 points per point of width
		pts = append(pts, vg.Point{X: vg.Length(x), Y: vg.Length(50 * math.Sin(x*3.1))})
	}
	out := thin(pts)
	if len(out) > 4*201 {
		t.Errorf("got %d points, want ≤ 4 per half-point column", len(out))
	}
	if out[0] != pts[0] || out[len(out)-1] != pts[len(pts)-1] {
		t.Errorf("ends not kept")
	}
	// Every column's extremes survive.
	col := map[int][2]vg.Length{}
	for _, p := range pts {
		c := int(math.Floor(float64(p.X) * 2))
		e, ok := col[c]
		if !ok {
			e = [2]vg.Length{p.Y, p.Y}
		}
		col[c] = [2]vg.Length{min(e[0], p.Y), max(e[1], p.Y)}
	}
	kept := map[int][2]vg.Length{}
	for _, p := range out {
		c := int(math.Floor(float64(p.X) * 2))
		e, ok := kept[c]
		if !ok {
			e = [2]vg.Length{p.Y, p.Y}
		}
		kept[c] = [2]vg.Length{min(e[0], p.Y), max(e[1], p.Y)}
	}
	for c, e := range col {
		if kept[c] != e {
			t.Fatalf("column %d: kept range %v, want %v", c, kept[c], e)
		}
	}
}

func TestPixelCells(t *testing.T) {
	t.Run("one pixel per even cell", func(t *testing.T) {
		r := pixelCells(cellEdges(linspace(-4000, 4000, 161)), 660)
		if len(r) != 161 || r[0] != [2]int{0, 1} || r[160] != [2]int{160, 161} {
			t.Errorf("got %d pixels %v…%v, want 161 identity", len(r), r[0], r[len(r)-1])
		}
	})
	t.Run("averaged down", func(t *testing.T) {
		r := pixelCells(cellEdges(linspace(0, 1, 1201)), 660)
		if len(r) != maxPixels {
			t.Fatalf("got %d pixels, want %d", len(r), maxPixels)
		}
		next := 0
		for i, c := range r {
			if c[0] != next || c[1] <= c[0] {
				t.Fatalf("pixel %d covers %v, want to start at %d and be non-empty", i, c, next)
			}
			next = c[1]
		}
		if next != 1201 {
			t.Errorf("pixels cover cells up to %d, want 1201", next)
		}
	})
	t.Run("uneven cells", func(t *testing.T) {
		v := []float64{0, 1, 2, 10, 11}
		e := cellEdges(v)
		r := pixelCells(e, 100)
		for p, c := range r {
			mid := e[0] + (e[5]-e[0])*(float64(p)+0.5)/float64(len(r))
			if c[1] != c[0]+1 || mid < e[c[0]] || mid > e[c[1]] {
				t.Fatalf("pixel %d (centre %v) shows cells %v, edges %v", p, mid, c, e)
			}
		}
	})
}

// textX maps each SVG text to its x position.
func textX(t *testing.T, svg string) map[string]float64 {
	t.Helper()
	re := regexp.MustCompile(`<text x="([^"]*)"[^>]*>([^<]*)</text>`)
	out := map[string]float64{}
	for _, m := range re.FindAllStringSubmatch(svg, -1) {
		x, err := strconv.ParseFloat(m[1], 64)
		if err != nil {
			t.Fatal(err)
		}
		out[m[2]] = x
	}
	return out
}

func TestReverseAxis(t *testing.T) {
	p := Profile{X: Axis{Label: "shift", Unit: "ppm", Values: linspace(-1, 6, 71), Reverse: true},
		Curves: []Curve{{Quantity: "mz", Y: linspace(0, 1, 71)}}}
	pos := textX(t, p.SVG())
	hi, ok1 := pos["6"]
	lo, ok2 := pos["−1"]
	if !ok1 || !ok2 {
		t.Fatalf("tick labels 6 and −1 missing: %v", pos)
	}
	if hi >= lo {
		t.Errorf("reversed axis: 6 at x=%v, −1 at x=%v; want 6 on the left", hi, lo)
	}
}

var badNumber = regexp.MustCompile(`[a-zA-Z]="[^"]*(NaN|Inf)[^"]*"|d="[^"]*(NaN|Inf)`)

// Degenerate input never panics and still gives well-formed output.
func TestDegenerateInput(t *testing.T) {
	nan, inf := math.NaN(), math.Inf(1)
	x := linspace(0, 1, 5)
	cases := map[string]func() Bundle{
		"empty profile":          Profile{}.Bundle,
		"axis without curves":    Profile{X: Axis{Values: x}}.Bundle,
		"short and long curve":   Profile{X: Axis{Values: x}, Curves: []Curve{{Y: []float64{1, 2}}, {Y: linspace(0, 1, 9)}}}.Bundle,
		"all NaN":                Profile{X: Axis{Values: x}, Curves: []Curve{{Y: []float64{nan, nan, nan, nan, nan}}}}.Bundle,
		"constant":               Profile{X: Axis{Values: x}, Curves: []Curve{{Y: []float64{2, 2, 2, 2, 2}}}}.Bundle,
		"single point":           Profile{X: Axis{Values: []float64{3}, Reverse: true}, Curves: []Curve{{Y: []float64{1}}}}.Bundle,
		"NaN in x, marks off":    Profile{X: Axis{Values: []float64{0, nan, 2, inf, 4}}, Curves: []Curve{{Y: x}}, Marks: []Mark{{X: nan, Label: "a"}, {X: 99, Label: "b"}, {X: 2}}}.Bundle,
		"equal but for rounding": Profile{X: Axis{Values: x}, Curves: []Curve{{Y: []float64{34.47634, 34.47634 + 7e-15, 34.47634, 34.47634 - 7e-15, 34.47634}}}}.Bundle,
		"huge and tiny":          Profile{X: Axis{Values: []float64{0, 1e-12}}, Curves: []Curve{{Y: []float64{1e300, -1e300}}}}.Bundle,
		"empty map":              Map{}.Bundle,
		"ragged map": Map{X: Axis{Values: x}, Y: Axis{Values: x[:3]},
			Z: [][]float64{{1, 2}, {3}}, HasContour: true, Contour: 2}.Bundle,
		"one cell map":                   Map{X: Axis{Values: []float64{1}}, Y: Axis{Values: []float64{2}}, Z: [][]float64{{5}}, HasContour: true}.Bundle,
		"all NaN map":                    Map{X: Axis{Values: x[:2]}, Y: Axis{Values: x[:2]}, Z: [][]float64{{nan, nan}, {nan, nan}}, HasContour: true}.Bundle,
		"descending map":                 Map{X: Axis{Values: []float64{3, 2, 0}}, Y: Axis{Values: []float64{5, 1}, Reverse: true}, Z: [][]float64{{1, 2, 3}, {4, 5, 6}}, ZMin: 9, ZMax: 1}.Bundle,
		"NaN map axes":                   Map{X: Axis{Values: []float64{0, nan, 2}}, Y: Axis{Values: []float64{inf, 1}}, Z: [][]float64{{1, 2, 3}, {4, inf, 6}}, HasContour: true, Contour: 3}.Bundle,
		"log map axis":                   Map{X: Axis{Values: []float64{-1, 0, 1}, Log: true}, Y: Axis{Values: []float64{1, 2}}, Z: [][]float64{{1, 2, 3}, {4, 5, 6}}}.Bundle,
		"log profile without positive x": Profile{X: Axis{Values: []float64{-2, -1, 0}, Log: true}, Curves: []Curve{{Y: []float64{1, 2, 3}}}}.Bundle,
		"empty waveform":                 func() Bundle { return Waveform{}.Bundle(Table{}) },
		"no time":                        func() Bundle { return Waveform{Amplitude: []float64{1, 2}}.Bundle(Table{}) },
		"one sample":                     func() Bundle { return Waveform{Time: []float64{1e-6}, Phase: []float64{90}}.Bundle(Table{}) },
	}
	for name, f := range cases {
		t.Run(name, func(t *testing.T) {
			b := f()
			svg := render(t, b)
			checkXML(t, svg)
			if m := badNumber.FindString(svg); m != "" {
				t.Errorf("svg has a non-finite coordinate: %s", m)
			}
			if s, _ := b["text/plain"].(string); strings.TrimSpace(s) == "" {
				t.Errorf("empty text/plain")
			}
			var v any
			decode(t, b, &v)
		})
	}
}

func rgb(c [3]uint8) color.NRGBA { return color.NRGBA{R: c[0], G: c[1], B: c[2], A: 0xff} }

// On a logarithmic axis the decades are equally spaced, and points at or below
// zero are left out rather than failing.
func TestLogAxis(t *testing.T) {
	x := []float64{0, 1, 2, 5, 10, 20, 50, 100}
	p := Profile{X: Axis{Label: "T2", Unit: "ms", Values: x, Log: true},
		Curves: []Curve{{Quantity: "mz", Y: []float64{0.1, 0.2, 0.3, 0.4, 0.5, 0.6, 0.7, 0.8}}}, Marks: []Mark{{X: -1, Label: "neg"}, {X: 10, Label: "ten"}}}
	svg := p.SVG()
	checkXML(t, svg)
	pos := textX(t, svg)
	a, b, c := pos["1"], pos["10"], pos["100"]
	if a == 0 || b == 0 || c == 0 {
		t.Fatalf("decade labels missing: %v", pos)
	}
	// Centred labels of different widths: compare centres (widths from the font).
	w := func(s string) float64 { return float64(textStyle(tickSize).Width(s)) / 2 }
	d1, d2 := (b+w("10"))-(a+w("1")), (c+w("100"))-(b+w("10"))
	if math.Abs(d1-d2) > 0.01*d1 {
		t.Errorf("decades 1–10 and 10–100 span %v and %v pt, want equal", d1, d2)
	}
	if _, ok := pos["neg"]; ok {
		t.Errorf("a mark at x ≤ 0 is labelled on a log axis")
	}
	if p.X.Reverse = true; !strings.Contains(p.SVG(), ">ten<") {
		t.Errorf("reversed log axis lost its mark")
	}
}

func TestPlaceMarks(t *testing.T) {
	tr := func(x float64) vg.Length { return vg.Length(x) } // 1 pt per unit
	ts := textStyle(markSize)
	t.Run("close pair side by side", func(t *testing.T) {
		ms := []Mark{{X: 200, Label: "edge"}, {X: 204, Label: "half width"}}
		got, rows := placeMarks(ms, tr, 0, 400, 0, 400)
		if rows != 1 || len(got) != 2 {
			t.Fatalf("got %d labels on %d rows, want 2 on 1", len(got), rows)
		}
		if e := got[0].left + ts.Width("edge"); e > 200 {
			t.Errorf("first label ends at %v, want left of its line at 200", e)
		}
		if got[1].left < 204 {
			t.Errorf("second label starts at %v, want right of its line at 204", got[1].left)
		}
	})
	t.Run("never overlapping", func(t *testing.T) {
		var ms []Mark
		for i := range 12 {
			ms = append(ms, Mark{X: 150 + 9*float64(i), Label: "mark " + strconv.Itoa(i)})
		}
		got, rows := placeMarks(ms, tr, 0, 400, 0, 400)
		if len(got) != len(ms) || rows < 2 {
			t.Fatalf("got %d labels on %d rows, want %d on several", len(got), rows, len(ms))
		}
		for i, a := range got {
			if a.left < 0 || a.left+ts.Width(a.txt) > 400 {
				t.Errorf("%q at %v runs outside the figure", a.txt, a.left)
			}
			for _, b := range got[i+1:] {
				if a.row == b.row && a.left < b.left+ts.Width(b.txt) && b.left < a.left+ts.Width(a.txt) {
					t.Errorf("%q and %q overlap on row %d", a.txt, b.txt, a.row)
				}
			}
		}
	})
}

func TestSteps(t *testing.T) {
	tm := []float64{0.5, 1.5, 2.5}
	y := []float64{1, 2, 3}
	for _, tc := range []struct {
		name         string
		zero, hold   bool
		wantX, wantY []float64
	}{
		{"held with zero ends", true, true, []float64{0, 0, 1, 1, 2, 2, 3, 3}, []float64{0, 1, 1, 2, 2, 3, 3, 0}},
		{"held", false, true, []float64{0, 1, 1, 2, 2, 3}, []float64{1, 1, 2, 2, 3, 3}},
		{"midpoints with zero ends", true, false, []float64{0, 0, 0.5, 1.5, 2.5, 3, 3}, []float64{0, 1, 1, 2, 3, 3, 0}},
		// Phase and frequency are not pulled to 0 at the pulse's edges.
		{"midpoints", false, false, []float64{0, 0.5, 1.5, 2.5, 3}, []float64{1, 1, 2, 3, 3}},
	} {
		t.Run(tc.name, func(t *testing.T) {
			x, v := steps(tm, y, tc.zero, tc.hold)
			if !slices.Equal(x, tc.wantX) || !slices.Equal(v, tc.wantY) {
				t.Errorf("got %v %v, want %v %v", x, v, tc.wantX, tc.wantY)
			}
		})
	}
	if x, v := steps([]float64{1e-4}, []float64{7}, true, true); !slices.Equal(x, []float64{0, 0, 2e-4, 2e-4}) || !slices.Equal(v, []float64{0, 7, 7, 0}) {
		t.Errorf("lone sample: got %v %v, want it held from 0 to twice its midpoint", x, v)
	}
}

// Y ranges a reader expects (common practice): magnetization in M0 units on a
// fixed axis, other quantities with a minimum span so rounding-level variation
// is not magnified, widened without crossing zero, phase on a quarter turn.
func TestYRange(t *testing.T) {
	for _, tc := range []struct {
		name           string
		pn             panel
		lo, hi         float64
		wantLo, wantHi float64 // before padding
	}{
		{"mxy on [0, 1]", panel{magnet: true}, 0.001, 0.02, 0, 1},
		{"mz of an inversion on [−1, 1]", panel{magnet: true}, -0.98, 1, -1, 1},
		{"mz of a saturation with rounding below 0", panel{magnet: true}, -1e-7, 1, 0, 1},
		{"inverted mz on [−1, 1]", panel{magnet: true}, -1, 0.01, -1, 1},
		{"unitless beyond ±1 is not magnetization", panel{magnet: true}, 2, 10, 2, 10},
		{"bandwidth 361–368 Hz", panel{}, 361, 368, 364.5 - 36.8, 364.5 + 36.8},
		{"wide range untouched", panel{}, 100, 4000, 100, 4000},
		{"flip 8–65° from 0", panel{degrees: true}, 8, 65, 0, 90},
		{"negative bandwidth-like values", panel{}, -368, -361, -364.5 - 36.8, -364.5 + 36.8},
		{"constant", panel{}, 5, 5, 4.5, 5.5},
		{"phase near 10° from 0", panel{degrees: true}, 9, 11, 0, 90},
		{"phase 0 centred", panel{degrees: true}, 0, 0, -45, 45},
		{"phase near −10° up to 0", panel{degrees: true}, -11, -9, -90, 0},
		{"phase near 170° on a quarter turn", panel{degrees: true}, 165, 175, 125, 215},
		{"amplitude from 0", panel{zero: true}, 2, 9, 0, 9},
	} {
		t.Run(tc.name, func(t *testing.T) {
			lo, hi := tc.pn.yRange(tc.lo, tc.hi)
			wl, wh := padRange(tc.wantLo, tc.wantHi, yPad)
			if math.Abs(lo-wl) > 1e-9*math.Max(1, math.Abs(wl)) || math.Abs(hi-wh) > 1e-9*math.Max(1, math.Abs(wh)) {
				t.Errorf("got [%v, %v], want [%v, %v]", lo, hi, wl, wh)
			}
			if lo > tc.lo || hi < tc.hi {
				t.Errorf("range [%v, %v] does not hold the data [%v, %v]", lo, hi, tc.lo, tc.hi)
			}
		})
	}
}

// Marks on one line get one label naming each (common practice for legends).
func TestMergeMarks(t *testing.T) {
	for _, tc := range []struct {
		in   []string
		want string
	}{
		{[]string{"a band edge", "b band edge"}, "a, b band edge"},
		{[]string{"a band edge", "a band edge"}, "a band edge"},
		{[]string{"edge", "half width"}, "edge / half width"},
		{[]string{"edge", "a edge"}, "edge / a edge"},
	} {
		t.Run(tc.want, func(t *testing.T) {
			if got := mergeLabels(tc.in); got != tc.want {
				t.Errorf("mergeLabels(%q) = %q, want %q", tc.in, got, tc.want)
			}
		})
	}
	tr := func(x float64) vg.Length { return vg.Length(x) }
	ms := []Mark{{X: 390, Label: "b band edge"}, {X: 100, Label: "a band edge"}, {X: 100.5, Label: "b band edge"}, {X: 390, Label: "a band edge"}}
	got, rows := placeMarks(ms, tr, 0, 400, 50, 400)
	if rows != 1 || len(got) != 2 || got[0].txt != "a, b band edge" || got[1].txt != "b, a band edge" {
		t.Fatalf("got %+v on %d rows, want two merged labels on one row", got, rows)
	}
	if e := got[1].left + textStyle(markSize).Width(got[1].txt); e > 400 {
		t.Errorf("label of a mark at the range end runs to %v, past the data area's 400", e)
	}
}

// Where the RF is off its phase is undefined (atan2(0, 0)); the trace is left
// out there rather than drawn at 0° (common practice).
func TestPhaseWhereOn(t *testing.T) {
	amp := []float64{0, 2, 3, 0, 2, 0}
	ph := []float64{0, 90, 90, 0, -90, 0}
	got := phaseWhereOn(ph, amp)
	for i := range got {
		if off := amp[i] == 0; off != math.IsNaN(got[i]) || !off && got[i] != ph[i] {
			t.Errorf("sample %d (amplitude %v): got phase %v", i, amp[i], got[i])
		}
	}
	if ph[0] != 0 {
		t.Errorf("input changed: %v", ph)
	}
	if got := phaseWhereOn(ph, nil); !slices.Equal(got, ph) {
		t.Errorf("without amplitudes: got %v, want the phase as given", got)
	}
}

// A mark at the end of the range is drawn inside the frame, not under it; a
// range without such marks keeps its curves up to the frame.
func TestMarkAtRangeEnd(t *testing.T) {
	x := linspace(-1000, 1000, 101)
	y := make([]float64, len(x))
	for _, tc := range []struct {
		name  string
		marks []Mark
		inset bool
	}{
		{"marks at both ends", []Mark{{X: -1000, Label: "a band edge"}, {X: 1000, Label: "a band edge"}}, true},
		{"marks inside", []Mark{{X: -500, Label: "a band edge"}}, false},
	} {
		t.Run(tc.name, func(t *testing.T) {
			s := stack{panels: []panel{{lines: []line{{x: x, y: y}}}}, marks: tc.marks}
			ps, _ := s.plots()
			p := ps[0]
			if got := p.X.Min < -1000 && p.X.Max > 1000; got != tc.inset {
				t.Errorf("x range [%v, %v]: inset %v, want %v", p.X.Min, p.X.Max, got, tc.inset)
			}
		})
	}
}

// A map with logarithmic axes: cell edges at geometric midpoints, one image
// pixel per cell for geometrically spaced values (even in log10), decades drawn
// equally wide, and the contour of z = (log10(x·y) − 2)/4.3 at 0.5, which is
// linear in log10 x and log10 y, traced exactly on the line x·y = 10^4.15
// (marching squares is exact for a field linear in the layout coordinates).
func TestLogMap(t *testing.T) {
	m := sampleLogMap()
	xl := newMapScale(m.X.Values, true)
	if !xl.log {
		t.Fatal("positive values on a Log axis: want a log layout")
	}
	e := xl.edges()
	for i := 1; i < len(m.X.Values); i++ {
		want := math.Sqrt(m.X.Values[i-1] * m.X.Values[i])
		if math.Abs(e[i]-want) > 1e-9*want {
			t.Fatalf("edge %d at %v, want the geometric midpoint %v", i, e[i], want)
		}
	}
	if r := pixelCells(cellEdges(xl.layout), 1000); len(r) != len(m.X.Values) {
		t.Errorf("geometric values: %d pixels, want one per cell (%d)", len(r), len(m.X.Values))
	}
	if lin := newMapScale([]float64{-1, 1, 10}, true); lin.log {
		t.Error("a Log axis with a value ≤ 0 drew logarithmically; want the linear fallback")
	}

	yl := newMapScale(m.Y.Values, true)
	lines := mapContour(xl, yl, m.Z, m.Contour)
	if len(lines) == 0 {
		t.Fatal("no contour")
	}
	for _, l := range lines {
		for _, p := range l {
			if got := math.Log10(p[0] * p[1]); math.Abs(got-4.15) > 1e-9 {
				t.Fatalf("contour point %v: log10(x·y) = %v, want 4.15", p, got)
			}
		}
	}

	svg := m.SVG()
	checkXML(t, svg)
	// The x axis is drawn first: keep each label's first position (the y
	// axis repeats the same labels).
	pos := map[string]float64{}
	for _, s := range regexp.MustCompile(`<text x="([^"]*)"[^>]*>([^<]*)</text>`).FindAllStringSubmatch(svg, -1) {
		if _, seen := pos[s[2]]; !seen {
			pos[s[2]], _ = strconv.ParseFloat(s[1], 64)
		}
	}
	a, b, c := pos["10"], pos["100"], pos["1000"]
	if a == 0 || b == 0 || c == 0 {
		t.Fatalf("decade labels missing: %v", pos)
	}
	w := func(s string) float64 { return float64(textStyle(tickSize).Width(s)) / 2 }
	d1, d2 := (b+w("100"))-(a+w("10")), (c+w("1000"))-(b+w("100"))
	if math.Abs(d1-d2) > 0.01*d1 {
		t.Errorf("decades 10–100 and 100–1000 span %v and %v pt, want equal", d1, d2)
	}
	// Without Log the same map draws linearly: 10 and 100 crowd together.
	m.X.Log, m.Y.Log = false, false
	if pos := textX(t, m.SVG()); pos["100"] != 0 {
		t.Errorf("linear axis labelled at 100, which a 0…2000 axis with nice steps does not")
	}
}

// Points left out of a sweep (NaN at the start of every curve) leave a gap: the
// x axis still spans every swept value, so its first decade is labelled.
func TestProfileGapKeepsAxis(t *testing.T) {
	x := []float64{1, 3, 10, 30, 100, 300, 1000}
	nan := math.NaN()
	p := Profile{X: Axis{Label: "t1", Unit: "ms", Values: x, Log: true},
		Curves: []Curve{{Quantity: "mxy", Y: []float64{nan, nan, nan, 0.9, 0.95, 0.97, 0.98}}}}
	if pos := textX(t, p.SVG()); pos["1"] == 0 {
		t.Errorf("no tick label 1 at the start of the swept range: %v", pos)
	}
}

// A phase map is drawn with the colour wheel: both ends of the range share a
// colour, every hue has the same OKLab lightness (none reads as larger), and
// a pixel that covers cells at 179° and −179° is coloured as 180°, not as
// their arithmetic mean 0°.
func TestCyclicMap(t *testing.T) {
	if wheelIndex(0) != wheelIndex(1) || wheelIndex(-0.25) != wheelIndex(0.75) {
		t.Errorf("wheel indices at 0 and 1: %d, %d; want one colour", wheelIndex(0), wheelIndex(1))
	}
	for i, c := range wheel {
		if l := toOKLab(c).L; math.Abs(l-0.70) > 0.01 {
			t.Fatalf("wheel colour %d: OKLab L = %.3f, want 0.70 (±0.01, sRGB rounding)", i, l)
		}
	}
	// 400 columns on a narrow plot: several cells share each pixel.
	n := 400
	xs := make([]float64, n)
	row := make([]float64, n)
	for i := range xs {
		xs[i] = float64(i)
		row[i] = 179
		if i%2 == 1 {
			row[i] = -179
		}
	}
	m := Map{Title: "phase", X: Axis{Label: "x", Values: xs}, Y: Axis{Label: "y", Values: []float64{0, 1}},
		Quantity: "phase", Unit: "deg", Z: [][]float64{row, row}, ZMin: -180, ZMax: 180, Cyclic: true}
	img := mapImage(t, m.SVG())
	// t = (v − ZMin)/(ZMax − ZMin): ±180° is t = 0 ≡ 1, 0° is t = ½.
	want, far := wheel[wheelIndex(0)], wheel[wheelIndex(0.5)]
	near := func(a, b color.NRGBA) bool { // neighbouring wheel entries (rounding of the mean)
		d := func(x, y uint8) int { return max(int(x)-int(y), int(y)-int(x)) }
		return d(a.R, b.R) <= 3 && d(a.G, b.G) <= 3 && d(a.B, b.B) <= 3
	}
	b := img.Bounds()
	for x := b.Min.X; x < b.Max.X; x++ {
		got := color.NRGBAModel.Convert(img.At(x, b.Min.Y)).(color.NRGBA)
		if !near(got, want) {
			t.Fatalf("pixel %d: %v, want the colour of ±180° %v (0° is %v)", x, got, want, far)
		}
	}
	if !strings.Contains(string(m.JSON()), `"cyclic":true`) {
		t.Error("the JSON does not say the map is cyclic")
	}
}

// mapImage decodes the heat map's PNG (the first image of an SVG).
func mapImage(t *testing.T, svg string) image.Image {
	t.Helper()
	sub := regexp.MustCompile(`xlink:href="data:image/png;base64,([^"]*)"`).FindStringSubmatch(svg)
	if sub == nil {
		t.Fatal("no PNG image in the SVG")
	}
	data, err := base64.StdEncoding.DecodeString(sub[1])
	if err != nil {
		t.Fatal(err)
	}
	img, err := png.Decode(bytes.NewReader(data))
	if err != nil {
		t.Fatal(err)
	}
	return img
}
