package display

import (
	"encoding/xml"
	"io"
	"strings"
	"testing"
	"unicode/utf8"
)

// spans finds the column spans [start, end) from the rule line of dashes.
func spans(rule string) [][2]int {
	var out [][2]int
	r := []rune(rule)
	for i := 0; i < len(r); {
		if r[i] != '-' {
			i++
			continue
		}
		j := i
		for j < len(r) && r[j] == '-' {
			j++
		}
		out = append(out, [2]int{i, j})
		i = j
	}
	return out
}

func TestTablePlainAligned(t *testing.T) {
	tb := sampleTable()
	tb.Columns[1].Unit = "SI"
	lines := strings.Split(tb.Plain(), "\n")
	if lines[0] != tb.Title {
		t.Fatalf("first line: got %q, want the title %q", lines[0], tb.Title)
	}
	rule := lines[2]
	sp := spans(rule)
	if len(sp) != 3 {
		t.Fatalf("rule %q: got %d columns, want 3", rule, len(sp))
	}
	if !strings.Contains(lines[1], "value (SI)") {
		t.Errorf("header %q: want the unit in it as \"value (SI)\"", lines[1])
	}
	for k, row := range tb.Rows {
		line := []rune(lines[3+k])
		for i, c := range row {
			s, e := sp[i][0], sp[i][1]
			n := utf8.RuneCountInString(c)
			var got string
			if i == 1 { // numeric: right-aligned
				got = string(line[e-n : e])
			} else {
				got = string(line[s : s+n])
			}
			if got != c {
				t.Errorf("row %d column %d: got %q at its place, want %q (line %q)", k, i, got, c, string(line))
			}
		}
	}
	if last := lines[len(lines)-1]; last != tb.Notes[0] {
		t.Errorf("last line: got %q, want the note", last)
	}
}

func TestTableHTML(t *testing.T) {
	tb := sampleTable()
	h := tb.HTML()
	d := xml.NewDecoder(strings.NewReader("<div>" + h + "</div>"))
	counts := map[string]int{}
	for {
		tok, err := d.Token()
		if err == io.EOF {
			break
		}
		if err != nil {
			t.Fatalf("html is not well formed: %v\n%s", err, h)
		}
		if e, ok := tok.(xml.StartElement); ok {
			counts[e.Name.Local]++
		}
	}
	if counts["tr"] != len(tb.Rows)+1 || counts["th"] != len(tb.Columns) || counts["p"] != len(tb.Notes) || counts["caption"] != 1 {
		t.Errorf("element counts: got %v, want %d tr, %d th, %d p, 1 caption", counts, len(tb.Rows)+1, len(tb.Columns), len(tb.Notes))
	}
	for _, want := range []string{"energy &lt;rel&gt;", "estimate &amp; not", "J/Ω"} {
		if !strings.Contains(h, want) {
			t.Errorf("html has no %q", want)
		}
	}
}

func TestTableRagged(t *testing.T) {
	tb := Table{Columns: []Column{{Name: "a"}}, Rows: [][]string{{"1", "extra"}, {}}}
	p := tb.Plain()
	if !strings.Contains(p, "extra") {
		t.Errorf("plain dropped a cell beyond the header: %q", p)
	}
	if h := tb.HTML(); !strings.Contains(h, "extra") {
		t.Errorf("html dropped a cell beyond the header: %q", h)
	}
	if b := (Table{}).Bundle(); b["text/plain"] != "" {
		t.Errorf("empty table: got %q, want empty text", b["text/plain"])
	}
}

func TestProfileTableChoice(t *testing.T) {
	short := Profile{X: Axis{Label: "B1", Unit: "µT", Values: linspace(0, 10, 11)},
		Curves: []Curve{{Pulse: "p", Quantity: "mz", Y: linspace(1, -1, 11)}}}
	tb := short.table()
	if len(tb.Rows) != 11 || len(tb.Columns) != 2 || tb.Columns[0].Header() != "B1 (µT)" {
		t.Errorf("≤50 points: got %d rows, columns %v; want the 11 data rows under B1 (µT), mz", len(tb.Rows), tb.Columns)
	}
	long := sampleProfile()
	long.Summary = Table{}
	tb = long.table()
	if len(tb.Rows) != len(long.Curves) {
		t.Fatalf(">50 points: got %d rows, want one per curve (%d)", len(tb.Rows), len(long.Curves))
	}
	// The Gaussian fixture peaks at 1 at offset 0 (its definition).
	if r := tb.Rows[1]; r[0] != "gauss mxy" || r[4] != "1" || r[5] != "0" {
		t.Errorf("gauss extremes: got %q, want max 1 at 0", r)
	}
	for n, p := range map[string]Profile{"summary": sampleProfile(), "long": long} {
		if rows := len(p.table().Rows); rows > maxListed {
			t.Errorf("%s: %d table rows, want ≤ %d", n, rows, maxListed)
		}
	}
	if got := sampleProfile().table(); got.Columns[1].Name != "FWHM" {
		t.Errorf("with a summary: got table %v, want the summary", got.Columns)
	}
}
