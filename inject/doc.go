// Package inject models transient dark-matter domain walls and their effect
// on clocks: wall profiles, amplitude from the dark-matter density, speed,
// encounter interval and thickness, couplings and clock sensitivity
// coefficients, the standard-halo-model population, the crossing solver and
// exact per-interval rendering of the clock signal.
//
// Units: SI inside (metres, seconds, m/s); energies in GeV where the
// physics literature quotes them (Λ in GeV, ρ_DM in GeV/cm³ at the edges).
// Times are float64 seconds relative to a run's start epoch. Trajectories are
// plain functions of time in the celestial frame, so this package does not
// import orbits.
package inject
