// Package overlay injects domain-wall crossings into real clock products:
// a RINEX clock file (3.04 or 2.00 layout) with the satellites' precise
// orbits from SP3. Each series receives its own crossing minus the
// reference clock's (the weighted ensemble of the ANALYSIS CLK REF
// clocks), exactly as in simulation, and the perturbed file differs from
// the input only in the bias values of the records a wall touches: every
// other byte, the header, the order and the number formats are kept.
//
// Satellite positions between SP3 epochs come from Lagrange interpolation
// over 10 epochs (orbits.Track; a window kept inside the file near its
// ends); station
// positions from the clock header's SOLN STA NAME / NUM records or a
// station file. Earth-fixed positions are rotated to the celestial frame
// with package orbits.
//
// Times inside the package are float64 seconds since the clock file's
// first epoch (GPS time); biases are seconds.
package overlay
