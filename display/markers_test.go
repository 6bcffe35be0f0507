package display

import (
	"encoding/json"
	"math"
	"os"
	"strings"
	"testing"

	"gonum.org/v1/plot/vg"
)

// twelveMarkers is a crowded spectrum: twelve labelled shifts within 1 ppm.
func twelveMarkers() []Mark {
	names := []string{"NAA", "Glu", "Gln", "GABA", "Asp", "NAAG", "Cr", "PCr", "Cho", "GPC", "Tau", "mI"}
	var ms []Mark
	for i, n := range names {
		ms = append(ms, Mark{X: 2.0 + 0.08*float64(i), Label: n, Marker: true})
	}
	return ms
}

// checkApart fails when two labels' boxes (across the axis: width, or height
// when upright; along it they share one band) overlap or come closer than the
// gap, when a label leaves [x0, x1], or when labels are out of the order of
// their lines (leaders would cross).
func checkApart(t *testing.T, l markerLayout, x0, x1 vg.Length) {
	t.Helper()
	for i, a := range l.labels {
		lo, hi := l.span(a)
		if lo < x0-1e-9 || hi > x1+1e-9 {
			t.Errorf("%q spans [%.2f, %.2f], outside [%v, %v]", a.txt, lo, hi, x0, x1)
		}
		if i == 0 {
			continue
		}
		b := l.labels[i-1]
		if b.line > a.line || b.at > a.at {
			t.Errorf("%q and %q out of the order of their lines: leaders cross", b.txt, a.txt)
		}
		_, bhi := l.span(b)
		if lo < bhi+markerGap-1e-9 {
			t.Errorf("%q [%.2f, …] and %q […, %.2f] overlap or touch (gap %v)", a.txt, lo, b.txt, bhi, markerGap)
		}
	}
}

func TestMarkerLabelsApart(t *testing.T) {
	// 1 pt per 0.01 ppm over a 400 pt data area, ppm 0…4 (orientation does not
	// matter to the layout).
	tr := func(x float64) vg.Length { return vg.Length(x * 100) }
	t.Run("twelve close markers turn upright", func(t *testing.T) {
		l := placeMarkers(twelveMarkers(), tr, 0, 4, 0, 400)
		if len(l.labels) != 12 {
			t.Fatalf("got %d labels, want 12", len(l.labels))
		}
		if !l.upright {
			t.Errorf("labels 8 pt apart stayed horizontal, want upright")
		}
		checkApart(t, l, 0, 400)
	})
	t.Run("twelve close markers near the edge", func(t *testing.T) {
		ms := twelveMarkers()
		for i := range ms {
			ms[i].X += 1.1 // 3.1…3.98 ppm: the cluster must move in from the right edge
		}
		l := placeMarkers(ms, tr, 0, 4, 0, 400)
		if len(l.labels) != 12 {
			t.Fatalf("got %d labels, want 12", len(l.labels))
		}
		checkApart(t, l, 0, 400)
	})
	t.Run("far apart stay horizontal and on their lines", func(t *testing.T) {
		ms := []Mark{{X: 1.3, Label: "lipid", Marker: true}, {X: 2.01, Label: "NAA", Marker: true}, {X: 3.03, Label: "Cr", Marker: true}, {X: 4, Label: "feature"}}
		l := placeMarkers(ms, tr, 0, 4, 0, 400)
		if len(l.labels) != 3 || l.upright {
			t.Fatalf("got %d labels (upright %v), want 3 horizontal (the feature is not a marker)", len(l.labels), l.upright)
		}
		for _, pm := range l.labels {
			if pm.at != pm.line {
				t.Errorf("%q at %v, want on its line at %v", pm.txt, pm.at, pm.line)
			}
		}
		checkApart(t, l, 0, 400)
	})
	t.Run("a close pair is pushed apart symmetrically", func(t *testing.T) {
		ms := []Mark{{X: 2, Label: "Cho", Marker: true}, {X: 2.05, Label: "Cr", Marker: true}}
		l := placeMarkers(ms, tr, 0, 4, 0, 400)
		checkApart(t, l, 0, 400)
		if l.upright {
			t.Errorf("a pair went upright, want horizontal")
		}
		a, b := l.labels[0], l.labels[1]
		if d := (a.at - a.line) + (b.at - b.line); math.Abs(float64(d)) > 1e-9 {
			t.Errorf("pushes %v and %v do not cancel: the pair is not centred on its lines", a.at-a.line, b.at-b.line)
		}
	})
	t.Run("more labels than fit", func(t *testing.T) {
		var ms []Mark
		for i := range 60 {
			ms = append(ms, Mark{X: 0.05 * float64(i), Label: "m", Marker: true})
		}
		l := placeMarkers(ms, tr, 0, 4, 0, 400)
		if len(l.labels) != 30 || !l.upright {
			t.Fatalf("got %d labels, upright %v; want 30 (every other one) upright", len(l.labels), l.upright)
		}
		checkApart(t, l, 0, 400)
	})
	t.Run("markers on one line share a label", func(t *testing.T) {
		ms := []Mark{{X: 2, Label: "p1 NAA", Marker: true}, {X: 2.001, Label: "p2 NAA", Marker: true}}
		l := placeMarkers(ms, tr, 0, 4, 0, 400)
		if len(l.labels) != 1 || l.labels[0].txt != "p1, p2 NAA" {
			t.Errorf("got %+v, want one label \"p1, p2 NAA\"", l.labels)
		}
	})
}

// A ppm axis of absolute shifts is labelled δ (ppm) on the figure and in the
// table; markers travel in the JSON (with "marker": true, the axis with
// "shift": true) and are named under the table; a figure with twelve markers
// renders.
func TestMarkersOnShiftAxis(t *testing.T) {
	x := linspace(4, 0, 201)
	y := make([]float64, len(x))
	for i, v := range x {
		y[i] = math.Exp(-(v - 2.4) * (v - 2.4) / 0.1)
	}
	p := Profile{
		Title:  "Band-selective excitation",
		X:      Axis{Label: "offset", Unit: "ppm", Values: x, Reverse: true, Shift: true},
		Curves: []Curve{{Pulse: "sel", Quantity: "mxy", Y: y}},
		Marks:  append(twelveMarkers(), Mark{X: 2.9, Label: "pass edge"}),
	}
	svg := p.SVG()
	if !strings.Contains(svg, "δ (ppm)") {
		t.Errorf("SVG lacks the axis label δ (ppm)")
	}
	if os.Getenv("NUTATE_WRITE_FIGURES") != "" {
		_ = os.WriteFile("/tmp/markers.svg", []byte(svg), 0o644)
		_ = os.WriteFile("/tmp/markers.png", renderPNG(p, 110, false, "test"), 0o644)
		q := p
		q.Marks = []Mark{{X: 1.3, Label: "lipid", Marker: true}, {X: 2.01, Label: "NAA", Marker: true}, {X: 3.03, Label: "Cr", Marker: true}, {X: 3.2, Label: "Cho", Marker: true}, {X: 2.9, Label: "pass edge"}}
		_ = os.WriteFile("/tmp/markers2.png", renderPNG(q, 110, false, "test"), 0o644)
	}
	var js struct {
		X     struct{ Shift bool }
		Marks []struct {
			X      float64
			Label  string
			Marker bool
		}
	}
	if err := json.Unmarshal(p.JSON(), &js); err != nil {
		t.Fatal(err)
	}
	if !js.X.Shift || len(js.Marks) != 13 || !js.Marks[0].Marker || js.Marks[12].Marker || js.Marks[0].Label != "NAA" {
		t.Errorf("JSON: shift %v, marks %+v", js.X.Shift, js.Marks)
	}
	tab := p.table()
	if tab.Columns[0].Name != "curve" && tab.Columns[0].Name != "δ" {
		t.Errorf("table first column %q", tab.Columns[0].Name)
	}
	if n := tab.Notes[len(tab.Notes)-1]; !strings.HasPrefix(n, "marks (δ, ppm): NAA 2, Glu 2.08") || strings.Contains(n, "pass edge") {
		t.Errorf("table note %q, want the markers listed", n)
	}
	small := Profile{X: Axis{Unit: "ppm", Values: []float64{3, 2, 1}, Shift: true}, Curves: []Curve{{Quantity: "mz", Y: []float64{1, 0, 1}}}}
	if c := small.table().Columns[0]; c.Name != "δ" || c.Unit != "ppm" {
		t.Errorf("data table x column %+v, want δ (ppm)", c)
	}
	mt := MarkTable(p.Marks, p.X)
	if len(mt.Rows) != 12 || mt.Columns[1].Name != "δ" || mt.Rows[6][0] != "Cr" || mt.Rows[6][1] != "2.48" {
		t.Errorf("MarkTable: %+v", mt)
	}
	if !strings.Contains(Map{X: Axis{Unit: "ppm", Shift: true, Values: []float64{1, 2}}, Y: Axis{Label: "b1", Values: []float64{1, 2}}, Z: [][]float64{{0, 1}, {1, 0}}}.caption(), "δ (ppm)") {
		t.Errorf("map caption does not name δ (ppm)")
	}
}
