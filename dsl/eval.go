package dsl

import (
	"context"
	"fmt"
	"maps"
	"math"
	"sort"
	"strings"

	"Nutate/display"
	"Nutate/dsl/present"
	"Nutate/physics"
)

// state is what persists from cell to cell. A statement works on a copy and the
// copy replaces the state only when the statement succeeds.
type state struct {
	nucleus physics.Nucleus
	field   float64 // T; 0: not set
	names   map[string]*binding
	seq     int             // definition counter, for listing names in order
	last    *sweepTable     // the last sweep's data, for `export sweep to "file.csv"`
	figure  display.Figure  // the last figure, for `export figure to "file.svg"`
	shown   map[string]bool // definition notes already given in full this session (notes.go)
}

// binding is a named quantity or a named pulse.
type binding struct {
	val   Value
	pulse *pulseDef
	seq   int
}

func newState() *state {
	h, _ := physics.Lookup("1H")
	return &state{nucleus: h, names: map[string]*binding{}}
}

func (s *state) clone() *state {
	c := *s
	c.names = maps.Clone(s.names)
	c.shown = maps.Clone(s.shown)
	return &c
}

func (s *state) nameList() []string {
	out := make([]string, 0, len(s.names))
	for n := range s.names {
		out = append(out, n)
	}
	sort.Strings(out)
	return out
}

func (s *state) pulseNames() []string {
	var out []string
	for n, b := range s.names {
		if b.pulse != nil {
			out = append(out, n)
		}
	}
	sort.Strings(out)
	return out
}

func (s *state) define(name string, b *binding) {
	s.seq++
	b.seq = s.seq
	s.names[name] = b
}

// evaluator runs one statement against a working copy of the state.
type evaluator struct {
	ctx  context.Context
	sess *Session
	st   *state
	sink Sink
	out  []display.Bundle
}

func (ev *evaluator) emit(b display.Bundle) { ev.out = append(ev.out, b) }

func (ev *evaluator) checkCtx() error {
	return ev.ctx.Err()
}

// exec runs one statement.
func (ev *evaluator) exec(s Stmt) error {
	switch s := s.(type) {
	case *NucleusStmt:
		n, ok := physics.Lookup(s.Name)
		if !ok {
			return errAt(s.NameP, "unknown nucleus %s, want one of %s%s", quoteText(s.Name), physics.NucleusNames(), suggest(s.Name, strings.Fields(physics.NucleusNames())))
		}
		ev.st.nucleus = n
		ev.emit(textBundle(fmt.Sprintf("nucleus %s: γ/2π = %s MHz/T (%s)", n.Name, present.Number(n.GammaBar/1e6), n.Reference)))
	case *FieldStmt:
		v, err := ev.evalExpr(s.X)
		if err != nil {
			return err
		}
		if v.Q.D != dimField {
			return errAt(s.X.Position(), "field expects a magnetic field in tesla units, got %s", describeValue(v))
		}
		b0 := v.Q.V
		if !(b0 > 0) || b0 > 100 {
			return errAt(s.X.Position(), "field must be above 0 T and at most 100 T, got %s", v)
		}
		ev.st.field = b0
		ev.emit(textBundle(fmt.Sprintf("field %s: %s Larmor frequency %s", Value{Q: Quantity{b0, dimField}, Unit: "T"}, ev.st.nucleus.Name,
			Quantity{math.Abs(ev.st.nucleus.GammaBar) * b0, dimFrequency}.format("MHz"))))
	case *LetStmt:
		return ev.let(s)
	case *PrintStmt:
		var parts []string
		for _, x := range s.Xs {
			if id, ok := x.(*Ident); ok {
				if b, ok := ev.st.names[id.Name]; ok && b.pulse != nil {
					parts = append(parts, pulseSummary(b.pulse))
					continue
				}
			}
			v, err := ev.evalExpr(x)
			if err != nil {
				return err
			}
			parts = append(parts, v.String())
		}
		ev.emit(textBundle(strings.Join(parts, "\n")))
	case *PulseStmt:
		return ev.pulse(s)
	case *DescribeStmt:
		return ev.describe(s)
	case *SweepStmt:
		return ev.sweep(s)
	case *ExportStmt:
		return ev.export(s)
	case *ImportStmt:
		return ev.importPulse(s)
	case *ReportStmt:
		return ev.report(s)
	case *HelpStmt:
		text, err := Help(s.Topic)
		if err != nil {
			return errAt(s.TopicP, "%v", err)
		}
		ev.emit(textBundle(text))
	case *ResetStmt:
		shown := ev.st.shown // definitions given stay given: once per session
		*ev.st = *newState()
		ev.st.shown = shown
		ev.emit(textBundle("reset: every name forgotten; nucleus 1H, no field"))
	default:
		return errAt(s.Position(), "statement not supported")
	}
	return nil
}

func (ev *evaluator) let(s *LetStmt) error {
	x := s.X
	if ov, ok := ev.sess.overrides[s.Name.Name]; ok {
		x = ov.expr
		ev.sess.used[s.Name.Name] = true
	}
	v, err := ev.evalExpr(x)
	if err != nil {
		if _, ok := ev.sess.overrides[s.Name.Name]; ok {
			return errAt(s.Name.P, "%s (value given by --set %s=%s)", err.Error(), s.Name.Name, ev.sess.overrides[s.Name.Name].text)
		}
		return err
	}
	if err := ev.checkRedefine(s.Name, false); err != nil {
		return err
	}
	ev.st.define(s.Name.Name, &binding{val: v})
	ev.emit(textBundle(fmt.Sprintf("%s = %s", s.Name.Name, v)))
	return nil
}

// checkRedefine refuses names that would hide a shape or a statement keyword.
func (ev *evaluator) checkRedefine(id Ident, pulse bool) error {
	if _, ok := lookupShape(id.Name); ok {
		return errAt(id.P, "%s is a shape and cannot be redefined", quoteText(id.Name))
	}
	if id.Name == piName {
		return errAt(id.P, "pi is the constant π and cannot be redefined")
	}
	if _, ok := lookupUnit(id.Name); ok && !pulse {
		return errAt(id.P, "%s is a unit and cannot name a quantity (`2 %s` would read as a unit)", quoteText(id.Name), id.Name)
	}
	return nil
}

// pulseNamed finds a pulse by name.
func (ev *evaluator) pulseNamed(id Ident) (*pulseDef, error) {
	b, ok := ev.st.names[id.Name]
	if !ok {
		return nil, errAt(id.P, "unknown pulse %s%s", quoteText(id.Name), ev.suggest(id.Name, ev.st.pulseNames()))
	}
	if b.pulse == nil {
		return nil, errAt(id.P, "%s is a quantity (%s), not a pulse", quoteText(id.Name), b.val)
	}
	return b.pulse, nil
}

func (ev *evaluator) pulses(ids []Ident) ([]*pulseDef, error) {
	var out []*pulseDef
	seen := map[string]bool{}
	for _, id := range ids {
		p, err := ev.pulseNamed(id)
		if err != nil {
			return nil, err
		}
		if seen[id.Name] {
			return nil, errAt(id.P, "pulse %s is listed twice", quoteText(id.Name))
		}
		seen[id.Name] = true
		out = append(out, p)
	}
	return out, nil
}

// wordOf reads an expression that should be a bare word (`hann`, `invert`, `-z`).
func wordOf(e Expr) (string, bool) {
	switch x := e.(type) {
	case *Ident:
		return x.Name, true
	case *Unary:
		if w, ok := wordOf(x.X); ok && x.Op == tMinus {
			return "-" + w, true
		}
	}
	return "", false
}

// textBundle is a plain-text answer.
func textBundle(s string) display.Bundle { return display.Text(s) }
