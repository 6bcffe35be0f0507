package dsl

import (
	"fmt"
	"math"
	"strings"

	"Nutate/dsl/present"
)

// Dim is a physical dimension as integer exponents of the base quantities the
// language keeps apart: time (s), magnetic field (T), length (m), angle (rad) and
// chemical shift (ppm). A frequency is time⁻¹; a gradient is field·length⁻¹. The
// zero Dim is a plain number.
type Dim [5]int8

const (
	baseTime = iota
	baseField
	baseLength
	baseAngle
	basePPM
)

// Dimensions with names in messages.
var (
	dimNumber    = Dim{}
	dimTime      = Dim{baseTime: 1}
	dimFrequency = Dim{baseTime: -1}
	dimField     = Dim{baseField: 1}
	dimLength    = Dim{baseLength: 1}
	dimAngle     = Dim{baseAngle: 1}
	dimPPM       = Dim{basePPM: 1}
	dimGradient  = Dim{baseField: 1, baseLength: -1}
	dimEnergy    = Dim{baseField: 2, baseTime: 1}
)

func (d Dim) mul(e Dim) Dim {
	for i := range d {
		d[i] += e[i]
	}
	return d
}

func (d Dim) div(e Dim) Dim {
	for i := range d {
		d[i] -= e[i]
	}
	return d
}

var dimNames = []struct {
	d          Dim
	noun, name string
}{
	{dimNumber, "a plain number", "number"},
	{dimTime, "a time", "time"},
	{dimFrequency, "a frequency", "frequency"},
	{dimField, "a magnetic field", "magnetic field"},
	{dimLength, "a length", "length"},
	{dimAngle, "an angle", "angle"},
	{dimPPM, "a chemical shift in ppm", "ppm"},
	{dimGradient, "a gradient", "gradient"},
	{dimEnergy, "an energy (B1²·time)", "energy"},
}

// Noun names the dimension for messages: "a time", "a frequency".
func (d Dim) Noun() string {
	for _, n := range dimNames {
		if n.d == d {
			return n.noun
		}
	}
	return "a quantity in " + d.unitString()
}

// Name is the bare dimension name ("time").
func (d Dim) Name() string {
	for _, n := range dimNames {
		if n.d == d {
			return n.name
		}
	}
	return d.unitString()
}

func (d Dim) unitString() string {
	sym := [...]string{"s", "T", "m", "rad", "ppm"}
	var num, den []string
	for i, e := range d {
		switch {
		case e == 1:
			num = append(num, sym[i])
		case e > 1:
			num = append(num, fmt.Sprintf("%s^%d", sym[i], e))
		case e == -1:
			den = append(den, sym[i])
		case e < -1:
			den = append(den, fmt.Sprintf("%s^%d", sym[i], -e))
		}
	}
	s := strings.Join(num, "·")
	if s == "" {
		s = "1"
	}
	if len(den) > 0 {
		s += "/" + strings.Join(den, "·")
	}
	return s
}

// Unit is a named unit: its dimension and the factor that takes a value in it to
// the base (SI, with ppm as its own base and angles in radians).
type Unit struct {
	Name   string
	Dim    Dim
	Factor float64
	Help   string
}

// units is the full vocabulary, case-sensitive. Micro is written u or µ (U+00B5;
// the Greek μ U+03BC is read as the same letter).
var units = []Unit{
	{"s", dimTime, 1, "second"},
	{"ms", dimTime, 1e-3, "millisecond"},
	{"us", dimTime, 1e-6, "microsecond"},
	{"µs", dimTime, 1e-6, "microsecond"},
	{"ns", dimTime, 1e-9, "nanosecond"},
	{"Hz", dimFrequency, 1, "hertz (cycles per second)"},
	{"kHz", dimFrequency, 1e3, "kilohertz"},
	{"MHz", dimFrequency, 1e6, "megahertz"},
	{"T", dimField, 1, "tesla"},
	{"mT", dimField, 1e-3, "millitesla"},
	{"uT", dimField, 1e-6, "microtesla"},
	{"µT", dimField, 1e-6, "microtesla"},
	{"nT", dimField, 1e-9, "nanotesla"},
	{"G", dimField, 1e-4, "gauss (10⁻⁴ T)"},
	{"mG", dimField, 1e-7, "milligauss"},
	{"deg", dimAngle, math.Pi / 180, "degree"},
	{"°", dimAngle, math.Pi / 180, "degree"},
	{"rad", dimAngle, 1, "radian"},
	{"ppm", dimPPM, 1, "parts per million of the Larmor frequency (needs `field`)"},
	{"m", dimLength, 1, "metre"},
	{"cm", dimLength, 1e-2, "centimetre"},
	{"mm", dimLength, 1e-3, "millimetre"},
	{"um", dimLength, 1e-6, "micrometre"},
	{"µm", dimLength, 1e-6, "micrometre"},
	{"T/m", dimGradient, 1, "tesla per metre"},
	{"mT/m", dimGradient, 1e-3, "millitesla per metre"},
	{"G/cm", dimGradient, 1e-2, "gauss per centimetre (10 mT/m)"},
	{"%", dimNumber, 1e-2, "percent (a plain number divided by 100)"},
}

// lookupUnit finds a unit by its exact spelling.
func lookupUnit(name string) (Unit, bool) {
	name = strings.ReplaceAll(name, "μ", "µ")
	for _, u := range units {
		if u.Name == name {
			return u, true
		}
	}
	return Unit{}, false
}

// suggestUnit is the hint after "unknown unit": units are case-sensitive, so a
// name that differs from a unit only in case is not guessed at (mHz is not
// MHz, 10⁹ times apart); the hint names that unit instead. Otherwise the usual
// did-you-mean.
func suggestUnit(name string) string {
	for _, u := range units {
		if strings.EqualFold(u.Name, name) {
			return "; units are case-sensitive, and " + u.Name + " is the " + u.Help
		}
	}
	return suggest(name, unitNames())
}

func unitNames() []string {
	out := make([]string, len(units))
	for i, u := range units {
		out[i] = u.Name
	}
	return out
}

// Quantity is a value in base units with its dimension.
type Quantity struct {
	V float64
	D Dim
}

// display units by dimension, largest first, for automatic formatting.
var displayLadder = map[Dim][]string{
	dimTime:      {"s", "ms", "us", "ns"},
	dimFrequency: {"MHz", "kHz", "Hz"},
	dimField:     {"T", "mT", "uT", "nT"},
	dimLength:    {"m", "cm", "mm", "um"},
	dimGradient:  {"T/m", "mT/m"},
	dimAngle:     {"deg"},
	dimPPM:       {"ppm"},
}

// autoUnit picks a readable unit for v in dimension d ("" for a plain number or a
// dimension without a named unit).
func autoUnit(q Quantity) string {
	ladder, ok := displayLadder[q.D]
	if !ok {
		return ""
	}
	a := math.Abs(q.V)
	for _, n := range ladder {
		u, _ := lookupUnit(n)
		if a >= u.Factor*0.999999 {
			return n
		}
	}
	return ladder[len(ladder)-1]
}

// shown is q as presentation shows it: its value in unit (or an automatic one
// when unit is "").
func (q Quantity) shown(unit string) present.Value {
	if unit == "" {
		unit = autoUnit(q)
	}
	if unit == "" {
		if q.D == dimNumber {
			return present.Value{V: q.V}
		}
		return present.Value{V: q.V, Unit: q.D.unitString()}
	}
	u, _ := lookupUnit(unit)
	return present.Value{V: q.V / u.Factor, Unit: unit}
}

// format shows q in unit (or an automatic one when unit is "").
func (q Quantity) format(unit string) string { return q.shown(unit).String() }

// String shows q in an automatic unit.
func (q Quantity) String() string { return q.format("") }

// in returns q in the given unit's value, converting between dimensions the way
// the trade does: frequency ↔ field through the nucleus (ν = |γ̄|·B, as used both
// for B1 amplitudes and for the Larmor frequency of B0: magnitudes), and ppm ↔
// frequency offset through the nucleus and the main field with the sign of γ:
// Δf = γ̄·B0·δ·10⁻⁶. A shift δ adds the field B0·δ along z, and the convention
// γB_eff = (ω1x, ω1y, Δω) makes its offset Δω = γ·B0·δ, so for a negative-γ nucleus
// (15N, 17O, 3He, 129Xe) a positive shift is a negative offset, just as a position
// x in a gradient G is the offset γ·G·x. It returns the converted quantity in base
// units.
func convert(q Quantity, to Dim, gammaBar, b0 float64, nucleus string) (Quantity, error) {
	if q.D == to {
		return q, nil
	}
	gb := math.Abs(gammaBar)
	switch {
	case q.D == dimFrequency && to == dimField:
		return Quantity{q.V / gb, to}, nil
	case q.D == dimField && to == dimFrequency:
		return Quantity{q.V * gb, to}, nil
	case q.D == dimPPM && to == dimFrequency:
		if b0 == 0 {
			return q, fmt.Errorf("ppm needs the main field (nucleus %s is set, the field is not): set it first, e.g. `field 3 T`", nucleus)
		}
		return Quantity{q.V * 1e-6 * gammaBar * b0, to}, nil
	case q.D == dimFrequency && to == dimPPM:
		if b0 == 0 {
			return q, fmt.Errorf("ppm needs the main field (nucleus %s is set, the field is not): set it first, e.g. `field 3 T`", nucleus)
		}
		return Quantity{q.V / (1e-6 * gammaBar * b0), to}, nil
	}
	return q, fmt.Errorf("cannot convert %s to %s", q.D.Noun(), to.Noun())
}
