package dsl

import (
	"context"
	"errors"
	"os"
	"path/filepath"
	"strings"
	"testing"
	"time"

	"Nutate/dsl/present"
)

// FuzzExec runs arbitrary cells through scanner, parser and evaluator: no panic
// (the recover at Exec's edge would report "internal error"), every error position
// inside the input, and a failing statement leaves the state as the statements
// before it left it. Seeds: every input of the testdata scripts.
func FuzzExec(f *testing.F) {
	files, _ := filepath.Glob("testdata/*.txt")
	for _, file := range files {
		data, err := os.ReadFile(file)
		if err != nil {
			f.Fatal(err)
		}
		for _, sec := range parseScript(string(data)) {
			if sec.kind == "input" {
				f.Add(sec.body)
			}
		}
	}
	f.Add("pulse p = train(rect(duration = 1 ms, flip = 90 deg), rect(duration = 1 ms, flip = 180 deg) at 90 deg, gap = 1 ms)")
	f.Add("let x = ((1 ms)")
	f.Add("print 1e400, -.5e-3 s, 3 µs in ns, 1 kHz * 2 / 4 ms")
	f.Fuzz(func(t *testing.T, src string) {
		if len(src) > 2000 {
			return
		}
		// Keep each case fast: a deadline, and a stop at the first progress report.
		ctx, cancel := context.WithTimeout(context.Background(), 2*time.Second)
		defer cancel()
		dir := t.TempDir()
		s := NewSession(dir)
		sink := Sink{Progress: func(string, int, int) { cancel() }}
		err := s.Exec(ctx, src, sink)
		if err == nil {
			return
		}
		var ce *CellError
		if !errors.As(err, &ce) {
			t.Fatalf("error %T %v is not a CellError", err, err)
		}
		for _, e := range ce.Errs {
			if strings.Contains(e.Msg, "internal error") {
				t.Fatalf("panic on %q: %s", src, e.Msg)
			}
			if e.Pos.Offset < 0 || e.Pos.Offset > len(src) || e.Pos.Line < 1 || e.Pos.Col < 1 {
				t.Fatalf("error position %+v outside the input %q", e.Pos, src)
			}
			if e.Line != lineOf(src, e.Pos.Offset) {
				t.Fatalf("error line %q, want %q", e.Line, lineOf(src, e.Pos.Offset))
			}
		}
		if errors.Is(err, context.Canceled) || errors.Is(err, context.DeadlineExceeded) {
			return
		}
		// The state is what the statements before the failing one made.
		ref := NewSession(t.TempDir())
		if ce.Stmt > 0 {
			rctx, rcancel := context.WithTimeout(context.Background(), 2*time.Second)
			defer rcancel()
			if err := ref.Exec(rctx, src[:ce.Stmt], Sink{Progress: func(string, int, int) { rcancel() }}); err != nil {
				return // the prefix alone may differ (e.g. a file the full cell wrote)
			}
		}
		if got, want := stateText(s), stateText(ref); got != want {
			t.Fatalf("state after the failing cell %q:\n%s\nwant:\n%s", src, got, want)
		}
	})
}

// stateText is the state without pointer identities.
func stateText(s *Session) string {
	var b strings.Builder
	b.WriteString(s.st.nucleus.Name)
	b.WriteString(present.Number(s.st.field))
	for _, n := range s.st.nameList() {
		bd := s.st.names[n]
		if bd.pulse != nil {
			b.WriteString("\n" + n + ": " + pulseSummary(bd.pulse))
		} else {
			b.WriteString("\n" + n + " = " + bd.val.String())
		}
	}
	return b.String()
}
