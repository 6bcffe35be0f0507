package dsl

import (
	"fmt"
	"io"
	"runtime"
	"strconv"
	"strings"
	"sync"

	"Nutate/dsl/present"
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
		t.columns = append(t.columns, colName(a.kind, present.UnitLabel(a.unit)))
	}
	for _, c := range curves {
		t.columns = append(t.columns, colName(c.pulse+" "+c.quantity.Name, present.UnitLabel(c.quantity.Unit)))
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
// values, repeated over the rows, are formatted once. Blocks of rows are
// formatted on every core and written in order, with a few blocks in flight.
func (t *sweepTable) writeCSV(w io.Writer) error {
	if _, err := fmt.Fprintf(w, "%s: %s, %d points\n%s\n", sweepMarker, t.title, t.points(), strings.Join(t.columns, ",")); err != nil {
		return err
	}
	x0, x1 := formatAll(t.x0), formatAll(t.x1)
	rows := func(b []byte, lo, hi int) []byte {
		for i := lo; i < hi; i++ {
			b = append(b, x0[i/t.n1]...)
			if x1 != nil {
				b = append(b, ',')
				b = append(b, x1[i%t.n1]...)
			}
			for _, c := range t.curves {
				b = append(b, ',')
				b = strconv.AppendFloat(b, c[i], 'g', -1, 64)
			}
			b = append(b, '\n')
		}
		return b
	}
	const block = 4096 // rows
	n := t.points()
	blocks := (n + block - 1) / block
	workers := min(runtime.GOMAXPROCS(0), blocks)
	if workers <= 1 {
		var b []byte
		for lo := 0; lo < n; lo += block {
			b = rows(b[:0], lo, min(lo+block, n))
			if _, err := w.Write(b); err != nil {
				return err
			}
		}
		return nil
	}
	type job struct {
		k   int
		buf []byte
	}
	done := make([]chan []byte, blocks) // block k's text, sent once
	for k := range done {
		done[k] = make(chan []byte, 1)
	}
	free := make(chan []byte, 2*workers)               // the buffers: at most this many blocks in flight
	width := len(x0[len(x0)-1]) + 2 + 24*len(t.curves) // a row, about
	if x1 != nil {
		width += len(x1[len(x1)-1])
	}
	for range cap(free) {
		free <- make([]byte, 0, block*width)
	}
	jobs, stop := make(chan job), make(chan struct{})
	go func() {
		defer close(jobs)
		for k := range blocks {
			var b []byte
			select {
			case b = <-free:
			case <-stop:
				return
			}
			select {
			case jobs <- job{k, b}:
			case <-stop:
				return
			}
		}
	}()
	var wg sync.WaitGroup
	for range workers {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for j := range jobs {
				lo := j.k * block
				done[j.k] <- rows(j.buf[:0], lo, min(lo+block, n))
			}
		}()
	}
	defer wg.Wait()
	defer close(stop)
	for k := range blocks {
		b := <-done[k]
		if _, err := w.Write(b); err != nil {
			return err
		}
		free <- b
	}
	return nil
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
