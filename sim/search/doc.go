// Package search is the reference pipeline of wallcross: a matched-filter
// search for planar domain walls sweeping a GNSS clock network. It reads a
// dataset (clock solutions relative to a reference clock, plus the clock
// positions) and writes a candidate list in the contract format of
// DESIGN.md §5 (t0_s, stat, nx, ny, nz, speed_m_s, thickness_m, ...).
//
// # Pipeline
//
//  1. Pseudo-frequency. y_j(k) = [b_j(t_{k+1}) − b_j(t_k)]/τ0 per clock
//     (dimensionless), on the intervals [t_k, t_{k+1}]; an interval
//     touching a gap is missing, so differencing restarts after each gap
//     (detection.md §1.5 item 2). Each clock's median frequency offset is
//     removed and samples beyond Config.Clip robust σ are clipped
//     (winsorised), which bounds the weight of outliers and phase jumps.
//  2. Noise model. Every series is "clock minus reference", so at one
//     interval the covariance of the pseudo-frequencies is
//     C = diag(σ_j²) + σ_r²·11ᵀ (detection.md §1.5 item 4), with σ_j the
//     clock's own white-frequency scale and σ_r the reference's. The total
//     scale s_j² = σ_j² + σ_r² is the squared normalised median absolute
//     deviation (MAD × 1.4826) of y_j, and σ_r² is the median over clock
//     pairs of (s_i² + s_j² − s_{i−j}²)/2, where s_{i−j} is the robust scale
//     of y_i − y_j (the common mode cancels in the difference). C⁻¹ is
//     applied in closed form with the Sherman–Morrison formula
//     (ApplyInverse), O(N) per interval, over the clocks present at that
//     interval. Optionally (Config.Whiten = p) every series is first
//     filtered by one shared AR(p) prediction-error filter A (Levinson–Durbin
//     on the pooled sample autocovariance), and templates are filtered by
//     the same A, so the statistic is (A·u)ᵀC⁻¹(A·y). A filter shared by all
//     series keeps the common-mode term rank one (the reference's noise
//     passes through the same A in every series); it whitens exactly only
//     when the clocks' noise spectra have a common shape, which is why a
//     per-clock filter is not used.
//  3. Templates. For a wall of velocity direction n̂ (celestial frame),
//     normal speed v, thickness d and geocentre time t0, clock j is crossed
//     at t_j = t0 + n̂·r_j(t_j)/v (physics.md §3.1). The bank solves this
//     with a first guess and one Newton step on the clock's projection
//     n̂·r_j tabulated at the data epochs (linear interpolation), which
//     agrees with the bracketing solver of package inject (inject.Wall.Cross)
//     to better than 1 ms (TestCrossingAgainstInject); inject's solver itself
//     is exact but costs ~10 position evaluations per crossing, too many for
//     the ~10⁹ crossings of a bank. The frequency template of clock j is its
//     sensitivity K_j times the wall profile averaged exactly over each
//     sample interval (inject.Profile.Between), normalised to a unit bias
//     step; a thin wall (d = 0) is a single spike of 1/τ0 in the interval
//     containing t_j. Because every series is referred to the reference
//     clock r, the template of series j is K_j·g_j − K_r·g_r: the
//     reference's own crossing appears with opposite sign in every series.
//  4. Statistic. For one template u and data y the matched-filter SNR is
//     ρ = uᵀC⁻¹y / sqrt(uᵀC⁻¹u), and the least-squares amplitude is
//     Â = uᵀC⁻¹y / uᵀC⁻¹u — the bias step of a clock with K = 1, in s.
//     The reported statistic at each t0 is max |ρ| over the bank (the
//     coupling sign is unknown), and one amplitude is fitted per coupling
//     class (the set of K_j used: "eff" = 1 for every clock, or a key of the
//     clocks' sensitivity coefficients in the manifest).
//  5. Candidates. Grid points with stat ≥ Config.Threshold are clustered in
//     time by non-maximum suppression (the loudest point absorbs every point
//     within ±Config.ClusterWindow, repeatedly) and each kept point is
//     reported with its template parameters.
//
// # Bank
//
// Directions: a Fibonacci (golden-angle) lattice, which is near equal-area,
// with spacing Δθ ≈ v_min·τ0/(2R) for network radius R — the angle that
// moves the outermost clock's crossing by half a sample — so
// N_dir ≈ 4π/Δθ², capped at Config.MaxDirections (default 2,000). For GPS
// (R ≈ 26,600 km), 30-s data and v_min = 150 km/s that is ≈ 1,750.
// Speeds: geometric steps from 150 to 700 km/s, 8 classes (a relative step
// of ≈ 1.25 shifts the outermost lag by ≈ half a sample at 300 km/s).
// Thicknesses: 0 (thin) by default; thick classes (Config.Thicknesses) use
// kernels spanning ±2τ, τ = d/v. t0: Config.T0Substeps grid points per
// sample interval (default 2).
//
// # Cost model
//
// A naive bank costs directions × speeds × thicknesses × couplings × t0
// points × clocks × (template length) multiply-adds, and the full
// covariance would add a clocks² factor. Three things cut it:
//
//   - C⁻¹y is computed once per dataset (O(clocks × epochs)), so each
//     template's numerator uᵀC⁻¹y is a sum of shifted per-clock series: for
//     each clock, the whitened series at its crossing interval times the
//     kernel (one term for a thin wall). This is shift-and-add on the time
//     grid: O(templates × clocks × t0 points).
//   - The denominator uᵀC⁻¹u is exact through Sherman–Morrison: per
//     template and t0, the kernels are accumulated into a short buffer of
//     the ~2R/(v·τ0) intervals the sweep spans, then each interval adds
//     Q − 2RG + R²W − γ(G − RW)² (see scan.go), O(clocks) and not O(clocks²).
//   - Crossing times depend only on (n̂, v, t0): they are solved once and
//     shared by every thickness and coupling class, and the projections
//     n̂·r_j are tabulated once per direction (O(clocks × epochs)). t0 is
//     scanned in blocks of 32 grid points; per clock and block one exact
//     solve adds a node, and the cubic through four nodes gives the
//     crossing anywhere in the block.
//   - Lane form (thin walls). Over a block most clocks keep the same lag
//     in whole intervals (the lag changes by ≲ 0.8 interval per block for
//     a satellite at 150 km/s), so for each of the block's t0 lanes (one
//     per t0 point within an interval) the crossing interval steps by one
//     with t0: the numerator is a contiguous multiply-add of the clock's
//     series, and where the clock has no gap the Q and G terms of the
//     denominator are one constant per lane. Blocks where a lag changes
//     take runs of one lag (one t0 per interval) or the per-point path.
//     About 90 % of clock-blocks take the lane form on the benchmark day.
//
// The total is ≈ directions × speeds × t0 points × clocks × (c1 + c2 ×
// thicknesses × couplings × kernel length) operations; for thin walls in
// lane form c1 is a fraction of one multiply-add per t0 point plus a
// per-block cost per clock (one solve, the cubic's range, the lane set-up),
// which dominates at 32 points per block. Thick kernels depend on the
// crossing phase and take the per-point path: a 1e4 km class costs ≈ 9×
// a thin one on the benchmark day (measured with the ScanDirection set-up). Directions are
// independent jobs for a pool of Config.Workers goroutines; each worker
// keeps its own per-t0 maxima, merged with a total order (larger stat,
// then lower template index), so the output does not depend on the worker
// count. BenchmarkSearchDay reports the throughput in template·clock·epoch
// evaluations per second.
//
// Units: SI inside; times are s since the dataset's first epoch (Network.Start
// is integer ns on GPS time), positions m in the celestial (GCRS-like)
// frame of package orbits, pseudo-frequencies dimensionless.
package search
