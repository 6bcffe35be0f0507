package dsl

import (
	"context"
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

// maxSuggestRunes bounds the words that get a suggestion: a longer word (or
// candidate) is not a typo of a name, and comparing it would cost its length
// squared.
const maxSuggestRunes = 64

// suggest returns "; did you mean X?" for the closest candidate to word within a
// small edit distance, or "".
func suggest(word string, candidates []string) string {
	s, _ := suggestWork(context.Background(), word, candidates)
	return s
}

// suggest is suggest for names a session holds, which may be many: it stops,
// suggesting nothing, once the statement is interrupted.
func (ev *evaluator) suggest(word string, candidates []string) string {
	s, _ := suggestWork(ev.ctx, word, candidates)
	return s
}

// suggestWork is suggest with the context checked before each candidate; it also
// returns the number of edit-distance cells computed (the work done), for tests.
// The work is bounded: words and candidates of more than maxSuggestRunes runes are
// skipped, a candidate whose length alone puts it beyond the allowed distance is
// skipped, and the distance is computed in a band of that width, given up as
// soon as a row exceeds it.
func suggestWork(ctx context.Context, word string, candidates []string) (string, int) {
	if len(word) > 4*maxSuggestRunes || utf8.RuneCountInString(word) > maxSuggestRunes {
		return "", 0
	}
	lw := []rune(strings.ToLower(word))
	limit := (len(lw) + 1) / 3
	best, bestD := "", limit+1
	first := func(s string) rune { r, _ := utf8.DecodeRuneInString(s); return r }
	work := 0
	for _, c := range candidates {
		if ctx.Err() != nil {
			return "", work
		}
		if len(c) > 4*maxSuggestRunes {
			continue
		}
		lc := []rune(strings.ToLower(c))
		if len(lc) > maxSuggestRunes || abs(len(lc)-len(lw)) > limit {
			continue
		}
		d, cells := boundedDistance(lw, lc, min(limit, bestD))
		work += cells
		// Ties go to a candidate that starts as the word does (dg → deg, not
		// G), then to the first in order.
		better := d < bestD
		if d == bestD && best != "" {
			cf, bf := first(c) == first(word), first(best) == first(word)
			better = cf && !bf || cf == bf && c < best
		}
		if better && d <= limit {
			best, bestD = c, d
		}
	}
	if best == "" || bestD == 0 && best == word {
		return "", work
	}
	return "; did you mean " + best + "?", work
}

func abs(x int) int {
	if x < 0 {
		return -x
	}
	return x
}

// boundedDistance is the Levenshtein distance between a and b when it is at most
// k, else some value above k; cells counts the table cells computed. Only the
// band |i−j| ≤ k can hold a distance ≤ k, and once a whole row exceeds k so
// does the result (Ukkonen 1985).
func boundedDistance(a, b []rune, k int) (d, cells int) {
	if abs(len(a)-len(b)) > k {
		return k + 1, 0
	}
	inf := k + 1
	prev := make([]int, len(b)+1)
	cur := make([]int, len(b)+1)
	for j := range prev {
		prev[j] = min(j, inf)
	}
	for i := 1; i <= len(a); i++ {
		lo, hi := max(1, i-k), min(len(b), i+k)
		cur[0] = min(i, inf)
		if lo > 1 {
			cur[lo-1] = inf
		}
		rowMin := cur[0]
		if lo > 1 {
			rowMin = inf
		}
		for j := lo; j <= hi; j++ {
			c := prev[j-1]
			if a[i-1] != b[j-1] {
				c++
			}
			up := inf
			if j <= i-1+k {
				up = prev[j] + 1
			}
			cur[j] = min(c, up, cur[j-1]+1, inf)
			rowMin = min(rowMin, cur[j])
			cells++
		}
		if hi < len(b) {
			cur[hi+1] = inf
		}
		if rowMin > k {
			return inf, cells
		}
		prev, cur = cur, prev
	}
	return prev[len(b)], cells
}
