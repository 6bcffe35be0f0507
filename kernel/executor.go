package kernel

import "context"

// Output is one display produced by a cell: a MIME bundle (MIME type → content),
// optional metadata, and an optional display id. Update marks an update of an
// earlier display with the same DisplayID (update_display_data), used for progress.
type Output struct {
	Data      map[string]any
	Metadata  map[string]any
	DisplayID string
	Update    bool
	// Stream, when "stdout" or "stderr", sends Text as a stream message instead of
	// a display.
	Stream string
	Text   string
	// Clear, when set, sends clear_output (wait false) instead: the front end
	// drops the cell's outputs so far.
	Clear bool
}

// Executor runs cells. Implementations keep session state between cells.
type Executor interface {
	// Execute runs one cell, calling emit for each output in order. It returns
	// ctx.Err() promptly when ctx is cancelled (interrupt). A returned error that
	// implements Traceback() []string supplies the traceback lines.
	Execute(ctx context.Context, code string, emit func(Output)) error
	// Complete returns completion candidates for the cursor (a rune offset in code)
	// and the rune range [start, end) they replace.
	Complete(code string, cursor int) (matches []string, start, end int)
	// Inspect returns help text for the name at the cursor, if any.
	Inspect(code string, cursor int, detailLevel int) (text string, found bool)
	// IsComplete reports "complete", "incomplete" (with the indent to use) or
	// "invalid" for code typed so far.
	IsComplete(code string) (status, indent string)
	// Language describes the language for kernel_info_request.
	Language() LanguageInfo
}

// LanguageInfo is kernel_info's language_info plus the banner and help links.
type LanguageInfo struct {
	Name           string
	Version        string
	Mimetype       string
	FileExtension  string
	PygmentsLexer  string
	CodemirrorMode string
	Banner         string
	HelpLinks      []HelpLink
}

// Map returns language_info as kernel_info_reply carries it. A headless writer
// stores the same map in a notebook's metadata, so that a front end opening the
// notebook finds nothing to change (a difference marks it unsaved at once).
// Without a CodeMirror mode of its own the language is edited as its mimetype.
func (li LanguageInfo) Map() map[string]any {
	mode := li.CodemirrorMode
	if mode == "" {
		mode = li.Mimetype
	}
	return map[string]any{
		"name":            li.Name,
		"version":         li.Version,
		"mimetype":        li.Mimetype,
		"file_extension":  li.FileExtension,
		"pygments_lexer":  li.PygmentsLexer,
		"codemirror_mode": mode,
	}
}

// HelpLink is one entry of kernel_info's help_links.
type HelpLink struct {
	Text string
	URL  string
}
