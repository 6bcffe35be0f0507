package present

import (
	"fmt"
	"math"
	"strconv"
	"strings"
)

// Number writes v with 6 significant digits, no exponent for ordinary
// magnitudes; NaN is "—".
func Number(v float64) string {
	if v == 0 {
		return "0"
	}
	if math.IsNaN(v) {
		return "—"
	}
	a := math.Abs(v)
	if a >= 1e-4 && a < 1e7 {
		s := fmt.Sprintf("%.6g", v)
		if strings.ContainsAny(s, "e") {
			// 10⁶ to 10⁷: %g turns to an exponent; write the six significant
			// digits out instead (2885240, not 2885235.214247).
			s = strconv.FormatFloat(RoundSig(v, 6), 'f', -1, 64)
		}
		return s
	}
	return fmt.Sprintf("%.6g", v)
}

// RoundSig rounds v to sig significant digits.
func RoundSig(v float64, sig int) float64 {
	if v == 0 || math.IsNaN(v) || math.IsInf(v, 0) {
		return v
	}
	e := math.Pow(10, float64(sig-1)-math.Floor(math.Log10(math.Abs(v))))
	return math.Round(v*e) / e
}

// Cell writes a table cell with 4 significant digits ("—" for NaN); an
// exact zero's rounding noise prints as 0.
func Cell(v float64) string {
	if math.IsNaN(v) {
		return "—"
	}
	if math.Abs(v) < 1e-10 {
		v = 0 // rounding noise of an exact zero
	}
	return fmt.Sprintf("%.4g", v)
}

// CellOpt writes a measured figure that may be missing ("—" for NaN),
// rounded to 5 significant digits.
func CellOpt(v float64) string {
	if math.IsNaN(v) {
		return "—"
	}
	return Number(RoundSig(v, 5))
}

// UnitLabel is a unit as shown: µT, µs and µm for the uT, us and um typed.
func UnitLabel(u string) string {
	switch u {
	case "uT":
		return "µT"
	case "us":
		return "µs"
	case "um":
		return "µm"
	}
	return u
}
