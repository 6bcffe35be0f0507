package dsl

import (
	"encoding/json"

	"Nutate/display"
	"Nutate/dsl/present"
)

// The functions here are the thin adapter between the language's outputs and
// package display, which renders a figure as text/plain, image/svg+xml,
// image/png and its data under display.ResultMIME (the values of a sweep, with
// axes and units), followed by its table in text/plain and text/html.

func tableBundle(t display.Table) display.Bundle { return t.Bundle() }

// emitFigure shows a figure's outputs and makes it the session's last figure.
func (ev *evaluator) emitFigure(f present.Figure) {
	ev.st.figure = f.Fig
	for _, b := range f.Bundles {
		ev.emit(b)
	}
}

// withSettingsJSON adds the sweep's `with` settings, as written, to its data:
// {"settings": {"offset": "12 ppm", ...}, ...}. The title carries them too.
func withSettingsJSON(f present.Figure, set *settings) present.Figure {
	if len(set.written) == 0 || len(f.Bundles) == 0 {
		return f
	}
	b := f.Bundles[0]
	raw, ok := b[display.ResultMIME].(json.RawMessage)
	if !ok || len(raw) < 2 || raw[0] != '{' {
		return f
	}
	m := make(map[string]string, len(set.written))
	for _, w := range set.written {
		m[w[0]] = w[1]
	}
	head, _ := json.Marshal(m)
	b[display.ResultMIME] = json.RawMessage(`{"settings":` + string(head) + "," + string(raw[1:]))
	return f
}
