// Package sim assembles synthetic clock products from a configuration:
// geometry sampling, per-clock noise, injected walls, clock solutions
// relative to a reference clock, nuisances, and the writers of the dataset
// directory (manifest.json, clocks.clk, clocks.csv, clocks.npy, orbits.sp3,
// stations.csv, events.csv, crossings.csv).
//
// Clock bias b is the clock reading minus reference time, in seconds (RINEX
// clock sign). Epochs are integer nanoseconds on GPS time; durations inside a
// run are float64 seconds since the first epoch.
package sim
