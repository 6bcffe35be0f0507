package nbformat

import (
	"strings"
	"testing"
)

// nbformat 4 with any minor version (and 4 written 4.0) reads; bytes that are
// not UTF-8 are named by offset instead of becoming U+FFFD; data after the
// notebook's object is refused instead of dropped.
func TestParse(t *testing.T) {
	ok := []string{
		`{"cells": [], "nbformat": 4}`,
		`{"cells": [], "nbformat": 4.0, "nbformat_minor": 0}`,
		`{"cells": [], "nbformat": 4, "nbformat_minor": 1}`,
		`{"cells": [], "nbformat": 4, "nbformat_minor": 2}`,
		`{"cells": [], "nbformat": 4, "nbformat_minor": 3}`,
		`{"cells": [], "nbformat": 4, "nbformat_minor": 4}`,
		`{"cells": [], "nbformat": 4, "nbformat_minor": 5}` + "\n\n",
		`{"cells": [{"cell_type": "markdown", "source": "µs, γ"}], "nbformat": 4}`,
	}
	for _, src := range ok {
		if _, err := Parse([]byte(src)); err != nil {
			t.Errorf("%s: %v", src, err)
		}
	}
	bad := map[string]string{
		"{\"cells\": [{\"source\": \"a\xffb\"}],\n \"nbformat\": 4}": "byte 24 (line 1) is not UTF-8 (0xff)",
		"{\"cells\": [],\n \"nbformat\": 4, \"x\": \"\xc3\"}":        "byte 36 (line 2) is not UTF-8 (0xc3)",
		`{"cells": [], "nbformat": 4}` + "\n{\"cells\": []}":         "data after the notebook's object at byte 29 (line 2)",
		`{"cells": [], "nbformat": 4} x`:                             "data after the notebook's object at byte 29",
		`{"cells": [], "nbformat": 3}`:                               "nbformat 3: want 4",
		`{"cells": [], "nbformat": 4.5}`:                             "nbformat 4.5: want 4",
		`{"cells": [], "nbformat": 4, "nbformat_minor": "x"}`:        "nbformat_minor x: want a whole number",
		`{"nbformat": 4}`: "no cells list",
	}
	for src, want := range bad {
		_, err := Parse([]byte(src))
		if err == nil || !strings.Contains(err.Error(), want) {
			t.Errorf("%q: got %v, want %q", src, err, want)
		}
	}
}
