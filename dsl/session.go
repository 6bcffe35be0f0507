// Package dsl is the Nutate pulse language: scanner, parser, units and evaluator.
// A Session keeps names, nucleus and field from cell to cell.
package dsl

import (
	"context"
	"errors"

	"nutate/display"
)

// Sink receives a cell's outputs in order. Progress, when non-nil, is told of long
// work (a sweep): a task label, the units done and the total.
type Sink struct {
	Display  func(display.Bundle)
	Progress func(task string, done, total int)
}

// Session is one interpreter state.
type Session struct {
	dir string
}

// NewSession returns a session whose relative file paths resolve against dir.
func NewSession(dir string) *Session { return &Session{dir: dir} }

// Exec runs the statements of src in order, sending each output to sink. On
// failure it returns an error with Traceback() []string; earlier outputs stay.
func (s *Session) Exec(ctx context.Context, src string, sink Sink) error {
	return errors.New("dsl: not built yet")
}

// Override makes a later `let NAME = ...` take value (source text) instead.
func (s *Session) Override(name, value string) error { return errors.New("dsl: not built yet") }

// Complete returns candidates at cursor (rune offset) and the rune range they replace.
func (s *Session) Complete(code string, cursor int) ([]string, int, int) { return nil, cursor, cursor }

// Inspect returns the help text for the word at cursor.
func (s *Session) Inspect(code string, cursor int) (string, bool) { return "", false }

// IsComplete reports "complete", "incomplete" (with indent) or "invalid".
func IsComplete(code string) (status, indent string) { return "complete", "" }

// Help returns the help text for topic ("" for the overview).
func Help(topic string) (string, error) { return "", errors.New("dsl: not built yet") }
