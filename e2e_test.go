package main

import (
	"bufio"
	"bytes"
	"context"
	"encoding/json"
	"os"
	"os/exec"
	"path/filepath"
	"strconv"
	"strings"
	"testing"
	"time"
)

// End-to-end tests: build the binary, install its kernelspec into a temporary
// prefix, and drive it with Jupyter's own Python clients (jupyter_client,
// nbclient, nbconvert, python3-zmq) from /usr/bin/python3. The scripts in
// testdata/e2e print "ok NAME", "skip NAME: why", "figure NAME VALUE UNIT" or
// "FAIL why" and exit non-zero on failure.
//
// Without the Python packages the tests skip, unless CI=true, where they fail.
// `go test -short` skips them (they take about half a minute).

const python = "/usr/bin/python3"

// e2eEnv builds the binary and installs the kernelspec once per test binary run.
type e2eEnv struct {
	bin, jupyterPath, runtimeDir string
	env                          []string
}

func setupE2E(t testing.TB) *e2eEnv {
	t.Helper()
	if testing.Short() {
		t.Skip("end-to-end tests skipped in -short mode")
	}
	if out, err := exec.Command(python, "-c", "import jupyter_client, zmq, nbclient, nbformat").CombinedOutput(); err != nil {
		if os.Getenv("CI") == "true" {
			t.Fatalf("CI=true and the Jupyter Python clients are missing (%v): %s", err, out)
		}
		t.Skipf("Jupyter Python clients not available (%v); install python3-jupyter-client python3-zmq python3-nbclient jupyter-nbconvert", err)
	}
	dir := t.TempDir()
	e := &e2eEnv{bin: filepath.Join(dir, "nutate"), runtimeDir: filepath.Join(dir, "runtime")}
	if out, err := exec.Command("go", "build", "-o", e.bin, ".").CombinedOutput(); err != nil {
		t.Fatalf("go build: %v\n%s", err, out)
	}
	prefix := filepath.Join(dir, "prefix")
	out, err := exec.Command(e.bin, "install", "--prefix", prefix).CombinedOutput()
	if err != nil {
		t.Fatalf("nutate install --prefix: %v\n%s", err, out)
	}
	e.jupyterPath = filepath.Join(prefix, "share", "jupyter")
	spec, err := os.ReadFile(filepath.Join(e.jupyterPath, "kernels", "nutate", "kernel.json"))
	if err != nil {
		t.Fatalf("kernelspec not where install said (%s): %v", out, err)
	}
	var ks struct{ Argv []string }
	if err := json.Unmarshal(spec, &ks); err != nil || len(ks.Argv) == 0 || ks.Argv[0] != e.bin {
		t.Fatalf("kernel.json argv: got %v (%v), want %s first", ks.Argv, err, e.bin)
	}
	e.env = append(os.Environ(),
		"JUPYTER_PATH="+e.jupyterPath,
		"JUPYTER_RUNTIME_DIR="+e.runtimeDir, // connection files stay in the temporary directory
		"PYTHONDONTWRITEBYTECODE=1",
	)
	return e
}

// script runs testdata/e2e/NAME and reports its lines; it returns the figures.
func (e *e2eEnv) script(t *testing.T, name string, timeout time.Duration) map[string]float64 {
	t.Helper()
	ctx, cancel := context.WithTimeout(context.Background(), timeout)
	defer cancel()
	cmd := exec.CommandContext(ctx, python, name)
	cmd.Dir = filepath.Join("testdata", "e2e")
	cmd.Env = e.env
	var stderr bytes.Buffer
	cmd.Stderr = &stderr
	out, err := cmd.Output()
	figures := map[string]float64{}
	failed := false
	sc := bufio.NewScanner(bytes.NewReader(out))
	for sc.Scan() {
		line := sc.Text()
		switch f := strings.Fields(line); {
		case len(f) == 0:
		case f[0] == "ok":
			t.Log(line)
		case f[0] == "skip":
			t.Log(line)
		case f[0] == "figure" && len(f) >= 3:
			v, _ := strconv.ParseFloat(f[2], 64)
			figures[f[1]] = v
			t.Log(line)
		case f[0] == "FAIL":
			failed = true
			t.Error(line)
		default:
			t.Log(line)
		}
	}
	if err != nil || failed {
		t.Fatalf("%s: %v\nstderr:\n%s", name, err, stderr.String())
	}
	return figures
}

func TestE2EJupyterClient(t *testing.T) {
	e := setupE2E(t)
	t.Run("client", func(t *testing.T) { e.script(t, "client.py", 3*time.Minute) })
	t.Run("adversarial", func(t *testing.T) { e.script(t, "adversarial.py", 5*time.Minute) })
	t.Run("nbclient", func(t *testing.T) { e.script(t, "notebook.py", 3*time.Minute) })
	t.Run("nbconvert", func(t *testing.T) {
		out := filepath.Join(t.TempDir(), "executed.ipynb")
		ctx, cancel := context.WithTimeout(context.Background(), 3*time.Minute)
		defer cancel()
		jupyter, err := exec.LookPath("jupyter")
		if err != nil {
			if os.Getenv("CI") == "true" {
				t.Fatalf("CI=true and the jupyter command is missing: %v", err)
			}
			t.Skipf("jupyter command not available: %v", err)
		}
		cmd := exec.CommandContext(ctx, jupyter, "nbconvert", "--to", "notebook", "--execute",
			"--output", out, filepath.Join("testdata", "e2e", "small.ipynb"))
		cmd.Env = e.env
		if msg, err := cmd.CombinedOutput(); err != nil {
			t.Fatalf("nbconvert --execute: %v\n%s", err, msg)
		}
		b, err := os.ReadFile(out)
		if err != nil {
			t.Fatal(err)
		}
		var nb struct {
			Cells []struct {
				CellType       string `json:"cell_type"`
				ExecutionCount *int   `json:"execution_count"`
				Outputs        []struct {
					OutputType string         `json:"output_type"`
					Data       map[string]any `json:"data"`
				} `json:"outputs"`
			} `json:"cells"`
		}
		if err := json.Unmarshal(b, &nb); err != nil {
			t.Fatal(err)
		}
		n, svg := 0, false
		for _, c := range nb.Cells {
			if c.CellType != "code" {
				continue
			}
			n++
			if c.ExecutionCount == nil || *c.ExecutionCount != n {
				t.Errorf("cell %d: execution_count %v, want %d", n, c.ExecutionCount, n)
			}
			for _, o := range c.Outputs {
				if o.OutputType == "error" {
					t.Errorf("cell %d: error output", n)
				}
				if _, ok := o.Data["image/svg+xml"]; ok {
					svg = true
				}
			}
		}
		if n != 3 || !svg {
			t.Fatalf("executed notebook: %d code cells, svg=%v; want 3 and an SVG", n, svg)
		}
	})
}

// BenchmarkE2EKernel reports figures measured under jupyter_client
// (testdata/e2e/bench.py): start to ready, the execute round trip of a cell
// drawing a 601-point profile, idle RSS and CPU. Run with
// `go test -run '^$' -bench E2EKernel -benchtime 1x .`
func BenchmarkE2EKernel(b *testing.B) {
	e := setupE2E(b)
	for i := 0; i < b.N; i++ {
		ctx, cancel := context.WithTimeout(context.Background(), 5*time.Minute)
		cmd := exec.CommandContext(ctx, python, "bench.py")
		cmd.Dir = filepath.Join("testdata", "e2e")
		cmd.Env = e.env
		out, err := cmd.Output()
		cancel()
		if err != nil {
			b.Fatalf("bench.py: %v\n%s", err, out)
		}
		for _, line := range strings.Split(string(out), "\n") {
			f := strings.Fields(line)
			if len(f) == 4 && f[0] == "figure" {
				v, _ := strconv.ParseFloat(f[2], 64)
				b.ReportMetric(v, f[3]+"/"+f[1])
			}
		}
	}
}
