package dsl

import (
	"fmt"
	"math"
	"strings"

	"Nutate/physics/shape"
)

// trainElem is one element of a train: the pulse and the phase it is played at.
type trainElem struct {
	Def   *pulseDef
	Phase float64 // rad
}

// trainArgs are the named arguments of `train(...)`.
var trainArgs = []argSpec{
	{Name: "gap", Dim: dimTime, Default: "0 s", Help: "time of zero field between neighbouring elements"},
	{Name: "phase", Dim: dimAngle, Default: "0 deg", Help: "phase added to the whole train"},
	{Name: "center", Dim: dimFrequency, Default: "0 Hz", Help: "carrier offset applied to the whole train (Hz or ppm)"},
	{Name: "role", Kind: argWord, Words: []string{"excite", "invert", "refocus", "saturate"}, Help: "what the train is for"},
}

// train runs `train(P1, P2 at PHASE, ..., gap = EXPR)`: a composite played back to
// back; each element is a pulse name or a shape call.
func (ev *evaluator) train(name string, c *Call) (*pulseDef, error) {
	var elems []trainElem
	named := map[string]argVal{}
	for i, a := range c.Args {
		if a.Name != nil {
			var as argSpec
			found := false
			for _, t := range trainArgs {
				if t.Name == a.Name.Name {
					as, found = t, true
				}
			}
			if !found {
				var names []string
				for _, t := range trainArgs {
					names = append(names, t.Name)
				}
				return nil, errAt(a.Name.P, "train has no argument %s%s (arguments: %s; elements are pulses or shape calls)", quoteText(a.Name.Name), suggest(a.Name.Name, names), strings.Join(names, ", "))
			}
			if _, dup := named[as.Name]; dup {
				return nil, errAt(a.Name.P, "argument %s given twice", as.Name)
			}
			v, err := ev.evalArg(as, a.Value, a.Name.P)
			if err != nil {
				return nil, err
			}
			named[as.Name] = v
			continue
		}
		var def *pulseDef
		var err error
		switch x := a.Value.(type) {
		case *Ident:
			def, err = ev.pulseNamed(*x)
		case *Call:
			def, err = ev.definePulse(fmt.Sprintf("%s[%d]", name, i+1), x)
		default:
			return nil, errAt(a.Value.Position(), "a train element is a pulse name or a shape call, got an expression")
		}
		if err != nil {
			return nil, err
		}
		e := trainElem{Def: def}
		if a.At != nil {
			v, err := ev.evalExpr(a.At)
			if err != nil {
				return nil, err
			}
			if e.Phase, err = ev.want(v, dimAngle, "at", a.At.Position()); err != nil {
				return nil, err
			}
		}
		elems = append(elems, e)
	}
	if len(elems) == 0 {
		return nil, errAt(c.Rparen, "train needs at least one element (a pulse name or a shape call)")
	}
	g := elems[0].Def.Pulse.Gamma
	for i, e := range elems {
		if e.Def.Pulse.Gamma != g {
			return nil, errAt(c.Args[i].Value.Position(), "element %d was built for %s, the first for %s: a train plays one nucleus", i+1, e.Def.Nucleus.Name, elems[0].Def.Nucleus.Name)
		}
	}
	spec, _ := lookupShape("train")
	p, err := ev.buildTrain(elems, named, c.Fun.P)
	if err != nil {
		return nil, err
	}
	return &pulseDef{Name: name, Spec: spec, Kind: "train", Args: named, Elems: elems, Pulse: p, Nucleus: elems[0].Def.Nucleus}, nil
}

// buildTrain plays the elements back to back with the train's named arguments;
// a copy or a sweep of a train rebuilds it here with arguments changed.
func (ev *evaluator) buildTrain(elems []trainElem, named map[string]argVal, callPos Pos) (*shape.Pulse, error) {
	b := &builder{vals: map[string]float64{}, words: map[string]string{}}
	for n, v := range named {
		if v.Word != "" {
			b.words[n] = v.Word
			continue
		}
		var as argSpec
		for _, t := range trainArgs {
			if t.Name == n {
				as = t
			}
		}
		x, err := ev.want(v.Val, as.Dim, n, v.Pos)
		if err != nil {
			return nil, err
		}
		b.vals[n] = x
	}
	gap := b.num("gap", 0)
	if gap < 0 {
		return nil, errAt(named["gap"].Pos, "gap must not be negative, got %s", named["gap"].Val)
	}
	if gap > maxDuration {
		return nil, errAt(named["gap"].Pos, "gap must be at most %s, got %s", Quantity{maxDuration, dimTime}, named["gap"].Val)
	}
	cm := shape.NewCommon()
	cm.Duration = math.NaN()
	cm.Phase = b.num("phase", 0)
	cm.Center = b.num("center", 0)
	cm.Role, _ = shape.ParseRole(b.word("role", ""))
	var se []shape.Element
	n := 0
	for _, e := range elems {
		se = append(se, shape.Element{Pulse: e.Def.Pulse, Phase: e.Phase})
		n += e.Def.Pulse.Wave.Len()
	}
	if n > maxPulseSamples {
		return nil, errAt(callPos, "the elements have %d samples together, over the limit of %d per pulse", n, maxPulseSamples)
	}
	p, err := shape.Train(se, gap, cm)
	if err != nil {
		return nil, errAt(callPos, "%s", strings.TrimPrefix(err.Error(), "train: "))
	}
	if n := p.Wave.Len(); n > maxPulseSamples {
		return nil, errAt(callPos, "the train has %d samples in all, over the limit of %d per pulse; use fewer or coarser elements", n, maxPulseSamples)
	}
	return p, nil
}
