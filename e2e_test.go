package main

import (
	"bufio"
	"bytes"
	"context"
	"debug/elf"
	"encoding/json"
	"errors"
	"net"
	"os"
	"os/exec"
	"path/filepath"
	"runtime"
	"strconv"
	"strings"
	"syscall"
	"testing"
	"time"

	"github.com/go-zeromq/zmq4"
	"github.com/go-zeromq/zmq4/security/null"

	"Nutate/kernel"
)

// End-to-end tests: build the binary, install its kernelspec into a temporary
// prefix, and drive it with Jupyter's own Python clients (jupyter_client,
// nbclient, nbconvert, python3-zmq) from /usr/bin/python3. The scripts in
// testdata/e2e print "ok NAME", "skip NAME: why", "figure NAME VALUE UNIT" or
// "FAIL why" and exit non-zero on failure.
//
// Without the Python packages the tests skip, unless CI=true, where they fail.
// `go test -short` skips them (they take about a minute). All run under
// TestBinary, which builds the binary once.

const python = "/usr/bin/python3"

// e2eEnv builds the binary and installs the kernelspec once per test binary run.
type e2eEnv struct {
	bin, jupyterPath, runtimeDir string
	env                          []string
}

func setupE2E(t testing.TB, bin string) *e2eEnv {
	t.Helper()
	if out, err := exec.Command(python, "-c", "import jupyter_client, zmq, nbclient, nbformat").CombinedOutput(); err != nil {
		if os.Getenv("CI") == "true" {
			t.Fatalf("CI=true and the Jupyter Python clients are missing (%v): %s", err, out)
		}
		t.Skipf("Jupyter Python clients not available (%v); install python3-jupyter-client python3-zmq python3-nbclient jupyter-nbconvert", err)
	}
	dir := t.TempDir()
	e := &e2eEnv{bin: bin, runtimeDir: filepath.Join(dir, "runtime")}
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
		"NUTATE_BIN="+e.bin,
	)
	return e
}

// script runs testdata/e2e/NAME and reports its lines; it returns the figures.
func (e *e2eEnv) script(t *testing.T, name string, timeout time.Duration, args ...string) map[string]float64 {
	t.Helper()
	ctx, cancel := context.WithTimeout(context.Background(), timeout)
	defer cancel()
	cmd := exec.CommandContext(ctx, python, append([]string{name}, args...)...)
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

// TestBinary builds the binary once and runs every test that needs it.
func TestBinary(t *testing.T) {
	bin := buildKernel(t)
	t.Run("static", func(t *testing.T) { testStaticBinary(t, bin) })
	t.Run("prebind_init_order", func(t *testing.T) { testPrebindInitOrder(t, bin) })
	t.Run("install", func(t *testing.T) { testInstallCommand(t, bin) })
	t.Run("install_refuses_go_run_binary", func(t *testing.T) { testInstallRefusesGoRun(t, bin) })
	t.Run("install_allow_files", func(t *testing.T) { testInstallAllowFiles(t, bin) })
	t.Run("command_errors", func(t *testing.T) { testKernelCommandErrors(t, bin) })
	t.Run("parent_death", func(t *testing.T) { testKernelExitsWhenParentDies(t, bin) })
	t.Run("signals", func(t *testing.T) { testKernelSignals(t, bin) })
	t.Run("shutdown_during_cell", func(t *testing.T) { testShutdownDuringCell(t, bin) })
	t.Run("jupyter", func(t *testing.T) { testJupyterClients(t, bin) })
	t.Run("slurm_array_example", func(t *testing.T) { testSlurmArrayExample(t, bin) })
	t.Run("browser", func(t *testing.T) { testBrowser(t, bin) })
}

func testJupyterClients(t *testing.T, bin string) {
	e := setupE2E(t, bin)
	t.Run("client", func(t *testing.T) { e.script(t, "client.py", 3*time.Minute) })
	t.Run("adversarial", func(t *testing.T) { e.script(t, "adversarial.py", 5*time.Minute) })
	t.Run("nbclient", func(t *testing.T) { e.script(t, "notebook.py", 3*time.Minute) })
	t.Run("conformance", func(t *testing.T) { e.script(t, "conformance.py", 5*time.Minute) })
	t.Run("console", func(t *testing.T) { testJupyterConsole(t, e) })
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

// testJupyterConsole types cells into jupyter console (its plain prompt reads
// standard input): results and errors come back in order, the error shows its
// caret, the session survives it, and the console shuts the kernel down at the
// end of input.
func testJupyterConsole(t *testing.T, e *e2eEnv) {
	console, err := exec.LookPath("jupyter-console")
	if err != nil {
		if os.Getenv("CI") == "true" {
			t.Fatalf("CI=true and jupyter-console is missing: %v", err)
		}
		t.Skipf("jupyter-console not available: %v", err)
	}
	ctx, cancel := context.WithTimeout(context.Background(), 2*time.Minute)
	defer cancel()
	cmd := exec.CommandContext(ctx, console, "--kernel", "nutate", "--simple-prompt")
	cmd.Env = e.env
	cmd.Stdin = strings.NewReader("pulse q = nosuch(duration = 1 ms)\nprint 1 kHz in uT\npulse p = rect(duration = 1 ms, flip = 90 deg)\n")
	out, err := cmd.CombinedOutput()
	if err != nil {
		t.Fatalf("jupyter console: %v\n%s", err, out)
	}
	text := string(out)
	want := []string{
		"Nutate " + version, // the banner
		"unknown shape or pulse `nosuch`",
		"            ^", // the caret under the name
		"23.4866 µT",    // 1 kHz / (γ/2π) for 1H (CODATA 2018)
		"pulse p: rect, 1 ms",
		"Shutting down kernel",
	}
	at := 0
	for _, w := range want {
		i := strings.Index(text[at:], w)
		if i < 0 {
			t.Fatalf("console output lacks %q after byte %d:\n%s", w, at, text)
		}
		at += i + len(w)
	}
}

// BenchmarkE2EKernel reports figures measured under jupyter_client
// (testdata/e2e/bench.py): start to ready, the execute round trip of a cell
// drawing a 601-point profile, idle RSS and CPU. Run with
// `go test -run '^$' -bench E2EKernel -benchtime 1x .`
func BenchmarkE2EKernel(b *testing.B) { benchE2E(b, buildKernel(b)) }

// benchE2E runs testdata/e2e/bench.py b.N times against the kernel bin.
func benchE2E(b *testing.B, bin string) {
	e := setupE2E(b, bin)
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

// testPrebindInitOrder checks that package prebind, which binds the kernel's
// ports before the heavy package initialisers run, is initialised right after
// os (its only non-trivial import) and before the plotting packages: that is
// what lets Jupyter clients' first connections succeed.
func testPrebindInitOrder(t *testing.T, bin string) {
	cmd := exec.Command(bin, "version")
	cmd.Env = append(os.Environ(), "GODEBUG=inittrace=1")
	var stderr bytes.Buffer
	cmd.Stderr = &stderr
	if err := cmd.Run(); err != nil {
		t.Fatal(err)
	}
	order := map[string]int{}
	n := 0
	for _, line := range strings.Split(stderr.String(), "\n") {
		if f := strings.Fields(line); len(f) > 2 && f[0] == "init" {
			order[f[1]] = n
			n++
		}
	}
	pre, ok := order["Nutate/kernel/prebind"]
	if !ok {
		t.Fatalf("no init trace of Nutate/kernel/prebind in:\n%s", stderr.String())
	}
	if pre != order["os"]+1 {
		t.Errorf("prebind initialised %d packages after os, want right after it", pre-order["os"])
	}
	for _, heavy := range []string{"gonum.org/v1/plot", "encoding/gob", "Nutate/display", "net"} {
		if i, ok := order[heavy]; !ok || i < pre {
			t.Errorf("%s initialised before prebind (or not at all: %v)", heavy, ok)
		}
	}
}

// Process-level tests of the kernel command with a Go client: signals and the
// death of the parent process. They need no Python.

// buildKernel builds the binary into a temporary directory.
func buildKernel(t testing.TB) string {
	t.Helper()
	if testing.Short() {
		t.Skip("tests of the built binary skipped in -short mode")
	}
	bin := filepath.Join(t.TempDir(), "nutate")
	cmd := exec.Command("go", "build", "-o", bin, ".")
	cmd.Env = append(os.Environ(), "CGO_ENABLED=0") // as the README builds it
	if out, err := cmd.CombinedOutput(); err != nil {
		t.Fatalf("CGO_ENABLED=0 go build: %v\n%s", err, out)
	}
	return bin
}

// testStaticBinary checks that the binary the README's build gives is one
// static executable: no program interpreter, no shared libraries.
func testStaticBinary(t *testing.T, bin string) {
	if runtime.GOOS != "linux" {
		t.Skip("an ELF check (Linux): on macOS every program links libSystem, on Windows the system DLLs")
	}
	f, err := elf.Open(bin)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	for _, p := range f.Progs {
		if p.Type == elf.PT_INTERP || p.Type == elf.PT_DYNAMIC {
			t.Errorf("the binary has a %v program header: dynamically linked", p.Type)
		}
	}
	if libs, _ := f.ImportedLibraries(); len(libs) > 0 {
		t.Errorf("the binary needs shared libraries %v", libs)
	}
}

// freePorts returns n TCP ports free at the time of the call.
func freePorts(t *testing.T, n int) []int {
	t.Helper()
	var ports []int
	var ls []net.Listener
	for range n {
		l, err := net.Listen("tcp", "127.0.0.1:0")
		if err != nil {
			t.Fatal(err)
		}
		ls = append(ls, l)
		ports = append(ports, l.Addr().(*net.TCPAddr).Port)
	}
	for _, l := range ls {
		l.Close()
	}
	return ports
}

type procKernel struct {
	t      *testing.T
	cmd    *exec.Cmd
	info   kernel.ConnectionInfo
	signer *kernel.Signer
	exited chan error
}

// startKernel runs `nutate kernel` with a fresh connection file and env.
func startKernel(t *testing.T, bin string, env ...string) *procKernel {
	t.Helper()
	p := freePorts(t, 5)
	info := kernel.ConnectionInfo{Transport: "tcp", IP: "127.0.0.1", ShellPort: p[0], IOPubPort: p[1], StdinPort: p[2],
		ControlPort: p[3], HBPort: p[4], Key: "process-test-key", SignatureScheme: "hmac-sha256"}
	cf := filepath.Join(t.TempDir(), "kernel.json")
	b, _ := json.Marshal(info)
	if err := os.WriteFile(cf, b, 0o600); err != nil {
		t.Fatal(err)
	}
	cmd := exec.Command(bin, "kernel", "--connection-file", cf)
	cmd.Env = append(os.Environ(), env...)
	if err := cmd.Start(); err != nil {
		t.Fatal(err)
	}
	signer, _ := kernel.NewSigner(info.Key, info.SignatureScheme)
	k := &procKernel{t: t, cmd: cmd, info: info, signer: signer, exited: make(chan error, 1)}
	go func() { k.exited <- cmd.Wait() }()
	t.Cleanup(func() {
		cmd.Process.Kill()
		<-k.exited
	})
	return k
}

// dial connects to port once the kernel listens (it may still be starting).
func (k *procKernel) dial(port int, typ zmq4.SocketType) *zmq4.Conn {
	k.t.Helper()
	deadline := time.Now().Add(20 * time.Second)
	for {
		c, err := net.Dial("tcp", "127.0.0.1:"+strconv.Itoa(port))
		if err == nil {
			zc, err := zmq4.Open(c, null.Security(), typ, zmq4.SocketIdentity("go-test"), false, nil)
			if err != nil {
				k.t.Fatal(err)
			}
			k.t.Cleanup(func() { zc.Close() })
			return zc
		}
		if time.Now().After(deadline) {
			k.t.Fatalf("kernel never listened on %d: %v", port, err)
		}
		select {
		case err := <-k.exited:
			k.t.Fatalf("kernel exited while starting: %v", err)
		case <-time.After(5 * time.Millisecond): // connection retry interval, as a ZMQ client's
		}
	}
}

func (k *procKernel) send(c *zmq4.Conn, msgType, id string, content any) {
	k.t.Helper()
	body, _ := json.Marshal(content)
	frames, err := k.signer.Encode(kernel.Message{
		Header:  kernel.Header{MsgID: id, Session: "go", Username: "t", Date: time.Now().UTC().Format(time.RFC3339Nano), MsgType: msgType, Version: "5.3"},
		Content: body,
	})
	if err != nil {
		k.t.Fatal(err)
	}
	if err := c.SendMsg(zmq4.NewMsgFrom(frames...)); err != nil {
		k.t.Fatal(err)
	}
}

func (k *procKernel) recv(c *zmq4.Conn) (kernel.Message, map[string]any, string) {
	k.t.Helper()
	for {
		msg, err := c.RecvMsg()
		if err != nil {
			k.t.Fatalf("recv: %v", err)
		}
		if msg.Type == zmq4.CmdMsg {
			continue
		}
		m, err := k.signer.Decode(msg.Frames)
		if err != nil {
			k.t.Fatalf("decode: %v", err)
		}
		var content map[string]any
		json.Unmarshal(m.Content, &content)
		var parent kernel.Header
		json.Unmarshal(m.Parent, &parent)
		return m, content, parent.MsgID
	}
}

// waitExit waits for the kernel to exit by itself and checks its status.
func (k *procKernel) waitExit(within time.Duration) {
	k.t.Helper()
	select {
	case err := <-k.exited:
		k.exited <- err // for the cleanup
		if err != nil {
			k.t.Fatalf("kernel exit: %v, want status 0", err)
		}
	case <-time.After(within):
		k.t.Fatalf("kernel still running after %v", within)
	}
}

func testKernelExitsWhenParentDies(t *testing.T, bin string) {
	parent := exec.Command("true")
	if err := parent.Run(); err != nil {
		t.Skipf("cannot run a short-lived parent: %v", err)
	}
	k := startKernel(t, bin, "JPY_PARENT_PID="+strconv.Itoa(parent.Process.Pid))
	// The kernel polls its parent every second; allow a generous bound.
	k.waitExit(20 * time.Second)
}

func testKernelSignals(t *testing.T, bin string) {
	k := startKernel(t, bin, "JPY_PARENT_PID="+strconv.Itoa(os.Getpid()))
	iopub := k.dial(k.info.IOPubPort, zmq4.Sub)
	iopub.SendMsg(zmq4.NewMsg([]byte{1}))
	shell := k.dial(k.info.ShellPort, zmq4.Dealer)

	// SIGINT while idle: nothing to interrupt, the kernel keeps serving
	// (an uncaught SIGINT would end a Go program with status 2).
	k.send(shell, "kernel_info_request", "k1", map[string]any{})
	k.recv(shell)
	if err := k.cmd.Process.Signal(os.Interrupt); err != nil {
		t.Fatal(err)
	}
	k.send(shell, "kernel_info_request", "k2", map[string]any{})
	if m, _, parent := k.recv(shell); m.Header.MsgType != "kernel_info_reply" || parent != "k2" {
		t.Fatalf("after SIGINT: got %s to %s", m.Header.MsgType, parent)
	}

	// SIGINT during a long cell interrupts the cell; the session survives.
	k.send(shell, "execute_request", "p", map[string]any{"code": "pulse p = sinc(duration = 4 ms, tbw = 8, flip = 90 deg, samples = 4000)"})
	if _, c, _ := k.recv(shell); c["status"] != "ok" {
		t.Skipf("the language cannot define the long cell's pulse yet: %v", c["evalue"])
	}
	k.longCell(shell, iopub, "long")
	if err := k.cmd.Process.Signal(os.Interrupt); err != nil {
		t.Fatal(err)
	}
	if _, c, parent := k.recv(shell); parent != "long" || c["status"] != "error" || c["ename"] != "Interrupted" {
		t.Fatalf("SIGINT during a cell: got %v to %s, want an Interrupted error", c, parent)
	}
	k.send(shell, "execute_request", "after", map[string]any{"code": "describe p"})
	if _, c, _ := k.recv(shell); c["status"] != "ok" {
		t.Fatalf("after SIGINT: got %v", c)
	}

	// SIGTERM during a long cell: the cell is cancelled and the kernel exits
	// cleanly well inside the 5 s a client waits before killing it.
	k.longCell(shell, iopub, "long2")
	if err := k.cmd.Process.Signal(syscall.SIGTERM); err != nil {
		t.Fatal(err)
	}
	k.waitExit(5 * time.Second)
}

// longCell starts a cell that runs for many seconds and waits until it runs.
func (k *procKernel) longCell(shell, iopub *zmq4.Conn, id string) {
	k.t.Helper()
	k.send(shell, "execute_request", id, map[string]any{"code": "sweep p over offset -20 kHz to 20 kHz points 1000, b1 0.5 to 1.5 points 1000"})
	for {
		m, _, parent := k.recv(iopub)
		if parent == id && m.Header.MsgType == "execute_input" {
			return
		}
	}
}

func testShutdownDuringCell(t *testing.T, bin string) {
	k := startKernel(t, bin, "JPY_PARENT_PID="+strconv.Itoa(os.Getpid()))
	iopub := k.dial(k.info.IOPubPort, zmq4.Sub)
	iopub.SendMsg(zmq4.NewMsg([]byte{1}))
	shell := k.dial(k.info.ShellPort, zmq4.Dealer)
	control := k.dial(k.info.ControlPort, zmq4.Dealer)
	k.send(shell, "execute_request", "p", map[string]any{"code": "pulse p = sinc(duration = 4 ms, tbw = 8, flip = 90 deg, samples = 4000)"})
	if _, c, _ := k.recv(shell); c["status"] != "ok" {
		t.Skipf("the language cannot define the long cell's pulse yet: %v", c["evalue"])
	}
	k.longCell(shell, iopub, "long")
	start := time.Now()
	k.send(control, "shutdown_request", "bye", map[string]any{"restart": true})
	if m, c, _ := k.recv(control); m.Header.MsgType != "shutdown_reply" || c["restart"] != true {
		t.Fatalf("shutdown during a cell: got %s %v", m.Header.MsgType, c)
	}
	if _, c, parent := k.recv(shell); parent != "long" || c["ename"] != "Interrupted" {
		t.Fatalf("the running cell: got %v to %s, want an Interrupted error reply", c, parent)
	}
	k.waitExit(5 * time.Second)
	t.Logf("shutdown during a cell: exited %v after the request", time.Since(start).Round(time.Millisecond))
}

func testKernelCommandErrors(t *testing.T, bin string) {
	tests := []struct {
		args []string
		code int
	}{
		{[]string{"kernel"}, 2},
		{[]string{"kernel", "--connection-file", filepath.Join(t.TempDir(), "missing.json")}, 1},
		{[]string{"kernel", "--bogus"}, 2},
		{[]string{"install", "--user", "--sys-prefix"}, 2},
	}
	for _, tc := range tests {
		ctx, cancel := context.WithTimeout(context.Background(), 20*time.Second)
		err := exec.CommandContext(ctx, bin, tc.args...).Run()
		cancel()
		var ee *exec.ExitError
		if !errors.As(err, &ee) || ee.ExitCode() != tc.code {
			t.Errorf("nutate %v: got %v, want exit status %d", tc.args, err, tc.code)
		}
	}
}

// testInstallRefusesGoRun installs from a copy of the binary placed where `go
// run` puts its temporary executables: the kernelspec would outlive it, so
// install refuses and says how to build a binary to keep.
func testInstallRefusesGoRun(t *testing.T, bin string) {
	dir := t.TempDir()
	exe := filepath.Join(dir, "go-build2718281828", "b001", "exe", "nutate")
	if err := os.MkdirAll(filepath.Dir(exe), 0o755); err != nil {
		t.Fatal(err)
	}
	data, err := os.ReadFile(bin)
	if err != nil {
		t.Fatal(err)
	}
	if err := os.WriteFile(exe, data, 0o755); err != nil {
		t.Fatal(err)
	}
	prefix := filepath.Join(dir, "prefix")
	out, err := exec.Command(exe, "install", "--prefix", prefix).CombinedOutput()
	var ee *exec.ExitError
	if !errors.As(err, &ee) || ee.ExitCode() != 1 {
		t.Fatalf("install from a go run binary: err %v, want exit status 1\n%s", err, out)
	}
	if !strings.Contains(string(out), "temporary binary of `go run`") || !strings.Contains(string(out), "CGO_ENABLED=0 go build") {
		t.Errorf("message does not explain: %s", out)
	}
	if _, err := os.Stat(filepath.Join(prefix, "share", "jupyter", "kernels", "nutate")); !os.IsNotExist(err) {
		t.Errorf("a kernelspec was written anyway (stat: %v)", err)
	}
}

func testInstallCommand(t *testing.T, bin string) {
	dir := t.TempDir()
	// Run through a symlink: the kernelspec must name the resolved binary.
	link := filepath.Join(dir, "nutate-link")
	if err := os.Symlink(bin, link); err != nil {
		t.Skipf("symlinks unavailable: %v", err)
	}
	resolved, err := filepath.EvalSymlinks(bin)
	if err != nil {
		t.Fatal(err)
	}
	run := func(env []string, args ...string) string {
		t.Helper()
		cmd := exec.Command(link, args...)
		cmd.Env = append(os.Environ(), env...)
		out, err := cmd.CombinedOutput()
		if err != nil {
			t.Fatalf("nutate %v: %v\n%s", args, err, out)
		}
		return string(out)
	}
	prefix := filepath.Join(dir, "prefix")
	spec := filepath.Join(prefix, "share", "jupyter", "kernels", "nutate")
	first := run(nil, "install", "--prefix", prefix)
	if !strings.Contains(first, spec) {
		t.Fatalf("install output %q does not name %s", first, spec)
	}
	kj, _ := os.ReadFile(filepath.Join(spec, "kernel.json"))
	if second := run(nil, "install", "--prefix", prefix); second != first {
		t.Fatalf("second install: got %q, want %q", second, first)
	}
	if kj2, _ := os.ReadFile(filepath.Join(spec, "kernel.json")); string(kj2) != string(kj) {
		t.Fatalf("second install changed kernel.json")
	}
	var ks struct {
		Argv          []string `json:"argv"`
		InterruptMode string   `json:"interrupt_mode"`
	}
	if err := json.Unmarshal(kj, &ks); err != nil {
		t.Fatal(err)
	}
	if len(ks.Argv) != 4 || ks.Argv[0] != resolved || ks.Argv[1] != "kernel" || ks.Argv[3] != "{connection_file}" || ks.InterruptMode != "message" {
		t.Fatalf("kernel.json: got %+v, want argv[0] %s", ks, resolved)
	}
	for _, logo := range []string{"logo-32x32.png", "logo-64x64.png"} {
		if _, err := os.Stat(filepath.Join(spec, logo)); err != nil {
			t.Fatalf("%s: %v", logo, err)
		}
	}
	if out := run(nil, "install", "--prefix", prefix, "--uninstall"); !strings.Contains(out, "removed") {
		t.Fatalf("uninstall: got %q", out)
	}
	if _, err := os.Stat(spec); !os.IsNotExist(err) {
		t.Fatalf("spec still present after uninstall: %v", err)
	}
	if out := run(nil, "install", "--prefix", prefix, "--uninstall"); !strings.Contains(out, "nothing to remove") {
		t.Fatalf("second uninstall: got %q", out)
	}
	// The default (--user) honours JUPYTER_DATA_DIR; --sys-prefix honours VIRTUAL_ENV.
	data := filepath.Join(dir, "data")
	run([]string{"JUPYTER_DATA_DIR=" + data}, "install")
	if _, err := os.Stat(filepath.Join(data, "kernels", "nutate", "kernel.json")); err != nil {
		t.Fatalf("install (--user default): %v", err)
	}
	venv := filepath.Join(dir, "venv")
	run([]string{"VIRTUAL_ENV=" + venv}, "install", "--sys-prefix")
	if _, err := os.Stat(filepath.Join(venv, "share", "jupyter", "kernels", "nutate", "kernel.json")); err != nil {
		t.Fatalf("install --sys-prefix: %v", err)
	}
}
