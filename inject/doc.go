// Package inject models transient dark-matter domain walls and their effect
// on clocks: wall profiles, amplitude from the dark-matter density, speed,
// encounter interval and thickness, couplings and clock sensitivity
// coefficients, the standard-halo-model population, the crossing solver and
// exact per-interval rendering of the clock signal.
//
// Units: SI inside (metres, seconds, m/s); energies in GeV where the
// physics literature quotes them (A and Λ in GeV, ρ_DM in GeV/m³ inside,
// GeV/cm³ only at the edges: multiply by GeVPerCm3 = 1e6). Times are float64
// seconds relative to a run's start epoch. Trajectories are plain functions
// of time in the celestial frame (Trajectory), so this package imports no
// other wallcross package. Formulas follow ../shared/reference/physics.md
// (cited as physics.md §n); numbers marked there "from memory" are marked so
// here too.
//
// # Geometry
//
// A Wall is a plane with unit normal N (celestial frame) moving along N at
// normal speed v relative to the geocentre; its centre plane passes the
// geocentre at T0. A clock at r(t) is at signed distance
//
//	x(t) = N·r(t) − v·(t − T0)
//
// ahead of the centre plane. Wall.Cross solves x(t_c) = 0 on the clock's
// celestial trajectory (satellite motion and Earth rotation included through
// the Trajectory): the root of this decreasing function (|ṙ| ≪ v) is
// bracketed from the straight-line guess t = T0 + N·r(T0)/v and refined by
// secant steps safeguarded by bisection to CrossTolerance (1e-9 s); the
// residual |x(t_c)|/v must be below 1 µs or Cross fails. The relative normal
// speed v_rel = v − N·ṙ(t_c) comes from a ±0.5 s central difference.
//
// # Profiles
//
// With the time-like coordinate u = (t − t_c)/τ, τ = d/v (physics.md §3.2:
// the clock sees φ²(v⊥·(t − t_j)); u = −x/d in the approximation below), the
// clock sees
//
//	δν/ν(t) = Γ·Aⁿ·s(u),   X(t) = ∫_{−∞}^{t} δν/ν dt′ = Γ·Aⁿ·τ·S(u)
//
// with Γ the clock's effective coupling and n = 2 (quadratic) or 1 (linear):
//
//	gaussian     φ² = A²·exp(−x²/d²)        s = e^{−u²}        S = (√π/2)·erfc(−u)   C_p = √π
//	kink         φ = A·tanh(x/d), φ²−A² = −A²·sech²(x/d)
//	                                         s = −sech²u        S = −(1 + tanh u)     C_p = −2
//	tophat       φ² = A² for |x| < d/2       s = 1 (|u| < ½)    S = clamp(u+½, 0, 1)  C_p = 1
//	kink-linear  δν/ν = Γ·φ, ahead value absorbed
//	                                         s = 1 + tanh u     S = ln(1 + e^{2u})    (ramp)
//
// (physics.md §1.1, §3.2, §3.6). d sits in φ², not in φ, for the Gaussian
// (papers differ by √2 in d). The bias step is ΔT = Γ·Aⁿ·τ·C_p; for the
// Gaussian ΔT = √π·Γ·A²·d/v (physics.md §3.3), the same for every clock of
// one sensitivity. Wall.ClockMotion instead uses each clock's relative
// normal speed, τ = d/v_rel with v_rel = v − N·ṙ(t_c): the time the clock
// really spends in a thin wall, 1.3 % different for GPS satellites at
// 300 km/s. The crossing time t_c always includes the clock's motion. The
// linear kink has no step: its bias ramps at Δy = 2·Γ·A after the crossing
// and asymptotes to Δy·(t − t_c) exactly (its Step is NaN).
//
// # Amplitude
//
// From the dark-matter density (physics.md §1.2, the order-of-magnitude
// relation ρ_DM = σ/L with σ ~ A²/d and L = v̄T of Derevianko & Pospelov 2014):
//
//	A² [GeV²] = ħc [GeV·m] · ρ_DM [GeV/m³] · v̄ [m/s] · T [s] · d [m]
//
// with ħc = 1.973269804e-16 GeV·m (CODATA 2018, from memory), 1 GeV/cm³ =
// 1e6 GeV/m³, v̄ the population's typical speed and T the mean time between
// encounters. With the kink's own tension σ = (4/3)A²/(ħc·d), A² is
// multiplied by 3/4 (AmplitudeSpec.KinkTension). Alternatively A² follows
// from a given peak |δν/ν| = |Γ|·Aⁿ·|s|max or a given bias step
// |ΔT| = |Γ·C_p|·A²·d/v of the reporting clock, or is given directly
// (AmplitudeSpec).
//
// # Couplings and sensitivity coefficients
//
// Quadratic portal (physics.md §2.1, [DP14]): δX/X = Γ_X·φ², Γ_X = ±1/Λ_X²,
// X ∈ {α, m_e, m_q}; linear portal δX/X = ±φ/Λ′_X. A clock responds with
// δν/ν = Σ_X K_X·δX/X, so Γ_eff = Σ_X K_X·Γ_X and Λ_eff = |Γ_eff|^{−1/2}
// (physics.md §2.2). Coupling either gives one Λ_eff with a sign for every
// clock (CouplingEff), or Λ_α, Λ_me, Λ_mq with signs (CouplingPerConstant),
// combined with each family's coefficients (Sensitivity). The response to
// m_q is K_mq = κ_q + K_mp·0.05 (proton mass through the σ-term, from
// memory). Conventions (physics.md §2.3): R, "atomic units" (ν = cR_∞·F(α,
// μ, X_q); hyperfine K_α = 2 + K_rel, K_me = 1, K_mp = −1) and A,
// "absolute" (K_α += 2, K_me += 1, for clocks hit at different times,
// [KB19]). Values: H 2.00/κ_q −0.100, Rb-87 2.34/−0.019, Cs-133 2.83/+0.002
// (convention R; [FT06, Dinh09], from memory). Quartz has no tabulated
// coefficients and is insensitive under CouplingPerConstant; CouplingEff
// applies Λ_eff to every clock, quartz included, and ignores the
// convention. The truth catalogue reports Λ_eff and the peak δν/ν of the
// reporting clock (Γ_eff itself, or Coupling.ReportFamily).
//
// # Approximation within a crossing
//
// Rendering treats the clock's distance to the wall as linear in time near
// the crossing: by default x(t) ≈ −v·(t − t_c), the clock's motion kept only
// in t_c (an error of at most |N·ṙ|/v, 1.3 % of the pulse width for GPS
// satellites at 300 km/s); with Wall.ClockMotion x(t) ≈ −v_rel·(t − t_c),
// whose error is second order. The term neglected there is the clock's
// acceleration along N, |a_N| ≤ a_max (GM/r² = 0.56 m/s² for a GPS orbit,
// 0.034 m/s² for a station): over |t − t_c| ≤ kτ the position error is
// |δx| ≤ a_max·(kτ)²/2, i.e. |δu| ≤ a_max·k²·d/(2·v_rel²), and the local
// rate, hence the pulse area, is off by at most a_max·kτ/v_rel. For d = 1e7 m
// at 300 km/s (τ = 33 s, k = 3) this is 2.8e-4 in u and 1.9e-4 in area; for
// d = 1e8 m (τ = 333 s) 2.8e-3 and 1.9e-3. It breaks down for walls whose
// crossing lasts a good fraction of an orbit (τ ≳ 1 h), where it would also
// give each satellite a spurious speed-dependent step (v/v_rel differs by
// up to ±1.3 % between satellites). Crossing.LinearError reports the local
// bound; for such walls RenderPhaseAlong integrates the profile along the
// trajectory itself, u(t) = (v·(t − T0) − N·r(t))/d, by 5-point
// Gauss–Legendre on pieces ≤ min(τ/10, 300 s) (exact edge times for the
// top-hat), agreeing with independent quadrature to 1e-9 of the step.
//
// # Rendering
//
// Crossing.PhaseAt evaluates X(t) in closed form (erf/erfc, tanh, piecewise
// linear, softplus); Crossing.MeanFrequency gives the exact average
// [X(t_b) − X(t_a)]/(t_b − t_a), evaluated without cancellation in the tails,
// so sampling never aliases a thin wall: a wall with d/v ≪ τ0 keeps its full
// area in one or two intervals. RenderPhase, RenderPhaseGrid and
// RenderFrequency add into caller-owned slices so signals sum with noise.
//
// # Population
//
// Population.Sample draws Poisson arrivals (exponential gaps of mean T) over
// the span and, for each wall, a velocity from the standard halo model
// (Halo): a Maxwellian with σ_1D = v0/√2 truncated at v_esc in the galactic
// rest frame, seen from the geocentre moving at v_sun (+ optionally the
// Earth's orbital velocity of Lee, Lisanti & Safdi 2013, from memory), with
// the wall normal either along the relative velocity (OrientAlongVelocity)
// or isotropic with normal speed v⊥ = v·n̂ (OrientIsotropic). Galactic
// vectors are rotated to ICRS with the transpose of the Hipparcos ICRS →
// galactic matrix (ESA 1997, Hipparcos Catalogue Vol. 1 §1.5.3; checked
// against erfa.icrs2g). Every draw takes an explicit *rand.Rand. Walls whose
// normal speed falls below MinSpeed (default 20 km/s, well above any clock's
// speed so the crossing is unique) are redrawn; FluxWeighted weights the
// draws by v⊥ (encounter rate ∝ v⊥). Describe states the model for the
// manifest. Population.Explicit replaces the draws by given arrivals.
// EquinoxOffset gives Halo.EquinoxT from the run start (mean equinox).
//
// # Use
//
//	walls, err := pop.Sample(rng)               // truth: walls[i].Event()
//	for each wall w, for each clock j:
//	    c, err := w.Cross(id_j, family_j, traj_j) // truth: c.Record()
//	    if c.LinearError() > 1e-2 {               // crossing lasts a good part of an orbit
//	        err = inject.RenderPhaseAlong(bias_j, times, &w, c, traj_j)
//	    } else {
//	        err = inject.RenderPhase(bias_j, times, c) // adds Δx_j(t) [s]
//	    }
//
// crossings.csv's step_s is Crossing.Step (NaN for the linear kink, whose
// bias ramps instead of stepping); events.csv's lambda_eff_gev and peak_dnu
// are those of the reporting clock.
//
// All types are plain values and all functions are free of shared state, so
// walls and crossings may be rendered from many goroutines at once.
package inject
