// Package stability estimates frequency stability from phase or
// fractional-frequency data: Allan, overlapping Allan, modified Allan, time,
// Hadamard, overlapping Hadamard and total deviations, with equivalent
// degrees of freedom and χ² confidence intervals (NIST SP 1065).
//
// Units: phase in seconds, frequency dimensionless, τ in seconds.
// Gaps are NaN.
package stability
