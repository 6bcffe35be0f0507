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

// NumColumn formats a column of numbers for a table with one number of decimals,
// so the points line up: enough decimals to give the largest magnitude sig
// significant digits, then trailing zeros that every entry shares are dropped.
// Columns whose largest magnitude is below 1e-3 or at least 1e6 fall back to Num
// for each entry. Non-finite entries print as Num does.
func NumColumn(v []float64, sig int) []string {
	sig = min(max(sig, 1), 17)
	var big float64
	for _, x := range v {
		if finite(x) {
			big = math.Max(big, math.Abs(x))
		}
	}
	out := make([]string, len(v))
	if big != 0 && (big < 1e-3 || big >= 1e6) {
		for i, x := range v {
			out[i] = Num(x, sig)
		}
		return out
	}
	dec := 0
	if big != 0 {
		dec = min(max(sig-1-int(math.Floor(math.Log10(big))), 0), 12)
	}
	for i, x := range v {
		if !finite(x) {
			out[i] = Num(x, sig)
			continue
		}
		out[i] = strconv.FormatFloat(x, 'f', dec, 64)
		if strings.Trim(out[i], "-0.") == "" {
			out[i] = strings.TrimPrefix(out[i], "-") // no "-0.000"
		}
	}
	// Drop decimals that are zero in every finite entry.
	for dec > 0 {
		all := true
		for i, x := range v {
			if finite(x) && !strings.HasSuffix(out[i], "0") {
				all = false
				break
			}
		}
		if !all {
			break
		}
		for i, x := range v {
			if finite(x) {
				out[i] = strings.TrimSuffix(out[i][:len(out[i])-1], ".")
			}
		}
		dec--
	}
	return out
}
