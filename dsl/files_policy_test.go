package dsl

import (
	"bytes"
	"context"
	"errors"
	"fmt"
	"os"
	"os/exec"
	"path/filepath"
	"runtime"
	"strconv"
	"strings"
	"testing"
)

// errText runs a cell that must fail and returns its traceback.
func errText(t *testing.T, s *Session, src string) string {
	t.Helper()
	_, tb := runCell(t, s, src)
	if tb == "" {
		t.Fatalf("%s: got no error, want one", src)
	}
	return tb
}

func writeFile(t *testing.T, path, text string) {
	t.Helper()
	if err := os.MkdirAll(filepath.Dir(path), 0o755); err != nil {
		t.Fatal(err)
	}
	if err := os.WriteFile(path, []byte(text), 0o644); err != nil {
		t.Fatal(err)
	}
}

// LANGUAGE.md "Files": symbolic links are followed to what they name; one that
// leaves the notebook's folder is refused like a path that does, and outputs
// name the file really read or written.
func TestFilesSymlinks(t *testing.T) {
	if runtime.GOOS == "windows" {
		t.Skip("symbolic links need privileges on Windows")
	}
	base := t.TempDir()
	nb, secrets := filepath.Join(base, "nb"), filepath.Join(base, "secrets")
	writeFile(t, filepath.Join(secrets, ".env"), "0,1e-6\n1e-5,1e-6\n")
	writeFile(t, filepath.Join(nb, "data", "real.csv"), "0,1e-6\n1e-5,1e-6\n")
	for link, target := range map[string]string{
		"env.csv": filepath.Join(secrets, ".env"),
		"out":     secrets,
		"in.csv":  filepath.Join(nb, "data", "real.csv"),
	} {
		if err := os.Symlink(target, filepath.Join(nb, link)); err != nil {
			t.Fatal(err)
		}
	}
	s := NewSession(nb)
	for _, src := range []string{`import x from "env.csv"`, `import x from "out/.env"`, `import x from "../secrets/.env"`} {
		if tb := errText(t, s, src); !strings.Contains(tb, "outside the notebook's folder") {
			t.Errorf("%s: got %q, want a refusal (outside the notebook's folder)", src, tb)
		}
	}
	runCell(t, s, `pulse r = rect(duration = 100 us, flip = 90 deg)`)
	if tb := errText(t, s, `export r to "out/r.csv"`); !strings.Contains(tb, "outside the notebook's folder") {
		t.Errorf("export through a link leaving the folder: got %q, want a refusal", tb)
	}
	if _, err := os.Stat(filepath.Join(secrets, "r.csv")); err == nil {
		t.Error("the export was written outside the folder")
	}
	out := execText(t, s, `import y from "in.csv"`)
	if !strings.Contains(out, "from data/real.csv") {
		t.Errorf("import through a link inside: got %q, want it to name data/real.csv", out)
	}
	out = execText(t, s, `export r to "data/../r.csv"`)
	if !strings.Contains(out, "exported r to r.csv:") {
		t.Errorf("got %q, want the resolved path r.csv", out)
	}
}

// A folder allowed by the person starting Nutate (never by the notebook) opens
// it for reading and writing; outputs name such a file by its full path.
func TestFilesAllowed(t *testing.T) {
	base := t.TempDir()
	nb, shared := filepath.Join(base, "nb"), filepath.Join(base, "shared")
	writeFile(t, filepath.Join(shared, "p.csv"), "0,1e-6\n1e-5,1e-6\n")
	os.MkdirAll(nb, 0o755)
	s := NewSession(nb)
	src := `import p from "../shared/p.csv"`
	if tb := errText(t, s, src); !strings.Contains(tb, "outside the notebook's folder") {
		t.Fatalf("before allowing: got %q, want a refusal", tb)
	}
	if err := s.AllowFiles([]string{shared}); err != nil {
		t.Fatal(err)
	}
	real, _ := filepath.EvalSymlinks(filepath.Join(shared, "p.csv"))
	if out := execText(t, s, src); !strings.Contains(out, "from "+real) {
		t.Errorf("allowed: got %q, want it to name %s", out, real)
	}
	if out := execText(t, s, `export p to "`+filepath.ToSlash(filepath.Join(shared, "q.csv"))+`"`); !strings.Contains(out, filepath.Join(filepath.Dir(real), "q.csv")) {
		t.Errorf("export to an allowed folder: got %q", out)
	}
	if err := s.AllowFiles([]string{filepath.Join(base, "missing")}); err == nil {
		t.Error("allowing a missing folder: got nil error, want one")
	}
}

// Only regular files are read or written: a named pipe is refused at once (it
// never hangs), and so are devices and /proc files, even inside an allowed
// folder.
func TestFilesRegularOnly(t *testing.T) {
	if runtime.GOOS != "linux" {
		t.Skip("Linux special files")
	}
	dir := t.TempDir()
	fifo := filepath.Join(dir, "pipe.csv")
	if err := exec.Command("mkfifo", fifo).Run(); err != nil {
		t.Skip("mkfifo:", err)
	}
	s := NewSession(dir)
	if err := s.AllowFiles([]string{"/dev", "/proc/self"}); err != nil {
		t.Fatal(err)
	}
	runCell(t, s, `pulse r = rect(duration = 100 us, flip = 90 deg)`)
	for src, want := range map[string]string{
		`import x from "pipe.csv"`:           "named pipe",
		`export r to "pipe.csv"`:             "named pipe",
		`import x from "/dev/zero"`:          "a device",
		`import x from "/dev/urandom"`:       "a device",
		`export r to "/dev/full"`:            "a device",
		`import x from "/proc/self/environ"`: "kernel interface file",
		`import x from "."`:                  "a folder",
	} {
		if tb := errText(t, s, src); !strings.Contains(tb, want) {
			t.Errorf("%s: got %q, want %q", src, tb, want)
		}
	}
}

// Rows are bounded and the sample count is the pulse limit of 10⁶ (as for
// shapes and trains); the first faulty row stops the reading.
func TestImportLimits(t *testing.T) {
	dir := t.TempDir()
	writeFile(t, filepath.Join(dir, "long.csv"), "0,1e-6\n1e-5,1e-6"+strings.Repeat(" ", 5000)+"\n")
	var b bytes.Buffer
	for i := 0; i <= maxPulseSamples; i++ {
		fmt.Fprintf(&b, "%d,1e-7\n", i)
	}
	writeFile(t, filepath.Join(dir, "many.csv"), b.String())
	s := NewSession(dir)
	if tb := errText(t, s, `import x from "long.csv" with dwell = 1 us`); !strings.Contains(tb, "row 2: longer than 4096 bytes") {
		t.Errorf("long row: got %q", tb)
	}
	if tb := errText(t, s, `import x from "many.csv" with flip = 1 deg`); !strings.Contains(tb, "row 1000001: more than 1000000 samples") {
		t.Errorf("too many samples: got %q", tb)
	}
	runCell(t, s, `pulse r = rect(duration = 10 ms, flip = 90 deg, samples = 600000)`)
	if tb := errText(t, s, `pulse t = train(r, r)`); !strings.Contains(tb, "1200000 samples") || !strings.Contains(tb, "limit of 1000000") {
		t.Errorf("train: got %q", tb)
	}
}

// The comment line prints durations and dwells at 12 significant digits, not
// a sum's rounding noise; the file still reads back to the same sampling.
func TestExportHeaderDuration(t *testing.T) {
	dir := t.TempDir()
	s := NewSession(dir)
	execText(t, s, "pulse p = sinc(duration = 3 ms, tbw = 4, flip = 90 deg, samples = 300)\nexport p to \"p.csv\"\nimport q from \"p.csv\"\nexport q to \"q.csv\"")
	for _, f := range []string{"p.csv", "q.csv"} {
		data, _ := os.ReadFile(filepath.Join(dir, f))
		first, _, _ := strings.Cut(string(data), "\n")
		if !strings.Contains(first, "duration 0.003 s, dwell 1e-05 s, samples 300") {
			t.Errorf("%s: got %q, want duration 0.003 s, dwell 1e-05 s", f, first)
		}
	}
}

// Importing a large malformed CSV streams it: a child process capped at 1 GiB
// of address space reads 64 MiB of commas (held as fields, as before, that
// took more than 1 GiB) and reports the memory the Go runtime obtained.
func TestImportStreamsMemory(t *testing.T) {
	if file := os.Getenv("NUTATE_IMPORT_CHILD"); file != "" {
		s := NewSession(filepath.Dir(file))
		_, tb := runCell(t, s, `import x from "`+filepath.Base(file)+`"`)
		var ms runtime.MemStats
		runtime.ReadMemStats(&ms)
		fmt.Printf("error: %s\nsys: %d\n", strings.SplitN(tb, "\n", 2)[0], ms.Sys)
		return
	}
	if runtime.GOOS != "linux" || testing.Short() {
		t.Skip("a capped child process on Linux (ulimit -v)")
	}
	dir := t.TempDir()
	for name, gen := range map[string]func(*os.File) error{
		"commas.csv": func(f *os.File) error { // one row of commas
			chunk := bytes.Repeat([]byte(","), 1<<20)
			for i := 0; i < 64; i++ {
				if _, err := f.Write(chunk); err != nil {
					return err
				}
			}
			return nil
		},
		"rows.csv": func(f *os.File) error { // 64 MiB of blank and comment rows, then a faulty one
			chunk := bytes.Repeat([]byte("# "+strings.Repeat("x", 60)+"\n\n"), 1<<14)
			for i := 0; i < 64; i++ {
				if _, err := f.Write(chunk); err != nil {
					return err
				}
			}
			_, err := f.WriteString("0,1,2,3\n")
			return err
		},
	} {
		path := filepath.Join(dir, name)
		f, err := os.Create(path)
		if err != nil {
			t.Fatal(err)
		}
		if err := gen(f); err != nil {
			t.Fatal(err)
		}
		f.Close()
		cmd := exec.Command("sh", "-c", `ulimit -v 1048576 && exec "$0" -test.run '^TestImportStreamsMemory$' -test.count=1`, os.Args[0])
		cmd.Env = append(os.Environ(), "NUTATE_IMPORT_CHILD="+path, "GOGC=100")
		out, err := cmd.CombinedOutput()
		if err != nil {
			t.Fatalf("%s: child failed: %v\n%s", name, err, out)
		}
		var sys int64
		var msg string
		for _, line := range strings.Split(string(out), "\n") {
			if v, ok := strings.CutPrefix(line, "sys: "); ok {
				sys, _ = strconv.ParseInt(v, 10, 64)
			}
			if v, ok := strings.CutPrefix(line, "error: "); ok {
				msg = v
			}
		}
		if msg == "" || sys == 0 {
			t.Fatalf("%s: child reported nothing:\n%s", name, out)
		}
		t.Logf("%s (64 MiB): %s; runtime obtained %.1f MiB", name, msg, float64(sys)/(1<<20))
		if sys > 48<<20 {
			t.Errorf("%s: the runtime obtained %d bytes from the system reading a 64 MiB file, want under 48 MiB", name, sys)
		}
	}
}

// A failed write names the target alone (not the temporary file) and changes
// nothing.
func TestExportIntoMissingFolder(t *testing.T) {
	dir := t.TempDir()
	s := NewSession(dir)
	runCell(t, s, `pulse r = rect(duration = 100 us, flip = 90 deg)`)
	tb := errText(t, s, `export r to "sub/r.csv"`)
	if !strings.Contains(tb, "cannot write sub/r.csv: ") || strings.Contains(tb, ".tmp-") || strings.Contains(tb, dir) {
		t.Errorf("got %q, want it to name sub/r.csv only", tb)
	}
	if ents, _ := os.ReadDir(dir); len(ents) != 0 {
		t.Errorf("files left: %v", ents)
	}
}

// countdownCtx is done after its Err has been asked n times.
type countdownCtx struct {
	context.Context
	n int
}

func (c *countdownCtx) Err() error {
	if c.n--; c.n < 0 {
		return context.Canceled
	}
	return nil
}

// An interrupt stops an import while it reads a large file.
func TestImportInterrupted(t *testing.T) {
	dir := t.TempDir()
	writeFile(t, filepath.Join(dir, "blank.csv"), strings.Repeat("\n", 8<<20)+"0,1e-6\n1e-5,1e-6\n")
	s := NewSession(dir)
	ctx := &countdownCtx{Context: context.Background(), n: 20}
	err := s.Exec(ctx, `import x from "blank.csv"`, Sink{})
	if !errors.Is(err, context.Canceled) {
		t.Fatalf("got %v, want an interrupt", err)
	}
	if ctx.n > 0 {
		t.Fatalf("the import did not look at the interrupt (%d checks left)", ctx.n)
	}
	if out := execText(t, s, `import x from "blank.csv"`); !strings.Contains(out, "pulse x: imported") {
		t.Errorf("uninterrupted: got %q", out)
	}
}
