package main

import (
	"testing"

	"Nutate/kernel/nbformat"
)

// The tour notebook's text/plain outputs are the answers a new user reads:
// definitions are given once per session and the energy caution as one line
// pointing to `help safety`, so they stay within 17,000 bytes (18,526 when
// every describe and sweep repeated them in full; 16,651 after).
func TestTourTextBudget(t *testing.T) {
	nb, _, err := readNotebook("notebooks/tour.ipynb")
	if err != nil {
		t.Fatal(err)
	}
	total := 0
	for _, c := range nb.Cells() {
		cell, _ := c.(map[string]any)
		outs, _ := cell["outputs"].([]any)
		for _, o := range outs {
			om, _ := o.(map[string]any)
			data, _ := om["data"].(map[string]any)
			if v, ok := data["text/plain"]; ok {
				total += len(nbformat.DataText(v))
			}
		}
	}
	t.Logf("tour text/plain: %d bytes", total)
	if total == 0 || total > 17_000 {
		t.Errorf("the tour's text/plain outputs weigh %d bytes, want 1 to 17000", total)
	}
}
