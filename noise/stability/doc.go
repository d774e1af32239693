// Package stability estimates frequency stability from phase or
// fractional-frequency data: Allan, overlapping Allan, modified Allan, time,
// Hadamard, overlapping Hadamard and total deviations, with equivalent
// degrees of freedom and χ² confidence intervals (NIST SP 1065).
//
// Units: phase in seconds, frequency dimensionless, τ in seconds.
// Gaps are NaN.
//
// The estimators take phase; FreqToPhase integrates frequency data. Compute
// evaluates one statistic on a grid of averaging factors (OctaveTaus,
// DecadeTaus, AllTaus), ComputeMany several at once (sharing one pass over
// the data where it can). Each Result carries τ, the number of terms, the
// deviation, its confidence interval, the EDF (Greenhall & Riley 2003 for
// ADEV, OADEV, MDEV, TDEV, HDEV, OHDEV; SP 1065 Table 7 for TOTDEV) and the
// noise exponent used, identified by the lag-1 autocorrelation
// (IdentifyNoise; Riley & Greenhall 2004). Plot draws σ(τ) with gonum/plot.
//
// The values of NIST SP 1065 Tables 30 and 31 are reproduced to 1e-6.
package stability
