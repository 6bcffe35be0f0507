package display

import (
	"math"
	"strconv"
	"strings"
)

// Num formats v rounded to sig significant digits, the way numbers are written in
// a paper: plain decimals for 1e-3 ≤ |v| < 1e6 ("0.0123", "1230", "-4.5"), otherwise
// a short exponent ("1.2e-5", "3.4e7"); trailing zeros after the point are dropped,
// negative zero prints as "0". sig is clamped to 1…17. NaN and infinities print as
// "NaN", "+Inf" and "-Inf".
func Num(v float64, sig int) string {
	switch {
	case math.IsNaN(v):
		return "NaN"
	case math.IsInf(v, 1):
		return "+Inf"
	case math.IsInf(v, -1):
		return "-Inf"
	case v == 0:
		return "0"
	}
	sig = min(max(sig, 1), 17)
	// Round once in exponent form so the decade is the one after rounding
	// (9.996 to 3 digits is 10.0, decade 1).
	e := strconv.FormatFloat(v, 'e', sig-1, 64)
	mant, exps, _ := strings.Cut(e, "e")
	exp, _ := strconv.Atoi(exps)
	if exp < -3 || exp >= 6 {
		return trimZeros(mant) + "e" + strconv.Itoa(exp)
	}
	r, _ := strconv.ParseFloat(e, 64)
	if r == 0 {
		return "0"
	}
	return trimZeros(strconv.FormatFloat(r, 'f', max(sig-1-exp, 0), 64))
}

// trimZeros drops trailing zeros after a decimal point, and the point itself.
func trimZeros(s string) string {
	if !strings.Contains(s, ".") {
		return s
	}
	s = strings.TrimRight(s, "0")
	return strings.TrimSuffix(s, ".")
}
