package display

import (
	"encoding/json"
	"math"
	"strconv"
)

// The data values (ResultMIME) are written by hand rather than through
// encoding/json: maps carry up to millions of numbers, and encoding/json would
// re-validate every byte a Marshaler returns. Keys keep a fixed order, numbers are
// rounded to the digits that matter (roundingFor), and non-finite numbers
// become null. The result is a json.RawMessage, which encoding/json embeds as is.

// object writes one JSON object field by field.
type object struct{ b []byte }

func newObject() *object { return &object{b: []byte{'{'}} }

func (o *object) raw(key string, v []byte) *object {
	if len(o.b) > 1 {
		o.b = append(o.b, ',')
	}
	o.b = appendString(o.b, key)
	o.b = append(o.b, ':')
	o.b = append(o.b, v...)
	return o
}

func (o *object) str(key, v string) *object { return o.raw(key, appendString(nil, v)) }

func (o *object) done() json.RawMessage { return append(o.b, '}') }

func appendString(b []byte, s string) []byte {
	q, _ := json.Marshal(s) // a string always marshals
	return append(b, q...)
}

func jsonNum(v float64) []byte { return sigRounding.append(nil, v) }

// rounding is how many digits of a value the data keeps (see the package doc):
// decimals ≥ 0 keeps that many decimals, otherwise SigDigits significant digits.
type rounding struct{ decimals int }

var (
	sigRounding    = rounding{decimals: -1}
	magnetRounding = rounding{decimals: 6} // 1e-6 of M0
	degreeRounding = rounding{decimals: 2} // 0.01°
)

// SigDigits is the number of significant digits the data keeps of axis values
// and of quantities other than magnetization and angles.
const SigDigits = 6

// roundingFor picks the rounding of a quantity's values from its unit: angles
// in degrees to 0.01°, a quantity without a unit whose values lie within
// [−1, 1] (magnetization in M0 units) to 1e-6, anything else to SigDigits.
func roundingFor(unit string, v ...[]float64) rounding {
	if isDegrees(unit) {
		return degreeRounding
	}
	if unit != "" {
		return sigRounding
	}
	for _, r := range v {
		lo, hi := finiteRange(r)
		if lo < -1-1e-9 || hi > 1+1e-9 {
			return sigRounding
		}
	}
	return magnetRounding
}

func (r rounding) append(b []byte, v float64) []byte {
	if !finite(v) {
		return append(b, "null"...)
	}
	if r.decimals < 0 {
		return strconv.AppendFloat(b, v, 'g', SigDigits, 64)
	}
	// The rounded float is the one nearest k·10⁻ᵈ, whose shortest text is
	// that decimal.
	p := math.Pow10(r.decimals)
	v = math.Round(v*p) / p
	if v == 0 {
		v = 0 // no "-0"
	}
	return strconv.AppendFloat(b, v, 'g', -1, 64)
}

func jsonFloats(v []float64) []byte { return jsonRounded(v, sigRounding) }

func jsonRounded(v []float64, r rounding) []byte {
	return appendRounded(make([]byte, 0, 2+len(v)*10), v, r)
}

// appendRounded appends v as a JSON array of numbers rounded by r.
func appendRounded(b []byte, v []float64, r rounding) []byte {
	b = append(b, '[')
	for i, x := range v {
		if i > 0 {
			b = append(b, ',')
		}
		b = r.append(b, x)
	}
	return append(b, ']')
}

func jsonStrings(v []string) []byte {
	b := []byte{'['}
	for i, s := range v {
		if i > 0 {
			b = append(b, ',')
		}
		b = appendString(b, s)
	}
	return append(b, ']')
}

func jsonArray(items [][]byte) []byte {
	n := 2
	for _, it := range items {
		n += len(it) + 1
	}
	b := make([]byte, 0, n)
	b = append(b, '[')
	for i, it := range items {
		if i > 0 {
			b = append(b, ',')
		}
		b = append(b, it...)
	}
	return append(b, ']')
}

func jsonBool(v bool) []byte { return strconv.AppendBool(nil, v) }

// json is the table as {"title", "columns": [{"name", "unit"}], "rows", "notes"}.
func (t Table) json() json.RawMessage {
	var cols, rows [][]byte
	for _, c := range t.Columns {
		cols = append(cols, newObject().str("name", c.Name).str("unit", c.Unit).done())
	}
	for _, r := range t.Rows {
		rows = append(rows, jsonStrings(r))
	}
	return newObject().str("title", t.Title).raw("columns", jsonArray(cols)).
		raw("rows", jsonArray(rows)).raw("notes", jsonStrings(t.Notes)).done()
}

func (a Axis) json() []byte {
	o := newObject().str("label", a.Label).str("unit", a.Unit).
		raw("reverse", jsonBool(a.Reverse))
	if a.Shift {
		o = o.raw("shift", []byte("true"))
	}
	return o.raw("values", jsonFloats(a.Values)).done()
}

// JSON is the profile's data as its bundle carries it under ResultMIME.
func (p Profile) JSON() json.RawMessage {
	var curves, marks [][]byte
	for _, c := range p.Curves {
		co := newObject().str("pulse", c.Pulse).str("quantity", c.Quantity).str("unit", c.Unit)
		if c.Label != "" {
			co = co.str("label", c.Label)
		}
		curves = append(curves, co.raw("y", jsonRounded(c.Y, roundingFor(c.Unit, c.Y))).done())
	}
	for _, m := range p.Marks {
		mo := newObject().raw("x", jsonNum(m.X)).str("label", m.Label)
		if m.Marker {
			mo = mo.raw("marker", []byte("true"))
		}
		marks = append(marks, mo.done())
	}
	o := newObject().str("kind", "profile").str("title", p.Title).raw("x", p.X.json()).
		raw("curves", jsonArray(curves)).raw("marks", jsonArray(marks)).
		raw("summary", p.Summary.json())
	if len(p.Notes) > 0 {
		o = o.raw("notes", jsonStrings(p.Notes))
	}
	return o.done()
}

// JSON is the map's data as its bundle carries it under ResultMIME.
func (m Map) JSON() json.RawMessage {
	// The rows go straight into one array (no slice per row).
	rd := roundingFor(m.Unit, m.Z...)
	cells := 0
	for _, r := range m.Z {
		cells += len(r)
	}
	z := make([]byte, 0, 2+len(m.Z)+cells*10)
	z = append(z, '[')
	for i, r := range m.Z {
		if i > 0 {
			z = append(z, ',')
		}
		z = appendRounded(z, r, rd)
	}
	z = append(z, ']')
	contour := []byte("null")
	if m.HasContour {
		contour = jsonNum(m.Contour)
	}
	o := newObject().str("kind", "map").str("title", m.Title).str("pulse", m.Pulse).
		str("quantity", m.Quantity).str("unit", m.Unit).raw("x", m.X.json()).raw("y", m.Y.json()).
		raw("z", z).raw("contour", contour).raw("summary", m.Summary.json())
	if m.Label != "" {
		o = o.str("label", m.Label)
	}
	if m.Cyclic {
		o = o.raw("cyclic", []byte("true"))
	}
	if len(m.Notes) > 0 {
		o = o.raw("notes", jsonStrings(m.Notes))
	}
	return o.done()
}

// JSON is the waveform's data, with t as its properties, as its bundle carries
// it under ResultMIME.
func (w Waveform) JSON(t Table) json.RawMessage {
	var series [][]byte
	for _, s := range w.series() {
		series = append(series, newObject().str("quantity", s.quantity).str("unit", s.unit).
			raw("values", jsonRounded(s.values, roundingFor(s.unit, s.values))).done())
	}
	return newObject().str("kind", "waveform").str("title", w.Title).
		raw("time", Axis{Label: "time", Unit: "s", Values: w.Time}.json()).
		raw("series", jsonArray(series)).raw("properties", t.json()).done()
}
