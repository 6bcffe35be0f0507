package main

import (
	"bytes"
	"context"
	"encoding/json"
	"errors"
	"flag"
	"fmt"
	"io"
	"os"
	"os/signal"
	"path/filepath"
	"strings"

	"Nutate/display"
	"Nutate/dsl"
)

// setFlags collects repeated --set NAME=VALUE options.
type setFlags []string

func (s *setFlags) String() string     { return strings.Join(*s, ",") }
func (s *setFlags) Set(v string) error { *s = append(*s, v); return nil }

// cmdRun executes notebooks and scripts headless: `nutate run [flags] FILE...`.
func cmdRun(args []string) int {
	fs := flag.NewFlagSet("run", flag.ContinueOnError)
	fs.SetOutput(os.Stderr)
	output := fs.String("output", "", "write the executed notebook here instead of in place (one input file only)")
	asJSON := fs.Bool("json", false, "scripts: print one JSON object (the MIME bundle) per output line")
	check := fs.Bool("check", false, "notebooks: re-execute and fail if the stored outputs differ from fresh ones")
	gatherOnly := fs.Bool("gather", false, "notebooks already run: print all their sweeps' values as one CSV table (gather.go)")
	var sets setFlags
	fs.Var(&sets, "set", "")
	var allow allowFlags
	fs.Var(&allow, "allow-files", "")
	memory := fs.String("memory", "", "")
	work := fs.String("work", "", "")
	fs.Usage = func() {
		fmt.Fprint(os.Stderr, `usage: nutate run [--output F] [--json] [--check] [--set NAME=VALUE]... [--allow-files DIR]...
                  [--memory SIZE] [--work STEPS] FILE...
       nutate run --gather NOTEBOOK... > table.csv
  --output F          notebooks: write the executed notebook to F instead of in place (one input file)
  --json              scripts: print one JSON object (the MIME bundle) per output
  --check             notebooks: re-execute and fail if the stored outputs differ from fresh ones
  --set NAME=VALUE    "let NAME = ..." in the file takes VALUE instead (repeatable)
  --gather            notebooks already run (e.g. by a job array): print every sweep value
                      as one CSV table, a column per --set name; nothing is executed
  --allow-files DIR   import and export may also use files in DIR (repeatable; also
                      NUTATE_ALLOW_FILES, a list like PATH); otherwise only files inside
                      the notebook's folder, and never by the notebook's own choice
  --memory SIZE       session memory budget, e.g. 4GiB (default 2GiB, or $NUTATE_MEMORY)
  --work STEPS        work budget of a sweep, describe or report in isochromat-steps (default 4e10, or $NUTATE_WORK)
`)
	}
	// Flags may stand before or after the files (`run x.ipynb --output y.ipynb`):
	// all are parsed before any file is touched.
	var files []string
	for {
		if err := fs.Parse(args); err != nil {
			return 2
		}
		rest := fs.Args()
		if len(rest) == 0 {
			break
		}
		if rest[0] == "--" {
			files = append(files, rest[1:]...)
			break
		}
		files = append(files, rest[0])
		args = rest[1:]
	}
	if len(files) == 0 {
		fs.Usage()
		return 2
	}
	if *gatherOnly {
		if *output != "" || *check || *asJSON || len(sets) > 0 {
			fmt.Fprintln(os.Stderr, "nutate run: --gather reads notebooks already run and prints a table; it takes no other option (redirect its output)")
			return 2
		}
		return cmdGather(files)
	}
	if *output != "" && len(files) != 1 {
		fmt.Fprintln(os.Stderr, "nutate run: --output takes one input file, got", len(files))
		return 2
	}
	allowed, err := allowedFolders(allow)
	if err != nil {
		fmt.Fprintln(os.Stderr, "nutate run:", err)
		return 2
	}
	budget, err := memoryBudget(*memory)
	if err != nil {
		fmt.Fprintln(os.Stderr, "nutate run: --memory:", err)
		return 2
	}
	workBudget, err := workBudget(*work)
	if err != nil {
		fmt.Fprintln(os.Stderr, "nutate run: --work:", err)
		return 2
	}
	ctx, stop := signal.NotifyContext(context.Background(), os.Interrupt)
	defer stop()
	r := runner{json: *asJSON, check: *check, sets: sets, allow: allowed, stdout: os.Stdout, stderr: os.Stderr, progress: isTerminal(os.Stderr), budget: budget, work: workBudget}
	for _, f := range files {
		var err error
		isNotebook := strings.EqualFold(filepath.Ext(f), ".ipynb")
		switch {
		case isNotebook && *asJSON:
			err = fmt.Errorf("--json prints a script's outputs; a notebook keeps them in its cells (drop --json)")
		case isNotebook:
			err = r.notebook(ctx, f, *output)
		case *check:
			err = fmt.Errorf("--check compares a notebook's stored outputs; %s is a script", f)
		case *output != "":
			err = fmt.Errorf("--output writes an executed notebook; a script's outputs go to standard output (redirect them)")
		default:
			err = r.script(ctx, f)
		}
		if err != nil {
			fmt.Fprintf(os.Stderr, "nutate run: %s: %v\n", f, err)
			return 1
		}
	}
	return 0
}

type runner struct {
	json, check bool
	sets        []string
	allow       []string // folders allowed for files beside the notebook's
	beforeWrite func()   // tests: runs between the run and writing the notebook
	stdout      io.Writer
	stderr      io.Writer
	progress    bool    // a status line on stderr (a terminal)
	cell, cells int     // the code cell being run, of how many (progress.go)
	budget      int64   // session memory budget in bytes; 0: the default
	work        float64 // work budget in isochromat-steps; 0: the default
}

// session returns a fresh session for a file, with the --set overrides applied.
func (r *runner) session(file string) (*dsl.Session, error) {
	dir, err := filepath.Abs(filepath.Dir(file))
	if err != nil {
		return nil, err
	}
	s := dsl.NewSession(dir)
	if err := s.AllowFiles(r.allow); err != nil {
		return nil, err
	}
	if r.budget > 0 {
		s.SetMemoryBudget(r.budget)
	}
	if r.work > 0 {
		s.SetWorkBudget(r.work)
	}
	if strings.EqualFold(filepath.Ext(file), ".ipynb") {
		s.KeepOutputs() // held until the notebook is written
	}
	for _, kv := range r.sets {
		name, value, ok := strings.Cut(kv, "=")
		if !ok || strings.TrimSpace(name) == "" {
			return nil, fmt.Errorf("--set %q: want NAME=VALUE", kv)
		}
		if err := s.Override(strings.TrimSpace(name), value); err != nil {
			return nil, fmt.Errorf("--set %s: %v", name, err)
		}
	}
	return s, nil
}

func (r *runner) sink(display func(display.Bundle)) dsl.Sink {
	sink := dsl.Sink{Display: display}
	if r.progress {
		sink.Progress = func(task string, done, total int) {
			if done >= total {
				task = ""
			}
			r.status(progressLine(r.cell, r.cells, task, done, total))
		}
	}
	return sink
}

// checkOverrides reports --set names that no `let` used.
func checkOverrides(s *dsl.Session) error {
	if unused := s.UnusedOverrides(); len(unused) > 0 {
		return fmt.Errorf("--set %s: no `let` of that name ran", strings.Join(unused, ", "))
	}
	return nil
}

// script runs a script file, printing each output's text/plain (or JSON bundle).
func (r *runner) script(ctx context.Context, file string) error {
	src, _, err := readFileState(file)
	if err != nil {
		return err
	}
	s, err := r.session(file)
	if err != nil {
		return err
	}
	r.cell, r.cells = 0, 0 // a script's status line names no cell
	defer r.clearStatus()
	var werr error
	err = s.Exec(ctx, string(src), r.sink(func(b display.Bundle) {
		if werr != nil {
			return
		}
		if r.json {
			var buf bytes.Buffer
			enc := json.NewEncoder(&buf)
			enc.SetEscapeHTML(false)
			werr = enc.Encode(b)
			if werr == nil {
				_, werr = r.stdout.Write(buf.Bytes())
			}
			return
		}
		text, _ := b["text/plain"].(string)
		_, werr = fmt.Fprintln(r.stdout, strings.TrimRight(text, "\n"))
	}))
	if err != nil {
		return errorText(err)
	}
	if werr != nil {
		return werr
	}
	return checkOverrides(s)
}

// errorText turns a language error into one error whose message is its traceback.
func errorText(err error) error {
	var tb interface{ Traceback() []string }
	if errors.As(err, &tb) {
		return errors.New(strings.Join(tb.Traceback(), "\n"))
	}
	return err
}

func isTerminal(f *os.File) bool {
	st, err := f.Stat()
	return err == nil && st.Mode()&os.ModeCharDevice != 0
}
