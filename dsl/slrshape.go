package dsl

import (
	"errors"

	"nutate/physics/shape"
)

// buildSLR adapts the slr shape row to package slr.
func buildSLR(b *builder) (*shape.Pulse, error) {
	return nil, errors.New("slr: the Shinnar–Le Roux designer is not available in this build")
}
