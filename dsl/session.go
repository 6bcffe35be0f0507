// Package dsl is the Nutate pulse language: scanner, parser, units and evaluator.
// A Session keeps names, nucleus and field from cell to cell.
//
// Units: values are kept in base units (seconds, tesla, metres, radians, hertz for
// frequencies, ppm as its own dimension) with their dimension (units.go); numbers
// handed to package physics are plain SI.
//
// Entry points: NewSession, Session.Exec (run a cell), Session.Complete and
// Session.Inspect (editor help), IsComplete (is a cell ready to run), Help (the help
// texts, also used by `nutate help`). The language itself is described in
// LANGUAGE.md and by `help`.
//
// Layout: scanner.go (tokens, positions), parser.go and ast.go (syntax, one parse
// function per statement with its grammar above it), units.go and value.go
// (quantities and dimension checks), errors.go (positions, carets, suggestions),
// eval.go (statements), shapes.go, slrshape.go and train.go (the shape table: one
// explicit row per shape), quantities.go and settings.go (the `show` and `with`
// tables), sweep.go, features.go and sweepfile.go (sweeps: check, plan, run,
// measure; CSV), notes.go (definitions once per session), describe.go,
// report.go, files.go (waveform CSV), render.go (a figure's outputs to the
// session), help.go and complete.go (help texts, completion, inspection). The
// package dsl/present turns plain result values into tables and figure
// bundles, with the number formatting and the wording of notes and cautions.
//
// Limits: a cell of at most 1 MiB, expressions nested at most 100 deep, sweeps
// and describe and report within the work budget (budget.go; by default the
// engine's step budget, physics.DefaultMaxSteps), at most 100 000
// points per axis and 10⁶ per map; a pulse of at most 10⁶ samples with a dwell of
// at least 10 ns (describe's JSON keeps at most 4096 of them), a peak below 1 T
// and a flip of at most 100 turns (typo guards; a peak beyond plausible RF
// hardware, see amplitudeWarning, gets a warning); T1 and T2 of at least 1 ns;
// a duration from 10 ns to 100 s. What a session holds (pulses' samples, arrays
// shared between copies counted once, the last sweep's table, and the outputs
// when the host keeps them) and what a sweep needs while it runs stay within its
// memory budget (budget.go; 2 GiB unless SetMemoryBudget says otherwise).
package dsl

import (
	"context"
	"errors"
	"fmt"
	"io"
	"os"
	"runtime/debug"
	"sort"
	"strings"
	"sync"

	"Nutate/display"
	"Nutate/physics"
)

// Sink receives a cell's outputs in order. Progress, when non-nil, is told of long
// work (a sweep; describe or report of a long pulse): a task label, the units done
// and the total.
type Sink struct {
	Display  func(display.Bundle)
	Progress func(task string, done, total int)
}

// Session is one interpreter state. It is not safe for concurrent Exec calls; a
// cancellation may come from another goroutine through the context.
type Session struct {
	dir       string
	allow     []string   // further folders for files (AllowFiles)
	mu        sync.Mutex // guards st (the pointer; a committed state is never changed)
	st        *state
	overrides map[string]override
	used      map[string]bool
	budget    int64     // memory budget in bytes (budget.go); 0: none
	work      float64   // work budget in isochromat-steps (budget.go)
	keep      bool      // the host keeps every output (KeepOutputs)
	outputs   int64     // bytes of the outputs kept so far
	held      memoryUse // what the committed state holds, as last counted
}

type override struct {
	text string
	expr Expr
}

// NewSession returns a session whose relative file paths resolve against dir.
func NewSession(dir string) *Session {
	return &Session{dir: dir, st: newState(), overrides: map[string]override{}, used: map[string]bool{}, budget: DefaultMemoryBudget, work: physics.DefaultMaxSteps}
}

// Exec runs the statements of src in order, sending each output to sink. The whole
// cell is parsed first; with syntax errors, the statements before the first faulty
// one run, then the syntax errors (one per line, sorted) are returned. At run time an
// error stops the cell; earlier statements' outputs and state stay, and the failing
// statement changes nothing. The error has Traceback()
// []string; after a cancellation errors.Is(err, context.Canceled) holds.
func (s *Session) Exec(ctx context.Context, src string, sink Sink) (err error) {
	if len(src) > maxCell {
		return &CellError{Errs: []*Error{{Pos: Pos{0, 1, 1}, Msg: fmt.Sprintf("cell has %d bytes, over the limit of %d", len(src), maxCell), Line: lineOf(src, 0)}}, Stmt: -1}
	}
	stmts, perrs, cut := parseCell(src)
	for _, st := range stmts {
		if len(perrs) > 0 && st.Position().Offset >= cut {
			break
		}
		if e := ctx.Err(); e != nil {
			return cancelled(src, st.Position(), e)
		}
		if err := s.run(ctx, src, st, sink); err != nil {
			return err
		}
	}
	if len(perrs) > 0 {
		return &CellError{Errs: perrs, Stmt: cut}
	}
	return nil
}

// internalLog receives the stack of an internal error (a recovered panic), which
// the cell's error gives in one line only: the process's stderr, the kernel's log.
var internalLog io.Writer = os.Stderr

// maxCell bounds the size of one cell.
const maxCell = 1 << 20

func cancelled(src string, p Pos, cause error) *CellError {
	return &CellError{
		Errs: []*Error{{Pos: p, Msg: "interrupted", Line: lineOf(src, p.Offset)}},
		Stmt: p.Offset,
		err:  cause,
	}
}

// run executes one statement on a copy of the state, with the one recover at the
// edge of execution.
func (s *Session) run(ctx context.Context, src string, st Stmt, sink Sink) (err error) {
	ev := &evaluator{ctx: ctx, sess: s, st: s.state().clone(), sink: sink}
	usedBefore := make(map[string]bool, len(s.used))
	for k, v := range s.used {
		usedBefore[k] = v
	}
	defer func() {
		if r := recover(); r != nil {
			// One line for the user; the stack goes to the log (the kernel's
			// stderr), not into the notebook.
			p := st.Position()
			fmt.Fprintf(internalLog, "nutate: internal error in the statement at line %d:%d: %v\n%s", p.Line, p.Col, r, debug.Stack())
			msg := strings.Join(strings.Fields(fmt.Sprint(r)), " ")
			err = &CellError{Errs: []*Error{{Pos: p, Msg: "internal error: " + msg + " (please report this with the cell)", Line: lineOf(src, p.Offset)}}, Stmt: p.Offset}
		}
		if err != nil {
			s.used = usedBefore
		}
	}()
	if e := ev.exec(st); e != nil {
		// Once interrupted, any failure of the statement is the interrupt's doing
		// (a routine may report it in its own words).
		if ctxErr := ctx.Err(); ctxErr != nil {
			return cancelled(src, st.Position(), ctxErr)
		}
		return toCellError(src, st, e)
	}
	if e := s.checkMemory(st, ev.st, ev.out); e != nil {
		return toCellError(src, st, e)
	}
	s.mu.Lock()
	s.st = ev.st
	s.mu.Unlock()
	if sink.Display != nil {
		for _, b := range ev.out {
			sink.Display(b)
		}
	}
	return nil
}

// state returns the committed state, safe to read while a cell runs.
func (s *Session) state() *state {
	s.mu.Lock()
	defer s.mu.Unlock()
	return s.st
}

func toCellError(src string, st Stmt, e error) *CellError {
	p := st.Position()
	var pe *posError
	if errors.As(e, &pe) {
		p = pe.pos
		e = errors.New(pe.msg)
	}
	if p.Offset > len(src) {
		p = st.Position()
	}
	return &CellError{Errs: []*Error{{Pos: p, Msg: e.Error(), Line: lineOf(src, p.Offset)}}, Stmt: st.Position().Offset}
}

// Override makes a later `let NAME = ...` take value (source text) instead. The
// value is parsed now, so a malformed one is refused at once.
func (s *Session) Override(name, value string) error {
	toks := tokenize(name, &errorList{src: name})
	if len(toks) != 2 || toks[0].Kind != tIdent || isReserved(name) || name == piName {
		return fmt.Errorf("override: %q is not a name", name)
	}
	if _, ok := lookupUnit(name); ok {
		return fmt.Errorf("override: %q is a unit, not a name", name)
	}
	stmts, errs := parse("let " + name + " = " + value)
	if len(errs) > 0 {
		return fmt.Errorf("override %s=%s: %s", name, value, errs[0].Msg)
	}
	if len(stmts) != 1 {
		return fmt.Errorf("override %s=%s: want one value", name, value)
	}
	s.overrides[name] = override{text: value, expr: stmts[0].(*LetStmt).X}
	return nil
}

// UnusedOverrides lists, sorted, the overrides that no `let` has taken so far.
func (s *Session) UnusedOverrides() []string {
	var out []string
	for n := range s.overrides {
		if !s.used[n] {
			out = append(out, n)
		}
	}
	sort.Strings(out)
	return out
}

// IsComplete reports "complete", "incomplete" (with the indent for the next line)
// while a `(` is open or the last line ends with `,`, `=` or an operator, or
// "invalid" for an unbalanced `)` or an unterminated string.
func IsComplete(code string) (status, indent string) {
	errs := &errorList{src: code}
	s := newScanner(code, errs)
	last := tNewline
	for {
		t := s.next()
		if t.Kind == tEOF {
			break
		}
		if t.Kind == tIllegal && strings.HasPrefix(t.Text, "\"") {
			return "invalid", ""
		}
		last = t.Kind
	}
	if s.unbalanced {
		return "invalid", ""
	}
	if s.depth > 0 || continues(last) {
		return "incomplete", "    "
	}
	return "complete", ""
}
