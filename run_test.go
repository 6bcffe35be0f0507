package main

import (
	"bytes"
	"context"
	"encoding/json"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

// TestNotebooksReproduce re-executes every bundled notebook and requires its stored
// outputs to come out byte for byte: the reproducibility promise of `nutate run --check`.
func TestNotebooksReproduce(t *testing.T) {
	files, err := filepath.Glob("notebooks/*.ipynb")
	if err != nil {
		t.Fatal(err)
	}
	if len(files) == 0 {
		t.Fatal("no notebooks in notebooks/")
	}
	for _, f := range files {
		t.Run(filepath.Base(f), func(t *testing.T) {
			var out bytes.Buffer
			r := runner{check: true, stdout: &out, stderr: &out}
			if err := r.notebook(context.Background(), f, ""); err != nil {
				t.Fatalf("%v\n(refresh with `go run . run %s` after an intended change)", err, f)
			}
			// A fresh run writes exactly the stored bytes.
			tmp := filepath.Join(t.TempDir(), "out.ipynb")
			r = runner{stdout: &out, stderr: &out}
			if err := r.notebook(context.Background(), f, tmp); err != nil {
				t.Fatal(err)
			}
			a, _ := os.ReadFile(f)
			b, _ := os.ReadFile(tmp)
			if !bytes.Equal(a, b) {
				t.Errorf("re-running %s changes its bytes", f)
			}
		})
	}
}

func writeNotebook(t *testing.T, dir string, cells ...string) string {
	t.Helper()
	var cs []map[string]any
	for _, c := range cells {
		cs = append(cs, map[string]any{"cell_type": "code", "metadata": map[string]any{}, "source": c, "outputs": []any{}, "execution_count": nil})
	}
	raw, err := json.Marshal(map[string]any{"cells": cs, "metadata": map[string]any{}, "nbformat": 4, "nbformat_minor": 4})
	if err != nil {
		t.Fatal(err)
	}
	f := filepath.Join(dir, "nb.ipynb")
	if err := os.WriteFile(f, raw, 0o644); err != nil {
		t.Fatal(err)
	}
	return f
}

// TestCheckCatchesEditedOutput: --check must fail, naming the place, when a stored
// output was edited by hand.
func TestCheckCatchesEditedOutput(t *testing.T) {
	dir := t.TempDir()
	f := writeNotebook(t, dir, "print 1 kHz in uT")
	var out bytes.Buffer
	r := runner{stdout: &out, stderr: &out}
	if err := r.notebook(context.Background(), f, ""); err != nil {
		t.Fatal(err)
	}
	r.check = true
	if err := r.notebook(context.Background(), f, ""); err != nil {
		t.Fatalf("fresh notebook should reproduce: %v", err)
	}
	raw, _ := os.ReadFile(f)
	// 1 kHz of B1 is 23.486595 µT for protons (CODATA 2018, ../shared/CHECKS.md).
	if !bytes.Contains(raw, []byte("23.48")) {
		t.Fatalf("executed notebook lacks the printed value:\n%s", raw)
	}
	edited := bytes.Replace(raw, []byte("23.48"), []byte("24.48"), 1)
	if err := os.WriteFile(f, edited, 0o644); err != nil {
		t.Fatal(err)
	}
	err := r.notebook(context.Background(), f, "")
	if err == nil {
		t.Fatal("--check passed a notebook whose stored output was edited")
	}
	if !strings.Contains(err.Error(), "cell 1") || !strings.Contains(err.Error(), "24.48") {
		t.Errorf("difference report should name the cell and show the stored line, got: %v", err)
	}
}

// TestRunStopsAtFirstError: the error is recorded in its cell, later cells are
// cleared, and the run fails.
func TestRunStopsAtFirstError(t *testing.T) {
	dir := t.TempDir()
	f := writeNotebook(t, dir, "let a = 1 ms", "let b = a + 1 kHz", "print a")
	before, err := os.ReadFile(f)
	if err != nil {
		t.Fatal(err)
	}
	var out bytes.Buffer
	r := runner{stdout: &out, stderr: &out}
	// In place, a failure leaves the file as it was (the stored outputs of
	// the later cells are not lost).
	err = r.notebook(context.Background(), f, "")
	if err == nil || !strings.Contains(err.Error(), "not written") {
		t.Fatalf("in-place run of a failing notebook: err %v, want a failure saying the notebook was not written", err)
	}
	if after, _ := os.ReadFile(f); !bytes.Equal(after, before) {
		t.Error("a failed in-place run changed the notebook")
	}
	// --output naming the notebook itself is a run in place: kept as well.
	if err := r.notebook(context.Background(), f, filepath.Join(dir, ".", filepath.Base(f))); err == nil || !strings.Contains(err.Error(), "not written") {
		t.Fatalf("--output onto the notebook itself: err %v, want it kept", err)
	}
	if after, _ := os.ReadFile(f); !bytes.Equal(after, before) {
		t.Error("--output onto the notebook itself changed it")
	}
	// With --output the partial run is written there: the error in its cell,
	// the cells after it cleared.
	partial := filepath.Join(dir, "partial.ipynb")
	if err := r.notebook(context.Background(), f, partial); err == nil || !strings.Contains(err.Error(), "written to "+partial) {
		t.Fatalf("run with --output: err %v, want a failure naming where it wrote", err)
	}
	nb, _, err := readNotebook(partial)
	if err != nil {
		t.Fatal(err)
	}
	cells := nb["cells"].([]any)
	outs := cells[1].(map[string]any)["outputs"].([]any)
	if len(outs) == 0 || outs[len(outs)-1].(map[string]any)["output_type"] != "error" {
		t.Errorf("cell 2 should hold the error, got %v", outs)
	}
	if n := len(cells[2].(map[string]any)["outputs"].([]any)); n != 0 {
		t.Errorf("cell 3 ran after the error: %d outputs", n)
	}
}

// A notebook of another kernel is neither run nor written.
func TestRunRefusesOtherKernels(t *testing.T) {
	dir := t.TempDir()
	f := filepath.Join(dir, "py.ipynb")
	src := `{"cells": [{"cell_type": "code", "execution_count": 1, "id": "a", "metadata": {}, "outputs": [{"output_type": "execute_result", "execution_count": 1, "data": {"text/plain": "2"}, "metadata": {}}], "source": "1 + 1"}], "metadata": {"kernelspec": {"name": "python3", "display_name": "Python 3", "language": "python"}}, "nbformat": 4, "nbformat_minor": 5}`
	if err := os.WriteFile(f, []byte(src), 0o644); err != nil {
		t.Fatal(err)
	}
	var out bytes.Buffer
	r := runner{stdout: &out, stderr: &out}
	if err := r.notebook(context.Background(), f, ""); err == nil || !strings.Contains(err.Error(), `"python3" kernel`) {
		t.Fatalf("err %v, want a refusal naming the python3 kernel", err)
	}
	if after, _ := os.ReadFile(f); string(after) != src {
		t.Error("the Python notebook was changed")
	}
}

// --check re-runs with the settings the notebook records, and ignores the
// empty display a Jupyter client keeps where the progress display ended.
func TestCheckUsesRecordedSettingsAndIgnoresProgressLeftovers(t *testing.T) {
	dir := t.TempDir()
	f := writeNotebook(t, dir, "let tbw = 4", "print tbw")
	var out bytes.Buffer
	r := runner{sets: []string{"tbw=8"}, stdout: &out, stderr: &out}
	if err := r.notebook(context.Background(), f, ""); err != nil {
		t.Fatal(err)
	}
	check := runner{check: true, stdout: &out, stderr: &out}
	if err := check.notebook(context.Background(), f, ""); err != nil {
		t.Fatalf("--check of a notebook run with --set tbw=8: %v", err)
	}
	// A Jupyter client's run keeps the finished progress display as an empty
	// display_data output.
	nb, _, err := readNotebook(f)
	if err != nil {
		t.Fatal(err)
	}
	cell := nb["cells"].([]any)[1].(map[string]any)
	empty := map[string]any{"output_type": "display_data", "data": map[string]any{"text/plain": ""}, "metadata": map[string]any{}}
	cell["outputs"] = append([]any{empty}, cell["outputs"].([]any)...)
	raw, err := nb.Encode()
	if err != nil {
		t.Fatal(err)
	}
	if err := os.WriteFile(f, raw, 0o644); err != nil {
		t.Fatal(err)
	}
	if err := check.notebook(context.Background(), f, ""); err != nil {
		t.Fatalf("--check with a leftover empty progress display: %v", err)
	}
}

// TestSetOverridesLet: --set NAME=VALUE replaces the value of `let NAME`; an unused
// override is an error.
func TestSetOverridesLet(t *testing.T) {
	dir := t.TempDir()
	script := filepath.Join(dir, "s.nut")
	if err := os.WriteFile(script, []byte("let d = 250 us\nprint d in us\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	var out bytes.Buffer
	r := runner{sets: []string{"d=500 us"}, stdout: &out, stderr: &out}
	if err := r.script(context.Background(), script); err != nil {
		t.Fatal(err)
	}
	if !strings.Contains(out.String(), "500") || strings.Contains(out.String(), "250") {
		t.Errorf("override not applied: %q", out.String())
	}
	out.Reset()
	r = runner{sets: []string{"nosuch=1"}, stdout: &out, stderr: &out}
	if err := r.script(context.Background(), script); err == nil || !strings.Contains(err.Error(), "nosuch") {
		t.Errorf("unused override should fail naming it, got %v", err)
	}
}

// TestRunJSON: --json prints one MIME bundle per line, each with text/plain.
func TestRunJSON(t *testing.T) {
	dir := t.TempDir()
	script := filepath.Join(dir, "s.nut")
	src := "pulse hard = rect(duration = 250 us, flip = 90 deg)\nprint 1 kHz in uT\nsweep hard over offset -2 kHz to 2 kHz points 101\n"
	if err := os.WriteFile(script, []byte(src), 0o644); err != nil {
		t.Fatal(err)
	}
	var out bytes.Buffer
	r := runner{json: true, stdout: &out, stderr: &out}
	if err := r.script(context.Background(), script); err != nil {
		t.Fatal(err)
	}
	lines := strings.Split(strings.TrimSpace(out.String()), "\n")
	if len(lines) < 2 {
		t.Fatalf("want a bundle per output, got %d lines", len(lines))
	}
	sawSVG := false
	for _, l := range lines {
		var b map[string]any
		if err := json.Unmarshal([]byte(l), &b); err != nil {
			t.Fatalf("line is not JSON: %v\n%s", err, l)
		}
		if _, ok := b["text/plain"]; !ok {
			t.Errorf("bundle without text/plain: %s", l)
		}
		if _, ok := b["image/svg+xml"]; ok {
			sawSVG = true
		}
	}
	if !sawSVG {
		t.Error("the sweep gave no SVG plot")
	}
}

// TestRunFlagsAfterFiles: flags after the file name are flags, parsed before any
// file is touched; the source notebook is left as it was.
func TestRunFlagsAfterFiles(t *testing.T) {
	dir := t.TempDir()
	f := writeNotebook(t, dir, "print 1 kHz in uT")
	before, _ := os.ReadFile(f)
	out := filepath.Join(dir, "out.ipynb")
	if code := cmdRun([]string{f, "--output", out}); code != 0 {
		t.Fatalf("exit %d", code)
	}
	after, _ := os.ReadFile(f)
	if !bytes.Equal(before, after) {
		t.Error("the source notebook was rewritten although --output was given after it")
	}
	if raw, err := os.ReadFile(out); err != nil || !bytes.Contains(raw, []byte("23.48")) {
		t.Errorf("--output file not written with the result: %v", err)
	}
}

// Flags that do not apply to a file are errors, not silently ignored.
func TestRunInapplicableFlags(t *testing.T) {
	dir := t.TempDir()
	nb := writeNotebook(t, dir, "print 1")
	script := filepath.Join(dir, "s.nut")
	if err := os.WriteFile(script, []byte("print 1\n"), 0o644); err != nil {
		t.Fatal(err)
	}
	out := filepath.Join(dir, "o.nut")
	for _, args := range [][]string{{"run", "--json", nb}, {"run", "--output", out, script}} {
		if code := realMain(args); code != 1 {
			t.Errorf("nutate %v: exit %d, want 1", args, code)
		}
	}
	if _, err := os.Stat(out); !os.IsNotExist(err) {
		t.Errorf("--output with a script wrote %s", out)
	}
}
