package dsl

import (
	"context"
	"encoding/json"
	"testing"

	"Nutate/display"
)

// lastOutput runs src in a fresh session and returns its last display bundle
// and that bundle's application/json re-encoded as JSON text (nil when it has
// none), failing the test on an error.
func lastOutput(t *testing.T, src string) (display.Bundle, []byte) {
	t.Helper()
	var last display.Bundle
	if err := NewSession(t.TempDir()).Exec(context.Background(), src, Sink{Display: func(b display.Bundle) { last = b }}); err != nil {
		t.Fatalf("%s: %v", src, err)
	}
	v, ok := last["application/json"]
	if !ok {
		return last, nil
	}
	raw, err := json.Marshal(v)
	if err != nil {
		t.Fatalf("%s: application/json does not encode: %v", src, err)
	}
	return last, raw
}

// lastJSON is lastOutput with the JSON decoded into its top-level fields.
func lastJSON(t *testing.T, src string) (map[string]json.RawMessage, display.Bundle) {
	t.Helper()
	b, raw := lastOutput(t, src)
	var out map[string]json.RawMessage
	if err := json.Unmarshal(raw, &out); err != nil {
		t.Fatalf("application/json is not valid JSON: %v\n%s", err, raw)
	}
	return out, b
}
