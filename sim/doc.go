// Package sim assembles synthetic clock products from a configuration:
// geometry sampling, per-clock noise, injected walls, clock solutions
// relative to a reference clock, nuisances, and the writers of the dataset
// directory (manifest.json, clocks.clk, clocks.csv, clocks.npy, orbits.sp3,
// stations.csv, events.csv, crossings.csv, nuisances.csv).
//
// Clock bias b is the clock reading minus reference time, in seconds (RINEX
// clock sign). Epochs are integer nanoseconds on GPS time (orbits.Time);
// durations inside a run are float64 seconds since the first epoch.
//
// # Run
//
// Run builds the geometry (Walker constellations or a RINEX navigation file,
// plus stations), then for every clock independently: its noise
// (noise.Preset of its family, h_α optionally overridden by the scenario),
// the phase perturbation of every wall (inject: crossing solved on the
// clock's celestial trajectory, rendered in closed form within 40 τ of the
// crossing, the full step after), the optional relativistic term −2 r·v/c²
// of satellites, and its own phase and frequency jumps. Every series is then
// referred to the reference, b_j = x_j − Σ_k w_k x_k (one clock or a
// weighted ensemble, switched at the scenario's reference changes), so the
// reference's own crossing appears, negated, in every series (physics.md
// §3.4). Product-level artefacts follow: daily-batch offsets (an
// independent normal offset per batch and clock; the sole reference clock,
// whose series is zero, gets none), outliers (not on the sole reference),
// random gaps and outages (NaN). Every artefact is one row of nuisances.csv:
// kind, clock, start time, duration, and size (s for phase_jump, outlier
// and batch_step — the batch_step value is the jump at that boundary —,
// dimensionless for freq_jump; a reference_change row names the new
// reference).
//
// Randomness: each (run seed, trial, clock, purpose) has its own stream
// (SeedStream), so the bytes written do not depend on the number of
// workers. The cost grows linearly with the number of clocks and, for the
// flicker noise terms (FFT convolution), as N log N with the number of
// epochs N; walls cost O(clocks × (walls·window + N)).
package sim
