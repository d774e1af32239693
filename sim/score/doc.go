// Package score turns a pipeline's candidate list and a dataset's truth
// catalogue into detection efficiency, false-alarm rates, ROC tables,
// efficiency-curve fits and projected exclusion limits on the effective
// coupling scale Λ_eff.
//
// # Matching
//
// A candidate (CSV with at least t0_s and stat; see ReadCandidates) matches
// an injected wall (events.csv) when |t0_cand − t0_true| ≤ Window/2 and, if a
// direction tolerance is set, when the angle between the candidate's and the
// true velocity direction is at most that tolerance. Matching is greedy and
// one-to-one: candidates are taken in order of decreasing stat and each
// takes the unmatched wall closest in time. The default window is
// 2·R_max/v_min: R_max is the largest geocentric radius of any clock in the
// dataset (stations.csv, orbits.sp3, and the crossing lags in crossings.csv),
// v_min the slowest injected speed; a wall's crossings of all clocks then
// lie within ±Window/2 of its t0.
//
// # Gaps
//
// An injection is "in a gap" when fewer than half of the clocks of the
// data (clocks.csv, or the RINEX clock file of a directory without it) have
// at least one sample within ±Window/2 of its t0. Such
// injections are counted separately and left out of every efficiency
// (detection.md §2.1); candidates matched to them are not false alarms.
//
// # Intervals and limits
//
// Efficiencies carry Wilson score and Clopper–Pearson (exact) binomial
// intervals at EfficiencyCL (two-sided). Limits use the zero-event Poisson
// condition ε·T_obs/T ≥ −ln(1−CL) with ε replaced by its Clopper–Pearson
// lower bound, which makes them conservative (detection.md §2.4 item 7).
// Efficiency is measured per grid cell at fixed (d, Λ_eff); the excluded
// Λ_eff at each d is the largest Λ_eff whose lower bound satisfies the
// condition, interpolated in log Λ_eff towards the next cell. The bias step
// scales as T·d²/Λ_eff² (A² = ħc·ρ_DM·v·T·d, physics.md §3.3), so a table
// made with mean interval T_inj serves any T after rescaling Λ_eff by
// √(T/T_inj). No limit exists at all when T > T_obs/(−ln(1−CL)).
//
// Units: SI throughout (s, m, m/s); Λ_eff in GeV as in events.csv; time
// stamps are seconds since the first epoch of the dataset, as in the
// dataset files.
package score
