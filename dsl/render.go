package dsl

import (
	"nutate/display"
)

// The functions here are the thin adapter between the language's outputs and
// package display.

func tableBundle(t display.Table) display.Bundle { return t.Bundle() }

// profileBundle is a plot of curves with its summary table and the data as JSON.
func profileBundle(p display.Profile, data any) display.Bundle {
	b := p.Summary.Bundle()
	if data != nil {
		b["application/json"] = data
	}
	return b
}

// mapBundle is a map of one quantity over two axes.
func mapBundle(m display.Map, data any) display.Bundle {
	b := m.Summary.Bundle()
	if data != nil {
		b["application/json"] = data
	}
	return b
}

// waveformBundle is a pulse's waveform plot with its properties table.
func waveformBundle(w display.Waveform, props display.Table) display.Bundle {
	return props.Bundle()
}
