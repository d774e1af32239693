// Package noise generates clock noise: power-law fractional-frequency noise
// with one-sided spectral density S_y(f) = h_α f^α (IEEE Std 1139), clock
// models (h_α set, offsets, drift, periodic terms) and presets per clock
// family with their sources.
//
// Units: phase x in seconds, fractional frequency y dimensionless, h_α in
// Hz^(-α-1) (so that S_y is in 1/Hz), sample interval τ0 in seconds.
// Every generator takes an explicit *rand.Rand (math/rand/v2).
package noise
