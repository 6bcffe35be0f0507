package display

import (
	"html"
	"strconv"
	"strings"
	"unicode/utf8"
)

// Header is the column's heading as shown: "peak (µT)", or the bare name when the
// column has no unit.
func (c Column) Header() string {
	if c.Unit == "" {
		return c.Name
	}
	return c.Name + " (" + c.Unit + ")"
}

// Bundle shows the table as aligned text/plain (units in the header, numeric
// columns right-aligned, notes under it), as an HTML <table> with the same cells and
// notes, and as its data under ResultMIME ({"title", "columns": [{"name", "unit"}], "rows",
// "notes"}).
func (t Table) Bundle() Bundle {
	return Bundle{
		"text/plain": t.Plain(),
		"text/html":  t.HTML(),
		ResultMIME:   t.json(),
	}
}

// width is the number of columns the table needs: the header count or the longest
// row, whichever is larger, so ragged rows never lose cells.
func (t Table) width() int {
	n := len(t.Columns)
	for _, r := range t.Rows {
		n = max(n, len(r))
	}
	return n
}

func (t Table) header(i int) string {
	if i < len(t.Columns) {
		return t.Columns[i].Header()
	}
	return ""
}

func cell(r []string, i int) string {
	if i < len(r) {
		return r[i]
	}
	return ""
}

// numericColumns reports, per column, whether every non-empty cell reads as a
// number; such columns are right-aligned.
func (t Table) numericColumns() []bool {
	n := t.width()
	num := make([]bool, n)
	for i := range n {
		seen := false
		num[i] = true
		for _, r := range t.Rows {
			c := strings.TrimSpace(cell(r, i))
			if c == "" {
				continue
			}
			seen = true
			if !isNumber(c) {
				num[i] = false
				break
			}
		}
		num[i] = num[i] && seen
	}
	return num
}

func isNumber(s string) bool {
	s = strings.TrimPrefix(s, "≈")
	s = strings.TrimPrefix(s, "~")
	if _, err := strconv.ParseFloat(s, 64); err == nil {
		return true
	}
	switch s {
	case "NaN", "+Inf", "-Inf", "Inf", "-", "—":
		return true
	}
	return false
}

// Plain renders the table as monospaced text: title, header, a rule, rows, notes.
func (t Table) Plain() string {
	var b strings.Builder
	if t.Title != "" {
		b.WriteString(t.Title)
		b.WriteByte('\n')
	}
	n := t.width()
	if n > 0 {
		num := t.numericColumns()
		w := make([]int, n)
		for i := range n {
			w[i] = utf8.RuneCountInString(t.header(i))
			for _, r := range t.Rows {
				w[i] = max(w[i], utf8.RuneCountInString(cell(r, i)))
			}
		}
		line := func(cells func(i int) string, right func(i int) bool) {
			var l strings.Builder
			for i := range n {
				if i > 0 {
					l.WriteString("  ")
				}
				c := cells(i)
				pad := strings.Repeat(" ", w[i]-utf8.RuneCountInString(c))
				if right(i) {
					l.WriteString(pad + c)
				} else {
					l.WriteString(c + pad)
				}
			}
			b.WriteString(strings.TrimRight(l.String(), " "))
			b.WriteByte('\n')
		}
		line(t.header, func(i int) bool { return num[i] })
		line(func(i int) string { return strings.Repeat("-", w[i]) }, func(int) bool { return false })
		for _, r := range t.Rows {
			line(func(i int) string { return cell(r, i) }, func(i int) bool { return num[i] })
		}
	}
	for _, note := range t.Notes {
		b.WriteString(note)
		b.WriteByte('\n')
	}
	return strings.TrimSuffix(b.String(), "\n")
}

// HTML renders the table as an HTML <table> (title as caption, units in the header
// cells, numeric columns right-aligned) followed by its notes, all escaped.
func (t Table) HTML() string {
	var b strings.Builder
	b.WriteString(`<table class="nutate-table">`)
	if t.Title != "" {
		b.WriteString("<caption>" + html.EscapeString(t.Title) + "</caption>")
	}
	n := t.width()
	num := t.numericColumns()
	align := func(i int) string {
		if num[i] {
			return ` style="text-align:right"`
		}
		return ` style="text-align:left"`
	}
	if n > 0 {
		b.WriteString("<thead><tr>")
		for i := range n {
			b.WriteString("<th" + align(i) + ">" + html.EscapeString(t.header(i)) + "</th>")
		}
		b.WriteString("</tr></thead>")
	}
	b.WriteString("<tbody>")
	for _, r := range t.Rows {
		b.WriteString("<tr>")
		for i := range n {
			b.WriteString("<td" + align(i) + ">" + html.EscapeString(cell(r, i)) + "</td>")
		}
		b.WriteString("</tr>")
	}
	b.WriteString("</tbody></table>")
	for _, note := range t.Notes {
		b.WriteString(`<p class="nutate-note">` + html.EscapeString(note) + "</p>")
	}
	return b.String()
}

// isEmpty reports a table with neither rows nor notes.
func (t Table) isEmpty() bool { return len(t.Rows) == 0 && len(t.Notes) == 0 }
