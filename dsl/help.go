package dsl

import (
	"fmt"
	"sort"
	"strings"

	"Nutate/dsl/present"
	"Nutate/physics"
)

// helpTopics are the topics of `help TOPIC` beside the names.
var helpTopics = []string{"statements", "shapes", "arguments", "quantities", "settings", "axes", "units", "nuclei", "conventions", "files", "errors", "safety"}

// statementHelp is the syntax and meaning of each statement.
var statementHelp = []struct{ Name, Syntax, Help string }{
	{"nucleus", "nucleus NUCLEUS", "set the working nucleus (default 1H): its signed γ scales amplitudes and sets the sense of rotation. Known: " + physics.NucleusNames()},
	{"field", "field EXPR", "set the main field B0 (e.g. `field 7 T`); needed for ppm"},
	{"let", "let NAME = EXPR", "name a quantity, e.g. `let te = 20 ms`; `nutate run --set NAME=VALUE` replaces the value"},
	{"pulse", "pulse NAME = SHAPE(ARG = EXPR, ...)\npulse NAME = OTHER(ARG = EXPR, ...)", "define a pulse from a shape, or as a copy of pulse OTHER with some arguments changed (rebuilt for the current nucleus and field); a redefined pulse replaces the old one"},
	{"describe", "describe NAME[, NAME...] [with tr = EXPR]", "plot each pulse's waveform (amplitude, phase, frequency, gradient) and list its properties: duration, samples, peak in µT and Hz, flip, bandwidth, TBW, transition, ripple, energy, slice. The properties come from a simulated profile; for a long pulse (tens of thousands of samples and up) this takes a while and shows its progress, and an interrupt stops it"},
	{"sweep", "sweep NAME[, NAME...] over AXIS[, AXIS] [show QUANTITY, ...] [with SETTING = EXPR, ...]\nAXIS: KIND FROM to TO (points N | step S)", "simulate the pulses over one axis (curves; several pulses overlay) or two (a map of one quantity, the first axis horizontal). Axes: offset, b1, position, t1, t2, or any argument of the pulse's shape (the pulse is rebuilt at each point and pulse properties can be shown). Without `show`, the quantities follow the first pulse's role. `export sweep to \"file.csv\"` saves the data"},
	{"print", "print EXPR[, EXPR...]", "show values; `EXPR in UNIT` converts (`1 kHz in uT` through the nucleus, `12 ppm in Hz` through the nucleus and field)"},
	{"export", "export NAME to \"file.csv\"\nexport sweep to \"file.csv\"\nexport figure to \"file.svg\" | \"file.png\" | \"file.pdf\"", "write the pulse's waveform as CSV: time (s), amplitude (T), phase (rad), frequency offset (Hz), gradient (T/m), after a comment line with nucleus, duration, dwell and role (if any). The phase is B1's own in the carrier frame (any offset's ramp included); the frequency offset is the pulse's centre, or its instantaneous frequency when swept (see `help files`). `export sweep to \"file.csv\"` writes the last sweep's data (axes, then one column per curve). `export figure to \"file.svg\"` writes the session's last figure (of a sweep or describe) as SVG, PNG (300 dpi) or PDF (fonts embedded), as the extension says; the same figure gives the same bytes. A file that is not an export is never overwritten; the write is atomic, and the path stays in the notebook's folder (see `help files`)"},
	{"import", "import NAME from \"file.csv\" [with dwell = EXPR, flip = EXPR | peak = EXPR, role = ROLE]", "read a waveform: an export, a CSV with a header naming time and amplitude (other columns optional, units in parentheses), a plain two-column time/amplitude file, or with `with dwell = EXPR` a plain one-column file of amplitudes (T), one sample a row; a file with a time column refuses dwell. Amplitudes are in tesla unless the header names a unit; `flip` or `peak` scales the waveform (a normalised shape), `role` says what it is for (an export's own role otherwise); a peak over 10 mT read as given is refused as a unit mistake. A constant frequency offset column is the pulse's centre, a varying one a frequency modulation (see `help files`). Paths are relative to the notebook's folder and stay inside it unless the person starting Nutate allowed more (see `help files`)"},
	{"report", "report NAME[, NAME...] [as markdown | as latex]", "a methods-section table of the pulses: shape, duration, samples, peak in µT and Hz, flip, bandwidth, TBW, energy (with its caution), adiabatic threshold. Like describe, it shows its progress for long pulses"},
	{"help", "help [TOPIC]", "topics: " + strings.Join(helpTopics, ", ") + ", or any statement, shape, argument, quantity or unit name"},
	{"reset", "reset", "forget every name; nucleus 1H, no field"},
}

const conventionsHelp = `Conventions
  Rotating frame at the carrier. dM/dt = γ M × B_eff with B_eff = (B1x, B1y, Δω/γ),
  Δω = ω(spin) − ω(carrier). Phase 0 puts B1 along +x, so on resonance a 90° pulse of
  phase 0 takes +z to +y for positive γ. Negative-γ nuclei (3He, 15N, 17O, 129Xe)
  rotate the other way.
  Offsets carry the sign of γ: a chemical shift δ is the offset Δf = γ̄·B0·δ and a
  position x in a gradient G is Δf = γ̄·G·x, so for a negative-γ nucleus +10 ppm is a
  negative offset in Hz (` + "`print 10 ppm in Hz`" + ` shows it).
  Printed amplitudes give both µT and Hz (|γ̄|B1, γ̄ = γ/2π).
  Simulation: each sample is an exact rotation (with relaxation, the exact solution of
  the linear step). Echo is the crushed spin-echo response |β|² of the Cayley–Klein
  parameters (Pauly et al., IEEE TMI 10:53, 1991); echophase is its phase arg(−β²),
  the phase of the refocused Mxy for Mxy along +x before the pulse.
  Gyromagnetic ratios: 1H CODATA 2018; others IUPAC, Harris et al., Pure Appl. Chem.
  73:1795 (2001).
  Energy and B1rms are relative, waveform-only estimates, never SAR: defer to the
  scanner's own SAR supervision, IEC 60601-2-33, local regulations and the site's MR
  safety officer.`

const filesHelp = `Files
  export NAME to "file.csv" writes a comment line (nucleus, duration, dwell, and the
  role if any) and a header row: time (s), amplitude (T), phase (rad), frequency
  offset (Hz), gradient (T/m); one row per sample, time at the sample's start.
  The columns:
    amplitude  |B1| of the sample;
    phase      B1's phase in the carrier's frame, everything included: the
               pulse's phase, the ramp of an off-centre pulse, a sweep's phase;
    frequency  where the pulse plays, relative to the carrier: the centre of a
    offset     fixed-frequency pulse (the same on every row), or the
               instantaneous frequency of a swept one. It says what the phase
               already holds; never add it to the phase a second time;
    gradient   the slice-select gradient, 0 without one.
  import NAME from "file.csv" [with dwell = EXPR, flip = EXPR | peak = EXPR,
  role = ROLE] reads the same columns (only time
  and amplitude required; units may be changed in the header, e.g. amplitude (uT)),
  or a plain two-column time/amplitude file. A frequency offset that is the same on
  every row is the pulse's centre (describe measures its band there; without a
  phase column its ramp is applied); one that varies is a frequency modulation
  (without a phase column it is integrated into the phase) and makes it a swept
  pulse: with a role, its adiabatic threshold is searched over the central half of
  its sweep, as for the designed sweeps. A gradient that is the same on every row
  is the pulse's gradient; an export's role is kept. So an export read back is
  measured around the same centre as the original and gives the same bandwidth,
  rotation, ripples and threshold (design figures such as the TBW are not carried). With dwell it reads a plain column of
  amplitudes (T), one sample a row; a file with a time column refuses dwell.
  A malformed file is refused with the row and column of the fault (quoting at
  most 8 characters of it); an import reads at most 256 MiB, rows of at most 4096
  bytes, and 10⁶ samples.
  Paths are relative to the notebook's folder and stay inside it: a path leaving
  it (absolute elsewhere, .. above it, a symbolic link out of it) is refused,
  unless the person starting Nutate allowed the folder that holds it (nutate run
  --allow-files DIR, nutate install --allow-files DIR, or NUTATE_ALLOW_FILES);
  a notebook cannot allow it itself. Only regular files are read or written (no
  devices, pipes or /proc files). Outputs name the file by its resolved path.
  Writes go through a temporary file renamed over the target, so a failed write
  (a full disk) leaves the old file as it was.`

// definitionsHelp states the one meaning of each measured word, used alike by
// describe, sweep, report and the `show` quantities.
const definitionsHelp = `Definitions (describe, sweep, report and show use these alike)
  design      a figure the shape was built to: flip (nominal), bandwidth and TBW
              (design), slice thickness (design). The pulse line shows only these
              and the waveform's own peak.
  measured    a figure read from an exact Bloch simulation of the samples: FWHM,
              transition, ripples, rotation at the centre, threshold, slice FWHM.
  profile     the role's quantity against offset: Mz for invert and saturate,
              |Mxy| for excite and no role, echo |β|² for refocus, from +z.
  pass value  the profile's value in its pass band by design: Mz = −1 (invert),
              Mz = 0 (saturate), |Mxy| = sin flip (excite), |β|² = sin²(flip/2)
              (refocus), 1 for adiabatic pulses; where the design fixes none (an
              imported excite or refocus, a pulse without role or flip), the centre's value.
              The stop-band value is the start state (Mz = 1, |Mxy| = 0, |β|² = 0).
  FWHM        (bandwidth, measured) the width where the profile is half-way between
              its stop-band and pass values: Mz = 0 for inversion, |Mxy| = 0.5 for
              a 90° excitation, |β|² = 0.5 for a 180° refocusing pulse; "—" when the
              centre does not reach that level.
  transition  the mean over both edges of the distance between the 90 % and 10 %
              points of that swing.
  ripple      pass: the largest deviation from the pass value within the FWHM
              edges moved inward by one transition width; stop: the largest
              deviation from the stop-band value beyond the edges moved outward by
              one transition width. Both in % of M0 in the profile's quantity (for
              inversion in Mz, as slr's pass and stop are given).
  threshold   (adiabatic) the lowest peak B1 at which the target holds at 11
              offsets over ±¼ of the design band (bir4: at the centre) and keeps
              holding over half an octave of B1; the same whatever peak the pulse
              was given. The upper B1 limit is where it fails again above.
  peak limits a peak above 100 kHz of nutation (γ̄B1) or 10 mT gets a warning:
              MRI coils give tens of µT, NMR probes up to about 100 kHz.`

const errorsHelp = `Errors
  An error names the line and column, repeats the line with a caret under the fault,
  and says what was expected. Syntax errors are all reported at once (one per line),
  after the statements before the first faulty one have run; at run time the first
  error stops the cell, earlier outputs stay and the failing statement changes
  nothing.`

// Help returns the help text for topic ("" for the overview). The texts are those
// shown by inspection in the notebook and by `nutate help`.
func Help(topic string) (string, error) {
	topic = strings.TrimSpace(topic)
	switch topic {
	case "":
		return overviewHelp(), nil
	case "statements":
		var b strings.Builder
		b.WriteString("Statements (one per line; `;` also separates; a line continues while a `(` is open or after `,`)\n")
		for _, s := range statementHelp {
			for _, l := range strings.Split(s.Syntax, "\n") {
				fmt.Fprintf(&b, "  %s\n", l)
			}
		}
		return strings.TrimRight(b.String(), "\n"), nil
	case "shapes":
		var b strings.Builder
		b.WriteString("Shapes (every shape also takes the common arguments: `help arguments`)\n")
		for _, s := range shapes {
			fmt.Fprintf(&b, "  %-6s %s\n", s.Name, s.Help)
		}
		return strings.TrimRight(b.String(), "\n"), nil
	case "arguments":
		var b strings.Builder
		b.WriteString("Arguments every shape takes (amplitude by exactly one of flip or peak)\n")
		for _, a := range commonArgs {
			b.WriteString("  " + argLine(a) + "\n")
		}
		return strings.TrimRight(b.String(), "\n"), nil
	case "quantities":
		return nameList("Quantities for `show` (default by role: excite mxy phase; invert, saturate mz; refocus echo, with echophase on one axis; otherwise mx my mz, or mz on a map; a map shows the first)",
			10, len(quantityTable), func(i int) (string, string) { return quantityTable[i].Name, quantityTable[i].Help }) + "\n\n" + definitionsHelp + "\n\n" + definitionNotesHelp(), nil
	case "settings":
		return nameList("Settings after `with`", 7, len(settingTable),
			func(i int) (string, string) { return settingTable[i].Name, settingTable[i].Help }), nil
	case "axes":
		var b strings.Builder
		b.WriteString(nameList("Sweep axes: KIND FROM to TO (points N | step S; the step goes from FROM toward TO whatever its sign)", 9, len(spinAxes),
			func(i int) (string, string) { return spinAxes[i].Name, spinAxes[i].Help }) + "\n")
		b.WriteString("  or any argument of the pulse's shape (duration, flip, tbw, bandwidth, ...): the pulse is rebuilt at each point and pulse properties can be shown")
		return b.String(), nil
	case "units":
		var b strings.Builder
		b.WriteString("Units (case-sensitive; a unit may follow a number with or without a space)\n")
		byDim := map[string][]string{}
		var order []string
		for _, u := range units {
			d := u.Dim.Name()
			if u.Name == "%" {
				d = "percent"
			}
			if _, ok := byDim[d]; !ok {
				order = append(order, d)
			}
			byDim[d] = append(byDim[d], u.Name)
		}
		for _, d := range order {
			fmt.Fprintf(&b, "  %-15s %s\n", d, strings.Join(byDim[d], " "))
		}
		b.WriteString("  Quantities combine with + - * / and parentheses; dimensions are checked.\n")
		b.WriteString("  A shift in ppm meeting a frequency or a time is its offset γ̄·B0·δ in Hz (signed like γ;\n")
		b.WriteString("  needs `field`): `3.5 ppm / bw` is a ratio, `3.5 ppm + 100 Hz` a frequency. ppm alone,\n")
		b.WriteString("  ppm ± ppm, ppm × number and ppm / ppm stay in ppm (or plain numbers).\n")
		b.WriteString("  `x in UNIT` converts: frequency ↔ field through the nucleus (γ̄), ppm ↔ frequency through the nucleus and field.\n")
		b.WriteString("  `pi` is the constant π (`flip = pi rad`, `pi/2 * rad`). An axis whose first end is a plain\n")
		b.WriteString("  number takes the unit of the second: `offset -1 to 1 kHz` is -1 kHz to 1 kHz.")
		return b.String(), nil
	case "nuclei":
		var b strings.Builder
		b.WriteString("Nuclei (γ/2π)\n")
		for _, n := range physics.Nuclei() {
			fmt.Fprintf(&b, "  %-6s %12s MHz/T  %s\n", n.Name, present.Number(n.GammaBar/1e6), n.Reference)
		}
		return strings.TrimRight(b.String(), "\n"), nil
	case "conventions":
		return conventionsHelp, nil
	case "files":
		return filesHelp, nil
	case "errors":
		return errorsHelp, nil
	case "safety":
		return safetyHelp, nil
	}
	if text, ok := wordHelp(topic); ok {
		return text, nil
	}
	return "", fmt.Errorf("no help for %s%s; topics: %s", quoteText(topic), suggest(topic, helpWords()), strings.Join(helpTopics, ", "))
}

func overviewHelp() string {
	var b strings.Builder
	b.WriteString("Nutate: design and simulate MR RF pulses.\n\n")
	for _, s := range statementHelp {
		fmt.Fprintf(&b, "  %-9s %s\n", s.Name, strings.Split(s.Syntax, "\n")[0])
	}
	b.WriteString("\nMore: help " + strings.Join(helpTopics, " | ") + ", or help NAME (e.g. help sinc, help flip).")
	return b.String()
}

func argLine(a argSpec) string {
	var kind string
	switch a.Kind {
	case argCount:
		kind = "whole number"
	case argWord:
		kind = strings.Join(a.Words, " | ")
	default:
		kind = a.Dim.Name()
		if a.Dim == dimField {
			kind = "magnetic field (T units or Hz)"
		}
		if a.Dim == dimFrequency {
			kind = "frequency (Hz or ppm)"
		}
	}
	s := fmt.Sprintf("%-10s %s: %s", a.Name, kind, a.Help)
	if a.Required {
		s += " (required)"
	} else if a.Default != "" {
		s += " (default " + a.Default + ")"
	}
	return s
}

// wordHelp is the help for a single name: statement, shape, argument, quantity,
// setting, axis, unit or nucleus. A name with several meanings lists each.
func wordHelp(w string) (string, bool) {
	var parts []string
	for _, s := range statementHelp {
		if s.Name == w {
			parts = append(parts, fmt.Sprintf("%s (statement)\n  %s\n  %s", w, strings.ReplaceAll(s.Syntax, "\n", "\n  "), s.Help))
		}
	}
	if s, ok := lookupShape(w); ok {
		parts = append(parts, shapeHelp(s))
	}
	var argShapes []string
	var argText string
	for _, s := range shapes {
		for _, a := range s.Args {
			if a.Name == w {
				argShapes = append(argShapes, s.Name)
				if argText == "" {
					argText = argLine(a)
				}
			}
		}
	}
	for _, a := range commonArgs {
		if a.Name == w {
			parts = append(parts, "argument of every shape\n  "+argLine(a))
		}
	}
	if argText != "" {
		parts = append(parts, "argument of "+strings.Join(argShapes, ", ")+"\n  "+argText)
	}
	if q, ok := lookupQuantity(w); ok {
		kind := "magnetization quantity"
		if q.Property {
			kind = "pulse property"
		}
		u := q.Unit
		if u == "" {
			u = "M0 units"
			if q.Property {
				u = "plain number"
			}
		}
		parts = append(parts, fmt.Sprintf("%s (%s for `show`, in %s)\n  %s\n  method: %s", q.Name, kind, present.UnitLabel(u), q.Help, q.Method))
	}
	for _, s := range settingTable {
		if s.Name == w {
			parts = append(parts, fmt.Sprintf("%s (setting after `with`)\n  %s", w, s.Help))
		}
	}
	for _, a := range spinAxes {
		if a.Name == w {
			parts = append(parts, fmt.Sprintf("%s (sweep axis)\n  %s", w, a.Help))
		}
	}
	if u, ok := lookupUnit(w); ok {
		parts = append(parts, fmt.Sprintf("%s (unit of %s)\n  %s = %s %s", u.Name, u.Dim.Name(), u.Name, present.Number(u.Factor), baseUnit(u.Dim)))
	}
	if n, ok := physics.Lookup(w); ok {
		parts = append(parts, fmt.Sprintf("%s (nucleus)\n  γ/2π = %s MHz/T (%s)", n.Name, present.Number(n.GammaBar/1e6), n.Reference))
	}
	switch w {
	case "over", "to", "points", "step", "show", "with":
		parts = append(parts, "part of `sweep`: "+strings.Split(statementHelp[5].Syntax, "\n")[0])
	case piName:
		parts = append(parts, "pi (constant)\n  π = 3.14159…, a plain number written like one: `flip = pi rad`, `pi/2 * rad` (a unit binds to the number before it, so `pi/2 rad` reads as pi / (2 rad)), `2*pi`. It cannot be redefined.")
	case "in":
		parts = append(parts, "`EXPR in UNIT` converts a value for display: `1 kHz in uT`, `12 ppm in Hz`")
	case "at":
		parts = append(parts, "`at PHASE` after a train element plays it at that phase")
	case "as":
		parts = append(parts, "`report ... as markdown` or `as latex`")
	case "markdown", "latex":
		parts = append(parts, w+" (report format)\n  `report NAME, ... as "+w+"`: the methods table as "+map[string]string{"markdown": "a Markdown table", "latex": "a LaTeX table environment to paste into a manuscript (a wide one needs \\usepackage{graphicx})"}[w])
	case "z", "-z", "x", "y":
		parts = append(parts, w+" (start magnetization, `with start = "+w+"`)\n  the spins begin along "+w+" (default z, thermal equilibrium)")
	case "window", "hann", "hamming", "none":
		if w != "window" {
			parts = append(parts, w+" (sinc window)\n  none: 1; Hann: 0.5 + 0.5·cos(2πt/T); Hamming: 0.54 + 0.46·cos(2πt/T), t from the pulse's middle (common practice)")
		}
	case "excite", "invert", "refocus", "saturate":
		parts = append(parts, w+" (role)\n  default quantity: "+strings.Join(defaultQuantitiesOf(w), ", "))
	case "linear", "minimum", "maximum":
		parts = append(parts, w+" (slr design)\n  phase of the underlying filter")
	}
	if len(parts) == 0 {
		return "", false
	}
	return strings.Join(parts, "\n\n"), true
}

func defaultQuantitiesOf(role string) []string {
	switch role {
	case "excite":
		return []string{"mxy", "phase"}
	case "refocus":
		return []string{"echo"}
	}
	return []string{"mz"}
}

func baseUnit(d Dim) string {
	switch d {
	case dimTime:
		return "s"
	case dimFrequency:
		return "Hz"
	case dimField:
		return "T"
	case dimLength:
		return "m"
	case dimAngle:
		return "rad"
	case dimPPM:
		return "ppm"
	case dimGradient:
		return "T/m"
	}
	return ""
}

func shapeHelp(s *shapeSpec) string {
	var b strings.Builder
	if s.Composite {
		fmt.Fprintf(&b, "%s (shape)\n  pulse NAME = %s(P1, P2 at PHASE, ..., gap = EXPR)\n  %s\n  method: %s\n  arguments:\n", s.Name, s.Name, s.Help, s.Method)
		for _, a := range s.Args {
			b.WriteString("    " + argLine(a) + "\n")
		}
		return strings.TrimRight(b.String(), "\n")
	}
	fmt.Fprintf(&b, "%s (shape)\n  pulse NAME = %s(", s.Name, s.Name)
	var req []string
	for _, a := range s.allArgs() {
		if a.Required {
			req = append(req, a.Name+" = ...")
		}
	}
	common := argNamesOf(commonArgs)
	if s.PeakOnly {
		req = append(req, "peak = ...", "...")
		for i, n := range common {
			if n == "flip" {
				common = append(common[:i:i], common[i+1:]...)
				break
			}
		}
	} else {
		req = append(req, "flip = ... | peak = ...", "...")
	}
	b.WriteString(strings.Join(req, ", ") + ")\n")
	fmt.Fprintf(&b, "  %s\n  method: %s\n", s.Help, s.Method)
	if len(s.Args) == 0 {
		b.WriteString("  arguments: the common ones: " + strings.Join(common, ", ") + " (help arguments)")
		return b.String()
	}
	b.WriteString("  arguments:\n")
	for _, a := range s.Args {
		b.WriteString("    " + argLine(a) + "\n")
	}
	b.WriteString("  and the common ones: " + strings.Join(common, ", ") + " (help arguments)")
	return b.String()
}

func argNamesOf(list []argSpec) []string {
	var out []string
	for _, a := range list {
		out = append(out, a.Name)
	}
	return out
}

// helpWords lists every word with help, for suggestions and completion.
func helpWords() []string {
	set := map[string]bool{}
	for _, w := range helpTopics {
		set[w] = true
	}
	for _, s := range statementHelp {
		set[s.Name] = true
	}
	for _, s := range shapes {
		set[s.Name] = true
		for _, a := range s.Args {
			set[a.Name] = true
		}
	}
	for _, a := range commonArgs {
		set[a.Name] = true
	}
	for _, q := range quantityTable {
		set[q.Name] = true
	}
	for _, s := range settingTable {
		set[s.Name] = true
	}
	set[piName] = true
	var out []string
	for w := range set {
		out = append(out, w)
	}
	sort.Strings(out)
	return out
}

// nameList is a help listing: a heading, then one "name  help" line per row with the
// names padded to width.
func nameList(heading string, width, n int, row func(int) (name, help string)) string {
	var b strings.Builder
	b.WriteString(heading)
	for i := 0; i < n; i++ {
		name, help := row(i)
		fmt.Fprintf(&b, "\n  %-*s %s", width, name, help)
	}
	return b.String()
}
