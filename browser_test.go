package main

import (
	"bytes"
	"encoding/base64"
	"encoding/json"
	"image"
	"image/png"
	"os"
	"os/exec"
	"path/filepath"
	"testing"
	"time"
)

// browserTools are what the real-browser test needs (Debian packages
// jupyter-notebook, chromium, chromium-driver, python3-selenium).
var browserTools = []string{"/usr/bin/jupyter-notebook", "/usr/bin/chromium", "/usr/bin/chromedriver"}

// testBrowser runs testdata/e2e/browser.py: classic Notebook in headless
// Chromium opens stored notebooks untrusted, counts their figures, runs all
// cells, completes, interrupts a long cell; and a help link of the kernel's
// form, with the front end's "?v=" suffix, lands on its section. Skipped
// without the tools, except under CI=true.
func testBrowser(t *testing.T, bin string) {
	var missing []string
	for _, p := range browserTools {
		if _, err := os.Stat(p); err != nil {
			missing = append(missing, p)
		}
	}
	if out, err := exec.Command(python, "-c", "import selenium").CombinedOutput(); err != nil {
		missing = append(missing, "python3-selenium ("+string(out)+")")
	}
	if len(missing) > 0 {
		if os.Getenv("CI") == "true" {
			t.Fatalf("CI=true and the browser test's tools are missing: %v", missing)
		}
		t.Skipf("browser test tools missing: %v; install jupyter-notebook chromium chromium-driver python3-selenium", missing)
	}
	e := setupE2E(t, bin)
	dir := t.TempDir()

	// A notebook of our own whose figures are stored as the figure contract
	// has them (image/svg+xml and image/png, without text/html), written by the
	// headless runner so that its language_info is the runner's. Untrusted,
	// classic Notebook shows only "safe" types (PNG, not SVG): the PNG here is
	// a plain stand-in for the rendition the figure bundles carry.
	own := filepath.Join(dir, "figures.ipynb")
	writeNotebookFile(t, own,
		"pulse h = rect(duration = 1 ms, flip = 90 deg)",
		"sweep h over offset -2 kHz to 2 kHz points 41 show mz",
		"describe h",
	)
	if out, err := exec.Command(bin, "run", own).CombinedOutput(); err != nil {
		t.Fatalf("nutate run: %v\n%s", err, out)
	}
	figureContract(t, own)

	page := filepath.Join(dir, "readme.html")
	if err := os.WriteFile(page, []byte(`<!doctype html><title>README</title><h2 id="rf-safety">RF safety</h2><div style="height:5000px"></div><h2 id="conventions">Conventions</h2><div style="height:5000px"></div>`), 0o644); err != nil {
		t.Fatal(err)
	}
	link := sectionURL("file://"+page, "conventions") + "?v=0123abcd" // as requirejs.toUrl appends it

	abs, err := filepath.Abs(filepath.Join("notebooks", "tour.ipynb"))
	if err != nil {
		t.Fatal(err)
	}
	env := append(append([]string{}, e.env...), "NUTATE_HELP_LINK="+link)
	e2 := *e
	e2.env = env
	e2.script(t, "browser.py", 15*time.Minute, own, abs)
}

// writeNotebookFile writes a notebook of code cells without outputs at path.
func writeNotebookFile(t *testing.T, path string, cells ...string) {
	t.Helper()
	var cs []map[string]any
	for _, c := range cells {
		cs = append(cs, map[string]any{"cell_type": "code", "metadata": map[string]any{}, "source": c, "outputs": []any{}, "execution_count": nil})
	}
	raw, err := json.Marshal(map[string]any{"cells": cs, "metadata": map[string]any{}, "nbformat": 4, "nbformat_minor": 4})
	if err != nil {
		t.Fatal(err)
	}
	if err := os.WriteFile(path, raw, 0o644); err != nil {
		t.Fatal(err)
	}
}

// figureContract keeps, of each stored output carrying image/svg+xml, only the
// SVG and its text/plain, and adds a PNG (a grey 480×320 stand-in).
func figureContract(t *testing.T, path string) {
	t.Helper()
	nb, _, err := readNotebook(path)
	if err != nil {
		t.Fatal(err)
	}
	n := 0
	for _, c := range nb["cells"].([]any) {
		cell := c.(map[string]any)
		outs, _ := cell["outputs"].([]any)
		for _, o := range outs {
			data, _ := o.(map[string]any)["data"].(map[string]any)
			if _, ok := data["image/svg+xml"]; !ok {
				continue
			}
			n++
			for mime := range data {
				if mime != "image/svg+xml" && mime != "text/plain" {
					delete(data, mime)
				}
			}
			data["image/png"] = standInPNG(t)
		}
	}
	if n == 0 {
		t.Fatal("the run stored no image/svg+xml output")
	}
	raw, err := nb.Encode()
	if err != nil {
		t.Fatal(err)
	}
	if err := os.WriteFile(path, raw, 0o644); err != nil {
		t.Fatal(err)
	}
}

func standInPNG(t *testing.T) string {
	img := image.NewGray(image.Rect(0, 0, 480, 320))
	for i := range img.Pix {
		img.Pix[i] = 0xd0
	}
	var buf bytes.Buffer
	if err := png.Encode(&buf, img); err != nil {
		t.Fatal(err)
	}
	return base64.StdEncoding.EncodeToString(buf.Bytes())
}
