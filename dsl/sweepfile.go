package dsl

import (
	"fmt"
	"io"
	"strconv"
	"strings"
)

// sweepTable is a sweep's data in long form: one row per point, the axis values
// (in their display units) then one column per curve. It holds the axes and
// the curves' own value slices (point i is x0[i/n1], x1[i%n1], then each
// curve's values[i]) and builds the rows only as it writes them.
type sweepTable struct {
	title   string
	columns []string
	x0, x1  []float64   // x1 nil for a one-axis sweep
	curves  [][]float64 // each n0·n1 values, shared with the sweep's curves
	n0, n1  int
}

func newSweepTable(title string, axes []*sweepAxis, curves []*curveData, n0, n1 int) *sweepTable {
	t := &sweepTable{title: title, n0: n0, n1: n1}
	for _, a := range axes {
		t.columns = append(t.columns, colName(a.kind, unitLabel(a.unit)))
	}
	for _, c := range curves {
		t.columns = append(t.columns, colName(c.pulse+" "+c.quantity.Name, unitLabel(c.quantity.Unit)))
		t.curves = append(t.curves, c.values)
	}
	t.x0 = axes[0].display()
	if len(axes) == 2 {
		t.x1 = axes[1].display()
	}
	return t
}

// points is the table's number of rows.
func (t *sweepTable) points() int { return t.n0 * t.n1 }

// memory is what the table holds, in bytes.
func (t *sweepTable) memory() int64 {
	return 8 * int64(len(t.x0)+len(t.x1)+len(t.curves)*t.points())
}

func colName(name, unit string) string {
	if unit == "" {
		return name
	}
	return name + " (" + unit + ")"
}

// sweepMarker starts the comment line of a sweep export.
const sweepMarker = "# nutate sweep export"

// writeCSV writes the table with its comment line and header row. Numbers are
// written in the shortest form that reads back as the same float64; the axis
// values, repeated over the rows, are formatted once.
func (t *sweepTable) writeCSV(w io.Writer) error {
	if _, err := fmt.Fprintf(w, "%s: %s, %d points\n%s\n", sweepMarker, t.title, t.points(), strings.Join(t.columns, ",")); err != nil {
		return err
	}
	x0, x1 := formatAll(t.x0), formatAll(t.x1)
	const flush = 64 << 10
	buf := make([]byte, 0, flush+4096)
	for i := range t.points() {
		buf = append(buf, x0[i/t.n1]...)
		if x1 != nil {
			buf = append(buf, ',')
			buf = append(buf, x1[i%t.n1]...)
		}
		for _, c := range t.curves {
			buf = append(buf, ',')
			buf = strconv.AppendFloat(buf, c[i], 'g', -1, 64)
		}
		buf = append(buf, '\n')
		if len(buf) >= flush {
			if _, err := w.Write(buf); err != nil {
				return err
			}
			buf = buf[:0]
		}
	}
	_, err := w.Write(buf)
	return err
}

// formatAll is each value of v in the shortest form that reads back the same
// (nil for nil).
func formatAll(v []float64) []string {
	if v == nil {
		return nil
	}
	s := make([]string, len(v))
	for i, x := range v {
		s[i] = strconv.FormatFloat(x, 'g', -1, 64)
	}
	return s
}
