package main

import (
	"context"
	"fmt"

	"nutate/display"
	"nutate/dsl"
	"nutate/kernel"
)

// languageExecutor adapts a dsl.Session to kernel.Executor.
type languageExecutor struct {
	s *dsl.Session
}

func newExecutor(dir string) *languageExecutor { return &languageExecutor{s: dsl.NewSession(dir)} }

func (e *languageExecutor) Execute(ctx context.Context, code string, emit func(kernel.Output)) error {
	n := 0
	return e.s.Exec(ctx, code, dsl.Sink{
		Display: func(b display.Bundle) { emit(kernel.Output{Data: b}) },
		Progress: func(task string, done, total int) {
			id := fmt.Sprintf("progress-%d", n)
			pct := 100 * float64(done) / float64(max(total, 1))
			text := fmt.Sprintf("%s: %.0f%% (%d of %d)", task, pct, done, total)
			emit(kernel.Output{Data: map[string]any{"text/plain": text}, DisplayID: id, Update: done > 0})
			if done >= total {
				n++
			}
		},
	})
}

func (e *languageExecutor) Complete(code string, cursor int) ([]string, int, int) {
	return e.s.Complete(code, cursor)
}

func (e *languageExecutor) Inspect(code string, cursor int, detail int) (string, bool) {
	return e.s.Inspect(code, cursor)
}

func (e *languageExecutor) IsComplete(code string) (string, string) { return dsl.IsComplete(code) }

func (e *languageExecutor) Language() kernel.LanguageInfo {
	return kernel.LanguageInfo{
		Name:          "nutate",
		Version:       version,
		Mimetype:      "text/x-nutate",
		FileExtension: ".nut",
		PygmentsLexer: "text",
		Banner:        "Nutate " + version + ": RF pulse design and exact Bloch simulation. Type `help` for the language.",
		HelpLinks: []kernel.HelpLink{
			{Text: "Nutate language", URL: "https://github.com/nutate/nutate#language-quick-reference"},
			{Text: "Conventions", URL: "https://github.com/nutate/nutate#conventions"},
		},
	}
}

var _ kernel.Executor = (*languageExecutor)(nil)
