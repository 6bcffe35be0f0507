package main

import (
	"os"
	"testing"

	"Nutate/kernel/nbformat"
)

// tourTextBudget bounds the text/plain of the tour notebook's outputs, the
// answers a new user reads: definitions are given once per session and the
// energy caution as one line pointing to `help safety` (18,526 bytes when
// every describe and sweep repeated them; 16,651 after).
const tourTextBudget = 17_000

func TestTourTextBudget(t *testing.T) {
	raw, err := os.ReadFile("notebooks/tour.ipynb")
	if err != nil {
		t.Fatal(err)
	}
	nb, err := nbformat.Parse(raw)
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
	if total == 0 || total > tourTextBudget {
		t.Errorf("the tour's text/plain outputs weigh %d bytes, want 1 to %d", total, tourTextBudget)
	}
}
