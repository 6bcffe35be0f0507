package dsl

import (
	"context"
	"errors"
	"testing"
)

// An SLR design of thousands of samples takes seconds: it stops when the cell
// is interrupted (the builder hands the session's context to the design). A
// context cancelled before the design starts makes it return at once with the
// cancellation; the same design with a live context succeeds.
func TestSLRDesignObeysInterrupt(t *testing.T) {
	b := &builder{vals: map[string]float64{"duration": 2e-3, "tbw": 8}, words: map[string]string{"role": "refocus"}, gamma: 2.6752218744e8}
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	b.ctx = ctx
	if _, err := buildSLR(b); !errors.Is(err, context.Canceled) {
		t.Fatalf("design with a cancelled context: err %v, want context.Canceled", err)
	}
	b.ctx = context.Background()
	if _, err := buildSLR(b); err != nil {
		t.Fatalf("design with a live context: %v", err)
	}
}
