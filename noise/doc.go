// Package noise generates clock noise: power-law fractional-frequency noise
// with one-sided spectral density S_y(f) = h_α f^α (IEEE Std 1139), clock
// models (h_α set, offsets, drift, periodic terms, optional steering) and
// presets per clock family with their sources.
//
// Units: phase x in seconds, fractional frequency y dimensionless, h_α in
// Hz^(-α-1) (so that S_y is in 1/Hz), sample interval τ0 in seconds.
// Every generator takes an explicit *rand.Rand (math/rand/v2).
//
// Entry points:
//   - ClockModel.Phase generates a phase series (Generator reuses the FFT
//     buffers across many series of one length). White PM, white FM and
//     random-walk FM are exact sums of white noise; flicker PM and FM use the
//     Kasdin–Walter filter (Kasdin 1995, Proc. IEEE 83(5)) by FFT convolution.
//   - TermAVAR, TermMVAR, ClockModel.AVAR/ADEV/MVAR give the exact expected
//     (overlapping) Allan and modified Allan variances of a series sampled at
//     τ0 (f_h = 1/(2τ0)), or the continuous-time asymptotes for τ0 = 0.
//   - Calibrate fits non-negative h_α to target Allan deviations.
//   - Preset, Families and LookupFamily give the clock-family presets; each
//     Family lists its target levels with their sources (gnss.md §5 of the
//     project's reference notes; "from memory" where so marked).
//
// Statistics of generated series are in the subpackage stability.
package noise
