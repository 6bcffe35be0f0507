package main

import (
	"bytes"
	"context"
	"os"
	"strings"
	"testing"
)

func TestProgressLine(t *testing.T) {
	tests := []struct {
		cell, cells int
		task        string
		done, total int
		want        string
	}{
		{3, 12, "", 0, 0, "cell 3/12"},
		{3, 12, "sweep p", 45, 100, "cell 3/12 · sweep p: 45 %"},
		{1, 1, "describe p", 2, 3, "cell 1/1 · describe p: 67 %"},
		{1, 2, "sweep p", 7, 0, "cell 1/2 · sweep p: 0 %"},       // no total known
		{1, 2, "sweep p", 120, 100, "cell 1/2 · sweep p: 100 %"}, // never over 100
		{0, 0, "sweep p", 1, 4, "sweep p: 25 %"},                 // a script: no cells
	}
	for _, tc := range tests {
		if got := progressLine(tc.cell, tc.cells, tc.task, tc.done, tc.total); got != tc.want {
			t.Errorf("progressLine(%d, %d, %q, %d, %d) = %q, want %q", tc.cell, tc.cells, tc.task, tc.done, tc.total, got, tc.want)
		}
	}
}

// TestRunStatusLineOnlyOnTerminal: `nutate run` decides on a status line by
// whether stderr is a terminal; a pipe or a file gets nothing, and the line,
// when shown, names the cell and is cleared at the end.
func TestRunStatusLineOnlyOnTerminal(t *testing.T) {
	dir := t.TempDir()
	cells := []string{
		"pulse p = sinc(duration = 4 ms, tbw = 8, flip = 90 deg, samples = 4000)",
		"sweep p over offset -20 kHz to 20 kHz points 3000 show mz",
	}
	pr, pw, err := os.Pipe()
	if err != nil {
		t.Fatal(err)
	}
	defer pr.Close()
	defer pw.Close()
	f, err := os.CreateTemp(dir, "stderr")
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	for _, w := range []*os.File{pw, f} {
		if isTerminal(w) {
			t.Fatalf("%s: taken for a terminal", w.Name())
		}
	}
	for _, onTerminal := range []bool{false, true} {
		var out, stderr bytes.Buffer
		r := runner{stdout: &out, stderr: &stderr, progress: onTerminal}
		nb := writeNotebook(t, dir, cells...)
		if err := r.notebook(context.Background(), nb, ""); err != nil {
			t.Fatal(err)
		}
		s := stderr.String()
		switch {
		case !onTerminal && s != "":
			t.Errorf("off a terminal: stderr got %q, want nothing", s)
		case onTerminal && (!strings.Contains(s, "\rcell 1/2\033[K") || !strings.Contains(s, "\rcell 2/2 · sweep p: ") || !strings.HasSuffix(s, "\r\033[K")):
			t.Errorf("on a terminal: stderr got %q, want cell lines, the sweep's share, and a clear at the end", s)
		}
	}
}
