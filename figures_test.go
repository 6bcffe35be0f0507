package main

import (
	"bytes"
	"context"
	"encoding/json"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"Nutate/display"
)

// notebookBudget bounds the bundled notebooks together: they are opened,
// converted and kept in git, and every figure travels in them three times
// (SVG, PNG, data).
const notebookBudget = 2_500_000

func TestNotebooksSizeBudget(t *testing.T) {
	files, err := filepath.Glob("notebooks/*.ipynb")
	if err != nil || len(files) == 0 {
		t.Fatalf("no notebooks (%v)", err)
	}
	total := 0
	for _, f := range files {
		info, err := os.Stat(f)
		if err != nil {
			t.Fatal(err)
		}
		t.Logf("%s: %d bytes", f, info.Size())
		total += int(info.Size())
	}
	if total > notebookBudget {
		t.Errorf("the notebooks weigh %d bytes together, want ≤ %d", total, notebookBudget)
	}
}

// The stored notebooks show their figures everywhere: no output carries
// application/json (JupyterLab would draw it as a tree instead) and no figure
// carries text/html (ranked above the images, and sanitized when untrusted);
// each figure has its PNG rendition and its data under the vendor type.
func TestNotebooksFigureBundles(t *testing.T) {
	files, _ := filepath.Glob("notebooks/*.ipynb")
	for _, f := range files {
		raw, err := os.ReadFile(f)
		if err != nil {
			t.Fatal(err)
		}
		var nb struct {
			Cells []struct {
				Outputs []struct {
					Data map[string]json.RawMessage
				}
			}
		}
		if err := json.Unmarshal(raw, &nb); err != nil {
			t.Fatalf("%s: %v", f, err)
		}
		figures := 0
		for i, c := range nb.Cells {
			for _, o := range c.Outputs {
				if _, ok := o.Data["application/json"]; ok {
					t.Errorf("%s cell %d: an output carries application/json", f, i+1)
				}
				if _, ok := o.Data["image/svg+xml"]; !ok {
					continue
				}
				figures++
				_, html := o.Data["text/html"]
				_, png := o.Data["image/png"]
				_, data := o.Data[display.ResultMIME]
				if html || !png || !data {
					t.Errorf("%s cell %d: figure with text/html %v, image/png %v, %s %v", f, i+1, html, png, display.ResultMIME, data)
				}
			}
		}
		if figures == 0 {
			t.Errorf("%s: no figures", f)
		}
	}
}

// --json carries a sweep's data under the vendor type.
func TestRunJSONCarriesData(t *testing.T) {
	dir := t.TempDir()
	script := filepath.Join(dir, "s.nut")
	src := "pulse hard = rect(duration = 250 us, flip = 90 deg)\nsweep hard over offset -2 kHz to 2 kHz points 11 show mz\n"
	if err := os.WriteFile(script, []byte(src), 0o644); err != nil {
		t.Fatal(err)
	}
	var out bytes.Buffer
	r := runner{json: true, stdout: &out, stderr: &out}
	if err := r.script(context.Background(), script); err != nil {
		t.Fatal(err)
	}
	found := false
	for _, l := range strings.Split(strings.TrimSpace(out.String()), "\n") {
		var b map[string]json.RawMessage
		if err := json.Unmarshal([]byte(l), &b); err != nil {
			t.Fatalf("line is not JSON: %v", err)
		}
		var data struct {
			Kind   string
			Curves []struct{ Y []float64 }
		}
		if v, ok := b[display.ResultMIME]; ok && json.Unmarshal(v, &data) == nil && data.Kind == "profile" {
			found = len(data.Curves) == 1 && len(data.Curves[0].Y) == 11
		}
	}
	if !found {
		t.Errorf("no profile with 11 values under %s in:\n%.600s", display.ResultMIME, out.String())
	}
}
