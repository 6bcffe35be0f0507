package dsl

import (
	"fmt"
	"sort"
	"strings"
	"unicode/utf8"
)

// Error is one fault in a cell: where it is and what was expected.
type Error struct {
	Pos  Pos
	Msg  string
	Line string // the source line holding Pos
}

func (e *Error) Error() string { return fmt.Sprintf("line %d:%d: %s", e.Pos.Line, e.Pos.Col, e.Msg) }

// lines formats e as the message, the source line and a caret under the column.
func (e *Error) lines() []string {
	out := []string{e.Error()}
	if e.Line != "" {
		out = append(out, "  "+e.Line)
		// Keep tabs so the caret lines up under tabbed source.
		var pad strings.Builder
		col := 1
		for _, r := range e.Line {
			if col >= e.Pos.Col {
				break
			}
			if r == '\t' {
				pad.WriteRune('\t')
			} else {
				pad.WriteByte(' ')
			}
			col++
		}
		out = append(out, "  "+pad.String()+"^")
	}
	return out
}

// errorList collects errors while parsing.
type errorList struct {
	src  string
	errs []*Error
}

func (l *errorList) add(p Pos, format string, args ...any) {
	l.errs = append(l.errs, &Error{Pos: p, Msg: fmt.Sprintf(format, args...), Line: lineOf(l.src, p.Offset)})
}

// CellError is the error Exec returns: one or more positioned faults (several parse
// errors, one per line, sorted; or the single runtime error that stopped the cell).
// Stmt is the byte offset where the failing statement starts: for a runtime error
// the statement that failed, for syntax errors the first faulty statement (the
// statements before it have run). It is -1 when nothing ran.
type CellError struct {
	Errs []*Error
	Stmt int
	err  error // wrapped cause (context cancellation)
}

func (e *CellError) Error() string {
	var parts []string
	for _, x := range e.Errs {
		parts = append(parts, x.Error())
	}
	return strings.Join(parts, "\n")
}

// Traceback returns the formatted lines: message, source line and caret for each
// fault.
func (e *CellError) Traceback() []string {
	var out []string
	for _, x := range e.Errs {
		out = append(out, x.lines()...)
	}
	return out
}

// Unwrap gives the cause, so errors.Is(err, context.Canceled) holds after an
// interrupt.
func (e *CellError) Unwrap() error { return e.err }

// ErrorName is the name a cell's error carries in Jupyter (ename) and in
// notebooks written headless: one name for both.
func (e *CellError) ErrorName() string { return ErrorName }

// ErrorName names a failed cell's error.
const ErrorName = "NutateError"

// sortErrors orders errors by position and keeps the first on each line.
func sortErrors(errs []*Error) []*Error {
	sort.SliceStable(errs, func(i, j int) bool { return errs[i].Pos.Offset < errs[j].Pos.Offset })
	var out []*Error
	last := -1
	for _, e := range errs {
		if e.Pos.Line == last {
			continue
		}
		last = e.Pos.Line
		out = append(out, e)
	}
	return out
}

// posError is an error raised while evaluating, tied to a position.
type posError struct {
	pos Pos
	msg string
}

func (e *posError) Error() string { return e.msg }

func errAt(p Pos, format string, args ...any) error {
	return &posError{pos: p, msg: fmt.Sprintf(format, args...)}
}

// suggest returns " (did you mean X?)" for the closest candidate to word within a
// small edit distance, or "".
func suggest(word string, candidates []string) string {
	best, bestD := "", 1<<30
	first := func(s string) rune { r, _ := utf8.DecodeRuneInString(s); return r }
	for _, c := range candidates {
		d := editDistance(strings.ToLower(word), strings.ToLower(c))
		// Ties go to a candidate that starts as the word does (dg → deg, not
		// G), then to the first in order.
		better := d < bestD
		if d == bestD {
			cf, bf := first(c) == first(word), first(best) == first(word)
			better = cf && !bf || cf == bf && c < best
		}
		if better {
			best, bestD = c, d
		}
	}
	limit := (utf8.RuneCountInString(word) + 1) / 3
	if best == "" || bestD > limit || bestD == 0 && best == word {
		return ""
	}
	return "; did you mean " + best + "?"
}

// editDistance is the Levenshtein distance between a and b in runes.
func editDistance(a, b string) int {
	ra, rb := []rune(a), []rune(b)
	prev := make([]int, len(rb)+1)
	cur := make([]int, len(rb)+1)
	for j := range prev {
		prev[j] = j
	}
	for i := 1; i <= len(ra); i++ {
		cur[0] = i
		for j := 1; j <= len(rb); j++ {
			c := prev[j-1]
			if ra[i-1] != rb[j-1] {
				c++
			}
			cur[j] = min(c, prev[j]+1, cur[j-1]+1)
		}
		prev, cur = cur, prev
	}
	return prev[len(rb)]
}
