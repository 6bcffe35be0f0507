package dsl

import (
	"nutate/display"
)

// The functions here are the thin adapter between the language's outputs and
// package display, which renders text/plain, text/html, image/svg+xml and
// application/json (every value of a sweep, with axes and units).

func tableBundle(t display.Table) display.Bundle { return t.Bundle() }

func profileBundle(p display.Profile) display.Bundle { return p.Bundle() }

func mapBundle(m display.Map) display.Bundle { return m.Bundle() }

func waveformBundle(w display.Waveform, props display.Table) display.Bundle { return w.Bundle(props) }
