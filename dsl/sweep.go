package dsl

import (
	"fmt"
	"math"
	"slices"
	"strings"
	"sync"

	"Nutate/display"
	"Nutate/dsl/present"
	"Nutate/physics"
	"Nutate/physics/shape"
)

// Limits of a sweep. The step budget is the engine's; the others keep outputs to a
// size a notebook can hold.
const (
	maxAxisPoints  = 100_000
	maxMapCells    = 1_000_000
	maxSweepBuilds = 10_000
	maxKeptSamples = 4_000_000 // samples of rebuilt pulses kept between planning and running
	progressSteps  = 1e7       // sweeps longer than this report progress
	measureCost    = 2000      // isochromat-steps per sample for measured properties (estimate)
)

// spinAxes are the axes that vary the spins rather than the pulse.
var spinAxes = []struct{ Name, Help string }{
	{"offset", "frequency offset from the pulse carrier (Hz units, or ppm once `field` is set; ppm axes run high to low)"},
	{"b1", "B1 scale: a factor (0.5 to 1.5), a percent (50% to 150%), or an absolute peak (0 uT to 25 uT, or Hz)"},
	{"position", "position along the slice gradient (length units; the pulse needs a gradient or thickness)"},
	{"t1", "longitudinal relaxation time during the pulse; over a decade: log scale, `points` spaced geometrically (`step` stays even); without t2, T2 = 2·t1"},
	{"t2", "transverse relaxation time during the pulse; scale as t1; points with t2 > 2·t1 are left out (T2 ≤ 2·T1)"},
}

func spinAxisNames() []string {
	var out []string
	for _, a := range spinAxes {
		out = append(out, a.Name)
	}
	return out
}

// sweepAxis is an evaluated axis.
type sweepAxis struct {
	kind    string
	pos     Pos
	spin    bool
	arg     argSpec
	from    Value
	step    float64 // base units per point
	n       int
	unit    string // display unit ("" plain, "%" percent)
	reverse bool
	// logScale draws the axis logarithmically; geometric spaces its points in
	// equal ratios, from FROM by ratio to TO (see decideSpacing).
	logScale  bool
	geometric bool
	ratio     float64
}

func (a *sweepAxis) value(i int) Value {
	v := a.from
	if a.geometric {
		v.Q.V = a.from.Q.V * math.Pow(a.ratio, float64(i)/float64(a.n-1))
		return v
	}
	v.Q.V = a.from.Q.V + a.step*float64(i)
	return v
}

// display returns the axis values in its display unit.
func (a *sweepAxis) display() []float64 {
	f := 1.0
	if u, ok := lookupUnit(a.unit); ok {
		f = u.Factor
	}
	out := make([]float64, a.n)
	for i := range out {
		out[i] = a.value(i).Q.V / f
	}
	return out
}

func (a *sweepAxis) label() string { return a.kind }

// evalAxis evaluates `KIND FROM to TO (points N | step S)` against the pulses.
func (ev *evaluator) evalAxis(ax Axis, defs []*pulseDef) (*sweepAxis, error) {
	a := &sweepAxis{kind: ax.Kind.Name, pos: ax.Kind.P}
	from, to, err := ev.axisEnds(ax)
	if err != nil {
		return nil, err
	}
	if contains(spinAxisNames(), a.kind) {
		a.spin = true
		if err := checkSpinAxis(ev.st.field, a.kind, ax, from, to); err != nil {
			return nil, err
		}
	} else if err := ev.shapeAxisArg(a, ax, defs, from); err != nil {
		return nil, err
	}
	if to.Q.D != from.Q.D {
		return nil, errAt(ax.To.Position(), "%s axis runs from %s to %s: want the same kind of quantity at both ends", a.kind, describeValue(from), describeValue(to))
	}
	if a.arg.Kind == argQuantity && !a.spin {
		if err := ev.checkArgValue(a.arg, to, ax.To.Position()); err != nil {
			return nil, err
		}
	}
	span := to.Q.V - from.Q.V
	if math.IsInf(span, 0) {
		return nil, errAt(ax.To.Position(), "%s axis from %s to %s spans more than the largest number; want a narrower axis", a.kind, from, to)
	}
	if err := ev.axisPoints(a, ax, from, to, span); err != nil {
		return nil, err
	}
	a.from = from
	a.unit = from.Unit
	if a.unit == "" {
		a.unit = to.Unit
	}
	if a.unit == "" || a.unit != "%" && from.Q.D == dimNumber {
		a.unit = autoUnit(Quantity{math.Max(math.Abs(from.Q.V), math.Abs(to.Q.V)), from.Q.D})
	}
	if a.arg.Kind == argCount {
		for i := 0; i < a.n; i++ {
			if v := a.value(i).Q.V; math.Abs(v-math.Round(v)) > 1e-9 {
				return nil, errAt(ax.Kind.P, "%s takes whole numbers, but the axis reaches %s; choose points or step so every value is whole", a.kind, present.Number(v))
			}
		}
	}
	a.reverse = from.Q.D == dimPPM
	a.decideSpacing(ax.Points != nil, to.Q.V)
	return a, nil
}

// axisEnds evaluates an axis's two ends; a bare number first takes the unit of
// the second end (`offset -1 to 1 kHz`).
func (ev *evaluator) axisEnds(ax Axis) (from, to Value, err error) {
	if from, err = ev.evalExpr(ax.From); err != nil {
		return from, to, err
	}
	if to, err = ev.evalExpr(ax.To); err != nil {
		return from, to, err
	}
	if from.Q.D == dimNumber && from.Unit == "" && to.Q.D != dimNumber && bareNumber(ax.From) {
		// `offset -1 to 1 kHz`: a plain number first takes the unit of the
		// second endpoint, as written.
		if u, ok := lookupUnit(to.Unit); ok && u.Dim == to.Q.D {
			from = Value{Q: Quantity{from.Q.V * u.Factor, u.Dim}, Unit: u.Name}
		}
	}
	return from, to, nil
}

// checkSpinAxis checks the ends of a spin axis (offset, b1, position, t1, t2)
// against its kind; an offset in ppm needs the main field.
func checkSpinAxis(field float64, kind string, ax Axis, from, to Value) error {
	var ok bool
	switch kind {
	case "offset":
		ok = from.Q.D == dimFrequency || from.Q.D == dimPPM
		if ok && from.Q.D == dimPPM && field == 0 {
			return errAt(ax.From.Position(), "an offset in ppm needs the main field: set it first with `field 3 T`")
		}
	case "b1":
		ok = from.Q.D == dimNumber || from.Q.D == dimField || from.Q.D == dimFrequency
	case "position":
		ok = from.Q.D == dimLength
	case "t1", "t2":
		ok = from.Q.D == dimTime
		if ok && to.Q.D == dimTime {
			// Both ends are checked: the physics layer reads 0 as "no
			// relaxation", and times far below a sample make its decay
			// factors underflow.
			if err := checkRelaxTime(kind+" axis", from, ax.From.Position()); err != nil {
				return err
			}
			if err := checkRelaxTime(kind+" axis", to, ax.To.Position()); err != nil {
				return err
			}
		}
	}
	if !ok {
		want := map[string]string{"offset": "a frequency (Hz or ppm)", "b1": "a factor, a percent or a peak B1 (T units or Hz)", "position": "a length", "t1": "a time", "t2": "a time"}[kind]
		return errAt(ax.From.Position(), "%s axis expects %s, got %s", kind, want, describeValue(from))
	}
	return nil
}

// shapeAxisArg finds the shape argument a non-spin axis sweeps in every pulse
// (a.arg) and checks the axis's first end against it.
func (ev *evaluator) shapeAxisArg(a *sweepAxis, ax Axis, defs []*pulseDef, from Value) error {
	found := false
	for _, d := range defs {
		if d.Spec == nil {
			return errAt(ax.Kind.P, "%s is an imported pulse; only spin axes (%s) apply to it", quoteText(d.Name), strings.Join(spinAxisNames(), ", "))
		}
		as, ok := d.Spec.arg(a.kind)
		if !ok {
			cands := append(spinAxisNames(), d.Spec.argNames()...)
			return errAt(ax.Kind.P, "unknown axis %s for %s pulse %s%s (axes: %s, or an argument of the shape)", quoteText(a.kind), d.Kind, d.Name, suggest(a.kind, cands), strings.Join(spinAxisNames(), ", "))
		}
		if as.Kind == argWord {
			return errAt(ax.Kind.P, "%s takes a word (%s) and cannot be swept", a.kind, strings.Join(as.Words, ", "))
		}
		a.arg, found = as, true
	}
	if !found {
		return errAt(ax.Kind.P, "unknown axis %s", quoteText(a.kind))
	}
	return ev.checkArgValue(a.arg, from, ax.From.Position())
}

// axisPoints sets the axis's number of points and step from `points N` or
// `step S`, within the limit per axis.
func (ev *evaluator) axisPoints(a *sweepAxis, ax Axis, from, to Value, span float64) error {
	if ax.Points != nil {
		pv, err := ev.evalExpr(ax.Points)
		if err != nil {
			return err
		}
		if pv.Q.D != dimNumber || pv.Q.V != math.Trunc(pv.Q.V) || pv.Q.V < 1 {
			return errAt(ax.Points.Position(), "points expects a whole number of at least 1, got %s", describeValue(pv))
		}
		if pv.Q.V > maxAxisPoints {
			return errAt(ax.Points.Position(), "points %s exceeds the limit of %d per axis", pv, maxAxisPoints)
		}
		a.n = int(pv.Q.V)
		if a.n > 1 {
			a.step = span / float64(a.n-1)
		} else if span != 0 {
			return errAt(ax.Points.Position(), "one point cannot span %s to %s; want points of at least 2", from, to)
		}
	} else {
		sv, err := ev.evalExpr(ax.Step)
		if err != nil {
			return err
		}
		if sv.Q.D != from.Q.D {
			return errAt(ax.Step.Position(), "step expects %s like the axis ends, got %s", from.Q.D.Noun(), describeValue(sv))
		}
		if sv.Q.V == 0 {
			return errAt(ax.Step.Position(), "step %s does not lead from %s to %s", sv, from, to)
		}
		// The step is taken in the direction from FROM to TO, whatever its
		// sign: `20 ppm to 0 ppm step 5 ppm` descends.
		if span != 0 && math.Signbit(sv.Q.V) != math.Signbit(span) {
			sv.Q.V = -sv.Q.V
		}
		k := math.Floor(span/sv.Q.V + 1e-9)
		if k+1 > maxAxisPoints {
			return errAt(ax.Step.Position(), "step %s gives %g points, over the limit of %d per axis", sv, k+1, maxAxisPoints)
		}
		a.n = int(k) + 1
		a.step = sv.Q.V
	}
	return nil
}

// decideSpacing is where a relaxation-time axis's scale and spacing are
// chosen. A t1 or t2 axis spanning more than a decade is drawn on a log
// scale; written with `points N` its points are then spaced geometrically
// (equal ratios, FROM and TO included), so every decade holds its share of
// them. An axis written with `step S` keeps the values as written. The values
// are positive (see evalAxis).
func (a *sweepAxis) decideSpacing(byPoints bool, to float64) {
	if a.kind != "t1" && a.kind != "t2" || a.n < 2 {
		return
	}
	lo, hi := a.value(0).Q.V, a.value(a.n-1).Q.V
	if lo > hi {
		lo, hi = hi, lo
	}
	a.logScale = lo > 0 && hi/lo > 10
	if a.logScale && byPoints {
		a.geometric, a.ratio = true, to/a.from.Q.V
	}
}

// spacingNote says which axes are spaced geometrically ("" when none).
func spacingNote(axes []*sweepAxis) string {
	var names []string
	for _, a := range axes {
		if a.geometric {
			names = append(names, a.kind)
		}
	}
	if len(names) == 0 {
		return ""
	}
	why := "the axis spans more than a decade and is drawn"
	if len(names) > 1 {
		why = "each axis spans more than a decade and is drawn"
	}
	return strings.Join(names, " and ") + " points spaced geometrically (equal ratios), as " + why + " on a log scale; `step` keeps even spacing."
}

// curveData is one quantity of one pulse over the sweep, indexed i0*n1 + i1.
type curveData struct {
	pulse    string
	quantity quantitySpec
	values   []float64
	mag      []float64 // phase and echophase: the magnitude (|Mxy|, |β|²) the phase belongs to
	role     shape.Role
	label    string // the quantity named on axes and in tables ("b1rms at TR 10 ms")
}

// quantityLabel names a quantity on axes and in tables: b1rms with the TR it is
// averaged over.
func quantityLabel(q string, tr float64) string {
	if q == "b1rms" && tr > 0 {
		return "b1rms at TR " + Quantity{tr, dimTime}.String()
	}
	return q
}

// sweep runs `sweep NAMES over AXES [show ...] [with ...]`: it checks the
// statement against the pulses (axes, quantities, limits), plans and runs the
// builds, then presents the curves.
func (ev *evaluator) sweep(s *SweepStmt) error {
	defs, err := ev.pulses(s.Names)
	if err != nil {
		return err
	}
	set, err := ev.evalSettings(s.With, "offset", "b1", "t1", "t2", "start", "tr")
	if err != nil {
		return err
	}
	axes, err := ev.sweepAxes(s, defs, set)
	if err != nil {
		return err
	}
	qs, mapNote, err := sweepQuantities(s, defs, axes, set)
	if err != nil {
		return err
	}
	skip, left, err := checkSweep(s, defs, axes, qs, set)
	if err != nil {
		return err
	}
	n0, n1 := axes[0].n, 1
	if len(axes) == 2 {
		n1 = axes[1].n
	}
	runs, total, err := ev.planSweep(defs, axes, qs, set)
	if err != nil {
		return err
	}
	if err := ev.checkWork("sweep", total); err != nil {
		return errAt(s.P, "%v", err)
	}
	if err := ev.needMemory("the sweep", sweepMemory(runs, len(axes), len(qs), n0*n1)); err != nil {
		return errAt(s.P, "%v", err)
	}
	curves, err := ev.runSweep(runs, axes, qs, set, skip, n0, n1, total, workLabel("sweep "+joinNames(s.Names), total))
	if err != nil {
		return err
	}
	for _, c := range curves {
		c.label = quantityLabel(c.quantity.Name, set.tr)
		if len(axes) == 1 && c.quantity.Name == "echophase" {
			unwrapDefined(c.values, c.mag)
		}
	}
	ev.presentSweep(s, defs, axes, curves, runs, set, skip, left, mapNote)
	return nil
}

// presentSweep emits the figures and tables of a sweep and keeps its data for
// `export sweep`.
func (ev *evaluator) presentSweep(s *SweepStmt, defs []*pulseDef, axes []*sweepAxis, curves []*curveData, runs []*sweepRun, set *settings, skip []bool, left int, mapNote string) {
	n0, n1 := axes[0].n, 1
	if len(axes) == 2 {
		n1 = axes[1].n
	}
	title := "sweep " + joinNames(s.Names) + " over " + axes[0].kind
	if len(axes) == 2 {
		title += " and " + axes[1].kind
	}
	title += set.caption()
	leftCells := 0
	if left > 0 {
		leftCells = left * n0 * n1 / len(skip) // every build leaves out the same spins
	}
	notes := axisNotes(axes, leftCells, n0*n1)
	notes = append(notes, sweepRunNotes(runs, axes)...)
	notes = append(notes, amplitudeNotes(runs, axes, set)...)
	if t2FromT1(axes, set) {
		notes = append(notes, t2FromT1Note)
	}
	if len(axes) == 2 {
		for _, c := range curves {
			ev.emitFigure(withSettingsJSON(present.MapFigure(mapResult(title, axes, c, n0, n1, mapNote, notes, leftCells)), set))
		}
		ev.st.last = newSweepTable(title, axes, curves, n0, n1)
		return
	}
	ev.emitFigure(withSettingsJSON(present.ProfileFigure(ev.profileResult(title, axes[0], curves, defs, set.start, notes)), set))
	ev.st.last = newSweepTable(title, axes, curves, n0, n1)
}

// sweepAxes evaluates the statement's axes: each kind once, a spin axis not also a setting.
func (ev *evaluator) sweepAxes(s *SweepStmt, defs []*pulseDef, set *settings) ([]*sweepAxis, error) {
	var axes []*sweepAxis
	for _, ax := range s.Axes {
		a, err := ev.evalAxis(ax, defs)
		if err != nil {
			return nil, err
		}
		for _, b := range axes {
			if b.kind == a.kind {
				return nil, errAt(ax.Kind.P, "axis %s given twice", a.kind)
			}
		}
		if _, fixed := set.given[a.kind]; fixed && a.spin {
			return nil, errAt(set.given[a.kind], "%s is both an axis and a setting", a.kind)
		}
		axes = append(axes, a)
	}
	return axes, nil
}

// sweepQuantities are the quantities a sweep shows: those given with `show`,
// checked against the axes and settings, or the first pulse's role's defaults
// (one on a map, which mapNote then names).
func sweepQuantities(s *SweepStmt, defs []*pulseDef, axes []*sweepAxis, set *settings) (qs []quantitySpec, mapNote string, err error) {
	// Quantities.
	if len(s.Show) == 0 {
		names := defaultQuantities(defs[0].Pulse.Role)
		if len(axes) == 2 {
			// A map shows one quantity: the role's first, or mz without a role
			// (an mx map says little), and says which was picked.
			names = names[:1]
			why := "the default for role " + defs[0].Pulse.Role.String()
			if defs[0].Pulse.Role == shape.RoleNone {
				names = []string{"mz"}
				why = "the default for a pulse without a role"
			}
			mapNote = "showing " + names[0] + ", " + why + "; choose another with `show` (mx, my, mz, mxy, phase, echo, echophase)"
		}
		for _, n := range names {
			q, _ := lookupQuantity(n)
			qs = append(qs, q)
		}
	}
	for _, id := range s.Show {
		q, ok := lookupQuantity(id.Name)
		if !ok {
			return nil, "", errAt(id.P, "unknown quantity %s%s (quantities: %s)", quoteText(id.Name), suggest(id.Name, quantityNames()), strings.Join(quantityNames(), ", "))
		}
		if q.Property && !anyShapeAxis(axes) {
			return nil, "", errAt(id.P, "%s is a property of the pulse and does not change over %s; sweep a shape argument (duration, flip, ...) to show it", q.Name, axes[0].kind)
		}
		if q.Name == "b1rms" && set.tr == 0 {
			return nil, "", errAt(id.P, "b1rms needs the repetition time: add `with tr = ...`")
		}
		if isEcho(q.Name) && (set.t1 > 0 || set.t2 > 0 || axisNamed(axes, "t1") || axisNamed(axes, "t2")) {
			return nil, "", errAt(id.P, "%s is computed from the pulse's Cayley–Klein parameters, which exist only without relaxation; drop t1 and t2", q.Name)
		}
		for _, p := range qs {
			if p.Name == q.Name {
				return nil, "", errAt(id.P, "quantity %s listed twice", q.Name)
			}
		}
		qs = append(qs, q)
	}
	if len(axes) == 2 && len(qs) > 1 {
		return nil, "", errAt(s.Show[1].P, "a map over two axes shows one quantity, got %d", len(qs))
	}
	if len(axes) == 1 {
		qs = withEchoPhase(qs)
	}
	return qs, mapNote, nil
}

// anyShapeAxis tells whether an axis varies the pulse (a shape argument).
func anyShapeAxis(axes []*sweepAxis) bool {
	return slices.ContainsFunc(axes, func(a *sweepAxis) bool { return !a.spin })
}

// checkSweep refuses a sweep whose axes and quantities do not go together or
// exceed the map limit, and marks the spins left out where t2 > 2·t1
// (relaxMask), refusing a sweep with no spin left.
func checkSweep(s *SweepStmt, defs []*pulseDef, axes []*sweepAxis, qs []quantitySpec, set *settings) (skip []bool, left int, err error) {
	n0, n1 := axes[0].n, 1
	if len(axes) == 2 {
		n1 = axes[1].n
		if n0*n1 > maxMapCells {
			return nil, 0, errAt(s.Axes[1].Kind.P, "map of %d × %d = %d points exceeds the limit of %d", n0, n1, n0*n1, maxMapCells)
		}
	}
	for _, d := range defs {
		if axisNamed(axes, "position") && d.Pulse.Wave.Gradient == nil && !anyShapeAxis(axes) {
			return nil, 0, errAt(axisPos(axes, "position"), "a position axis needs a slice gradient, but %s has none (give gradient or thickness)", d.Name)
		}
	}
	for _, q := range qs {
		if isEcho(q.Name) {
			if axisNamed(axes, "t1") || axisNamed(axes, "t2") {
				return nil, 0, errAt(axisPos(axes, "t1", "t2"), "%s is computed from the pulse's Cayley–Klein parameters, which exist only without relaxation; sweep t1 or t2 with mz, mxy ...", q.Name)
			}
		}
	}
	skip, left = relaxMask(axes, set)
	if left > 0 && left == len(skip) {
		var over []string
		for _, name := range []string{"t1", "t2"} {
			for _, a := range axes {
				if a.kind == name {
					over = append(over, name+" "+a.value(0).String()+" to "+a.value(a.n-1).String())
				}
			}
			if _, ok := set.given[name]; ok {
				over = append(over, name+" = "+set.writtenValue(name))
			}
		}
		return nil, 0, errAt(axisPos(axes, "t1", "t2"), "t2 exceeds 2·t1 at every point of the sweep (%s); want t2 ≤ 2·t1 somewhere (beyond it the Bloch equations let |M| exceed M0)", strings.Join(over, ", "))
	}
	return skip, left, nil
}

// isEcho reports whether q is the crushed echo or its phase, which need the
// Cayley–Klein parameters (no relaxation).
func isEcho(q string) bool { return q == "echo" || q == "echophase" }

// withEchoPhase puts echophase after echo when only echo is asked for: a one-axis
// sweep of the echo shows its magnitude and its phase, which a refocusing design
// needs as much (linear across offset shifts the echo, curvature dephases it).
func withEchoPhase(qs []quantitySpec) []quantitySpec {
	at := -1
	for i, q := range qs {
		switch q.Name {
		case "echophase":
			return qs
		case "echo":
			at = i
		}
	}
	if at < 0 {
		return qs
	}
	ph, _ := lookupQuantity("echophase")
	out := append([]quantitySpec{}, qs[:at+1]...)
	out = append(out, ph)
	return append(out, qs[at+1:]...)
}

// echoPhaseFloor and phaseFloor are the echo and |Mxy| magnitudes (M0 units)
// below which their phases are left out (NaN): there a phase says nothing a
// designer can use, and near a zero it is rounding noise.
const (
	echoPhaseFloor = 1e-3
	phaseFloor     = 1e-3
)

func joinNames(ids []Ident) string {
	var s []string
	for _, id := range ids {
		s = append(s, id.Name)
	}
	return strings.Join(s, ", ")
}

// bareNumber reports whether e is a number written without a unit, signed or
// not (`-1`, `pi`).
func bareNumber(e Expr) bool {
	switch x := e.(type) {
	case *Number:
		return x.Unit == nil
	case *Unary:
		return bareNumber(x.X)
	}
	return false
}

func axisNamed(axes []*sweepAxis, names ...string) bool {
	for _, a := range axes {
		if contains(names, a.kind) {
			return true
		}
	}
	return false
}

func axisPos(axes []*sweepAxis, names ...string) Pos {
	for _, a := range axes {
		if contains(names, a.kind) {
			return a.pos
		}
	}
	return axes[0].pos
}

// sweepRun is one built pulse and the cells of the sweep it fills.
type sweepRun struct {
	def     *pulseDef
	pi      int               // index of the pulse
	p       *shape.Pulse      // built for this point of the shape axes; nil: rebuild when run
	args    map[string]argVal // the arguments of a rebuilt pulse
	fixed   map[int]int       // axis index → point index fixed by this build
	spins   int               // isochromats simulated
	callPos Pos               // where build errors point
	// fail, when not "", says why the pulse cannot be built at this point of
	// the shape axes: the point is left out (NaN) and the reason goes in the
	// notes. note is a remark on a figure of this point (a threshold not found).
	fail, note string
}

// planSweep builds every pulse the sweep needs (one per point of the shape axes)
// and counts the isochromat-steps.
func (ev *evaluator) planSweep(defs []*pulseDef, axes []*sweepAxis, qs []quantitySpec, set *settings) ([]*sweepRun, float64, error) {
	shapeIdx, spins, builds := axisGrid(axes)
	needMag, needMeasure := planNeeds(qs)
	if builds*len(defs) > maxSweepBuilds {
		return nil, 0, errAt(axes[shapeIdx[0]].pos, "sweep rebuilds the pulse %d times, over the limit of %d", builds*len(defs), maxSweepBuilds)
	}
	var runs []*sweepRun
	total, kept := 0.0, 0
	var firstErr error
	built := 0
	for pi, d := range defs {
		for b := 0; b < builds; b++ {
			if err := ev.checkCtx(); err != nil {
				return nil, 0, err
			}
			r := &sweepRun{def: d, pi: pi, p: d.Pulse, fixed: map[int]int{}, spins: spins}
			if len(shapeIdx) > 0 {
				if err := ev.buildRun(r, axes, shapeIdx, b); err != nil {
					if cerr := ev.checkCtx(); cerr != nil {
						return nil, 0, cerr
					}
					if firstErr == nil {
						firstErr = err
					}
					// An impossible point is left out; the rest is drawn.
					runs = append(runs, r)
					continue
				}
				built++
			}
			if axisNamed(axes, "position") && r.p.Wave.Gradient == nil {
				return nil, 0, errAt(axisPos(axes, "position"), "a position axis needs a slice gradient, but %s has none (give gradient or thickness)", d.Name)
			}
			n := float64(r.p.Wave.Len())
			if needMag {
				total += float64(spins) * n
			}
			if needMeasure {
				total += measureCost * n
			}
			if total > ev.workBudget() {
				return nil, 0, errAt(axes[0].pos, "%s", strings.Replace(ev.checkWork("sweep", total).Error(), "needs", "needs more than", 1))
			}
			if r.args != nil {
				// Keep rebuilt pulses while they are small; rebuild the rest when run.
				if kept += r.p.Wave.Len(); kept > maxKeptSamples {
					r.p = nil
				}
			}
			runs = append(runs, r)
		}
	}
	if firstErr != nil && built == 0 && len(shapeIdx) > 0 {
		return nil, 0, firstErr // no point can be built: nothing to draw
	}
	return runs, total, nil
}

// axisGrid splits a sweep's axes into shape axes (each point a rebuilt pulse)
// and spin axes (isochromats of one run): the shape axes' indices, the spins of
// a run and the number of builds per pulse.
func axisGrid(axes []*sweepAxis) (shapeIdx []int, spins, builds int) {
	spins, builds = 1, 1
	for i, a := range axes {
		if a.spin {
			spins *= a.n
		} else {
			shapeIdx = append(shapeIdx, i)
			builds *= a.n
		}
	}
	return shapeIdx, spins, builds
}

// planNeeds reports whether the quantities need the magnetization simulated
// and the pulse measured (describe's figures), for the work budget.
func planNeeds(qs []quantitySpec) (needMag, needMeasure bool) {
	for _, q := range qs {
		if !q.Property {
			needMag = true
		}
		switch q.Name {
		case "bandwidth", "tbw", "transition", "ripple", "threshold", "b1rms", "flip":
			needMeasure = true
		}
	}
	return needMag, needMeasure
}

// buildRun rebuilds r's pulse at build b of the shape axes (the last shape
// axis fastest). A point that cannot be built is marked failed (r.fail, no
// pulse) and its error names the point.
func (ev *evaluator) buildRun(r *sweepRun, axes []*sweepAxis, shapeIdx []int, b int) error {
	changes := map[string]argVal{}
	rem := b
	for k := len(shapeIdx) - 1; k >= 0; k-- {
		ai := shapeIdx[k]
		idx := rem % axes[ai].n
		rem /= axes[ai].n
		r.fixed[ai] = idx
		changes[axes[ai].kind] = argVal{Pos: axes[ai].pos, Val: axes[ai].value(idx)}
	}
	r.args = mergeArgs(r.def.Spec, r.def.Args, changes)
	r.callPos = axes[shapeIdx[0]].pos
	p, err := ev.rebuild(r.def, r.args, r.callPos)
	if err != nil {
		msg := err.Error()
		if e, ok := err.(*posError); ok {
			msg = e.msg
		}
		r.fail, r.p = msg, nil
		return errAt(axes[shapeIdx[0]].pos, "at %s: %s", pointText(axes, r.fixed), msg)
	}
	r.p = p
	return nil
}

// sweepMemory estimates the bytes a sweep holds while it runs: the rebuilt
// pulses kept from planning, per cell the quantities' values and magnitudes,
// one simulated spin's result and a row of the table kept for export.
func sweepMemory(runs []*sweepRun, axes, quantities, cells int) int64 {
	var kept int64
	for _, r := range runs {
		if r.args != nil && r.p != nil {
			kept += int64(r.p.Wave.Len())
		}
	}
	perCell := int64(16*quantities + 48 + 24 + 8*(axes+quantities))
	return kept*40 + int64(cells)*perCell
}

// amplitudeNotes warn, once per pulse, when the strongest B1 a sweep plays
// (the pulse's peak, scaled by a b1 axis or setting) is beyond plausible RF
// hardware (amplitudeWarning).
func amplitudeNotes(runs []*sweepRun, axes []*sweepAxis, set *settings) []string {
	var out []string
	worst := map[int]float64{}
	var order []int
	for _, r := range runs {
		if r.p == nil || r.fail != "" {
			continue
		}
		gb := gammaBarOf(r.p)
		scale := 1.0
		if set.b1 != nil {
			if f, ok := b1Factor(*set.b1, r.p.Peak(), gb); ok {
				scale = math.Abs(f)
			}
		}
		for _, a := range axes {
			if a.kind != "b1" {
				continue
			}
			scale = 0
			for _, i := range []int{0, a.n - 1} {
				if f, ok := b1Factor(a.value(i), r.p.Peak(), gb); ok {
					scale = math.Max(scale, math.Abs(f))
				}
			}
		}
		b := scale * r.p.Peak()
		if _, ok := worst[r.pi]; !ok {
			order = append(order, r.pi)
		}
		if b > worst[r.pi] {
			worst[r.pi] = b
		}
	}
	for _, pi := range order {
		for _, r := range runs {
			if r.pi == pi && r.p != nil {
				if w := amplitudeWarning(r.def.Name+": the strongest B1 of this sweep,", worst[pi], gammaBarOf(r.p)); w != "" {
					out = append(out, "warning: "+w+".")
				}
				break
			}
		}
	}
	return out
}

// sweepRunNotes are the notes of a sweep's impossible points (left out) and of
// figures that could not be found at some points (a threshold not met).
func sweepRunNotes(runs []*sweepRun, axes []*sweepAxis) []string {
	var out []string
	left := 0
	var why []string
	for _, r := range runs {
		if r.fail != "" {
			left++
			if len(why) < 4 {
				why = append(why, r.def.Name+" at "+pointText(axes, r.fixed)+": "+r.fail)
			}
		}
	}
	if left > 0 {
		more := ""
		if left > len(why) {
			more = fmt.Sprintf("; and %d more", left-len(why))
		}
		out = append(out, fmt.Sprintf("%d of %d pulses could not be built and are left out (blank in the figure, \"—\" in tables, null in the JSON): %s%s.", left, len(runs), strings.Join(why, "; "), more))
	}
	// Figures not found: one note per pulse and reason, listing the points.
	type key struct{ pulse, reason string }
	var keys []key
	at := map[key][]string{}
	for _, r := range runs {
		if r.note == "" {
			continue
		}
		k := key{r.def.Name, r.note}
		if _, ok := at[k]; !ok {
			keys = append(keys, k)
		}
		at[k] = append(at[k], pointText(axes, r.fixed))
	}
	for i, k := range keys {
		if i == 3 {
			out = append(out, fmt.Sprintf("(and %d more reasons why a threshold was not found)", len(keys)-3))
			break
		}
		pts := at[k]
		list := strings.Join(pts[:min(len(pts), 4)], "; ")
		if len(pts) > 4 {
			list += fmt.Sprintf(" and %d more", len(pts)-4)
		}
		out = append(out, fmt.Sprintf("threshold of %s not found (\"—\") at %s: %s", k.pulse, list, k.reason))
	}
	return out
}

func pointText(axes []*sweepAxis, fixed map[int]int) string {
	var parts []string
	for i, a := range axes {
		if idx, ok := fixed[i]; ok {
			parts = append(parts, a.kind+" = "+a.value(idx).String())
		}
	}
	return strings.Join(parts, ", ")
}

// progress aggregates the engine's progress across the simulations of a sweep and
// passes it on in whole percents.
type progress struct {
	mu    sync.Mutex
	sink  func(string, int, int)
	task  string
	total float64
	base  float64
	last  int
}

func (p *progress) report(done float64) {
	if p == nil {
		return
	}
	p.mu.Lock()
	defer p.mu.Unlock()
	pct := int(100 * (p.base + done) / p.total)
	if pct > p.last && pct <= 100 {
		p.last = pct
		p.sink(p.task, pct, 100)
	}
}

// runSweep simulates and measures every run and fills the curves.
func (ev *evaluator) runSweep(runs []*sweepRun, axes []*sweepAxis, qs []quantitySpec, set *settings, skip []bool, n0, n1 int, total float64, task string) ([]*curveData, error) {
	var prog *progress
	if total > progressSteps && ev.sink.Progress != nil {
		prog = &progress{sink: ev.sink.Progress, task: task, total: total, last: -1}
		prog.report(0)
	}
	npulse := 0
	for _, r := range runs {
		npulse = max(npulse, r.pi+1)
	}
	curves := make([]*curveData, 0, npulse*len(qs))
	byPulse := make([][]*curveData, npulse)
	for _, r := range runs {
		if byPulse[r.pi] != nil {
			continue
		}
		for _, q := range qs {
			c := &curveData{pulse: r.def.Name, quantity: q, values: make([]float64, n0*n1), role: r.def.Pulse.Role}
			if q.Name == "phase" || q.Name == "echophase" {
				c.mag = make([]float64, n0*n1)
			}
			byPulse[r.pi] = append(byPulse[r.pi], c)
			curves = append(curves, c)
		}
	}
	for _, r := range runs {
		if err := ev.checkCtx(); err != nil {
			return nil, err
		}
		if err := ev.runOne(r, axes, qs, set, skip, n1, byPulse[r.pi], prog); err != nil {
			return nil, err
		}
	}
	if prog != nil && prog.last < 100 {
		prog.sink(prog.task, 100, 100)
	}
	return curves, nil
}

// runOne fills the cells of one build; spins marked in skip (see relaxMask) are
// not simulated and their cells are NaN. It rebuilds the pulse when the build
// needs it, simulates the spins, measures the pulse, then reads each quantity.
func (ev *evaluator) runOne(r *sweepRun, axes []*sweepAxis, qs []quantitySpec, set *settings, skip []bool, n1 int, curves []*curveData, prog *progress) error {
	cell := runCells(r, axes, n1)
	if r.fail != "" {
		for k := 0; k < r.spins; k++ {
			for _, c := range curves {
				c.values[cell(k)] = math.NaN()
				if c.mag != nil {
					c.mag[cell(k)] = math.NaN()
				}
			}
		}
		return nil
	}
	if r.p == nil {
		p, err := ev.rebuild(r.def, r.args, r.callPos)
		if err != nil {
			return err
		}
		r.p = p
		defer func() { r.p = nil }()
	}
	p := r.p
	if err := set.checkTR(r.def.Name, p); err != nil {
		if at := pointText(axes, r.fixed); at != "" {
			return errAt(set.given["tr"], "at %s: %s", at, err.(*posError).msg)
		}
		return err
	}
	needMag, needMeasure := runNeeds(qs, p)
	var res *physics.Result
	if needMag {
		var err error
		if res, err = ev.simulateRun(r, axes, set, skip, prog); err != nil {
			return err
		}
	}
	var props shape.Properties
	if needMeasure {
		var err error
		if props, err = ev.measureRun(r, axes, set, prog); err != nil {
			return err
		}
	}
	for qi, q := range qs {
		c := curves[qi]
		ri := 0 // index into the simulated spins
		for k := 0; k < r.spins; k++ {
			if skip != nil && skip[k] {
				c.values[cell(k)] = math.NaN()
				continue
			}
			v, err := runValue(r, q, res, ri, props, c, cell(k), axes[0].pos)
			if err != nil {
				return err
			}
			ri++
			c.values[cell(k)] = v
		}
	}
	return nil
}

// runCells maps the k-th spin of a build (spin axes as a grid, first axis
// slowest) to its cell in the sweep's values (first axis slowest, n1 the
// second axis's points).
func runCells(r *sweepRun, axes []*sweepAxis, n1 int) func(k int) int {
	spinAx := spinIndices(axes)
	return func(k int) int {
		idx := [2]int{}
		for ai, v := range r.fixed {
			idx[ai] = v
		}
		rem := k
		for j := len(spinAx) - 1; j >= 0; j-- {
			ai := spinAx[j]
			idx[ai] = rem % axes[ai].n
			rem /= axes[ai].n
		}
		return idx[0]*n1 + idx[1]
	}
}

// spinIndices are the indices of the axes that vary the spins.
func spinIndices(axes []*sweepAxis) []int {
	var out []int
	for i, a := range axes {
		if a.spin {
			out = append(out, i)
		}
	}
	return out
}

// runNeeds tells whether the quantities need the spins simulated (magnetization)
// and the pulse measured (properties read from its simulated profile).
func runNeeds(qs []quantitySpec, p *shape.Pulse) (needMag, needMeasure bool) {
	for _, q := range qs {
		if !q.Property {
			needMag = true
		}
		switch q.Name {
		case "bandwidth", "tbw", "transition", "ripple", "threshold", "b1rms":
			needMeasure = true
		case "flip":
			needMeasure = needMeasure || math.IsNaN(p.Flip)
		}
	}
	return needMag, needMeasure
}

// simulateRun simulates the spins of one build (those not marked in skip).
func (ev *evaluator) simulateRun(r *sweepRun, axes []*sweepAxis, set *settings, skip []bool, prog *progress) (*physics.Result, error) {
	p := r.p
	iso, err := ev.isochromats(r, axes, spinIndices(axes), set, gammaBarOf(p))
	if err != nil {
		return nil, err
	}
	iso = keepSpins(iso, skip)
	opt := physics.Options{Start: set.start, MaxSteps: ev.workBudget()}
	base := 0.0
	if prog != nil {
		prog.mu.Lock()
		base = prog.base
		prog.mu.Unlock()
		n := float64(p.Wave.Len())
		opt.Progress = func(done, total int) { prog.report(float64(done) * n) }
	}
	res, err := physics.Simulate(ev.ctx, &p.Wave, p.Gamma, iso, opt)
	if err != nil {
		if ev.ctx.Err() != nil {
			return nil, ev.ctx.Err()
		}
		return nil, errAt(axes[0].pos, "simulating %s: %v", r.def.Name, err)
	}
	if prog != nil {
		prog.mu.Lock()
		prog.base = base + float64(r.spins)*float64(p.Wave.Len())
		prog.mu.Unlock()
	}
	return res, nil
}

// measureRun measures the pulse of one build (shape.Measure).
func (ev *evaluator) measureRun(r *sweepRun, axes []*sweepAxis, set *settings, prog *progress) (shape.Properties, error) {
	p := r.p
	props, err := shape.Measure(ev.ctx, p, ev.measureOptions(r.def, set.tr))
	if err != nil {
		if ev.ctx.Err() != nil {
			return props, ev.ctx.Err()
		}
		return props, errAt(axes[0].pos, "measuring %s at %s: %v", r.def.Name, pointText(axes, r.fixed), withoutPrefix(err, "measure: "))
	}
	if prog != nil {
		prog.mu.Lock()
		prog.base += measureCost * float64(p.Wave.Len())
		prog.mu.Unlock()
		prog.report(0)
	}
	return props, nil
}

// runValue is quantity q of one build at simulated spin j (cell i of curve c,
// whose magnitude it also fills for the phases).
func runValue(r *sweepRun, q quantitySpec, res *physics.Result, j int, props shape.Properties, c *curveData, i int, at Pos) (float64, error) {
	p := r.p
	var v float64
	switch q.Name {
	case "mx":
		v = res.Mx[j]
	case "my":
		v = res.My[j]
	case "mz":
		v = res.Mz[j]
	case "mxy":
		v = math.Hypot(res.Mx[j], res.My[j])
	case "phase":
		c.mag[i] = math.Hypot(res.Mx[j], res.My[j])
		v = math.NaN()
		if c.mag[i] >= phaseFloor {
			v = math.Atan2(res.My[j], res.Mx[j]) * 180 / math.Pi
		}
	case "echo", "echophase":
		if res.Beta == nil {
			return 0, errAt(at, "%s is computed from the pulse's Cayley–Klein parameters, which exist only without relaxation; drop t1 and t2", q.Name)
		}
		b := res.Beta[j]
		v = real(b)*real(b) + imag(b)*imag(b)
		if q.Name == "echophase" {
			c.mag[i] = v
			v = math.NaN()
			if c.mag[i] >= echoPhaseFloor {
				v = physics.EchoPhase(b) * 180 / math.Pi
			}
		}
	case "peak":
		v = p.Peak() * 1e6
	case "energy":
		v = p.Energy() * 1e15
	case "b1rms":
		v = props.B1rms * 1e6
	case "flip":
		v = p.Flip
		if math.IsNaN(v) {
			v = props.Rotation
		}
		v *= 180 / math.Pi
	case "bandwidth":
		v = props.Bandwidth
	case "tbw":
		v = props.Bandwidth * p.Duration()
	case "transition":
		v = props.Transition
	case "ripple":
		v = props.PassRipple * 100 // % of M0 in the role's quantity
	case "threshold":
		v = props.Threshold * 1e6
		if math.IsNaN(v) && r.note == "" {
			r.note = thresholdReason(p, props)
		}
	}
	return v, nil
}

// isochromats sets up the spins of one build: the spin axes as a grid (first axis
// slowest) and the fixed settings elsewhere.
func (ev *evaluator) isochromats(r *sweepRun, axes []*sweepAxis, spinAx []int, set *settings, gb float64) (*physics.Isochromats, error) {
	n := r.spins
	iso := &physics.Isochromats{}
	fill := func(v float64) []float64 {
		a := make([]float64, n)
		for i := range a {
			a[i] = v
		}
		return a
	}
	if set.offset != 0 {
		iso.Offset = fill(set.offset)
	}
	if set.b1 != nil {
		f, ok := b1Factor(*set.b1, r.p.Peak(), gb)
		if !ok {
			return nil, errAt(set.given["b1"], "b1 %s is an absolute peak, but %s has zero amplitude", set.b1, r.def.Name)
		}
		iso.B1Scale = fill(f)
	}
	if set.t1 > 0 {
		iso.T1 = fill(set.t1)
	}
	if set.t2 > 0 {
		iso.T2 = fill(set.t2)
	}
	stride := n
	for _, ai := range spinAx {
		a := axes[ai]
		stride /= a.n
		vals, err := ev.spinAxisValues(a, r, gb)
		if err != nil {
			return nil, err
		}
		arr := make([]float64, n)
		for k := range arr {
			arr[k] = vals[(k/stride)%a.n]
		}
		switch a.kind {
		case "offset":
			iso.Offset = arr
		case "b1":
			iso.B1Scale = arr
		case "position":
			iso.Position = arr
		case "t1":
			iso.T1 = arr
		case "t2":
			iso.T2 = arr
		}
	}
	if iso.T1 != nil && iso.T2 == nil {
		// t1 without t2: T2 = 2·T1, the longest a relaxing ensemble can have
		// (see relaxMask); no transverse decay at all would let |M| exceed M0.
		iso.T2 = make([]float64, n)
		for k, t1 := range iso.T1 {
			iso.T2[k] = 2 * t1
		}
	}
	return iso, nil
}

// spinAxisValues gives a spin axis's points as the engine takes them: offsets
// in Hz (ppm through the field, with the sign of γ), b1 as a factor of the
// pulse's peak, the rest in SI units.
func (ev *evaluator) spinAxisValues(a *sweepAxis, r *sweepRun, gb float64) ([]float64, error) {
	vals := make([]float64, a.n)
	for i := range vals {
		v := a.value(i)
		switch a.kind {
		case "offset":
			if v.Q.D == dimPPM {
				// Δf = γ̄·B0·δ with the sign of γ (see convert).
				vals[i] = v.Q.V * 1e-6 * signedGammaBar(r.p) * ev.st.field
			} else {
				vals[i] = v.Q.V
			}
		case "b1":
			f, ok := b1Factor(v, r.p.Peak(), gb)
			if !ok {
				return nil, errAt(a.pos, "b1 axis in absolute units, but %s has zero amplitude", r.def.Name)
			}
			vals[i] = f
		default:
			vals[i] = v.Q.V
		}
	}
	return vals, nil
}

// t2FromT1 tells whether a sweep relaxes with t1 but was given no t2 (as a
// setting or an axis), so that T2 is taken as 2·T1 (see isochromats).
func t2FromT1(axes []*sweepAxis, set *settings) bool {
	return (set.t1 > 0 || axisNamed(axes, "t1")) && !(set.t2 > 0 || axisNamed(axes, "t2"))
}

// t2FromT1Note says so in the sweep's notes.
const t2FromT1Note = "t2 not given: taken as 2·t1 at every point, the longest T2 consistent with T1 (T2 ≤ 2·T1; with no transverse decay at all |M| would exceed M0); give t2 for a real sample's value."

// bandMarks marks the design band edges of each pulse on offset and position axes.
func bandMarks(a *sweepAxis, defs []*pulseDef, st *state) []display.Mark {
	var marks []display.Mark
	for _, d := range defs {
		p := d.Pulse
		if p.Bandwidth == 0 {
			continue
		}
		for _, side := range []float64{-1, 1} {
			f := p.Center + side*p.Bandwidth/2
			var x float64
			switch {
			case a.kind == "offset" && a.from.Q.D == dimPPM:
				x = f / (signedGammaBar(p) * st.field * 1e-6)
			case a.kind == "offset":
				u, _ := lookupUnit(a.unit)
				x = f / u.Factor
			case a.kind == "position" && p.Gradient != 0:
				u, _ := lookupUnit(a.unit)
				x = f / (signedGammaBar(p) * p.Gradient) / u.Factor
			default:
				continue
			}
			marks = append(marks, display.Mark{X: x, Label: d.Name + " band edge"})
		}
	}
	return marks
}

// finitePoints keeps the points where y is not NaN (points left out of a sweep,
// t2 > 2·t1), with the matching x and also (when not nil); the inputs are
// returned as they are when nothing is left out.
func finitePoints(x, y, also []float64) ([]float64, []float64, []float64) {
	if !slices.ContainsFunc(y, math.IsNaN) {
		return x, y, also
	}
	var fx, fy, fa []float64
	for i, v := range y {
		if math.IsNaN(v) {
			continue
		}
		fx, fy = append(fx, x[i]), append(fy, v)
		if also != nil {
			fa = append(fa, also[i])
		}
	}
	return fx, fy, fa
}

// curveView is the curve as presentation shows it.
func (c *curveData) view() present.Curve {
	return present.Curve{Pulse: c.pulse, Quantity: c.quantity.Name, Label: c.label, Unit: present.UnitLabel(c.quantity.Unit), Values: c.values,
		Energy: c.quantity.Name == "energy" || c.quantity.Name == "b1rms"}
}

// view is the axis as presentation shows it.
func (a *sweepAxis) view() present.Axis {
	return present.Axis{Kind: a.label(), Unit: present.UnitLabel(a.unit), Values: a.display(), Reverse: a.reverse, Log: a.logScale,
		At: func(i int) string { return a.value(i).String() }}
}

// profileResult measures the curves of a one-axis sweep for presentation: the
// design band edges, and on a sweep of over 50 points (summarized by features)
// each curve's features, against the half levels set by start (the initial
// magnetization) and the pulse's design.
func (ev *evaluator) profileResult(title string, a *sweepAxis, curves []*curveData, defs []*pulseDef, start [3]float64, notes []string) present.Profile {
	v := present.Profile{Title: title, X: a.view(), Marks: bandMarks(a, defs, ev.st), Notes: notes}
	x := v.X.Values
	hasLevels := false
	for _, c := range curves {
		cv := c.view()
		if len(x) > 50 {
			if c.quantity.Name == "phase" || c.quantity.Name == "echophase" {
				slope, dev, x0, x1 := phaseFeatures(x, c.values, c.mag)
				// A phase constant to rounding (a time-symmetric pulse's echo)
				// reads 0, not 1e-13.
				if math.Abs(slope*(x1-x0)) < 1e-9 {
					slope = 0
				}
				if dev < 1e-9 {
					dev = 0
				}
				cv.Phase = &present.PhaseFit{Slope: slope, Dev: dev, X0: x0, X1: x1}
			} else {
				var p *shape.Pulse
				for _, d := range defs {
					if d.Name == c.pulse {
						p = d.Pulse
					}
				}
				base, target := curveLevels(c.quantity.Name, a.kind, start, p)
				hasLevels = hasLevels || !math.IsNaN(base)
				fx, fy, _ := finitePoints(x, c.values, nil)
				cv.Features = curveFeatures(fx, fy, base, target)
			}
		}
		v.Curves = append(v.Curves, cv)
	}
	if hasLevels {
		v.LevelNote = ev.st.definition(present.HalfLevelNote, present.HalfLevelBrief)
	}
	return v
}

// mapResult measures one quantity of one pulse over two axes for presentation:
// its extremes and, for its role's quantity, how many points meet the target;
// leftOut cells were not simulated (t2 > 2·t1).
func mapResult(title string, axes []*sweepAxis, c *curveData, n0, n1 int, note string, axisNotes []string, leftOut int) present.Map {
	v := present.Map{Title: title, X: axes[0].view(), Y: axes[1].view(), Curve: c.view(), N0: n0, N1: n1, Note: note, AxisNotes: axisNotes, LeftOut: leftOut}
	level, cmp, ok := roleTarget(c.role, c.quantity.Name)
	lo, hi, loAt, hiAt := math.Inf(1), math.Inf(-1), 0, 0
	met := 0
	for i, x := range c.values {
		// Ties within rounding noise keep the first point, so that the
		// summary does not hinge on the last bits of the simulation.
		if x < lo-tieTol(lo) {
			lo, loAt = x, i
		}
		if x > hi+tieTol(hi) {
			hi, hiAt = x, i
		}
		if ok && cmp(x) {
			met++
		}
	}
	v.Lo, v.Hi, v.LoAt, v.HiAt = lo, hi, loAt, hiAt
	if ok {
		v.Target = &present.Target{Level: level, Text: targetText(c.role, level), Met: met}
	}
	return v
}

// roleTarget is the level a role's profile must reach (the targets of
// shape.Measure's threshold): invert Mz ≤ −0.9, excite |Mxy| ≥ 0.9, refocus
// |β|² ≥ 0.9, saturate |Mz| ≤ 0.1.
func roleTarget(r shape.Role, q string) (float64, func(float64) bool, bool) {
	switch {
	case r == shape.RoleInvert && q == "mz":
		return -0.9, func(v float64) bool { return v <= -0.9 }, true
	case r == shape.RoleExcite && q == "mxy":
		return 0.9, func(v float64) bool { return v >= 0.9 }, true
	case r == shape.RoleRefocus && q == "echo":
		return 0.9, func(v float64) bool { return v >= 0.9 }, true
	case r == shape.RoleSaturate && q == "mz":
		return 0.1, func(v float64) bool { return math.Abs(v) <= 0.1 }, true
	}
	return 0, nil, false
}

func targetText(r shape.Role, level float64) string {
	switch r {
	case shape.RoleInvert:
		return "≤ −0.9"
	case shape.RoleSaturate:
		return "within ±0.1"
	}
	return "≥ 0.9"
}

// tieTol is the difference below which two values count as equal in summaries.
func tieTol(v float64) float64 {
	if math.IsInf(v, 0) {
		return 0
	}
	return 1e-9 * math.Max(1, math.Abs(v))
}

// relaxMask marks the spins of a sweep (in the order isochromats lays them out:
// spin axes as a grid, first axis slowest) whose T2 exceeds 2·T1, with t1 and t2
// taken from the axes or the settings; left counts them. It is nil when a t1 or
// t2 is missing (no relaxation of that kind) or no spin is marked. Such spins
// are not simulated: T2 ≤ 2·T1 holds for any relaxing spin ensemble, and beyond
// it the Bloch equations let |M| grow past M0 (common practice; Abragam, The
// Principles of Nuclear Magnetism, 1961, from memory).
func relaxMask(axes []*sweepAxis, set *settings) (skip []bool, left int) {
	var spinAx []*sweepAxis
	n := 1
	relaxAxis := false
	for _, a := range axes {
		if a.spin {
			spinAx = append(spinAx, a)
			n *= a.n
			relaxAxis = relaxAxis || a.kind == "t1" || a.kind == "t2"
		}
	}
	if !relaxAxis {
		return nil, 0 // fixed t1 and t2 alone are checked with the settings
	}
	skip = make([]bool, n)
	for k := range skip {
		t1, t2 := set.t1, set.t2
		stride := n
		for _, a := range spinAx {
			stride /= a.n
			switch v := a.value((k / stride) % a.n).Q.V; a.kind {
			case "t1":
				t1 = v
			case "t2":
				t2 = v
			}
		}
		if t1 > 0 && t2 > 0 && beyondRelaxLimit(t1, t2) {
			skip[k] = true
			left++
		}
	}
	if left == 0 {
		return nil, 0
	}
	return skip, left
}

// beyondRelaxLimit reports t2 > 2·t1; values equal but for rounding (a t2 axis
// stepping onto 2·t1) count as equal, so that the limit itself is simulated.
func beyondRelaxLimit(t1, t2 float64) bool { return t2 > 2*t1*(1+1e-12) }

// keepSpins drops the spins marked in skip from iso.
func keepSpins(iso *physics.Isochromats, skip []bool) *physics.Isochromats {
	if skip == nil {
		return iso
	}
	keep := func(a []float64) []float64 {
		if a == nil {
			return nil
		}
		var out []float64
		for k, v := range a {
			if !skip[k] {
				out = append(out, v)
			}
		}
		return out
	}
	return &physics.Isochromats{Offset: keep(iso.Offset), B1Scale: keep(iso.B1Scale), Position: keep(iso.Position), T1: keep(iso.T1), T2: keep(iso.T2)}
}

// relaxLimitNote names the relation behind the points left out of a sweep.
const relaxLimitNote = "T2 ≤ 2·T1 for any relaxing spin ensemble; beyond it the Bloch equations let |M| exceed M0 (common practice: Abragam, The Principles of Nuclear Magnetism, 1961; from memory)"

// axisNotes are the notes a sweep's figure and table carry about its axes: the
// geometric spacing of relaxation axes and the points left out where
// t2 > 2·t1 (left of cells).
func axisNotes(axes []*sweepAxis, left, cells int) []string {
	var notes []string
	if s := spacingNote(axes); s != "" {
		notes = append(notes, s)
	}
	if left > 0 {
		notes = append(notes, fmt.Sprintf("%d of %d points, where t2 > 2·t1, left out (not simulated; blank in the figure, \"—\" in tables, null in the JSON): %s.", left, cells, relaxLimitNote))
	}
	return notes
}
