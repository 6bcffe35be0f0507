package main

import (
	"bytes"
	"encoding/csv"
	"encoding/json"
	"fmt"
	"io"
	"os"
	"sort"
	"strings"
)

// gather reads executed notebooks (the outputs of a job array of
// `nutate run --set NAME=VALUE --output ...`) and writes every value of their
// sweeps as one long CSV table to w: one row per point and quantity, with the
// notebook, its --set settings (one column each), the sweep, and the axes.
// Nothing is executed. Sweeps are found by the JSON their figures carry (under
// application/json or a vendor type application/vnd.*+json).
func gather(files []string, w io.Writer) error {
	type job struct {
		file string
		sets map[string]string
		rows [][]string // sweep, pulse, quantity, unit, x, x unit, x value, y, y unit, y value, value
	}
	var jobs []job
	names := map[string]bool{}
	for _, f := range files {
		nb, _, err := readNotebook(f)
		if err != nil {
			return fmt.Errorf("%s: %v", f, err)
		}
		if k := nb.Kernel("nutate"); k != "" && k != "nutate" {
			return fmt.Errorf("%s: a notebook for the %q kernel, not Nutate", f, k)
		}
		j := job{file: f, sets: map[string]string{}}
		for _, kv := range recordedSettings(nb) {
			name, value, _ := strings.Cut(kv, "=")
			name = strings.TrimSpace(name)
			j.sets[name] = strings.TrimSpace(value)
			names[name] = true
		}
		for _, c := range nb["cells"].([]any) {
			cell, _ := c.(map[string]any)
			outs, _ := cell["outputs"].([]any)
			for _, o := range outs {
				om, _ := o.(map[string]any)
				data, _ := om["data"].(map[string]any)
				mimes := make([]string, 0, len(data))
				for mime := range data {
					mimes = append(mimes, mime)
				}
				sort.Strings(mimes)
				for _, mime := range mimes {
					if mime == "application/json" || strings.HasPrefix(mime, "application/vnd.") && strings.HasSuffix(mime, "json") {
						if rows := sweepRows(data[mime]); len(rows) > 0 {
							j.rows = append(j.rows, rows...)
							break // one JSON per figure, should it carry two
						}
					}
				}
			}
		}
		if len(j.rows) == 0 {
			return fmt.Errorf("%s: no sweep outputs (was it run? `nutate run --output` writes them)", f)
		}
		jobs = append(jobs, j)
	}
	setNames := make([]string, 0, len(names))
	for n := range names {
		setNames = append(setNames, n)
	}
	sort.Strings(setNames)
	cw := csv.NewWriter(w)
	header := append(append([]string{"notebook"}, setNames...),
		"sweep", "pulse", "quantity", "unit", "x", "x unit", "x value", "y", "y unit", "y value", "value")
	if err := cw.Write(header); err != nil {
		return err
	}
	for _, j := range jobs {
		lead := []string{j.file}
		for _, n := range setNames {
			lead = append(lead, j.sets[n])
		}
		for _, r := range j.rows {
			if err := cw.Write(append(append([]string{}, lead...), r...)); err != nil {
				return err
			}
		}
	}
	cw.Flush()
	return cw.Error()
}

// sweepRows turns one sweep's JSON (kind "profile": curves over one axis;
// kind "map": one quantity over two) into rows; other JSON gives none.
func sweepRows(v any) [][]string {
	// Stored notebooks hold the JSON as an object; a string is parsed too.
	if s, ok := v.(string); ok {
		dec := json.NewDecoder(strings.NewReader(s))
		dec.UseNumber()
		if dec.Decode(&v) != nil {
			return nil
		}
	}
	m, _ := v.(map[string]any)
	axis := func(a any) (label, unit string, values []any) {
		am, _ := a.(map[string]any)
		label, _ = am["label"].(string)
		unit, _ = am["unit"].(string)
		values, _ = am["values"].([]any)
		return
	}
	title, _ := m["title"].(string)
	var rows [][]string
	switch m["kind"] {
	case "profile":
		xl, xu, xs := axis(m["x"])
		curves, _ := m["curves"].([]any)
		for _, c := range curves {
			cm, _ := c.(map[string]any)
			ys, _ := cm["y"].([]any)
			for i, x := range xs {
				if i < len(ys) {
					rows = append(rows, []string{title, str(cm["pulse"]), str(cm["quantity"]), str(cm["unit"]), xl, xu, num(x), "", "", "", num(ys[i])})
				}
			}
		}
	case "map":
		xl, xu, xs := axis(m["x"])
		yl, yu, ys := axis(m["y"])
		z, _ := m["z"].([]any)
		for j, y := range ys {
			if j >= len(z) {
				break
			}
			row, _ := z[j].([]any)
			for i, x := range xs {
				if i < len(row) {
					rows = append(rows, []string{title, str(m["pulse"]), str(m["quantity"]), str(m["unit"]), xl, xu, num(x), yl, yu, num(y), num(row[i])})
				}
			}
		}
	}
	return rows
}

func str(v any) string {
	s, _ := v.(string)
	return s
}

// num writes a JSON number as stored (a missing value, null, as an empty cell).
func num(v any) string {
	switch n := v.(type) {
	case nil:
		return ""
	case json.Number:
		return n.String()
	case float64:
		raw, _ := json.Marshal(n)
		return string(raw)
	case string:
		return n
	}
	raw, _ := json.Marshal(v)
	return string(bytes.TrimSpace(raw))
}

// cmdGather is `nutate run --gather FILE...`: the table on standard output.
func cmdGather(files []string) int {
	if err := gather(files, os.Stdout); err != nil {
		fmt.Fprintf(os.Stderr, "nutate run --gather: %v\n", err)
		return 1
	}
	return 0
}
