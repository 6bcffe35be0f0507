package main

import (
	"context"
	"fmt"

	"Nutate/display"
	"Nutate/dsl"
	"Nutate/kernel"
)

// languageExecutor adapts a dsl.Session to kernel.Executor.
type languageExecutor struct {
	s *dsl.Session
	// displays counts progress displays over the session: display ids must be
	// unique across cells, since an update reaches every display with its id.
	displays int
}

func newExecutor(dir string) *languageExecutor { return &languageExecutor{s: dsl.NewSession(dir)} }

// Execute runs a cell. Long work shows a progress line, updated in place; when the
// work ends (finished, failed or interrupted) the line is cleared, so a saved
// notebook holds results only.
func (e *languageExecutor) Execute(ctx context.Context, code string, emit func(kernel.Output)) error {
	id, shown := "", false
	clear := func() {
		if shown {
			emit(kernel.Output{Data: map[string]any{"text/plain": ""}, DisplayID: id, Update: true})
			shown = false
		}
	}
	defer clear()
	return e.s.Exec(ctx, code, dsl.Sink{
		Display: func(b display.Bundle) {
			clear()
			emit(kernel.Output{Data: b})
		},
		Progress: func(task string, done, total int) {
			if done >= total {
				clear()
				return
			}
			if !shown {
				e.displays++
				id = fmt.Sprintf("nutate-progress-%d", e.displays)
			}
			pct := 100 * float64(done) / float64(max(total, 1))
			text := fmt.Sprintf("%s: %.0f%% (%d of %d)", task, pct, done, total)
			emit(kernel.Output{Data: map[string]any{"text/plain": text}, DisplayID: id, Update: shown})
			shown = true
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

func (e *languageExecutor) Language() kernel.LanguageInfo { return languageInfo() }

// readmeURL is where the README is published; the kernel's help links point at
// its sections. Set it for a build with
// -ldflags "-X main.readmeURL=https://host/path/README".
var readmeURL = "https://github.com/nutate/nutate"

// languageInfo describes the language for kernel_info and notebook metadata.
func languageInfo() kernel.LanguageInfo {
	return kernel.LanguageInfo{
		Name:          "nutate",
		Version:       version,
		Mimetype:      "text/x-nutate",
		FileExtension: ".nut",
		PygmentsLexer: "text",
		Banner:        "Nutate " + version + ": RF pulse design and exact Bloch simulation. Type `help` for the language.",
		HelpLinks: []kernel.HelpLink{
			{Text: "Nutate language", URL: readmeURL + "#language-quick-reference"},
			{Text: "Conventions", URL: readmeURL + "#conventions"},
			{Text: "RF safety", URL: readmeURL + "#rf-safety"},
		},
	}
}

var _ kernel.Executor = (*languageExecutor)(nil)
