// Package physics is Nutate's exact Bloch core: nuclei, piecewise-constant RF
// waveforms and their simulation in the rotating frame of the carrier.
//
// Units, stated once for the whole package and its sub-packages: time in seconds,
// magnetic field (B1, B0) in tesla, gradients in tesla per metre, positions in
// metres, frequencies in hertz (cycles per second), angles in radians, gyromagnetic
// ratios γ in rad·s⁻¹·T⁻¹ (signed). No language, display or I/O types appear here.
//
// Conventions: dM/dt = γ M × B_eff with B_eff = (B1x, B1y, Δω/γ) in the frame
// rotating at the carrier, Δω = 2π·(offset) + γ·G·x. B1 phase 0 is along +x, so for
// positive γ a 90° pulse of phase 0 takes +z to +y on resonance. Negative-γ nuclei
// rotate the other way.
//
// Entry points: Lookup (nuclei), Waveform (the RF), Simulate (magnetization and
// Cayley–Klein parameters of an isochromat set).
package physics
