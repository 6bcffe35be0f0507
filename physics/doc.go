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
// rotate the other way. Cayley–Klein parameters follow Pauly et al., IEEE TMI
// 10:53 (1991): from equilibrium Mxy = 2α*β and Mz = 1 − 2|β|²; the crushed spin
// echo is Mxy⁺ = −β²·Mxy* (Echo, EchoOf); Rotate applies (α, β) to any start.
//
// Simulate is exact for piecewise-constant waveforms: without relaxation each
// sample is a rotation composed in Cayley–Klein form (power series of cos and
// sin/x exact to double precision for per-sample half-angles up to 1 rad, angle
// halving and doubling up to 8 rad, the library's sine beyond); with relaxation each sample is the exact solution of the
// linear Bloch equations including recovery toward M0 = ẑ, through the
// Cayley–Hamilton form of the matrix function φ1 (see relax.go). Neither uses
// operator splitting or a small-angle approximation. On amd64 CPUs with AVX2 and
// FMA both run 4 isochromats per instruction (rotation 8 with AVX-512), chosen at
// run time, with the portable scalar kernels' results bit for bit. The work is spread over
// Options.Workers goroutines in fixed blocks of spins, so results are identical bit
// for bit whatever the number of workers; the inner loops allocate nothing; the
// context is polled every stepChunk samples of a block (well under a millisecond)
// and cancellation returns ctx.Err(); Options.Progress reports finished spins; the
// size is checked against Options.MaxSteps and MaxIsochromats before anything is
// allocated.
//
// Entry points: Lookup and Nuclei (gyromagnetic ratios), Waveform (the RF),
// Isochromats and Grid (the spins), Simulate (magnetization and Cayley–Klein
// parameters), StartState (named start magnetizations), Rotate, Echo and EchoOf
// (quantities derived from α and β), the Result methods Mxy, Phase,
// Transverse and Echo, FieldFromProton and ShiftOffset (a magnet named by its
// 1H frequency, absolute chemical shifts from a carrier's shift), and
// SimulateAveraged and AverageOver (averages over uniform spreads of offset,
// B1 or T2 by Gauss–Legendre quadrature, see average.go).
package physics
