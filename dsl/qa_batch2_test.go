package dsl

import (
	"context"
	"encoding/json"
	"math"
	"strings"
	"testing"

	"Nutate/display"
)

// cellBundles runs one cell in a fresh session and returns its outputs.
func cellBundles(t *testing.T, src string) []display.Bundle {
	t.Helper()
	var out []display.Bundle
	if err := NewSession(t.TempDir()).Exec(context.Background(), src, Sink{Display: func(b display.Bundle) { out = append(out, b) }}); err != nil {
		t.Fatalf("%s: %v", src, err)
	}
	return out
}

// Two sweeps that differ only in their `with` settings must be told apart in
// every representation: text, the SVG title and the JSON (the table after the
// figure leaves the title to it).
func TestSweepSettingsInTitle(t *testing.T) {
	const pulse = "field 7 T\npulse p = rect(duration = 1 ms, flip = 90 deg)\n"
	cases := []struct {
		name, sweep, want string
		settings          map[string]string
	}{
		{"curves", "sweep p over duration 1 ms to 2 ms points 2 show mxy with offset = 12 ppm, b1 = 70%",
			"sweep p over duration with offset = 12 ppm, b1 = 70%", map[string]string{"offset": "12 ppm", "b1": "70%"}},
		{"map", "sweep p over duration 1 ms to 2 ms points 2, offset -1 kHz to 1 kHz points 3 show mz with start = -z",
			"sweep p over duration and offset with start = -z", map[string]string{"start": "-z"}},
		{"none", "sweep p over duration 1 ms to 2 ms points 2 show mxy", "sweep p over duration", nil},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			bs := cellBundles(t, pulse+c.sweep)
			b := lastFigure(bs)
			for _, mime := range []string{"text/plain", "image/svg+xml"} {
				s, _ := b[mime].(string)
				if !strings.Contains(s, c.want) {
					t.Errorf("%s lacks %q:\n%.400s", mime, c.want, s)
				}
				if c.settings == nil && strings.Contains(s, " with ") {
					t.Errorf("%s names settings that were not given:\n%.400s", mime, s)
				}
			}
			raw, _ := json.Marshal(lastFigure(bs)[display.ResultMIME])
			var data struct {
				Title    string
				Settings map[string]string
			}
			if err := json.Unmarshal(raw, &data); err != nil {
				t.Fatal(err)
			}
			if !strings.HasPrefix(data.Title, c.want) {
				t.Errorf("json title %q, want %q", data.Title, c.want)
			}
			if len(data.Settings) != len(c.settings) {
				t.Errorf("json settings %v, want %v", data.Settings, c.settings)
			}
			for k, v := range c.settings {
				if data.Settings[k] != v {
					t.Errorf("json settings[%s] = %q, want %q", k, data.Settings[k], v)
				}
			}
		})
	}
}

// Figures of energy or B1rms carry the caution inside the SVG, and B1rms names
// its TR on the axis; figures of magnetization carry no such note.
func TestEnergyCautionInFigure(t *testing.T) {
	const pulse = "pulse p = rect(duration = 1 ms, flip = 90 deg)\n"
	cases := []struct {
		name, sweep string
		caution     bool
		label       string
	}{
		{"b1rms", "sweep p over duration 1 ms to 2 ms points 2 show b1rms with tr = 10 ms", true, "b1rms at TR 10 ms (µT)"},
		{"energy", "sweep p over duration 1 ms to 2 ms points 2 show energy", true, "energy"},
		{"energy map", "sweep p over duration 1 ms to 2 ms points 2, flip 10 deg to 20 deg points 2 show energy", true, "energy"},
		{"magnetization", "sweep p over duration 1 ms to 2 ms points 2 show mz", false, "mz"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			bs := cellBundles(t, pulse+c.sweep)
			svg, _ := lastFigure(bs)["image/svg+xml"].(string)
			for _, w := range []string{"not SAR", "IEC 60601-2-33", "safety officer"} {
				if got := strings.Contains(svg, w); got != c.caution {
					t.Errorf("svg has %q: %v, want %v", w, got, c.caution)
				}
			}
			if !strings.Contains(svg, c.label) {
				t.Errorf("svg lacks the label %q", c.label)
			}
		})
	}
}

// A train swept over its gap is rebuilt at each point: at gap 0 two identical
// back-to-back hard pulses are one hard pulse of twice the length (exact: the
// rotations share an axis; common practice), and at any gap the sweep agrees with
// a copy of the train made with that gap.
func TestTrainGapSweep(t *testing.T) {
	const a = "pulse a = rect(duration = 250 us, flip = 90 deg)\npulse t = train(a, a, gap = 1 ms)\n"
	cases := []struct{ name, sweep, ref string }{
		{"gap 0 is one long pulse",
			a + "sweep t over gap 0 ms to 0 ms points 1 show mx, my, mz with offset = 300 Hz",
			"pulse r = rect(duration = 500 us, flip = 180 deg)\nsweep r over b1 1 to 1 points 1 show mx, my, mz with offset = 300 Hz"},
		{"sweep point equals copy",
			a + "sweep t over gap 2 ms to 2 ms points 1 show mx, my, mz with offset = 300 Hz",
			a + "pulse u = t(gap = 2 ms)\nsweep u over b1 1 to 1 points 1 show mx, my, mz with offset = 300 Hz"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			got, want := sweepJSON(t, c.sweep), sweepJSON(t, c.ref)
			for _, q := range []string{"mx", "my", "mz"} {
				if len(got[q]) != 1 || len(want[q]) != 1 {
					t.Fatalf("%s: got %v, want %v", q, got[q], want[q])
				}
				if math.Abs(got[q][0]-want[q][0]) > 1e-9 {
					t.Errorf("%s = %.9f, want %.9f", q, got[q][0], want[q][0])
				}
			}
		})
	}
	// The gap changes the result off resonance (free precession between the
	// pulses), so the sweep does rebuild the train.
	m := sweepJSON(t, a+"sweep t over gap 0 ms to 2 ms points 3 show mz with offset = 100 Hz")["mz"]
	if len(m) != 3 || math.Abs(m[0]-m[1]) < 1e-3 || math.Abs(m[1]-m[2]) < 1e-3 {
		t.Errorf("mz over gap = %v, want values that change with the gap", m)
	}
}

// An internal error (a recovered panic; here a statement no parser makes) shows
// one line to the user and sends the stack to the log.
func TestInternalErrorOneLine(t *testing.T) {
	var log strings.Builder
	saved := internalLog
	internalLog = &log
	defer func() { internalLog = saved }()
	s := NewSession(t.TempDir())
	src := "pulse x = rect(duration = 1 ms, flip = 90 deg)"
	err := s.run(context.Background(), src, &PulseStmt{P: Pos{0, 1, 1}, Name: Ident{Name: "x"}}, Sink{})
	ce, ok := err.(*CellError)
	if !ok || len(ce.Errs) != 1 {
		t.Fatalf("got %v, want one CellError", err)
	}
	msg := ce.Errs[0].Msg
	if !strings.HasPrefix(msg, "internal error: ") || strings.Contains(msg, "\n") || strings.Contains(msg, "goroutine") {
		t.Errorf("message %q, want one line without a stack", msg)
	}
	for _, l := range ce.Traceback() {
		if strings.Contains(l, "goroutine") || strings.Contains(l, ".go:") {
			t.Errorf("traceback line %q holds the stack", l)
		}
	}
	if !strings.Contains(log.String(), "goroutine") || !strings.Contains(log.String(), "line 1:1") {
		t.Errorf("log %q, want the statement's position and the stack", log.String())
	}
	if _, ok := s.state().names["x"]; ok {
		t.Error("the failed statement defined x")
	}
}

// replaceNumber rewrites whole values only: not inside a longer number nor
// before a longer unit.
func TestReplaceNumber(t *testing.T) {
	cases := []struct{ s, old, repl, want string }{
		{"got -0.001 s", "-0.001 s", "-1 ms", "got -1 ms"},
		{"got 10.001 s, then 0.001 s", "0.001 s", "1 ms", "got 10.001 s, then 1 ms"},
		{"gradient 1 T/m, peak 1 T", "1 T", "1000 mT", "gradient 1 T/m, peak 1000 mT"},
		{"dwell 0.003 s does not divide duration 0.001 s", "0.003 s", "3 ms", "dwell 3 ms does not divide duration 0.001 s"},
	}
	for _, c := range cases {
		t.Run(c.s, func(t *testing.T) {
			if got := replaceNumber(c.s, c.old, c.repl); got != c.want {
				t.Errorf("got %q, want %q", got, c.want)
			}
		})
	}
}
