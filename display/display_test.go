package display

import (
	"bytes"
	"encoding/base64"
	"encoding/json"
	"encoding/xml"
	"flag"
	"image"
	"image/png"
	"io"
	"math"
	"os"
	"path/filepath"
	"regexp"
	"slices"
	"strconv"
	"strings"
	"testing"
)

var update = flag.Bool("update", false, "rewrite the golden SVG files in testdata")

// samples are the fixed figures checked against golden files.
func samples() map[string]Bundle {
	w, wt := sampleWaveform(false)
	wg, wgt := sampleWaveform(true)
	return map[string]Bundle{
		"profile":           sampleProfile().Bundle(),
		"map":               sampleMap().Bundle(),
		"waveform":          w.Bundle(wt),
		"waveform_gradient": wg.Bundle(wgt),
		"profile_notes":     sampleRMSProfile().Bundle(),
		"map_notes":         sampleNotedMap().Bundle(),
		"map_log":           sampleLogMap().Bundle(),
	}
}

// Notes travel inside the figure, under the plot, and the quantity's label
// replaces its name on the axis and in the caption.
func TestFigureNotes(t *testing.T) {
	words := []string{"IEC", "60601-2-33", "officer"}
	cases := []struct {
		name       string
		with, bare Bundle
		label      string
	}{
		{"profile", sampleRMSProfile().Bundle(), func() Bundle { p := sampleRMSProfile(); p.Notes = nil; return p.Bundle() }(), "b1rms at TR 10 ms (µT)"},
		{"map", sampleNotedMap().Bundle(), func() Bundle { m := sampleNotedMap(); m.Notes = nil; return m.Bundle() }(), "mxy after the pulse"},
	}
	height := regexp.MustCompile(`<svg[^>]* height="([0-9.]+)`)
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			svg := c.with["image/svg+xml"].(string)
			checkXML(t, svg)
			for _, w := range words {
				if !strings.Contains(svg, w) {
					t.Errorf("svg lacks %q of the note", w)
				}
				if strings.Contains(c.bare["image/svg+xml"].(string), w) {
					t.Errorf("svg without notes has %q", w)
				}
			}
			if !strings.Contains(svg, c.label) {
				t.Errorf("svg lacks the label %q", c.label)
			}
			if txt := c.with["text/plain"].(string); !strings.Contains(txt, c.label) {
				t.Errorf("caption lacks the label %q:\n%s", c.label, txt)
			}
			hw, hb := height.FindStringSubmatch(svg), height.FindStringSubmatch(c.bare["image/svg+xml"].(string))
			if hw == nil || hb == nil {
				t.Fatal("svg without a height")
			}
			a, _ := strconv.ParseFloat(hw[1], 64)
			b, _ := strconv.ParseFloat(hb[1], 64)
			if !(a > b) {
				t.Errorf("height with notes %g, without %g: want the notes to add a band", a, b)
			}
		})
	}
}

func TestGoldenSVG(t *testing.T) {
	for name, b := range samples() {
		t.Run(name, func(t *testing.T) {
			got, ok := b["image/svg+xml"].(string)
			if !ok {
				t.Fatalf("bundle has no image/svg+xml string")
			}
			path := filepath.Join("testdata", name+".svg")
			if *update {
				if err := os.WriteFile(path, []byte(got), 0o644); err != nil {
					t.Fatal(err)
				}
			}
			want, err := os.ReadFile(path)
			if err != nil {
				t.Fatalf("%v (run go test -update to create it)", err)
			}
			if !bytes.Equal([]byte(got), want) {
				t.Errorf("svg differs from %s (%d bytes, want %d); inspect it and run go test -update if the change is intended", path, len(got), len(want))
			}
		})
	}
}

// checkXML fails unless s parses as XML to the end.
func checkXML(t *testing.T, s string) {
	t.Helper()
	d := xml.NewDecoder(bytes.NewReader([]byte(s)))
	for {
		_, err := d.Token()
		if err == io.EOF {
			return
		}
		if err != nil {
			t.Fatalf("svg is not well-formed XML: %v", err)
		}
	}
}

// render returns the bundle's SVG, failing if it is missing.
func render(t *testing.T, b Bundle) string {
	t.Helper()
	s, ok := b["image/svg+xml"].(string)
	if !ok || s == "" {
		t.Fatalf("bundle has no image/svg+xml string")
	}
	return s
}

// textsOf collects the character data of the SVG's <text> elements.
func textsOf(t *testing.T, s string) []string {
	t.Helper()
	checkXML(t, s)
	var out []string
	d := xml.NewDecoder(strings.NewReader(s))
	in := false
	for {
		tok, err := d.Token()
		if err == io.EOF {
			return out
		}
		if err != nil {
			t.Fatal(err)
		}
		switch e := tok.(type) {
		case xml.StartElement:
			in = e.Name.Local == "text"
		case xml.EndElement:
			in = false
		case xml.CharData:
			if in {
				out = append(out, string(e))
			}
		}
	}
}

func TestSVGIsXMLWithLabels(t *testing.T) {
	w, wt := sampleWaveform(true)
	for _, tc := range []struct {
		name string
		b    Bundle
		want []string
	}{
		{"profile", sampleProfile().Bundle(), []string{"Slice profile", "offset (Hz)", "mxy", "phase (deg)", "p1", "gauss", "pass edge", "+FWHM/2"}},
		{"map", sampleMap().Bundle(), []string{"Inversion efficiency (hs1)", "offset (Hz)", "B1 scale", "mxy", "mxy = 0.5"}},
		{"waveform", w.Bundle(wt), []string{"hs1 waveform", "time (ms)", "amplitude (µT)", "phase (deg)", "frequency (Hz)", "gradient (mT/m)"}},
	} {
		t.Run(tc.name, func(t *testing.T) {
			s := render(t, tc.b)
			texts := textsOf(t, s)
			for _, want := range tc.want {
				if !slices.Contains(texts, want) {
					t.Errorf("svg has no text %q; texts: %q", want, texts)
				}
			}
			if strings.Contains(s, "@font-face") || strings.Contains(s, "http://") && strings.Count(s, "http://") != 2 {
				t.Errorf("svg embeds fonts or refers to the network")
			}
			if !strings.Contains(s, "sans-serif") {
				t.Errorf("svg text has no generic sans-serif fallback")
			}
			if _, ok := tc.b["text/html"]; ok {
				t.Errorf("figure bundle has text/html, which front ends rank above the images")
			}
			if p, _ := tc.b["text/plain"].(string); p == "" {
				t.Errorf("no text/plain")
			}
			img := decodePNG(t, tc.b)
			if w := img.Bounds().Dx(); w != 576 {
				t.Errorf("png is %d pixels wide, want 576 (6 in at %d dpi)", w, NotebookDPI)
			}
		})
	}
}

func TestDeterministic(t *testing.T) {
	a, b := samples(), samples()
	for name := range a {
		t.Run(name, func(t *testing.T) {
			for _, mime := range []string{"image/svg+xml", "image/png", "text/plain"} {
				if a[name][mime] != b[name][mime] {
					t.Errorf("%s differs between two renderings", mime)
				}
			}
			ja, jb := a[name][ResultMIME].(json.RawMessage), b[name][ResultMIME].(json.RawMessage)
			if len(ja) == 0 || !bytes.Equal(ja, jb) {
				t.Errorf("%s differs between two renderings", ResultMIME)
			}
		})
	}
}

// Size budgets on the fixed inputs; the thinning and the PNG raster keep
// figures small while the JSON keeps every value.
func TestSizeBudget(t *testing.T) {
	big := sampleProfile()
	big.X.Values = linspace(-3000, 3000, 20001)
	for i := range big.Curves {
		y := make([]float64, len(big.X.Values))
		for k, x := range big.X.Values {
			y[k] = math.Sin(x/37) * math.Exp(-x*x/4e6)
		}
		big.Curves[i].Y = y
	}
	bigMap := sampleMapSized(1201, 1001)
	for _, tc := range []struct {
		name  string
		b     Bundle
		limit int
	}{
		{"601-point two-pulse overlay", sampleProfile().Bundle(), 120 << 10},
		{"161x101 map", sampleMap().Bundle(), 400 << 10},
		{"20001-point two-pulse overlay", Bundle{"image/svg+xml": big.SVG()}, 120 << 10},
		{"1201x1001 map", Bundle{"image/svg+xml": bigMap.SVG()}, 400 << 10},
	} {
		t.Run(tc.name, func(t *testing.T) {
			s := render(t, tc.b)
			checkXML(t, s)
			if len(s) > tc.limit {
				t.Errorf("svg is %d bytes, want ≤ %d", len(s), tc.limit)
			}
		})
	}
}

// Decoding targets for the JSON round trip; pointers tell null from 0.
type (
	axisOut struct {
		Label, Unit string
		Reverse     bool
		Values      []*float64
	}
	tableOut struct {
		Title   string
		Columns []struct{ Name, Unit string }
		Rows    [][]string
		Notes   []string
	}
	profileOut struct {
		Kind, Title string
		X           axisOut
		Curves      []struct {
			Pulse, Quantity, Unit string
			Y                     []*float64
		}
		Marks []struct {
			X     *float64
			Label string
		}
		Summary tableOut
	}
	mapOut struct {
		Kind, Title, Pulse, Quantity, Unit string
		X, Y                               axisOut
		Z                                  [][]*float64
		Contour                            *float64
		Summary                            tableOut
	}
	waveformOut struct {
		Kind, Title string
		Time        axisOut
		Series      []struct {
			Quantity, Unit string
			Values         []*float64
		}
		Properties tableOut
	}
)

func decodePNG(t *testing.T, b Bundle) image.Image {
	t.Helper()
	s, _ := b["image/png"].(string)
	raw, err := base64.StdEncoding.DecodeString(s)
	if err != nil || len(raw) == 0 {
		t.Fatalf("image/png is not base64 (%v)", err)
	}
	img, err := png.Decode(bytes.NewReader(raw))
	if err != nil {
		t.Fatalf("image/png does not decode: %v", err)
	}
	return img
}

func decode(t *testing.T, b Bundle, v any) {
	t.Helper()
	raw, ok := b[ResultMIME].(json.RawMessage)
	if !ok {
		t.Fatalf("%s is %T, want json.RawMessage", ResultMIME, b[ResultMIME])
	}
	// The bundle must also survive being marshalled inside a message.
	if _, err := json.Marshal(map[string]any(b)); err != nil {
		t.Fatalf("bundle does not marshal: %v", err)
	}
	if err := json.Unmarshal(raw, v); err != nil {
		t.Fatalf("%s does not decode: %v", ResultMIME, err)
	}
}

// sameValues compares decoded values with the originals to the digits the
// package doc promises (SigDigits significant digits: relative 5e-6 covers
// the rounding of the last one), and null for NaN/Inf.
func sameValues(t *testing.T, what string, got []*float64, want []float64) {
	t.Helper()
	closeValues(t, what, got, want, func(w float64) float64 { return 5e-6 * math.Abs(w) })
}

// closeValues compares decoded values with the originals within tol(want).
func closeValues(t *testing.T, what string, got []*float64, want []float64, tol func(float64) float64) {
	t.Helper()
	if len(got) != len(want) {
		t.Fatalf("%s: got %d values, want %d", what, len(got), len(want))
	}
	for i, w := range want {
		switch {
		case !finite(w) && got[i] != nil:
			t.Fatalf("%s[%d]: got %v, want null for %v", what, i, *got[i], w)
		case finite(w) && (got[i] == nil || math.Abs(*got[i]-w) > tol(w)):
			t.Fatalf("%s[%d]: got %v, want %v within %g", what, i, got[i], w, tol(w))
		}
	}
}

// Magnetization (no unit, within ±1) keeps 6 decimals, angles 2.
func magnetTol(float64) float64 { return 5e-7 + 1e-15 }
func degreeTol(float64) float64 { return 5e-3 + 1e-12 }

// The rounding keeps the stated digits and no more: shorter text than the
// shortest round trip of the full float64.
func TestJSONRounding(t *testing.T) {
	for _, tc := range []struct {
		r    rounding
		v    float64
		want string
	}{
		{sigRounding, 1234.56789, "1234.57"},
		{sigRounding, -0.000123456789, "-0.000123457"},
		{sigRounding, 2.5e-7, "2.5e-07"},
		{sigRounding, 1e21, "1e+21"},
		{magnetRounding, 0.123456789, "0.123457"},
		{magnetRounding, -2e-7, "0"},
		{magnetRounding, 1, "1"},
		{degreeRounding, 179.99999, "180"},
		{degreeRounding, -45.678, "-45.68"},
		{degreeRounding, math.NaN(), "null"},
	} {
		if got := string(tc.r.append(nil, tc.v)); got != tc.want {
			t.Errorf("%v rounded %+v: got %s, want %s", tc.v, tc.r, got, tc.want)
		}
	}
	if r := roundingFor("", []float64{-1, 0.5, math.NaN()}); r != magnetRounding {
		t.Errorf("magnetization: got %+v", r)
	}
	if r := roundingFor("", []float64{0, 1.5}); r != sigRounding {
		t.Errorf("a unitless quantity beyond ±1: got %+v, want significant digits", r)
	}
	if r := roundingFor("deg", nil); r != degreeRounding {
		t.Errorf("degrees: got %+v", r)
	}
}

func sameTable(t *testing.T, got tableOut, want Table) {
	t.Helper()
	if got.Title != want.Title || len(got.Columns) != len(want.Columns) || len(got.Rows) != len(want.Rows) || len(got.Notes) != len(want.Notes) {
		t.Fatalf("table: got %+v, want %+v", got, want)
	}
	for i, c := range want.Columns {
		if got.Columns[i].Name != c.Name || got.Columns[i].Unit != c.Unit {
			t.Errorf("column %d: got %+v, want %+v", i, got.Columns[i], c)
		}
	}
	for i, r := range want.Rows {
		if !slices.Equal(got.Rows[i], r) {
			t.Errorf("row %d: got %q, want %q", i, got.Rows[i], r)
		}
	}
}

func TestJSONRoundTrip(t *testing.T) {
	t.Run("table", func(t *testing.T) {
		tb := sampleTable()
		var got tableOut
		decode(t, tb.Bundle(), &got)
		sameTable(t, got, tb)
	})
	t.Run("profile", func(t *testing.T) {
		p := sampleProfile()
		p.Curves[1].Y[7] = math.NaN()
		p.Marks = append(p.Marks, Mark{X: math.Inf(1), Label: "off scale"})
		var got profileOut
		decode(t, p.Bundle(), &got)
		if got.Kind != "profile" || got.Title != p.Title || got.X.Label != p.X.Label || got.X.Unit != p.X.Unit {
			t.Errorf("header: got %q %q %q %q", got.Kind, got.Title, got.X.Label, got.X.Unit)
		}
		sameValues(t, "x", got.X.Values, p.X.Values)
		if len(got.Curves) != len(p.Curves) {
			t.Fatalf("got %d curves, want %d", len(got.Curves), len(p.Curves))
		}
		for i, c := range p.Curves {
			g := got.Curves[i]
			if g.Pulse != c.Pulse || g.Quantity != c.Quantity || g.Unit != c.Unit {
				t.Errorf("curve %d: got %s/%s/%s, want %s/%s/%s", i, g.Pulse, g.Quantity, g.Unit, c.Pulse, c.Quantity, c.Unit)
			}
			tol := magnetTol
			if c.Unit == "deg" {
				tol = degreeTol
			}
			closeValues(t, c.Pulse+" "+c.Quantity, g.Y, c.Y, tol)
		}
		for i, m := range p.Marks {
			sameValues(t, "mark", []*float64{got.Marks[i].X}, []float64{m.X})
			if got.Marks[i].Label != m.Label {
				t.Errorf("mark %d: got %q, want %q", i, got.Marks[i].Label, m.Label)
			}
		}
		sameTable(t, got.Summary, p.Summary)
	})
	t.Run("map", func(t *testing.T) {
		m := sampleMap()
		m.Z[3][4] = math.NaN()
		var got mapOut
		decode(t, m.Bundle(), &got)
		if got.Kind != "map" || got.Pulse != m.Pulse || got.Quantity != m.Quantity || got.Y.Label != m.Y.Label {
			t.Errorf("header: got %+v", got.Kind)
		}
		sameValues(t, "x", got.X.Values, m.X.Values)
		sameValues(t, "y", got.Y.Values, m.Y.Values)
		if len(got.Z) != len(m.Z) {
			t.Fatalf("got %d rows, want %d", len(got.Z), len(m.Z))
		}
		for j := range m.Z {
			closeValues(t, "z row", got.Z[j], m.Z[j], magnetTol)
		}
		sameValues(t, "contour", []*float64{got.Contour}, []float64{m.Contour})
		sameTable(t, got.Summary, m.Summary)
	})
	t.Run("waveform", func(t *testing.T) {
		w, tb := sampleWaveform(false)
		var got waveformOut
		decode(t, w.Bundle(tb), &got)
		if got.Time.Unit != "s" {
			t.Errorf("time unit: got %q, want s", got.Time.Unit)
		}
		sameValues(t, "time", got.Time.Values, w.Time)
		want := []struct {
			q, u string
			v    []float64
		}{{"amplitude", "µT", w.Amplitude}, {"phase", "deg", w.Phase}, {"frequency", "Hz", w.Frequency}}
		if len(got.Series) != len(want) {
			t.Fatalf("got %d series, want %d (nil gradient left out)", len(got.Series), len(want))
		}
		for i, s := range want {
			if got.Series[i].Quantity != s.q || got.Series[i].Unit != s.u {
				t.Errorf("series %d: got %s (%s), want %s (%s)", i, got.Series[i].Quantity, got.Series[i].Unit, s.q, s.u)
			}
			if s.u == "deg" {
				closeValues(t, s.q, got.Series[i].Values, s.v, degreeTol)
			} else {
				sameValues(t, s.q, got.Series[i].Values, s.v)
			}
		}
		sameTable(t, got.Properties, tb)
	})
}
