package main

import (
	"context"
	"encoding/json"
	"io"
	"maps"
	"os"
	"path/filepath"
	"slices"
	"strings"
	"testing"
)

// A notebook as an editor on Windows may leave it (CRLF line ends in the file
// and inside cell sources, a CSV with CRLF rows, an import path written with
// `\`, relative to the notebook) gives the same outputs as its LF, `/` twin,
// and the written notebook passes --check. On Windows `sub\wave.csv` names
// wave.csv in the folder sub; elsewhere `\` is part of a file name, so the
// test puts the CSV where filepath says the path points on the host.
func TestWindowsStyleNotebookRoundTrip(t *testing.T) {
	csv := "time (s),amplitude (uT)\n0,1\n1e-5,2\n2e-5,3\n3e-5,2\n4e-5,1\n"
	cells := func(path, eol string) []string {
		return []string{
			strings.Join([]string{"# a pulse drawn elsewhere", `import w from "` + path + `"`, ""}, eol),
			strings.Join([]string{"describe w", "print 1 kHz in uT", ""}, eol),
		}
	}
	for _, c := range []struct {
		name, path, eol string
	}{
		{"crlf", "sub/wave.csv", "\r\n"},
		{"backslash", `sub\wave.csv`, "\n"},
		{"crlf+backslash", `sub\wave.csv`, "\r\n"},
	} {
		t.Run(c.name, func(t *testing.T) {
			lfDir, winDir := t.TempDir(), t.TempDir()
			want := runOutputs(t, lfDir, "sub/wave.csv", csv, cells("sub/wave.csv", "\n"), "\n")
			got := runOutputs(t, winDir, c.path, strings.ReplaceAll(csv, "\n", c.eol), cells(c.path, c.eol), c.eol)
			if got != want {
				t.Errorf("outputs differ from the LF, / notebook:\ngot  %.600s\nwant %.600s", got, want)
			}
		})
	}
}

// runOutputs writes the CSV at path (relative to dir, read with the host's
// filepath rules) and a notebook of cells whose file lines end in eol, runs
// it in place, checks it with --check, and returns the text of its outputs
// with `\` read as `/` (messages may name the file as written).
func runOutputs(t *testing.T, dir, path, csv string, cells []string, eol string) string {
	t.Helper()
	file := filepath.Join(dir, path)
	if err := os.MkdirAll(filepath.Join(dir, "sub"), 0o755); err != nil {
		t.Fatal(err)
	}
	if err := os.WriteFile(file, []byte(csv), 0o644); err != nil {
		t.Fatal(err)
	}
	var cs []map[string]any
	for _, src := range cells {
		// nbformat's list form: lines keeping their line ends.
		var lines []any
		for _, l := range strings.SplitAfter(src, "\n") {
			if l != "" {
				lines = append(lines, l)
			}
		}
		cs = append(cs, map[string]any{"cell_type": "code", "metadata": map[string]any{}, "source": lines, "outputs": []any{}, "execution_count": nil})
	}
	raw, err := json.MarshalIndent(map[string]any{"cells": cs, "metadata": map[string]any{}, "nbformat": 4, "nbformat_minor": 5}, "", " ")
	if err != nil {
		t.Fatal(err)
	}
	nbFile := filepath.Join(dir, "nb.ipynb")
	if err := os.WriteFile(nbFile, []byte(strings.ReplaceAll(string(raw), "\n", eol)+eol), 0o644); err != nil {
		t.Fatal(err)
	}
	r := runner{stdout: io.Discard, stderr: io.Discard}
	if err := r.notebook(context.Background(), nbFile, ""); err != nil {
		t.Fatalf("run: %v", err)
	}
	r.check = true
	if err := r.notebook(context.Background(), nbFile, ""); err != nil {
		t.Fatalf("--check of the written notebook: %v", err)
	}
	written, err := os.ReadFile(nbFile)
	if err != nil {
		t.Fatal(err)
	}
	var nb struct {
		Cells []struct {
			Outputs []any `json:"outputs"`
		} `json:"cells"`
	}
	if err := json.Unmarshal(written, &nb); err != nil {
		t.Fatal(err)
	}
	var b strings.Builder
	n := 0
	for _, c := range nb.Cells {
		for _, o := range c.Outputs {
			if m, _ := o.(map[string]any); m["output_type"] == "error" {
				t.Fatalf("an error output: %v", m)
			}
			n++
			collectStrings(&b, o)
		}
	}
	if n < 2 {
		t.Fatalf("%d outputs, want the import's and the describe's:\n%s", n, written)
	}
	return strings.ReplaceAll(b.String(), `\`, "/")
}

// collectStrings appends every string inside v, maps in key order.
func collectStrings(b *strings.Builder, v any) {
	switch v := v.(type) {
	case string:
		b.WriteString(v)
		b.WriteByte('\n')
	case []any:
		for _, e := range v {
			collectStrings(b, e)
		}
	case map[string]any:
		for _, k := range slices.Sorted(maps.Keys(v)) {
			collectStrings(b, v[k])
		}
	}
}
