package dsl

import (
	"fmt"
	"math"
	"strings"
)

// Value is a quantity with the unit it was written or converted in, kept for
// display ("3 kHz" stays "3 kHz" in messages).
type Value struct {
	Q    Quantity
	Unit string
}

func (v Value) String() string {
	u := v.Unit
	if unit, ok := lookupUnit(u); u != "" && (!ok || unit.Dim != v.Q.D) {
		u = ""
	}
	return v.Q.format(u)
}

// describeValue names a value and its dimension for messages: "3 kHz (a frequency)".
func describeValue(v Value) string {
	if v.Q.D == dimNumber {
		return v.String() + " (a plain number)"
	}
	return v.String() + " (" + v.Q.D.Noun() + ")"
}

// evalExpr computes an expression to a value. Names resolve to `let` quantities.
func (ev *evaluator) evalExpr(e Expr) (Value, error) {
	switch x := e.(type) {
	case *Number:
		if x.Unit == nil {
			return Value{Q: Quantity{x.Value, dimNumber}}, nil
		}
		u, ok := lookupUnit(x.Unit.Name)
		if !ok {
			return Value{}, errAt(x.Unit.P, "unknown unit %s%s", quoteText(x.Unit.Name), suggestUnit(x.Unit.Name))
		}
		return Value{Q: Quantity{x.Value * u.Factor, u.Dim}, Unit: u.Name}, nil
	case *Ident:
		b, ok := ev.st.names[x.Name]
		if !ok {
			// A bare unit is one of it (`10 mT / m`); names never shadow units.
			if u, isUnit := lookupUnit(x.Name); isUnit {
				return Value{Q: Quantity{u.Factor, u.Dim}, Unit: u.Name}, nil
			}
			return Value{}, errAt(x.P, "unknown name %s%s", quoteText(x.Name), ev.suggest(x.Name, ev.st.nameList()))
		}
		if b.pulse != nil {
			return Value{}, errAt(x.P, "%s is a pulse, not a quantity", quoteText(x.Name))
		}
		return b.val, nil
	case *Unary:
		v, err := ev.evalExpr(x.X)
		if err != nil {
			return v, err
		}
		if x.Op == tMinus {
			v.Q.V = -v.Q.V
		}
		return v, nil
	case *Binary:
		a, err := ev.evalExpr(x.X)
		if err != nil {
			return a, err
		}
		b, err := ev.evalExpr(x.Y)
		if err != nil {
			return b, err
		}
		if a, b, err = ev.shiftsToOffsets(x, a, b); err != nil {
			return Value{}, err
		}
		switch x.Op {
		case tPlus, tMinus:
			if a.Q.D != b.Q.D {
				verb := "add"
				if x.Op == tMinus {
					verb = "subtract"
				}
				return Value{}, errAt(x.P, "cannot %s %s and %s", verb, describeValue(a), describeValue(b))
			}
			r := a
			if x.Op == tPlus {
				r.Q.V = a.Q.V + b.Q.V
			} else {
				r.Q.V = a.Q.V - b.Q.V
			}
			if r.Unit == "%" && b.Unit != "%" {
				r.Unit = ""
			}
			return r, checkFinite(x.P, r)
		case tStar:
			r := Value{Q: Quantity{a.Q.V * b.Q.V, a.Q.D.mul(b.Q.D)}}
			r.Unit = productUnit(a, b)
			return r, checkFinite(x.P, r)
		case tSlash:
			if b.Q.V == 0 {
				return Value{}, errAt(x.P, "division by zero")
			}
			r := Value{Q: Quantity{a.Q.V / b.Q.V, a.Q.D.div(b.Q.D)}}
			if b.Q.D == dimNumber && a.Unit != "%" {
				r.Unit = a.Unit
			}
			return r, checkFinite(x.P, r)
		}
	case *Convert:
		v, err := ev.evalExpr(x.X)
		if err != nil {
			return v, err
		}
		u, ok := lookupUnit(x.Unit.Name)
		if !ok {
			return Value{}, errAt(x.Unit.P, "unknown unit %s%s", quoteText(x.Unit.Name), suggestUnit(x.Unit.Name))
		}
		q, err := convert(v.Q, u.Dim, ev.st.nucleus.GammaBar, ev.st.field, ev.st.nucleus.Name)
		if err != nil {
			return Value{}, errAt(x.P, "%s in %s: %v", v, u.Name, err)
		}
		return Value{Q: q, Unit: u.Name}, nil
	case *Call:
		return Value{}, errAt(x.Fun.P, "%s(...) is a pulse shape, not a quantity; define it with `pulse NAME = %s(...)`", x.Fun.Name, x.Fun.Name)
	}
	return Value{}, errAt(e.Position(), "expected a value")
}

// shiftsToOffsets turns a chemical shift that meets a frequency or a time in x
// into its frequency offset (Δf = γ̄·B0·δ, signed like γ; see convert), so that
// `3.5 ppm / bw` is a plain ratio, `3.5 ppm + 100 Hz` a frequency and
// `3.5 ppm * 2 ms` the cycles of phase the shift gathers. A shift alone, with
// another shift, with a plain number or with any other dimension (`0.3 mm / ppm`,
// a displacement per ppm) stays in ppm. Without the main field there is no
// offset: that is an error naming the field.
func (ev *evaluator) shiftsToOffsets(x *Binary, a, b Value) (Value, Value, error) {
	meets := func(shift, other Value) bool {
		return shift.Q.D == dimPPM && (other.Q.D == dimFrequency || other.Q.D == dimTime)
	}
	aPPM, bPPM := meets(a, b), meets(b, a)
	if !aPPM && !bPPM {
		return a, b, nil
	}
	if ev.st.field == 0 {
		what := map[tokKind]string{tPlus: "add %s and %s", tMinus: "subtract %s and %s", tStar: "multiply %s by %s", tSlash: "divide %s by %s"}[x.Op]
		return a, b, errAt(x.P, "cannot "+what+" without the main field: a shift in ppm becomes an offset in Hz only once the field is set, e.g. `field 3 T`", describeValue(a), describeValue(b))
	}
	to := func(v Value) Value {
		q, _ := convert(v.Q, dimFrequency, ev.st.nucleus.GammaBar, ev.st.field, ev.st.nucleus.Name)
		return Value{Q: q, Unit: "Hz"}
	}
	if aPPM {
		return to(a), b, nil
	}
	return a, to(b), nil
}

// productUnit keeps the unit hint when one side is a plain number.
func productUnit(a, b Value) string {
	switch {
	case a.Q.D == dimNumber && b.Unit != "%":
		return b.Unit
	case b.Q.D == dimNumber && a.Unit != "%":
		return a.Unit
	}
	return ""
}

func checkFinite(p Pos, v Value) error {
	if math.IsInf(v.Q.V, 0) || math.IsNaN(v.Q.V) {
		return errAt(p, "result is out of range")
	}
	return nil
}

// want converts v to dimension d for the argument or setting named what, accepting
// the trade's equivalents: a field given in Hz (through γ̄), a frequency given in
// ppm (through γ̄ and the main field).
func (ev *evaluator) want(v Value, d Dim, what string, p Pos) (float64, error) {
	if v.Q.D == d {
		return v.Q.V, nil
	}
	if (d == dimField && v.Q.D == dimFrequency) || (d == dimFrequency && v.Q.D == dimPPM) {
		q, err := convert(v.Q, d, ev.st.nucleus.GammaBar, ev.st.field, ev.st.nucleus.Name)
		if err != nil {
			return 0, errAt(p, "%s = %s: %v", what, v, err)
		}
		return q.V, nil
	}
	return 0, errAt(p, "%s expects %s, got %s", what, wantNoun(d), describeValue(v))
}

func wantNoun(d Dim) string {
	switch d {
	case dimField:
		return "a magnetic field (T units, or Hz through the nucleus)"
	case dimFrequency:
		return "a frequency (Hz, or ppm once the field is set)"
	}
	return strings.TrimSpace(d.Noun())
}

// plural writes "1 sample", "2 samples".
func plural(n int, noun string) string {
	if n == 1 {
		return "1 " + noun
	}
	return fmt.Sprintf("%d %ss", n, noun)
}
