package dsl

import (
	"context"
	"errors"
	"fmt"
	"os"
	"path/filepath"
	"reflect"
	"sort"
	"strings"
	"testing"

	"Nutate/display"
)

// snapshot describes the persistent state for comparisons.
func snapshot(s *Session) string {
	var b strings.Builder
	fmt.Fprintf(&b, "nucleus %s field %g\n", s.st.nucleus.Name, s.st.field)
	names := s.st.nameList()
	sort.Strings(names)
	for _, n := range names {
		bd := s.st.names[n]
		if bd.pulse != nil {
			fmt.Fprintf(&b, "%s: %s %p\n", n, pulseSummary(bd.pulse), bd.pulse)
		} else {
			fmt.Fprintf(&b, "%s = %v %v\n", n, bd.val.Q, bd.val.Unit)
		}
	}
	return b.String()
}

func TestFailingStatementLeavesState(t *testing.T) {
	s := NewSession(t.TempDir())
	ctx := context.Background()
	if err := s.Exec(ctx, "nucleus 13C\nfield 3 T\nlet a = 1 ms\npulse p = rect(duration = a, flip = 90 deg)", Sink{}); err != nil {
		t.Fatal(err)
	}
	before := snapshot(s)
	cells := []string{
		"nucleus 99Zz",
		"field 3 Hz",
		"let a = 1 ms + 1 Hz",
		"pulse p = rect(duration = 1 kHz, flip = 90 deg)",
		"pulse p = sinc(duration = 1 ms, tbw = 4)",
		"sweep p over offset -1 kHz to 1 kHz points 11 show nonsense",
		"print 1 +\nreset", // a parse error in the first statement: nothing runs, not even reset
	}
	for _, c := range cells {
		var outs int
		err := s.Exec(ctx, c, Sink{Display: func(display.Bundle) { outs++ }})
		if err == nil {
			t.Errorf("%q: no error", c)
		}
		if outs != 0 {
			t.Errorf("%q: %d outputs from a failing statement", c, outs)
		}
		if got := snapshot(s); got != before {
			t.Errorf("%q changed the state:\n%s\nwant:\n%s", c, got, before)
		}
	}
	// Earlier statements of a cell keep their effect and outputs.
	var outs []string
	err := s.Exec(ctx, "let b = 2 ms\nlet c = b + 1 kHz", Sink{Display: func(b display.Bundle) { outs = append(outs, b["text/plain"].(string)) }})
	if err == nil || len(outs) != 1 || s.st.names["b"] == nil || s.st.names["c"] != nil {
		t.Errorf("err %v, outputs %q, b kept %v, c set %v", err, outs, s.st.names["b"] != nil, s.st.names["c"] != nil)
	}
}

func TestParseErrorsAllReported(t *testing.T) {
	src := "pulse = rect()\nprint 1 2\nlet x = 2 ms\nsweep p over offset 1 Hz to 2 Hz\nfoo 1"
	err := NewSession(t.TempDir()).Exec(context.Background(), src, Sink{})
	var ce *CellError
	if !errors.As(err, &ce) {
		t.Fatalf("error %v is not a CellError", err)
	}
	var lines []int
	for _, e := range ce.Errs {
		lines = append(lines, e.Pos.Line)
	}
	if want := []int{1, 2, 4, 5}; !reflect.DeepEqual(lines, want) {
		t.Errorf("errors on lines %v, want %v:\n%s", lines, want, err)
	}
	tb := ce.Traceback()
	if len(tb) != 12 || !strings.HasPrefix(tb[0], "line 1:7: ") || tb[2] != "        ^" {
		t.Errorf("traceback:\n%s", strings.Join(tb, "\n"))
	}
}

func TestCancelStopsSweep(t *testing.T) {
	s := NewSession(t.TempDir())
	ctx, cancel := context.WithCancel(context.Background())
	defer cancel()
	src := "pulse p = sinc(duration = 5 ms, tbw = 8, flip = 90 deg, samples = 4000)\n" +
		"sweep p over offset -5 kHz to 5 kHz points 2001, b1 0.5 to 1.5 points 401"
	calls := 0
	err := s.Exec(ctx, src, Sink{Progress: func(task string, done, total int) {
		calls++
		if calls == 2 {
			cancel() // interrupt once the sweep is under way
		}
	}})
	if !errors.Is(err, context.Canceled) {
		t.Fatalf("error %v, want context.Canceled", err)
	}
	var tb interface{ Traceback() []string }
	if !errors.As(err, &tb) || !strings.Contains(strings.Join(tb.Traceback(), "\n"), "interrupted") {
		t.Errorf("traceback of the interrupt: %v", err)
	}
	if s.st.names["p"] == nil {
		t.Errorf("the pulse defined before the interrupt was lost")
	}
}

func TestSweepRefusedOverBudget(t *testing.T) {
	s := NewSession(t.TempDir())
	src := "pulse p = sinc(duration = 5 ms, tbw = 8, flip = 90 deg, samples = 1000000)\n" +
		"sweep p over offset -5 kHz to 5 kHz points 100000, b1 0.5 to 1.5 points 10"
	err := s.Exec(context.Background(), src, Sink{})
	if err == nil || !strings.Contains(err.Error(), "isochromat-steps (about ") || !strings.Contains(err.Error(), "here), over the session's work budget of 4e+10; use fewer points or samples, or start Nutate with a larger budget") || !strings.Contains(err.Error(), "1e+12") {
		t.Errorf("error = %v, want a refusal naming the size and the limit", err)
	}
}

func TestOverride(t *testing.T) {
	s := NewSession(t.TempDir())
	if err := s.Override("te", "30 ms"); err != nil {
		t.Fatal(err)
	}
	if err := s.Override("unused", "1"); err != nil {
		t.Fatal(err)
	}
	if err := s.Override("bad", "1 +"); err == nil {
		t.Errorf("malformed override accepted")
	}
	var out []string
	if err := s.Exec(context.Background(), "let te = 20 ms\nprint te", Sink{Display: func(b display.Bundle) { out = append(out, b["text/plain"].(string)) }}); err != nil {
		t.Fatal(err)
	}
	if len(out) != 2 || out[1] != "30 ms" {
		t.Errorf("outputs %q, want te = 30 ms", out)
	}
	if got := s.UnusedOverrides(); !reflect.DeepEqual(got, []string{"unused"}) {
		t.Errorf("unused overrides %v, want [unused]", got)
	}
}

func TestIsComplete(t *testing.T) {
	cases := []struct{ code, status string }{
		{"print 1", "complete"},
		{"pulse p = rect(duration = 1 ms,", "incomplete"},
		{"pulse p = rect(\n  duration = 1 ms", "incomplete"},
		{"sweep p over offset -1 kHz to 1 kHz points 11,", "incomplete"},
		{"print 1 +", "incomplete"},
		{"print 1)", "invalid"},
		{"export p to \"a.csv", "invalid"},
		{"", "complete"},
	}
	for _, c := range cases {
		if got, _ := IsComplete(c.code); got != c.status {
			t.Errorf("IsComplete(%q) = %s, want %s", c.code, got, c.status)
		}
	}
}

func TestComplete(t *testing.T) {
	s := NewSession(t.TempDir())
	if err := s.Exec(context.Background(), "let te = 2 ms\nlet tbw = 4\npulse hard = rect(duration = 1 ms, flip = 90 deg)", Sink{}); err != nil {
		t.Fatal(err)
	}
	cases := []struct {
		code string
		want []string // must all be among the candidates
		not  []string
	}{
		{"sw", []string{"sweep"}, []string{"sinc"}},
		{"pulse x = si", []string{"sinc"}, nil},
		{"pulse x = h", []string{"hard", "hsec"}, nil},
		{"pulse x = sinc(duration = 1 ms, t", []string{"tbw", "thickness"}, []string{"te"}},
		{"pulse x = sinc(duration = 1 ms, window = h", []string{"hann", "hamming"}, nil},
		{"pulse x = hard(fl", []string{"flip"}, nil},
		{"sweep hard over offset -1 kHz to 1 kHz points 11 show m", []string{"mx", "mxy", "mz"}, nil},
		{"sweep hard over d", []string{"duration"}, nil},
		{"sweep hard over offset -1 kHz to 1 kHz points 11 with st", []string{"start"}, nil},
		{"print 250 u", []string{"us", "uT", "um"}, nil},
		{"print 250u", []string{"us", "uT"}, nil},
		{"print 1 kHz in u", []string{"uT"}, nil},
		{"describe h", []string{"hard"}, nil},
		{"print t", []string{"te"}, nil},
		{"nucleus 3", []string{"31P", "3He"}, []string{"129Xe"}},
		{"nucleus 13", []string{"13C"}, []string{"1H", "31P"}},
		{`import w from "a.csv" with fl`, []string{"flip"}, nil},
		{`import w from "a.csv" with `, []string{"dwell", "flip", "peak", "role"}, []string{"offset"}},
		{`import w from "a.csv" with role = i`, []string{"invert"}, nil},
		{"report hard ", []string{"as"}, nil},
		{"sweep hard over offset -1 kHz to 1 kHz points 11 ", []string{"show", "with"}, []string{"kHz", "us"}},
		{"sweep hard over offset -1 kHz to 1 kHz ", []string{"points", "step"}, nil},
		{"report hard as m", []string{"markdown"}, nil},
		{"help sw", []string{"sweep"}, nil},
		{"export f", []string{"figure"}, nil},
		{"export ", []string{"hard", "sweep", "figure"}, nil},
		{"export sweep ", []string{"to"}, []string{"tbw", "te"}},
	}
	// A file name follows `to` and `from`: nothing of the session fits there.
	for _, code := range []string{"export sweep to ", "export hard to ", "export sweep to t", `export sweep to "t`, `import w from `, `import w from "a`} {
		if got, _, _ := s.Complete(code, len([]rune(code))); len(got) != 0 {
			t.Errorf("Complete(%q) = %v, want nothing (a file name follows)", code, got)
		}
	}
	for _, c := range cases {
		got, start, end := s.Complete(c.code, len([]rune(c.code)))
		for _, w := range c.want {
			if !contains(got, w) {
				t.Errorf("Complete(%q) = %v, want %s among them", c.code, got, w)
			}
		}
		for _, w := range c.not {
			if contains(got, w) {
				t.Errorf("Complete(%q) = %v, want no %s", c.code, got, w)
			}
		}
		if end != len([]rune(c.code)) || start > end {
			t.Errorf("Complete(%q) range %d..%d", c.code, start, end)
		}
	}
	// A nuclide is one word: accepting 13C replaces "13", not the text after it.
	if _, start, _ := s.Complete("nucleus 13", 10); start != 8 {
		t.Errorf("Complete(\"nucleus 13\") starts at %d, want 8", start)
	}
}

// Every keyword, shape, argument, quantity, setting and unit has inspection text.
func TestInspectEverything(t *testing.T) {
	s := NewSession(t.TempDir())
	words := append([]string{}, statementKeywords...)
	words = append(words, shapeNames()...)
	for _, sp := range shapes {
		words = append(words, sp.argNames()...)
	}
	words = append(words, argNamesOf(trainArgs)...)
	words = append(words, quantityNames()...)
	words = append(words, settingNames()...)
	words = append(words, spinAxisNames()...)
	for _, u := range units {
		if u.Name != "%" {
			words = append(words, u.Name)
		}
	}
	for _, w := range words {
		code := "x " + w + " y"
		text, ok := s.Inspect(code, 3)
		if !ok || !strings.Contains(text, w) {
			t.Errorf("Inspect(%q) = %q, %v", w, text, ok)
		}
		if h, err := Help(w); err != nil || h == "" {
			t.Errorf("Help(%q): %v", w, err)
		}
	}
	for _, topic := range []string{"", "statements", "shapes", "arguments", "quantities", "settings", "axes", "units", "nuclei", "conventions", "files", "errors"} {
		if h, err := Help(topic); err != nil || h == "" {
			t.Errorf("Help(%q): %v", topic, err)
		}
	}
	if _, err := Help("sweeep"); err == nil || !strings.Contains(err.Error(), "did you mean sweep?") {
		t.Errorf("Help(sweeep) error %v", err)
	}
}

func TestExportRefusesForeignFile(t *testing.T) {
	dir := t.TempDir()
	foreign := filepath.Join(dir, "notes.csv")
	if err := os.WriteFile(foreign, []byte("a,b\n1,2\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	s := NewSession(dir)
	err := s.Exec(context.Background(), "pulse p = rect(duration = 1 ms, flip = 90 deg)\nexport p to \"notes.csv\"", Sink{})
	if err == nil || !strings.Contains(err.Error(), "is not a waveform or sweep export") {
		t.Errorf("error %v, want a refusal", err)
	}
	if b, _ := os.ReadFile(foreign); string(b) != "a,b\n1,2\n" {
		t.Errorf("foreign file changed: %q", b)
	}
	// A waveform export may be overwritten, and reads back the same.
	src := "pulse q = sinc(duration = 2 ms, tbw = 4, flip = 90 deg, center = 100 Hz)\nexport q to \"q.csv\"\nexport q to \"q.csv\"\nimport r from \"q.csv\""
	if err := s.Exec(context.Background(), src, Sink{}); err != nil {
		t.Fatal(err)
	}
	q, r := s.st.names["q"].pulse.Pulse, s.st.names["r"].pulse.Pulse
	if q.Wave.Len() != r.Wave.Len() || !closeRel(r.Duration(), q.Duration(), 1e-12) {
		t.Fatalf("round trip: %d samples %g s, want %d samples %g s", r.Wave.Len(), r.Duration(), q.Wave.Len(), q.Duration())
	}
	for j := range q.Wave.B1 {
		if d := q.Wave.B1[j] - r.Wave.B1[j]; real(d)*real(d)+imag(d)*imag(d) > 1e-30 {
			t.Fatalf("sample %d: %v, want %v", j, r.Wave.B1[j], q.Wave.B1[j])
		}
	}
}

// The outputs follow LANGUAGE.md "Output": text/plain always, tables with
// text/html, figures as SVG and PNG with their data as JSON and no text/html,
// each followed by its table.
func TestBundleKinds(t *testing.T) {
	s := NewSession(t.TempDir())
	var got []display.Bundle
	src := "pulse p = rect(duration = 1 ms, flip = 90 deg)\ndescribe p\nsweep p over offset -2 kHz to 2 kHz points 101\nsweep p over offset -2 kHz to 2 kHz points 21, b1 0.5 to 1.5 points 11 show mz\nreport p"
	if err := s.Exec(context.Background(), src, Sink{Display: func(b display.Bundle) { got = append(got, b) }}); err != nil {
		t.Fatal(err)
	}
	fig := []string{"text/plain", "image/svg+xml", "image/png", display.ResultMIME}
	table := []string{"text/plain", "text/html"}
	// pulse; describe: figure, properties; profile: figure, features; map:
	// figure, features; report.
	want := [][]string{{"text/plain"}, fig, table, fig, table, fig, table, append(table, display.ResultMIME)}
	if len(got) != len(want) {
		t.Fatalf("%d bundles, want %d", len(got), len(want))
	}
	for i, w := range want {
		if len(got[i]) != len(w) {
			t.Errorf("bundle %d has %d types, want %q", i, len(got[i]), w)
		}
		for _, k := range w {
			if _, ok := got[i][k]; !ok {
				t.Errorf("bundle %d lacks %s", i, k)
			}
		}
	}
}

func TestProgressReported(t *testing.T) {
	s := NewSession(t.TempDir())
	src := "pulse p = sinc(duration = 2 ms, tbw = 4, flip = 90 deg, samples = 1000)\n" +
		"sweep p over offset -5 kHz to 5 kHz points 201, b1 0.5 to 1.5 points 60" // 1.2e7 steps
	var dones []int
	err := s.Exec(context.Background(), src, Sink{Progress: func(task string, done, total int) {
		if task != "sweep p" || total != 100 {
			t.Errorf("progress %q %d/%d", task, done, total)
		}
		dones = append(dones, done)
	}})
	if err != nil {
		t.Fatal(err)
	}
	if len(dones) < 2 || dones[0] != 0 || dones[len(dones)-1] != 100 {
		t.Fatalf("progress %v, want 0 first and 100 last", dones)
	}
	for i := 1; i < len(dones); i++ {
		if dones[i] <= dones[i-1] {
			t.Fatalf("progress %v does not increase", dones)
		}
	}
	// A short sweep reports nothing.
	dones = nil
	if err := s.Exec(context.Background(), "sweep p over offset -5 kHz to 5 kHz points 11", Sink{Progress: func(string, int, int) { dones = append(dones, 0) }}); err != nil || dones != nil {
		t.Errorf("short sweep: err %v, progress %v", err, dones)
	}
}

// Inputs built to exhaust the stack or memory are refused with an error.
func TestHostileInputs(t *testing.T) {
	cases := []struct{ name, src, want string }{
		{"deep parentheses", "print " + strings.Repeat("(", 100000) + "1", "nested more than 100 deep"},
		{"deep signs", "print " + strings.Repeat("-", 100000) + "1", "nested more than 100 deep"},
		{"long chain", "print 1" + strings.Repeat(" + 1", 5000), "more than 1000 terms"},
		{"huge cell", "# " + strings.Repeat("x", 2<<20), "over the limit of 1048576"},
		{"nested trains", "pulse t = " + strings.Repeat("train(", 1000) + "x", "nested more than 100 deep"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			err := NewSession(t.TempDir()).Exec(context.Background(), c.src, Sink{})
			if err == nil || !strings.Contains(err.Error(), c.want) {
				t.Errorf("error %v, want %q", err, c.want)
			}
		})
	}
}

// Inspection knows nuclide names (one word, digits first), report formats and
// start values.
func TestInspectNuclideAndWords(t *testing.T) {
	s := NewSession(t.TempDir())
	for _, c := range []struct {
		code string
		want string
	}{
		{"nucleus 13C", "13C (nucleus)"},
		{"report p as latex", "latex (report format)"},
		{"sweep p over offset 0 Hz to 1 Hz points 2 with start = x", "x (start magnetization"},
	} {
		text, ok := s.Inspect(c.code, len([]rune(c.code)))
		if !ok || !strings.Contains(text, c.want) {
			t.Errorf("Inspect(%q) = %q, %v; want it to contain %q", c.code, text, ok, c.want)
		}
	}
}
