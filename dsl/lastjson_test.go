package dsl

import (
	"context"
	"encoding/json"
	"testing"

	"Nutate/display"
)

// lastOutput runs src in a fresh session and returns its last display bundle
// (a figure rather than the table after it) and that bundle's data
// (display.ResultMIME) re-encoded as JSON text (nil when it has
// none), failing the test on an error.
func lastOutput(t *testing.T, src string) (display.Bundle, []byte) {
	t.Helper()
	var last display.Bundle
	if err := NewSession(t.TempDir()).Exec(context.Background(), src, Sink{Display: keepLast(&last)}); err != nil {
		t.Fatalf("%s: %v", src, err)
	}
	v, ok := last[display.ResultMIME]
	if !ok {
		return last, nil
	}
	raw, err := json.Marshal(v)
	if err != nil {
		t.Fatalf("%s: %s does not encode: %v", src, display.ResultMIME, err)
	}
	return last, raw
}

// keepLast keeps the last output in *last, except the table that follows a
// figure as an output of its own: the "last output" of a sweep or describe is
// its figure.
func keepLast(last *display.Bundle) func(display.Bundle) {
	afterFigure := false
	return func(b display.Bundle) {
		_, fig := b["image/svg+xml"]
		if afterFigure && !fig {
			afterFigure = false
			return
		}
		afterFigure = fig
		*last = b
	}
}

// lastFigure is the last bundle of bs that holds a figure (nil if none).
func lastFigure(bs []display.Bundle) display.Bundle {
	for i := len(bs) - 1; i >= 0; i-- {
		if _, ok := bs[i]["image/svg+xml"]; ok {
			return bs[i]
		}
	}
	return nil
}

// lastJSON is lastOutput with the JSON decoded into its top-level fields.
func lastJSON(t *testing.T, src string) (map[string]json.RawMessage, display.Bundle) {
	t.Helper()
	b, raw := lastOutput(t, src)
	var out map[string]json.RawMessage
	if err := json.Unmarshal(raw, &out); err != nil {
		t.Fatalf("%s is not valid JSON: %v\n%s", display.ResultMIME, err, raw)
	}
	return out, b
}
