package dsl

import (
	"bytes"
	"fmt"
	"strconv"
	"strings"
)

// sweepTable is a sweep's data in long form: one row per point, the axis values
// (in their display units) then one column per curve.
type sweepTable struct {
	title   string
	columns []string
	rows    [][]float64
}

func newSweepTable(title string, axes []*sweepAxis, curves []*curveData, n0, n1 int) *sweepTable {
	t := &sweepTable{title: title}
	for _, a := range axes {
		t.columns = append(t.columns, colName(a.kind, unitLabel(a.unit)))
	}
	for _, c := range curves {
		t.columns = append(t.columns, colName(c.pulse+" "+c.quantity.Name, unitLabel(c.quantity.Unit)))
	}
	x0 := axes[0].display()
	var x1 []float64
	if len(axes) == 2 {
		x1 = axes[1].display()
	}
	for i := 0; i < n0*n1; i++ {
		row := []float64{x0[i/n1]}
		if x1 != nil {
			row = append(row, x1[i%n1])
		}
		for _, c := range curves {
			row = append(row, c.values[i])
		}
		t.rows = append(t.rows, row)
	}
	return t
}

func colName(name, unit string) string {
	if unit == "" {
		return name
	}
	return name + " (" + unit + ")"
}

// sweepMarker starts the comment line of a sweep export.
const sweepMarker = "# nutate sweep export"

// csv writes the table with its comment line and header row.
func (t *sweepTable) csv() []byte {
	var b bytes.Buffer
	fmt.Fprintf(&b, "%s: %s, %d points\n", sweepMarker, t.title, len(t.rows))
	b.WriteString(strings.Join(t.columns, ",") + "\n")
	for _, r := range t.rows {
		for i, v := range r {
			if i > 0 {
				b.WriteByte(',')
			}
			b.WriteString(strconv.FormatFloat(v, 'g', -1, 64))
		}
		b.WriteByte('\n')
	}
	return b.Bytes()
}
