package dsl

import (
	"context"
	"errors"
	"fmt"
	"maps"
	"math"
	"math/cmplx"
	"slices"
	"strconv"
	"strings"

	"Nutate/dsl/present"
	"Nutate/physics"
	"Nutate/physics/shape"
	"Nutate/physics/slr"
)

// argKind says how an argument's value is read.
type argKind int

const (
	argQuantity argKind = iota // a quantity of Dim (with the trade's equivalents)
	argCount                   // a positive whole number
	argWord                    // one of Words
)

// argSpec is one argument of a shape: its dimension, default, help text, and the
// group of arguments it excludes (flip/peak, samples/dwell, gradient/thickness...).
type argSpec struct {
	Name     string
	Kind     argKind
	Dim      Dim
	Words    []string
	Default  string // as shown in help; "" when there is none
	Help     string
	Group    string // arguments of one group exclude each other
	Required bool
	// Positive arguments refuse 0 and below: the shapes take 0 as "the
	// default", so a 0 written by hand would silently become it.
	Positive bool
}

// shapeSpec is one row of the shape table.
type shapeSpec struct {
	Name   string
	Help   string
	Method string // the source of the method
	Args   []argSpec
	Build  func(b *builder) (*shape.Pulse, error)
	// Composite rows (train) take elements as well as Args, and none of the
	// common arguments; they are built by the evaluator's train.
	Composite bool
	// PeakOnly rows (adiabatic shapes) take their amplitude from peak alone:
	// the common flip does not apply (bir4's flip is an argument of its own).
	PeakOnly bool
}

// commonArgs are taken by every shape (LANGUAGE.md "Shapes").
var commonArgs = []argSpec{
	{Name: "duration", Dim: dimTime, Required: true, Help: "pulse length"},
	{Name: "flip", Dim: dimAngle, Group: "amplitude", Help: "nominal on-resonance flip angle; sets the amplitude (give flip or peak)"},
	{Name: "peak", Dim: dimField, Group: "amplitude", Help: "peak B1, in tesla units or in Hz (γ̄·B1); sets the amplitude (give flip or peak)"},
	{Name: "phase", Dim: dimAngle, Default: "0 deg", Help: "constant RF phase; 0 puts B1 along +x"},
	{Name: "center", Dim: dimFrequency, Default: "0 Hz", Help: "carrier offset of the pulse's band, in Hz or ppm (ppm needs `field`)"},
	{Name: "samples", Kind: argCount, Group: "sampling", Default: "the shape's own", Help: "number of waveform samples"},
	{Name: "dwell", Dim: dimTime, Group: "sampling", Help: "sample length; must divide the duration"},
	{Name: "gradient", Dim: dimGradient, Group: "slice", Help: "slice-select gradient played with the pulse"},
	{Name: "thickness", Dim: dimLength, Group: "slice", Help: "slice thickness as selected: the gradient comes from the measured width W of the role's own profile where it is half-way (|Mxy| for excite, Mz for invert and saturate, |β|² for refocus), thickness = W/(γ̄·G)"},
	{Name: "role", Kind: argWord, Words: []string{"excite", "invert", "refocus", "saturate"}, Help: "what the pulse is for; sets the default `show` quantity and the target of measured properties"},
}

// shapes is the shape table: one explicit row per shape in LANGUAGE.md.
var shapes = []*shapeSpec{
	{
		Name:   "rect",
		Help:   "constant amplitude (hard pulse); one sample is exact",
		Method: "rectangular pulse; flip = 360°·γ̄·B1·T (common practice)",
		Build:  func(b *builder) (*shape.Pulse, error) { return shape.Rect(b.common(), b.gamma) },
	},
	{
		Name:   "sinc",
		Help:   "windowed sinc; tbw zero crossings over the duration",
		Method: "windowed sinc, bandwidth ≈ tbw/duration (Bernstein, King & Zhou, Handbook of MRI Pulse Sequences, 2004)",
		Args: []argSpec{
			{Name: "tbw", Dim: dimNumber, Default: "4", Group: "zeros", Help: "time-bandwidth product (= number of zero crossings)"},
			{Name: "lobes", Kind: argCount, Group: "zeros", Help: "number of lobes, main lobe included (tbw = lobes + 1, common practice)"},
			{Name: "bandwidth", Dim: dimFrequency, Group: "zeros", Help: "measured band instead of tbw: the full width of the role's own profile at half-way (|Mxy| for excite, Mz for invert and saturate, |β|² for refocus); the design tbw is chosen to give it"},
			{Name: "window", Kind: argWord, Words: shape.WindowNames(), Default: "none", Help: "taper: Hann 0.5 + 0.5·cos(2πt/T) or Hamming 0.54 + 0.46·cos(2πt/T)"},
		},
		Build: func(b *builder) (*shape.Pulse, error) {
			w, _ := shape.ParseWindow(b.word("window", "none"))
			if l, ok := b.vals["lobes"]; ok {
				return shape.SincLobes(b.common(), b.gamma, int(l), w)
			}
			return measuredBand(b, b.tbw(4), func(tbw float64) (*shape.Pulse, error) { return shape.Sinc(b.common(), b.gamma, tbw, w) })
		},
	},
	{
		Name:   "gauss",
		Help:   "Gaussian envelope, width by tbw or by the relative amplitude at the ends",
		Method: "Gaussian; the spectrum of exp(−t²/2σ²) has FWHM √(2 ln 2)/(πσ)",
		Args: []argSpec{
			{Name: "tbw", Dim: dimNumber, Default: "cutoff 1.1 % (T = 6σ)", Group: "width", Help: "time-bandwidth product (small-tip FWHM × duration)"},
			{Name: "cutoff", Dim: dimNumber, Group: "width", Help: "relative amplitude at the ends, 0 to 1 (fraction or %)"},
			{Name: "bandwidth", Dim: dimFrequency, Group: "width", Help: "measured band instead of tbw: the full width of the role's own profile at half-way (|Mxy| for excite, Mz for invert and saturate, |β|² for refocus); the design tbw is chosen to give it"},
		},
		Build: func(b *builder) (*shape.Pulse, error) {
			tbw, cut := b.tbw(0), b.num("cutoff", 0)
			if tbw == 0 && cut == 0 {
				cut = math.Exp(-4.5) // T = 6σ (common practice)
			}
			return measuredBand(b, tbw, func(tbw float64) (*shape.Pulse, error) { return shape.Gauss(b.common(), b.gamma, tbw, cut) })
		},
	},
	{
		Name:   "slr",
		Help:   "Shinnar–Le Roux design for a role, with pass and stop ripples; the role's own profile (|Mxy| for excite, Mz for invert and saturate, |β|² for refocus) is half-way at ±bandwidth/2",
		Method: "Shinnar–Le Roux (Pauly et al., IEEE TMI 10:53, 1991): equiripple β filter, transition D∞/TBW of the band (Herrmann, Rabiner & Chan 1973), edges (1 ∓ W)·TBW/(2T) moved together so the role's profile is half-way at TBW/(2T); on-resonance flip pinned",
		Args: []argSpec{
			{Name: "tbw", Dim: dimNumber, Default: "4", Group: "width", Help: "time-bandwidth product: the full width of the role's profile at half-way × duration"},
			{Name: "bandwidth", Dim: dimFrequency, Group: "width", Help: "full width of the role's profile at half-way, instead of tbw (tbw = bandwidth × duration)"},
			{Name: "pass", Dim: dimNumber, Default: "1%", Help: "pass-band ripple of the profile (fraction or %)"},
			{Name: "stop", Dim: dimNumber, Default: "1%", Help: "stop-band ripple of the profile (fraction or %)"},
			{Name: "design", Kind: argWord, Words: slr.DesignNames(), Default: "linear", Help: "phase of the underlying filter"},
			{Name: "stopband", Kind: argWord, Words: []string{"flat", "rising"}, Default: "flat", Help: "flat: the published equiripple stopband, whose ripples put spikes in the first and last samples (5–80 % of the peak); rising (linear phase only): the stopband weight rises away from the edge, which brings the end samples to about 1 % of the peak at some cost in ripple near the edges (most for 90° excite)"},
		},
		Build: buildSLR,
	},
	{
		Name:     "hsec",
		Help:     "adiabatic hyperbolic secant HSn; amplitude by peak",
		PeakOnly: true,
		Method:   "Silver, Joseph & Hoult, Phys. Rev. A 31:2753 (1985); HSn: Tannús & Garwood, J. Magn. Reson. A 120:133 (1996)",
		Args: []argSpec{
			{Name: "bandwidth", Dim: dimFrequency, Required: true, Help: "frequency sweep range"},
			{Name: "order", Kind: argCount, Default: "1", Help: "n of HSn"},
			{Name: "beta", Dim: dimNumber, Default: "5.3", Positive: true, Help: "truncation: the amplitude falls to sech(beta) at the ends"},
		},
		Build: func(b *builder) (*shape.Pulse, error) {
			return shape.Hsec(b.common(), b.gamma, int(b.num("order", 1)), b.num("bandwidth", 0), b.num("beta", 0))
		},
	},
	{
		Name:     "chirp",
		Help:     "linear frequency sweep at constant amplitude, edges smoothed; amplitude by peak",
		PeakOnly: true,
		Method:   "linear sweep; adiabatic passage (Landau–Zener, 1932)",
		Args: []argSpec{
			{Name: "bandwidth", Dim: dimFrequency, Required: true, Help: "frequency sweep range"},
			{Name: "ramp", Dim: dimNumber, Default: "0", Help: "fraction of the duration smoothed at each end (0 to 0.5, or %)"},
		},
		Build: func(b *builder) (*shape.Pulse, error) {
			return shape.Chirp(b.common(), b.gamma, b.num("bandwidth", 0), b.num("ramp", 0))
		},
	},
	{
		Name:     "wurst",
		Help:     "wideband uniform-rate smooth-truncation sweep; amplitude by peak",
		PeakOnly: true,
		Method:   "WURST (Kupce & Freeman, J. Magn. Reson. A 115:273, 1995)",
		Args: []argSpec{
			{Name: "bandwidth", Dim: dimFrequency, Required: true, Help: "frequency sweep range"},
			{Name: "order", Dim: dimNumber, Default: "20", Positive: true, Help: "n of the amplitude 1 − |sin(πt/T)|ⁿ"},
		},
		Build: func(b *builder) (*shape.Pulse, error) {
			return shape.Wurst(b.common(), b.gamma, b.num("bandwidth", 0), b.num("order", 0))
		},
	},
	{
		Name:     "bir4",
		Help:     "B1-insensitive rotation by flip; amplitude by peak",
		PeakOnly: true,
		Method:   "BIR-4 (Garwood & Ke, J. Magn. Reson. 94:511, 1991)",
		Args: []argSpec{
			{Name: "bandwidth", Dim: dimFrequency, Required: true, Help: "frequency sweep range"},
			{Name: "flip", Dim: dimAngle, Required: true, Help: "rotation angle, set by the phase jumps (the amplitude is set by peak)"},
			{Name: "lambda", Dim: dimNumber, Default: "10", Positive: true, Help: "tanh amplitude modulation constant λ"},
			{Name: "kappa", Dim: dimAngle, Default: "atan(20) = 87.14 deg", Positive: true, Help: "tan frequency modulation constant κ"},
		},
		Build: func(b *builder) (*shape.Pulse, error) {
			return shape.Bir4(b.common(), b.gamma, b.num("bandwidth", 0), b.num("lambda", 0), b.num("kappa", 0))
		},
	},
	{
		Name:      "train",
		Help:      "pulses played back to back: train(P1, P2 at 90 deg, ..., gap = EXPR); each element is a pulse name or a shape call",
		Method:    "concatenation of the elements' samples, each rotated by its phase",
		Args:      trainArgs,
		Composite: true,
	},
}

// lookupShape finds a shape row.
func lookupShape(name string) (*shapeSpec, bool) {
	for _, s := range shapes {
		if s.Name == name {
			return s, true
		}
	}
	return nil, false
}

func shapeNames() []string {
	out := []string{}
	for _, s := range shapes {
		out = append(out, s.Name)
	}
	return out
}

// allArgs lists the shape's own arguments then the common ones.
// A shape's own argument of a common name (bir4's flip) replaces the common one.
func (s *shapeSpec) allArgs() []argSpec {
	out := append([]argSpec{}, s.Args...)
	if s.Composite {
		return out
	}
	for _, a := range commonArgs {
		own := false
		for _, b := range s.Args {
			own = own || b.Name == a.Name
		}
		if !own {
			out = append(out, a)
		}
	}
	return out
}

func (s *shapeSpec) arg(name string) (argSpec, bool) {
	for _, a := range s.allArgs() {
		if a.Name == name {
			return a, true
		}
	}
	return argSpec{}, false
}

func (s *shapeSpec) argNames() []string {
	var out []string
	for _, a := range s.allArgs() {
		out = append(out, a.Name)
	}
	return out
}

// argVal is an argument as given: its expression (for positions and messages) and
// its value, or its word.
type argVal struct {
	Pos  Pos
	Val  Value
	Word string
}

// pulseDef is a named pulse: how it was made (so that a copy or a sweep can change
// an argument and rebuild it) and the built waveform.
type pulseDef struct {
	Name    string
	Spec    *shapeSpec // nil for a train or an import
	Kind    string     // shape name, "train" or "imported"
	Args    map[string]argVal
	Elems   []trainElem
	Pulse   *shape.Pulse
	Nucleus physics.Nucleus
	Source  string // imported file
}

// builder hands a shape's Build function its resolved arguments in base units.
type builder struct {
	vals  map[string]float64
	words map[string]string
	gamma float64
	ctx   context.Context // for long designs (slr) to stop on an interrupt
}

func (b *builder) num(name string, def float64) float64 {
	if v, ok := b.vals[name]; ok {
		return v
	}
	return def
}

// measuredBand builds an amplitude-modulated pulse with build at the design
// time-bandwidth product tbw; when the bandwidth argument was given, it then
// scales the design tbw by asked/measured until the measured width of the
// role's own profile (shape.ProfileWidth) is the bandwidth asked within
// bandTol, and records that width in Pulse.Width.
func measuredBand(b *builder, tbw float64, build func(tbw float64) (*shape.Pulse, error)) (*shape.Pulse, error) {
	p, err := build(tbw)
	want, ok := b.vals["bandwidth"]
	if err != nil || !ok {
		return p, err
	}
	ctx := b.ctx
	if ctx == nil {
		ctx = context.Background()
	}
	for range 6 {
		w, werr := shape.ProfileWidth(ctx, p)
		if werr != nil {
			return p, nil // no half-way width: the design bandwidth stands
		}
		p.Width = w
		if math.Abs(w-want) <= bandTol*want {
			break
		}
		tbw *= want / w
		q, err := build(tbw)
		if err != nil {
			return nil, err
		}
		p = q
		p.Width = 0
	}
	if p.Width == 0 {
		if w, err := shape.ProfileWidth(ctx, p); err == nil {
			p.Width = w
		}
	}
	return p, nil
}

// bandTol is how close to the asked bandwidth measuredBand brings the
// measured width.
const bandTol = 1e-3

// tbw is the time-bandwidth product given as tbw, or as bandwidth × duration.
func (b *builder) tbw(def float64) float64 {
	if bw, ok := b.vals["bandwidth"]; ok {
		return bw * b.num("duration", math.NaN())
	}
	return b.num("tbw", def)
}

func (b *builder) word(name, def string) string {
	if w, ok := b.words[name]; ok {
		return w
	}
	return def
}

func (b *builder) common() shape.Common {
	c := shape.NewCommon()
	c.Duration = b.num("duration", math.NaN())
	c.Flip = b.num("flip", math.NaN())
	c.Peak = b.num("peak", math.NaN())
	c.Phase = b.num("phase", 0)
	c.Center = b.num("center", 0)
	c.Samples = int(b.num("samples", 0))
	c.Dwell = b.num("dwell", math.NaN())
	c.Gradient = b.num("gradient", 0)
	c.Thickness = b.num("thickness", 0)
	c.Role, _ = shape.ParseRole(b.word("role", ""))
	return c
}

// evalArgs evaluates a call's named arguments against the shape row.
func (ev *evaluator) evalArgs(spec *shapeSpec, c *Call) (map[string]argVal, error) {
	out := map[string]argVal{}
	for _, a := range c.Args {
		if a.Name == nil {
			return nil, errAt(a.Value.Position(), "%s takes named arguments (NAME = VALUE), got a positional one", spec.Name)
		}
		name := a.Name.Name
		as, ok := spec.arg(name)
		if !ok {
			return nil, errAt(a.Name.P, "%s has no argument %s%s", spec.Name, quoteText(name), suggest(name, spec.argNames()))
		}
		if _, dup := out[name]; dup {
			return nil, errAt(a.Name.P, "argument %s given twice", name)
		}
		if as.Group != "" {
			for other := range out {
				if os, _ := spec.arg(other); os.Group == as.Group {
					return nil, errAt(a.Name.P, "give %s or %s, not both", other, name)
				}
			}
		}
		v, err := ev.evalArg(as, a.Value, a.Name.P)
		if err != nil {
			return nil, err
		}
		out[name] = v
	}
	return out, nil
}

// wordAliases are names other software gives to a word of ours: "hanning" is
// the Hann window (numpy, MATLAB), and the nearest spelling (hamming) would be
// another window.
var wordAliases = map[string]string{"hanning": "hann"}

// evalArg evaluates one argument value.
func (ev *evaluator) evalArg(as argSpec, e Expr, namePos Pos) (argVal, error) {
	p := e.Position()
	if as.Kind == argWord {
		w, ok := wordOf(e)
		if !ok || !contains(as.Words, w) {
			got := "a value"
			if ok {
				got = quoteText(w)
			} else if v, err := ev.evalExpr(e); err == nil {
				got = describeValue(v)
			}
			hint := suggest(w, as.Words)
			if other, ok := wordAliases[w]; ok && contains(as.Words, other) {
				hint = "; " + w + " is another name for the window written " + other
			}
			return argVal{}, errAt(p, "%s expects one of %s, got %s%s", as.Name, strings.Join(as.Words, ", "), got, hint)
		}
		return argVal{Pos: p, Word: w}, nil
	}
	if id, ok := e.(*Ident); ok {
		if _, known := ev.st.names[id.Name]; !known && as.Kind == argQuantity {
			return argVal{}, errAt(p, "unknown name %s%s", quoteText(id.Name), ev.suggest(id.Name, ev.st.nameList()))
		}
	}
	v, err := ev.evalExpr(e)
	if err != nil {
		return argVal{}, err
	}
	if err := ev.checkArgValue(as, v, p); err != nil {
		return argVal{}, err
	}
	return argVal{Pos: p, Val: v}, nil
}

func (ev *evaluator) checkArgValue(as argSpec, v Value, p Pos) error {
	switch as.Kind {
	case argCount:
		if v.Q.D != dimNumber {
			return errAt(p, "%s expects a whole number, got %s", as.Name, describeValue(v))
		}
		limit := float64(1 << 24)
		if as.Name == "samples" {
			limit = maxPulseSamples
		}
		if v.Q.V != math.Trunc(v.Q.V) || v.Q.V < 1 || v.Q.V > limit {
			got := v.String()
			if v.Q.V == math.Trunc(v.Q.V) && math.Abs(v.Q.V) < 1e15 {
				got = strconv.FormatFloat(v.Q.V, 'f', -1, 64) // every digit of a whole number
			}
			return errAt(p, "%s expects a whole number from 1 to %.0f, got %s", as.Name, limit, got)
		}
		return nil
	}
	x, err := ev.want(v, as.Dim, as.Name, p)
	if err == nil && as.Name == "duration" && as.Dim == dimTime && x > 0 && !(x >= minDwell && x <= maxDuration) {
		return errAt(p, "duration must be from %s to %s, got %s", Quantity{minDwell, dimTime}, Quantity{maxDuration, dimTime}, v)
	}
	if err == nil && as.Positive && !(x > 0) {
		return errAt(p, "%s must be positive, got %s (leave it out for the default, %s)", as.Name, v, as.Default)
	}
	return err
}

// resolve turns evaluated arguments into base-unit numbers for the builder.
func (ev *evaluator) resolve(spec *shapeSpec, args map[string]argVal) (*builder, error) {
	b := &builder{vals: map[string]float64{}, words: map[string]string{}, gamma: ev.st.nucleus.Gamma(), ctx: ev.ctx}
	for name, a := range args {
		as, _ := spec.arg(name)
		switch as.Kind {
		case argWord:
			b.words[name] = a.Word
		case argCount:
			b.vals[name] = a.Val.Q.V
		default:
			x, err := ev.want(a.Val, as.Dim, name, a.Pos)
			if err != nil {
				return nil, err
			}
			if name == "bandwidth" && a.Val.Q.D == dimPPM {
				x = math.Abs(x) // a width in ppm: |γ̄|·B0·δ (a negative γ signs offsets, not widths)
			}
			b.vals[name] = x
		}
	}
	return b, nil
}

// build makes the pulse of a shape row with the given arguments; callPos places
// errors that belong to no single argument.
func (ev *evaluator) build(spec *shapeSpec, args map[string]argVal, callPos Pos) (*shape.Pulse, error) {
	for _, as := range spec.allArgs() {
		if _, ok := args[as.Name]; as.Required && !ok {
			return nil, errAt(callPos, "%s needs %s (%s)", spec.Name, as.Name, as.Help)
		}
	}
	b, err := ev.resolve(spec, args)
	if err != nil {
		return nil, err
	}
	if a, ok := args["dwell"]; ok && b.vals["dwell"] < minDwell {
		return nil, errAt(a.Pos, "dwell must be at least %s, got %s", Quantity{minDwell, dimTime}, a.Val)
	}
	// Typo guards: a B1 of a tesla is no one's (hardware limits warn, see
	// amplitudeWarning), and a hundred turns is no one's flip.
	if a, ok := args["peak"]; ok && math.Abs(b.vals["peak"]) > maxPeak {
		return nil, errAt(a.Pos, "peak must be below 1 T (a B1 that large is a typo; above about %s for this nucleus the pulse gets a warning), got %s", fmtFieldKHz(hardwareField(ev.st.nucleus.GammaBar), ev.st.nucleus.GammaBar), a.Val)
	}
	if a, ok := args["flip"]; ok && math.Abs(b.vals["flip"]) > maxFlip {
		return nil, errAt(a.Pos, "flip must be at most 36000 deg (100 turns), got %s", a.Val)
	}
	if a, ok := args["samples"]; ok && b.vals["samples"] > maxPulseSamples {
		return nil, errAt(a.Pos, "samples must be at most %d, got %s", maxPulseSamples, a.Val)
	}
	if a, ok := args["dwell"]; ok {
		if n := math.Round(b.vals["duration"] / b.vals["dwell"]); n > maxPulseSamples {
			return nil, errAt(a.Pos, "dwell %s gives %.0f samples, over the limit of %d per pulse; use a longer dwell or a shorter duration", a.Val, n, maxPulseSamples)
		}
	}
	if err := checkSlice(args, b); err != nil {
		return nil, err
	}
	p, err := spec.Build(b)
	if err != nil {
		return nil, errAt(ev.blame(err, args, callPos), "%s", asWritten(strings.TrimPrefix(err.Error(), spec.Name+": "), args, b))
	}
	if a, ok := args["thickness"]; ok && math.Abs(p.Gradient) > maxGradient {
		bw, what := p.Bandwidth, "a bandwidth"
		if p.Width > 0 {
			bw, what = p.Width, "a measured profile width"
		}
		return nil, errAt(a.Pos, "thickness %s needs a gradient of %s for %s of %s, over the limit of 1 T/m; want a thicker slice",
			a.Val, Quantity{math.Abs(p.Gradient), dimGradient}.format("T/m"), what, Quantity{bw, dimFrequency})
	}
	if n := p.Wave.Len(); n > maxPulseSamples {
		at, what := callPos, "the shape's own sampling"
		if a, ok := args["dwell"]; ok {
			at, what = a.Pos, "dwell "+a.Val.String()
		}
		return nil, errAt(at, "%s gives %d samples, over the limit of %d per pulse; use a longer dwell or a shorter duration", what, n, maxPulseSamples)
	}
	return p, nil
}

// Sampling limits of one pulse: a dwell of 10 ns is far below any RF
// transmitter's raster, and a million samples already take seconds to describe.
const (
	minDwell        = 10e-9
	maxPulseSamples = 1_000_000
	// maxDuration is a typo guard: saturation pulses last seconds, and far
	// longer durations only overflow the amplitude or the sample count.
	maxDuration = 100 // s
)

// Slice bounds (typo guards): no MR gradient system reaches 1 T/m, a gradient
// below 1 µT/m selects no slice worth the name, and slices run from 1 µm
// (microscopy) to 10 m (beyond any magnet's bore).
const (
	minGradient  = 1e-6 // T/m
	maxGradient  = 1    // T/m
	minThickness = 1e-6 // m
	maxThickness = 10   // m
)

// checkSlice refuses a gradient or thickness that is zero, negative (thickness)
// or outside the bounds above, naming the argument and the bound.
func checkSlice(args map[string]argVal, b *builder) error {
	if a, ok := args["thickness"]; ok {
		switch t := b.vals["thickness"]; {
		case !(t > 0):
			return errAt(a.Pos, "thickness must be positive, got %s", a.Val)
		case t < minThickness:
			return errAt(a.Pos, "thickness must be at least 1 µm, got %s", a.Val)
		case t > maxThickness:
			return errAt(a.Pos, "thickness must be at most 10 m, got %s", a.Val)
		}
	}
	if a, ok := args["gradient"]; ok {
		switch g := math.Abs(b.vals["gradient"]); {
		case g == 0:
			return errAt(a.Pos, "gradient must not be 0 (leave it out for a pulse without slice selection), got %s", a.Val)
		case !(g >= minGradient):
			return errAt(a.Pos, "gradient must be at least 1 µT/m in magnitude, got %s", a.Val)
		case g > maxGradient:
			return errAt(a.Pos, "gradient must be at most 1 T/m in magnitude, got %s", a.Val)
		}
	}
	return nil
}

// Amplitude bounds (typo guards): peak B1 in T, flip in rad.
const (
	maxPeak = 1
	maxFlip = 100 * 2 * math.Pi
)

// siUnits are the units package shape writes its values in (plain SI, %g).
var siUnits = []struct {
	dim  Dim
	unit string
}{{dimTime, "s"}, {dimFrequency, "Hz"}, {dimField, "T"}, {dimLength, "m"}, {dimAngle, "rad"}, {dimGradient, "T/m"}}

// asWritten replaces, in a shape's message, each argument's value as package
// shape writes it ("-0.001 s") by the value as the user wrote it ("-1 ms").
func asWritten(msg string, args map[string]argVal, b *builder) string {
	names := slices.Sorted(maps.Keys(args))
	for _, n := range names {
		a := args[n]
		if a.Word != "" {
			continue
		}
		for _, u := range siUnits {
			if a.Val.Q.D != u.dim && !(u.dim == dimField && a.Val.Q.D == dimFrequency) && !(u.dim == dimFrequency && a.Val.Q.D == dimPPM) {
				continue
			}
			msg = replaceNumber(msg, strconv.FormatFloat(b.vals[n], 'g', -1, 64)+" "+u.unit, a.Val.String())
		}
	}
	return msg
}

// replaceNumber replaces whole occurrences of the value-and-unit old: not part of
// a longer number before it, nor of a longer unit after it.
func replaceNumber(s, old, repl string) string {
	var out strings.Builder
	for {
		i := strings.Index(s, old)
		if i < 0 {
			out.WriteString(s)
			return out.String()
		}
		end := i + len(old)
		before := i > 0 && strings.ContainsRune("0123456789.-+e", rune(s[i-1]))
		after := end < len(s) && (isWordByte(s[end]) || s[end] == '/' || s[end] == '²')
		out.WriteString(s[:i])
		if before || after {
			out.WriteString(old)
		} else {
			out.WriteString(repl)
		}
		s = s[end:]
	}
}

// blame places a shape's error at the argument it names, if any.
func (ev *evaluator) blame(err error, args map[string]argVal, def Pos) Pos {
	msg := err.Error()
	names := slices.Sorted(maps.Keys(args))
	best, bestAt := def, len(msg)+1
	for _, n := range names {
		if i := indexWord(msg, n); i >= 0 && i < bestAt {
			best, bestAt = args[n].Pos, i
		}
	}
	return best
}

func indexWord(s, w string) int {
	for i := 0; i+len(w) <= len(s); i++ {
		if s[i:i+len(w)] != w {
			continue
		}
		if (i == 0 || !isWordByte(s[i-1])) && (i+len(w) == len(s) || !isWordByte(s[i+len(w)])) {
			return i
		}
	}
	return -1
}

func isWordByte(c byte) bool {
	return c == '_' || c >= 'a' && c <= 'z' || c >= 'A' && c <= 'Z' || c >= '0' && c <= '9'
}

func contains(list []string, w string) bool {
	for _, x := range list {
		if x == w {
			return true
		}
	}
	return false
}

// pulse runs `pulse NAME = SHAPE(...)` or `pulse NAME = OTHER(...)`.
func (ev *evaluator) pulse(s *PulseStmt) error {
	if err := ev.checkRedefine(s.Name, true); err != nil {
		return err
	}
	def, err := ev.definePulse(s.Name.Name, s.Call)
	if err != nil {
		return err
	}
	if err := ev.checkCtx(); err != nil {
		return err
	}
	warning, err := ev.definitionWarning(def, s.Name.P)
	if err != nil {
		return err
	}
	ev.st.define(s.Name.Name, &binding{pulse: def})
	ev.emit(textBundle(pulseSummary(def) + warning))
	return nil
}

// definitionWarning is the line a new pulse's summary gets when the pulse is
// adiabatic with a role and misses its target at its own peak (see
// meetsAdiabaticTarget), else "".
func (ev *evaluator) definitionWarning(def *pulseDef, at Pos) (string, error) {
	w, err := rampWarning(ev.ctx, def.Pulse)
	if err != nil {
		return "", errAt(at, "checking %s's sampling of its centre: %v", def.Name, err)
	}
	met, err := meetsAdiabaticTarget(ev.ctx, def.Pulse)
	if err != nil {
		return "", errAt(at, "checking %s against its adiabatic threshold: %v", def.Name, err)
	}
	if sw := sweepSamplingWarning(def.Pulse); sw != "" {
		w += "\nwarning: " + sw
	}
	if aw := amplitudeWarning("peak B1", def.Pulse.Peak(), gammaBarOf(def.Pulse)); aw != "" {
		w += "\nwarning: " + aw + ": check the duration and the flip or peak"
	}
	if !met {
		w += "\nwarning: peak " + Quantity{def.Pulse.Peak(), dimField}.format("uT") + " is below the adiabatic threshold: this pulse will not " + pulseAction(def.Pulse, "its band") + " (`describe " + def.Name + "` gives the threshold)"
	}
	return w, nil
}

// rampWarning warns when an off-centre pulse's samples are too coarse for its
// centre: the phase ramp held over each sample scales the band by
// sinc(π·center·dwell) (the spectrum of a sample-and-hold) and aliases it beyond
// 1/(2·dwell). Shapes and trains pick enough samples by default (1/40 cycle
// each, 0.1 %); this speaks when samples or dwell were given, or for imported
// data. A pulse with a nominal flip is simulated at its centre, since for large
// flips the loss of rotation is not the field's.
func rampWarning(ctx context.Context, p *shape.Pulse) (string, error) {
	dwell := 0.0 // the longest sample that carries field (a train's gaps do not)
	for j, d := range p.Wave.Dwell {
		if p.Wave.B1[j] != 0 {
			dwell = math.Max(dwell, d)
		}
	}
	x := math.Pi * math.Abs(p.Center) * dwell
	if x == 0 || 1-math.Sin(x)/x < 0.01 {
		return "", nil
	}
	// An slr pulse divides the hold's loss at the centre out of its field
	// (package slr): what is left is the change of that loss across the band.
	sinc := func(x float64) float64 { return math.Sin(x) / x }
	edgeLoss := 0.0
	if p.Shape == "slr" {
		xe := math.Pi * (math.Abs(p.Center) + p.Bandwidth/2) * dwell
		edgeLoss = 1 - sinc(xe)/sinc(x)
		if math.Abs(p.Center)*dwell < 0.5 && edgeLoss < 0.01 {
			return "", nil
		}
	}
	msg := fmt.Sprintf("\nwarning: the centre %s turns the phase by %s per sample (dwell %s), held over each sample: ", Quantity{p.Center, dimFrequency}.String(), present.Number(present.RoundSig(math.Abs(p.Center)*dwell*360, 3))+" deg", Quantity{dwell, dimTime}.String())
	switch {
	case math.Abs(p.Center)*dwell >= 0.5:
		msg += "the band aliases and plays elsewhere than the centre"
	case p.Shape == "slr":
		msg += fmt.Sprintf("the field is scaled to keep the rotation at the centre, but falls by about %s %% more towards the band's edge", present.Number(present.RoundSig(100*edgeLoss, 2)))
	case !math.IsNaN(p.Flip) && !p.Adiabatic && !imported(p):
		w := p.Wave
		w.Gradient = nil
		r, err := physics.Simulate(ctx, &w, p.Gamma, &physics.Isochromats{Offset: []float64{p.Center}}, physics.Options{})
		if err != nil {
			return "", err
		}
		rot := 2 * math.Asin(math.Min(1, cmplx.Abs(r.Beta[0])))
		msg += fmt.Sprintf("the simulated rotation at the centre is %s deg for a nominal %s deg", present.Number(present.RoundSig(rot*180/math.Pi, 4)), present.Number(present.RoundSig(p.Flip*180/math.Pi, 4)))
	default:
		msg += fmt.Sprintf("the field at the centre is weakened by about %s %%", present.Number(present.RoundSig(100*(1-math.Sin(x)/x), 2)))
	}
	if !imported(p) && p.Shape != "train" {
		need := math.Ceil(40 * math.Abs(p.Center) * p.Duration() * (1 - 1e-12)) // as shapes choose by default
		msg += fmt.Sprintf("; %s samples or more (the default) keep it within about 0.1 %%", present.Number(need))
	}
	return msg, nil
}

// definePulse builds a pulse from a shape call, a copy of a named pulse, or a train.
func (ev *evaluator) definePulse(name string, c *Call) (*pulseDef, error) {
	fn := c.Fun.Name
	if fn == "train" {
		return ev.train(name, c)
	}
	if spec, ok := lookupShape(fn); ok {
		args, err := ev.evalArgs(spec, c)
		if err != nil {
			return nil, err
		}
		p, err := ev.build(spec, args, c.Fun.P)
		if err != nil {
			return nil, err
		}
		return &pulseDef{Name: name, Spec: spec, Kind: spec.Name, Args: args, Pulse: p, Nucleus: ev.st.nucleus}, nil
	}
	if b, ok := ev.st.names[fn]; ok && b.pulse != nil {
		return ev.copyPulse(name, b.pulse, c)
	}
	if b, ok := ev.st.names[fn]; ok {
		return nil, errAt(c.Fun.P, "%s is a quantity (%s), not a shape or a pulse", quoteText(fn), b.val)
	}
	cands := append(shapeNames(), ev.st.pulseNames()...)
	return nil, errAt(c.Fun.P, "unknown shape or pulse %s%s (shapes: %s)", quoteText(fn), ev.suggest(fn, cands), strings.Join(shapeNames(), ", "))
}

// copyPulse rebuilds pulse old with some arguments changed; an argument replaces
// the others of its group (peak replaces flip).
func (ev *evaluator) copyPulse(name string, old *pulseDef, c *Call) (*pulseDef, error) {
	if old.Spec == nil {
		if len(c.Args) > 0 {
			return nil, errAt(c.Args[0].Value.Position(), "%s is an imported pulse; its arguments cannot be changed", quoteText(old.Name))
		}
		cp := *old
		cp.Name = name
		return &cp, nil
	}
	if old.Kind == "train" {
		for _, a := range c.Args {
			if a.Name == nil {
				return nil, errAt(a.Value.Position(), "a copy of train %s changes its arguments (%s); write a new train to change its elements", old.Name, strings.Join(old.Spec.argNames(), ", "))
			}
		}
	}
	changes, err := ev.evalArgs(old.Spec, c)
	if err != nil {
		return nil, err
	}
	args := mergeArgs(old.Spec, old.Args, changes)
	p, err := ev.rebuild(old, args, c.Fun.P)
	if err != nil {
		return nil, inheritedFault(err, name, old, args, changes, c)
	}
	shareSamples(p, old.Pulse)
	nuc := ev.st.nucleus
	if old.Kind == "train" {
		nuc = old.Nucleus
	}
	return &pulseDef{Name: name, Spec: old.Spec, Kind: old.Kind, Args: args, Elems: old.Elems, Pulse: p, Nucleus: nuc}, nil
}

// rebuild builds pulse d again with the given arguments (a copy or a point of a
// sweep): a shape row, or a train over the same elements.
func (ev *evaluator) rebuild(d *pulseDef, args map[string]argVal, callPos Pos) (*shape.Pulse, error) {
	if d.Kind == "train" {
		return ev.buildTrain(d.Elems, args, callPos)
	}
	return ev.build(d.Spec, args, callPos)
}

// inheritedFault moves an error that build placed on an argument the copy
// inherited (whose position lies in the original's statement, perhaps in another
// cell) to the copy, naming the inherited value and how to replace it.
func inheritedFault(err error, name string, old *pulseDef, args, changes map[string]argVal, c *Call) error {
	var pe *posError
	if !errors.As(err, &pe) {
		return err
	}
	for _, ch := range changes {
		if ch.Pos == pe.pos {
			return err
		}
	}
	names := slices.Sorted(maps.Keys(args))
	for _, n := range names {
		a := args[n]
		if _, changed := changes[n]; changed || a.Pos != pe.pos {
			continue
		}
		val := a.Word
		if val == "" {
			val = a.Val.String()
		}
		msg := strings.TrimSuffix(strings.TrimPrefix(pe.msg, n+": "), " (or omit it)")
		at := c.Fun.P
		if len(c.Args) == 1 {
			at = c.Args[0].Value.Position()
		}
		return errAt(at, "%s inherits %s = %s from %s: %s; give %s = ... in the copy to replace it", name, n, val, old.Name, msg, n)
	}
	return err
}

// mergeArgs applies changes over base; a changed argument drops the others of its
// group.
func mergeArgs(spec *shapeSpec, base, changes map[string]argVal) map[string]argVal {
	out := map[string]argVal{}
	for n, v := range base {
		out[n] = v
	}
	for n, v := range changes {
		as, _ := spec.arg(n)
		if as.Group != "" {
			for m := range out {
				if ms, _ := spec.arg(m); ms.Group == as.Group {
					delete(out, m)
				}
			}
		}
		out[n] = v
	}
	return out
}

// pulseSummary is the one-line answer to a pulse statement.
func pulseSummary(d *pulseDef) string {
	p := d.Pulse
	gb := math.Abs(p.Gamma) / (2 * math.Pi)
	parts := []string{
		fmt.Sprintf("pulse %s: %s", d.Name, d.Kind),
		Quantity{p.Duration(), dimTime}.String(),
		plural(p.Wave.Len(), "sample"),
		fmt.Sprintf("peak %s (%s)", Quantity{p.Peak(), dimField}.format("uT"), Quantity{p.Peak() * gb, dimFrequency}.format("Hz")),
	}
	if imported(p) {
		if p.Center != 0 {
			parts = append(parts, "centre "+Quantity{p.Center, dimFrequency}.String())
		}
		parts = append(parts, importedArea(p)+" "+Quantity{p.Flip, dimAngle}.format("deg"))
	} else if !math.IsNaN(p.Flip) && !p.Adiabatic {
		parts = append(parts, "flip "+Quantity{p.Flip, dimAngle}.format("deg"))
	} else if a, ok := d.Args["flip"]; ok && d.Spec != nil {
		parts = append(parts, "rotation "+a.Val.String()+" by design")
	}
	// Design figures (from the shape's bandwidth) and, where a slice is
	// selected, the measured width of the role's own profile beside them.
	if p.Bandwidth != 0 {
		bw := "bandwidth " + Quantity{p.Bandwidth, dimFrequency}.String() + " (design)"
		if p.Width > 0 {
			bw = "bandwidth " + Quantity{p.Width, dimFrequency}.String() + " measured (" + Quantity{p.Bandwidth, dimFrequency}.String() + " design)"
		}
		parts = append(parts, bw)
	}
	if p.Role != shape.RoleNone {
		parts = append(parts, "role "+p.Role.String())
	}
	if p.Gradient != 0 {
		parts = append(parts, "gradient "+Quantity{p.Gradient, dimGradient}.format("mT/m"))
		design := "thickness " + Quantity{shape.SliceThickness(p.Bandwidth, p.Gamma, p.Gradient), dimLength}.format("mm") + " (design)"
		switch {
		case p.Width > 0 && p.Bandwidth != 0:
			parts = append(parts, "thickness "+Quantity{shape.SliceThickness(p.Width, p.Gamma, p.Gradient), dimLength}.format("mm")+
				" measured ("+Quantity{shape.SliceThickness(p.Bandwidth, p.Gamma, p.Gradient), dimLength}.format("mm")+" design)")
		case p.Width > 0:
			parts = append(parts, "thickness "+Quantity{shape.SliceThickness(p.Width, p.Gamma, p.Gradient), dimLength}.format("mm")+" measured")
		case p.Bandwidth != 0:
			parts = append(parts, design)
		}
	}
	return strings.Join(parts, ", ")
}
