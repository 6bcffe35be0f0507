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

// Execute runs a cell. Long work shows a progress line, updated in place. A
// front end stores every display it was sent, so when the work ends (the next
// result arrives, or the cell finishes, fails or is interrupted) the line is
// taken away with clear_output, and the cell's earlier results, if any, are
// sent again: a saved notebook holds results only, with no empty leftover.
// (Replacing the line by the result with update_display_data would leave
// clients that ignore updates, such as jupyter-console, without the result.)
func (e *languageExecutor) Execute(ctx context.Context, code string, emit func(kernel.Output)) error {
	id, shown := "", false
	var results []kernel.Output // this cell's results so far, to send again after a clear
	clear := func() {
		if !shown {
			return
		}
		shown = false
		emit(kernel.Output{Clear: true})
		for _, o := range results {
			emit(o)
		}
	}
	defer clear()
	return e.s.Exec(ctx, code, dsl.Sink{
		Display: func(b display.Bundle) {
			clear()
			o := kernel.Output{Data: b}
			results = append(results, o)
			emit(o)
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

// readmeURL is where the README is published, set at build time with
// -ldflags "-X main.readmeURL=https://host/path/README"; empty (the default),
// the kernel offers no help links: the language reference is `help` in a cell.
var readmeURL = ""

// helpSections are the README sections the help links open (text, heading slug).
var helpSections = []struct{ Text, Anchor string }{
	{"Nutate language", "language-quick-reference"},
	{"Conventions", "conventions"},
	{"RF safety", "rf-safety"},
}

// sectionURL is the link to one README section. Classic Notebook passes help
// links through requirejs.toUrl, which appends "?v=<hash>" (or "&v=<hash>")
// after the #fragment, where it would spoil the section anchor. The fragment
// directive delimiter ":~:" after the anchor shields it: browsers take the
// fragment only up to ":~:" (the URL Fragment Text Directives specification)
// and ignore a directive they do not know, such as "?v=<hash>".
func sectionURL(base, anchor string) string { return base + "#" + anchor + ":~:" }

// helpLinks are kernel_info's help links: none unless a published README
// address was set at build time.
func helpLinks(base string) []kernel.HelpLink {
	if base == "" {
		return nil
	}
	var links []kernel.HelpLink
	for _, s := range helpSections {
		links = append(links, kernel.HelpLink{Text: s.Text, URL: sectionURL(base, s.Anchor)})
	}
	return links
}

// languageInfo describes the language for kernel_info and notebook metadata.
func languageInfo() kernel.LanguageInfo {
	return kernel.LanguageInfo{
		Name:           "nutate",
		Version:        version,
		Mimetype:       "text/x-nutate",
		FileExtension:  ".nut",
		PygmentsLexer:  "text",
		CodemirrorMode: codemirrorMode,
		Banner:         "Nutate " + version + ": RF pulse design and exact Bloch simulation. Type `help` for the language.",
		HelpLinks:      helpLinks(readmeURL),
	}
}

var _ kernel.Executor = (*languageExecutor)(nil)
