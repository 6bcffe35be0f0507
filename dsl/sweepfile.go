package dsl

import (
	"fmt"
	"io"
	"strconv"
	"strings"

	"Nutate/dsl/present"
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
		t.columns = append(t.columns, colName(a.kind, present.UnitLabel(a.unit)))
	}
	for _, c := range curves {
		t.columns = append(t.columns, colName(c.pulse+" "+c.quantity.Name, present.UnitLabel(c.quantity.Unit)))
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

// writeCSV writes the table with its comment line and header row.
func (t *sweepTable) writeCSV(w io.Writer) error {
	if _, err := fmt.Fprintf(w, "%s: %s, %d points\n%s\n", sweepMarker, t.title, len(t.rows), strings.Join(t.columns, ",")); err != nil {
		return err
	}
	var line []byte
	for _, r := range t.rows {
		line = line[:0]
		for i, v := range r {
			if i > 0 {
				line = append(line, ',')
			}
			line = strconv.AppendFloat(line, v, 'g', -1, 64)
		}
		line = append(line, '\n')
		if _, err := w.Write(line); err != nil {
			return err
		}
	}
	return nil
}
